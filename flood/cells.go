package flood

import "math"

// partitionSw returns the pore-volume weighted water saturation of the
// cells whose partition is well w, or NaN when there are none (or no
// partition).
func partitionSw(partition []int, pv, sw []float64, w int) float64 {
	if partition == nil {
		return math.NaN()
	}
	s, v := 0.0, 0.0
	for c, p := range partition {
		if p == w {
			s += pv[c] * sw[c]
			v += pv[c]
		}
	}
	if v == 0 {
		return math.NaN()
	}
	return s / v
}

// cellMap copies a saturation array for a snapshot, NaN in inactive cells.
func cellMap(active []bool, sw []float64) []float64 {
	out := make([]float64, len(sw))
	for c := range out {
		if active[c] {
			out[c] = sw[c]
		} else {
			out[c] = math.NaN()
		}
	}
	return out
}

// massBalance returns (injected - produced - change of water in place) /
// injected, with the water in place from the cell saturations; 0 when
// nothing was injected.
func massBalance(active []bool, pv, sw []float64, swi, injected, produced float64) float64 {
	if !(injected > 0) {
		return 0
	}
	dW := 0.0
	for c, v := range sw {
		if active[c] {
			dW += pv[c] * (v - swi)
		}
	}
	return (injected - produced - dW) / injected
}

package calibrate

import (
	"math"
	"sort"
)

// shiftSteps is the number of candidate shifts tried each side of zero.
const shiftSteps = 400

// generalizedShift returns the time shift Δ, days, that best aligns the
// model water-cut curve (mt, mwc: times ascending, values) with the
// observed one (ot, owc): the Δ minimising Σ_k (owc_k - mwc(ot_k - Δ))²
// over Δ in [-window, window], the generalized travel time of He,
// Datta-Gupta and Yoon (2002, eq. 2: the shift maximising the coefficient
// of determination between the two curves). A positive Δ means the model
// curve must be delayed: its water comes too early. Candidates are tried
// on a grid of window/shiftSteps and the best refined by a parabola
// through its neighbours; among equal fits the smallest |Δ| wins. NaN
// when no shift changes the fit (the model curve is flat over the times
// it is sampled at) or there is no observation.
func generalizedShift(ot, owc, mt, mwc []float64, window float64) float64 {
	if len(ot) == 0 || len(mt) == 0 || !(window > 0) {
		return math.NaN()
	}
	h := window / shiftSteps
	cost := func(d float64) float64 {
		s := 0.0
		for k, t := range ot {
			e := owc[k] - interp(mt, mwc, t-d)
			s += e * e
		}
		return s
	}
	best, bestC := 0.0, cost(0)
	worst := bestC
	for i := 1; i <= shiftSteps; i++ {
		for _, d := range []float64{float64(i) * h, -float64(i) * h} {
			cd := cost(d)
			worst = math.Max(worst, cd)
			if cd < bestC-1e-12*math.Max(1, bestC) {
				best, bestC = d, cd
			}
		}
	}
	if worst-bestC <= 1e-12*math.Max(1, worst) {
		return math.NaN()
	}
	// Parabolic refinement.
	a, b := cost(best-h), cost(best+h)
	if den := a - 2*bestC + b; den > 0 {
		off := 0.5 * h * (a - b) / den
		if math.Abs(off) < h && cost(best+off) <= bestC {
			best += off
		}
	}
	return best
}

// interp is the piecewise linear interpolation of (x, y) at t, constant
// beyond the ends (before the first time, the first value).
func interp(x, y []float64, t float64) float64 {
	if t <= x[0] {
		return y[0]
	}
	n := len(x)
	if t >= x[n-1] {
		return y[n-1]
	}
	i := sort.SearchFloat64s(x, t)
	f := (t - x[i-1]) / (x[i] - x[i-1])
	return y[i-1] + f*(y[i]-y[i-1])
}

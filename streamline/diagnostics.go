package streamline

import (
	"math"
	"sort"
)

// Diagnostics is the time-of-flight summary of a set of streamlines: the
// F-Phi curve, its Lorenz coefficient and the sweep efficiency.
type Diagnostics struct {
	// Phi and F sample the F-Phi curve (FPhi) at evenly spaced storage
	// capacities; nil when no cell has a positive, finite pore volume and
	// travel time.
	Phi, F []float64
	// TD and Ev are the sweep efficiency against dimensionless time
	// (Sweep), from the full curve.
	TD, Ev []float64
	// Lorenz is the dynamic Lorenz coefficient of the full curve (Lorenz):
	// 0 when the result has no line (nothing flows), NaN for a curve that
	// is not valid.
	Lorenz float64
}

// Diagnostics returns the F-Phi curve, Lorenz coefficient and sweep
// efficiency of the traced field for the cell pore volumes pv, with each
// cell's total travel time the sum of its TOF and BackTOF. The curve is
// resampled at samples evenly spaced storage capacities (0 keeps every
// point); the Lorenz coefficient and the sweep use the full curve.
func (r *Result) Diagnostics(pv []float64, samples int) Diagnostics {
	travel := make([]float64, len(r.TOF))
	for k := range travel {
		travel[k] = r.TOF[k] + r.BackTOF[k]
	}
	var d Diagnostics
	phi, F := FPhi(pv, travel)
	d.Lorenz = Lorenz(phi, F)
	d.TD, d.Ev = Sweep(phi, F)
	d.Phi, d.F = phi, F
	if samples > 1 {
		d.Phi, d.F = resample(phi, F, samples)
	}
	return d
}

// resample samples a monotone F-Phi curve at n evenly spaced storage
// capacities by linear interpolation.
func resample(phi, f []float64, n int) ([]float64, []float64) {
	if len(phi) == 0 {
		return nil, nil
	}
	ph := make([]float64, n)
	fo := make([]float64, n)
	for i := range ph {
		x := float64(i) / float64(n-1)
		ph[i] = x
		k := sort.SearchFloat64s(phi, x)
		switch {
		case k == 0:
			if phi[0] > 0 {
				fo[i] = f[0] * x / phi[0]
			} else {
				fo[i] = f[0]
			}
		case k >= len(phi):
			fo[i] = f[len(f)-1]
		default:
			x0, x1 := phi[k-1], phi[k]
			if x1 > x0 {
				fo[i] = f[k-1] + (f[k]-f[k-1])*(x-x0)/(x1-x0)
			} else {
				fo[i] = f[k]
			}
		}
	}
	return ph, fo
}

// FPhi returns the flow-capacity / storage-capacity curve of a set of
// cells (Shook and Mitchell 2009, from memory): the cells are sorted by
// total travel time ascending, phi is the cumulative pore-volume fraction
// and F the cumulative fraction of pv/travel (each cell's share of the
// flux). Cells whose pore volume or travel time is not positive and finite
// are left out. Both slices start with a (0, 0) point, so they hold one
// more value than the cells used. They are nil when no cell qualifies or
// the two inputs differ in length.
func FPhi(pv, travel []float64) (phi, F []float64) {
	if len(pv) != len(travel) {
		return nil, nil
	}
	idx := sortByTravel(pv, travel)
	if len(idx) == 0 {
		return nil, nil
	}
	phi = make([]float64, len(idx)+1)
	F = make([]float64, len(idx)+1)
	for m, k := range idx {
		phi[m+1] = phi[m] + pv[k]
		F[m+1] = F[m] + pv[k]/travel[k]
	}
	sp, sf := phi[len(idx)], F[len(idx)]
	for m := range phi {
		phi[m] /= sp
		F[m] /= sf
	}
	phi[len(idx)], F[len(idx)] = 1, 1
	return phi, F
}

// Lorenz returns the dynamic Lorenz coefficient of an F-Phi curve, twice
// the area between the curve and the diagonal: 0 for a homogeneous
// displacement, towards 1 for a very heterogeneous one (Shook and Mitchell
// 2009, from memory). The area is integrated by the trapezoid rule, exact
// for the piecewise-linear curve FPhi returns. It is NaN for a curve that
// is not a valid F-Phi curve (fewer than two points, lengths that differ,
// values that are not finite or decrease).
func Lorenz(phi, F []float64) float64 {
	if !validCurve(phi, F) {
		return math.NaN()
	}
	area := 0.0
	for m := 1; m < len(phi); m++ {
		area += 0.5 * (F[m] + F[m-1]) * (phi[m] - phi[m-1])
	}
	return 2 * (area - 0.5)
}

// Sweep returns the volumetric sweep efficiency Ev against dimensionless
// time tD (pore volumes injected) from an F-Phi curve (Shook and Mitchell
// 2009, from memory): on each segment of the curve tD = dPhi/dF and
// Ev = Phi + (1-F)*tD, evaluated at the segment's upper end (the moment
// the last cell of the segment is swept). Before the first breakthrough
// Ev = tD, so the first point is (0, 0). Segments with no flow (dF = 0)
// are skipped, and consecutive segments of the same slope (cells of equal
// travel time) give a single point. Both slices are nil for an invalid
// curve (see Lorenz).
func Sweep(phi, F []float64) (tD, Ev []float64) {
	if !validCurve(phi, F) {
		return nil, nil
	}
	// At most one point per segment: sized once, not grown by appends.
	tD, Ev = make([]float64, 1, len(phi)), make([]float64, 1, len(phi))
	for m := 1; m < len(phi); m++ {
		dF := F[m] - F[m-1]
		if !(dF > 0) {
			continue
		}
		t := (phi[m] - phi[m-1]) / dF
		e := phi[m] + (1-F[m])*t
		if n := len(tD); n > 1 && math.Abs(t-tD[n-1]) <= 1e-9*t {
			tD[n-1], Ev[n-1] = t, e
			continue
		}
		tD = append(tD, t)
		Ev = append(Ev, e)
	}
	return tD, Ev
}

func validCurve(phi, F []float64) bool {
	if len(phi) != len(F) || len(phi) < 2 {
		return false
	}
	for m := range phi {
		if !finite(phi[m]) || !finite(F[m]) {
			return false
		}
		if m > 0 && (phi[m] < phi[m-1] || F[m] < F[m-1]) {
			return false
		}
	}
	return true
}

// sortByTravel returns the cells whose pore volume and travel time are
// positive and finite, by travel time ascending and, for equal times, by
// cell: the order of a stable sort of the cell numbers by travel time. A
// positive float64 orders as its bit pattern, so the cells are sorted by
// a least-significant-digit radix sort of the bits (stable), 11 bits a
// pass, skipping the passes in which every cell has the same digit (the
// high bits of times within a few orders of magnitude): a few linear
// passes instead of a comparison sort of a million cells.
func sortByTravel(pv, travel []float64) []int32 {
	const bits = 11
	const digits = (64 + bits - 1) / bits
	var count [digits][1 << bits]int32
	n := 0
	for k := range pv {
		if pv[k] > 0 && finite(pv[k]) && travel[k] > 0 && finite(travel[k]) {
			n++
		}
	}
	if n == 0 {
		return nil
	}
	key := make([]uint64, n)
	idx := make([]int32, n)
	m := 0
	for k := range pv {
		if pv[k] > 0 && finite(pv[k]) && travel[k] > 0 && finite(travel[k]) {
			b := math.Float64bits(travel[k])
			key[m], idx[m] = b, int32(k)
			m++
			for d := range digits {
				count[d][(b>>(d*bits))&(1<<bits-1)]++
			}
		}
	}
	var key2 []uint64
	var idx2 []int32
	for d := range digits {
		c := &count[d]
		if c[(key[0]>>(d*bits))&(1<<bits-1)] == int32(n) {
			continue // one digit for all: the pass would not move anything
		}
		if key2 == nil {
			key2, idx2 = make([]uint64, n), make([]int32, n)
		}
		sum := int32(0)
		for v, cnt := range c {
			c[v] = sum
			sum += cnt
		}
		shift := uint(d * bits)
		for m, b := range key {
			v := (b >> shift) & (1<<bits - 1)
			at := c[v]
			c[v]++
			key2[at], idx2[at] = b, idx[m]
		}
		key, key2 = key2, key
		idx, idx2 = idx2, idx
	}
	return idx
}

package streamline

import (
	"math"
	"slices"
)

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
	// Sort (travel, cell) pairs: ties keep cell order, as a stable sort of
	// the cell numbers would, at a fraction of the cost on a million cells.
	type cell struct {
		t float64
		k int
	}
	cs := make([]cell, 0, len(pv))
	for k := range pv {
		if pv[k] > 0 && finite(pv[k]) && travel[k] > 0 && finite(travel[k]) {
			cs = append(cs, cell{travel[k], k})
		}
	}
	if len(cs) == 0 {
		return nil, nil
	}
	slices.SortFunc(cs, func(a, b cell) int {
		switch {
		case a.t < b.t:
			return -1
		case a.t > b.t:
			return 1
		}
		return a.k - b.k
	})
	idx := make([]int, len(cs))
	for m, c := range cs {
		idx[m] = c.k
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
	tD, Ev = []float64{0}, []float64{0}
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

package streamline

import (
	"errors"
	"fmt"
	"math"
	"slices"
)

// FPhi returns the flow-capacity / storage-capacity curve of a set of
// cells (Shook and Mitchell 2009, from memory): the cells are sorted by
// total travel time ascending, phi is the cumulative pore-volume fraction
// and F the cumulative fraction of pv/travel (each cell's share of the
// flux). Cells with a pore volume or travel time that is not positive and
// finite are left out. Both slices start with a 0 point, so they hold one
// more value than the cells used; they are empty when no cell qualifies.
func FPhi(pv, travel []float64) (phi, F []float64, err error) {
	if len(pv) != len(travel) {
		return nil, nil, fmt.Errorf("streamline: FPhi: %d pore volumes for %d travel times", len(pv), len(travel))
	}
	idx := make([]int, 0, len(pv))
	for k := range pv {
		if pv[k] > 0 && finite(pv[k]) && travel[k] > 0 && finite(travel[k]) {
			idx = append(idx, k)
		}
	}
	if len(idx) == 0 {
		return nil, nil, nil
	}
	slices.SortStableFunc(idx, func(a, b int) int {
		switch {
		case travel[a] < travel[b]:
			return -1
		case travel[a] > travel[b]:
			return 1
		}
		return 0
	})
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
	return phi, F, nil
}

// Lorenz returns the dynamic Lorenz coefficient of an F-Phi curve, twice
// the area between the curve and the diagonal: 0 for a homogeneous
// displacement, towards 1 for a very heterogeneous one (Shook and Mitchell
// 2009, from memory). The area is integrated by the trapezoid rule, which
// is exact for the piecewise-linear curve FPhi returns.
func Lorenz(phi, F []float64) (float64, error) {
	if err := checkCurve(phi, F); err != nil {
		return math.NaN(), err
	}
	area := 0.0
	for m := 1; m < len(phi); m++ {
		area += 0.5 * (F[m] + F[m-1]) * (phi[m] - phi[m-1])
	}
	return 2 * (area - 0.5), nil
}

// Sweep returns the volumetric sweep efficiency Ev against dimensionless
// time tD (pore volumes injected) from an F-Phi curve (Shook and Mitchell
// 2009, from memory): on each segment of the curve tD = dPhi/dF and
// Ev = Phi + (1-F)*tD, evaluated at the segment's upper end; before the
// first segment (breakthrough) Ev = tD. The first point is (0, 0).
// Segments with no flow (dF = 0) are skipped.
func Sweep(phi, F []float64) (tD, Ev []float64, err error) {
	if err := checkCurve(phi, F); err != nil {
		return nil, nil, err
	}
	tD, Ev = []float64{0}, []float64{0}
	for m := 1; m < len(phi); m++ {
		dF := F[m] - F[m-1]
		if !(dF > 0) {
			continue
		}
		t := (phi[m] - phi[m-1]) / dF
		tD = append(tD, t)
		Ev = append(Ev, phi[m]+(1-F[m])*t)
	}
	return tD, Ev, nil
}

func checkCurve(phi, F []float64) error {
	if len(phi) != len(F) {
		return fmt.Errorf("streamline: F-Phi curve has %d phi and %d F values", len(phi), len(F))
	}
	if len(phi) < 2 {
		return errors.New("streamline: F-Phi curve needs at least two points")
	}
	for m := range phi {
		if !finite(phi[m]) || !finite(F[m]) {
			return fmt.Errorf("streamline: F-Phi curve point %d is not finite", m)
		}
		if m > 0 && (phi[m] < phi[m-1] || F[m] < F[m-1]) {
			return fmt.Errorf("streamline: F-Phi curve decreases at point %d", m)
		}
	}
	return nil
}

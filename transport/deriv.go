package transport

import "math"

// ridders returns the derivative of f at x by Richardson extrapolation of
// finite differences with a shrinking step (Ridders 1982), using only
// points inside [lo, hi]. It uses central differences when x has room on
// both sides and one-sided differences at the ends of the interval. The
// extrapolation is started from three initial steps and the estimate with
// the smallest error estimate wins, which copes with curves that bend
// sharply near the ends (high viscosity ratios) without giving up accuracy
// elsewhere.
func ridders(f func(float64) float64, x, lo, hi float64) float64 {
	span := hi - lo
	if !(span > 0) || math.IsNaN(x) {
		return 0
	}
	room := math.Min(x-lo, hi-x)
	central := room >= 1e-4*span
	dir := 1.0
	if !central && x-lo > hi-x {
		dir = -1
	}
	best, bestErr := math.NaN(), math.Inf(1)
	for _, start := range [...]float64{0.05, 0.01, 0.002} {
		h := start * span
		if central {
			// Stay well inside the interval: the curve may be singular
			// at its ends (as sqrt is at 0), and the extrapolation needs
			// h well below the distance to a singularity.
			h = math.Min(h, 0.5*room)
		}
		d, e := richardson(f, x, h, dir, central)
		if e < bestErr || math.IsNaN(best) {
			best, bestErr = d, e
		}
	}
	return best
}

// richardson runs one Ridders (1982) tableau from step h and returns the
// best estimate and its error estimate.
func richardson(f func(float64) float64, x, h, dir float64, central bool) (float64, float64) {
	const (
		levels = 12
		shrink = 1.4
		safe   = 2.0
	)
	diff := func(h float64) float64 {
		if central {
			return (f(x+h) - f(x-h)) / (2 * h)
		}
		return (f(x+dir*h) - f(x)) / (dir * h)
	}
	// Error series: even powers of h for central differences, all powers
	// for one-sided ones.
	ratio := shrink
	if central {
		ratio = shrink * shrink
	}
	var tab [levels][levels]float64
	tab[0][0] = diff(h)
	best, bestErr := tab[0][0], math.Inf(1)
	for i := 1; i < levels; i++ {
		h /= shrink
		tab[0][i] = diff(h)
		fac := ratio
		for j := 1; j <= i; j++ {
			tab[j][i] = (tab[j-1][i]*fac - tab[j-1][i-1]) / (fac - 1)
			fac *= ratio
			e := math.Max(math.Abs(tab[j][i]-tab[j-1][i]), math.Abs(tab[j][i]-tab[j-1][i-1]))
			if e <= bestErr {
				bestErr, best = e, tab[j][i]
			}
		}
		if math.Abs(tab[i][i]-tab[i-1][i-1]) >= safe*bestErr {
			break
		}
	}
	return best, bestErr
}

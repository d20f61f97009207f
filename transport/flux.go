package transport

import (
	"errors"
	"fmt"
	"math"
)

// fluxIntervals is the number of table intervals on [0, 1]; with exact
// slopes at the nodes, cubic Hermite interpolation errs by about h^4/384
// times the fourth derivative of fw (h = 1/1024), far below the error of
// the schemes for usual Corey curves.
const (
	fluxIntervals = 1024
	fluxBins      = 64
)

// Flux is a fractional-flow curve tabulated for the explicit schemes of
// Advance: cubic Hermite interpolation of fw and fw' at 1025 equally spaced
// saturations on [0, 1] (evaluation costs a few multiplications instead of
// powers), and a table of the largest |fw'| over 64 bins of saturation that
// bounds the wave speed of any range of saturations for the CFL condition.
// A Flux is read-only after construction and safe for concurrent use.
type Flux struct {
	f, d [fluxIntervals + 1]float64
	// poly holds, per interval, the Hermite cubic as c0 + t(c1 + t(c2 + t c3))
	// in the local coordinate t in [0, 1]: one cache line per evaluation.
	poly   [fluxIntervals][4]float64
	binMax [fluxBins]float64
	// span[a][b] is the largest binMax over the bins a..b (a <= b).
	span [fluxBins][fluxBins]float64
	// unsafe[k] counts the intervals before k on which the cubic may
	// leave [0, 1] (so that Fw's clamp may act there; see clampFree).
	unsafe [fluxIntervals + 1]int32
}

// NewFlux tabulates c. It returns an error if fw is not finite somewhere on
// [0, 1]; a non-finite slope (a Corey water exponent below 1 at connate
// water) is replaced by the neighbouring chord slope.
func NewFlux(c Curve) (*Flux, error) {
	if c == nil {
		return nil, errors.New("transport: flux table without a fractional-flow curve")
	}
	fl := &Flux{}
	const h = 1.0 / fluxIntervals
	for k := range fl.f {
		s := float64(k) * h
		fl.f[k] = c.Fw(s)
		if !finite(fl.f[k]) {
			return nil, fmt.Errorf("transport: fractional flow not finite at s=%g", s)
		}
		fl.d[k] = c.DFw(s)
	}
	for k := range fl.d {
		if finite(fl.d[k]) {
			continue
		}
		switch {
		case k == 0:
			fl.d[k] = (fl.f[1] - fl.f[0]) / h
		case k == fluxIntervals:
			fl.d[k] = (fl.f[k] - fl.f[k-1]) / h
		default:
			fl.d[k] = (fl.f[k+1] - fl.f[k-1]) / (2 * h)
		}
	}
	for k := range fl.poly {
		f0, f1 := fl.f[k], fl.f[k+1]
		d0, d1 := fl.d[k]*h, fl.d[k+1]*h
		fl.poly[k] = [4]float64{f0, d0, 3*(f1-f0) - 2*d0 - d1, 2*(f0-f1) + d0 + d1}
	}
	// Largest speed per bin: node slopes, and the interpolant's slope at
	// interval quarter points (it may exceed the node values slightly).
	const per = fluxIntervals / fluxBins
	for b := range fl.binMax {
		m := 0.0
		for k := b * per; k < (b+1)*per; k++ {
			m = math.Max(m, math.Abs(fl.d[k]))
			m = math.Max(m, math.Abs(fl.d[k+1]))
			for _, t := range [...]float64{0.25, 0.5, 0.75} {
				m = math.Max(m, math.Abs(fl.DFw((float64(k)+t)*h)))
			}
		}
		fl.binMax[b] = m
	}
	for k := range fl.poly {
		fl.unsafe[k+1] = fl.unsafe[k]
		if !cubicInside(fl.poly[k]) {
			fl.unsafe[k+1]++
		}
	}
	for a := range fl.span {
		m := 0.0
		for b := a; b < fluxBins; b++ {
			m = math.Max(m, fl.binMax[b])
			fl.span[a][b] = m
		}
	}
	return fl, nil
}

// Fw returns the interpolated fractional flow at s, clamped to [0, 1]. The
// cubic may leave [0, 1] by round-off-sized amounts (about 1e-11) on the
// interval holding a kink of the curve at an end point of the mobile range;
// the clamp is here, once, so that the transport of Advance and every
// caller's bookkeeping see the same value and water is conserved.
func (fl *Flux) Fw(s float64) float64 { return clampFw(fl.cubic(s)) }

// clampFw is Fw's clamp to [0, 1], apart so that the transport sweeps can
// inline Fw as clampFw(fl.cubic(s)) (Fw itself is over the inliner's
// budget).
func clampFw(v float64) float64 {
	if v < 0 {
		return 0
	}
	if v > 1 {
		return 1
	}
	return v
}

// cubic is Fw without its clamp to [0, 1]: the end values outside the
// table, the interval's cubic inside. Small enough to be inlined into the
// transport sweeps.
func (fl *Flux) cubic(s float64) float64 {
	x := s * fluxIntervals
	switch {
	case !(x > 0):
		return fl.f[0]
	case x >= fluxIntervals:
		return fl.f[fluxIntervals]
	}
	k := int(x)
	t := x - float64(k)
	c := &fl.poly[k&(fluxIntervals-1)] // k < fluxIntervals: no bounds check
	return c[0] + t*(c[1]+t*(c[2]+t*c[3]))
}

// DFw returns the slope of the interpolant at s (0 outside [0, 1]).
func (fl *Flux) DFw(s float64) float64 {
	x := s * fluxIntervals
	if x < 0 || x > fluxIntervals || math.IsNaN(x) {
		return 0
	}
	k := min(int(x), fluxIntervals-1)
	t := x - float64(k)
	const h = 1.0 / fluxIntervals
	df := (fl.f[k+1] - fl.f[k]) / h
	// Derivatives of the Hermite basis functions, divided by h.
	return 6*t*(1-t)*df + (1-4*t+3*t*t)*fl.d[k] + (3*t*t-2*t)*fl.d[k+1]
}

// MaxSpeed returns an upper bound of |fw'| over the saturations between lo
// and hi (in either order), from the bin table.
func (fl *Flux) MaxSpeed(lo, hi float64) float64 {
	if lo > hi {
		lo, hi = hi, lo
	}
	b0 := int(math.Floor(lo * fluxBins))
	b1 := int(math.Floor(hi * fluxBins))
	b0 = min(max(b0, 0), fluxBins-1)
	b1 = min(max(b1, 0), fluxBins-1)
	return fl.span[b0][b1]
}

// cubicInside reports whether c0 + t(c1 + t(c2 + t c3)) lies within
// [margin, 1-margin] for every t in [0, 1], margin 1e-12: its values at the
// ends and at the zeros of its derivative in (0, 1). The margin is far
// above the rounding of the evaluation (about 1e-15 for coefficients of
// size 10), so on such an interval Fw's clamp never acts.
func cubicInside(c [4]float64) bool {
	const margin = 1e-12
	p := func(t float64) float64 { return c[0] + t*(c[1]+t*(c[2]+t*c[3])) }
	ok := func(v float64) bool { return v >= margin && v <= 1-margin }
	if !ok(p(0)) || !ok(p(1)) {
		return false
	}
	// p'(t) = c1 + 2 c2 t + 3 c3 t^2.
	a, b, d := 3*c[3], 2*c[2], c[1]
	var roots []float64
	switch {
	case a == 0 && b != 0:
		roots = append(roots, -d/b)
	case a != 0:
		if disc := b*b - 4*a*d; disc >= 0 {
			q := math.Sqrt(disc)
			roots = append(roots, (-b+q)/(2*a), (-b-q)/(2*a))
		}
	}
	for _, t := range roots {
		if t > 0 && t < 1 && !ok(p(t)) {
			return false
		}
	}
	return true
}

// clampFree reports whether Fw's clamp cannot act for any saturation
// within one table interval of [lo, hi] (lo <= hi): the cubic of every
// interval there stays inside [0, 1] (cubicInside).
func (fl *Flux) clampFree(lo, hi float64) bool {
	k0, k1 := int(lo*fluxIntervals)-1, int(hi*fluxIntervals)+1
	k0 = min(max(k0, 0), fluxIntervals-1)
	k1 = min(max(k1, 0), fluxIntervals-1)
	return fl.unsafe[k1+1] == fl.unsafe[k0]
}

// speed is MaxSpeed for lo <= hi, both in [0, 1] or beyond (clamped).
func (fl *Flux) speed(lo, hi float64) float64 {
	b0, b1 := int(lo*fluxBins), int(hi*fluxBins)
	if lo < 0 {
		b0 = 0
	}
	b0 = min(b0, fluxBins-1)
	b1 = min(max(b1, 0), fluxBins-1)
	return fl.span[b0][b1]
}

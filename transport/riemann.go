package transport

import (
	"errors"
	"fmt"
	"math"
)

// WaveKind tells a shock from a rarefaction fan.
type WaveKind int

// The two kinds of elementary wave of a scalar conservation law.
const (
	Shock WaveKind = iota // a discontinuity moving at one speed
	Fan                   // a continuous rarefaction, each saturation at its own speed
)

// String returns "shock" or "fan".
func (k WaveKind) String() string {
	if k == Fan {
		return "fan"
	}
	return "shock"
}

// Wave is one elementary wave of a Riemann solution. Behind is the
// saturation on the inlet side of the wave and Ahead the saturation on the
// side of the initial state. Speeds are in tau per unit time (tau in days,
// so speeds are dimensionless); a shock has SlowSpeed == FastSpeed, a fan
// carries Behind at SlowSpeed and Ahead at FastSpeed.
type Wave struct {
	Kind                 WaveKind
	Behind, Ahead        float64
	SlowSpeed, FastSpeed float64
}

// ErrNegativeSpeed reports a fractional-flow curve whose envelope has a
// negative slope: water would flow back through the inlet, and the
// injection problem has no self-similar solution on tau >= 0.
var ErrNegativeSpeed = errors.New("transport: fractional flow decreases with saturation (negative wave speed)")

// Riemann is the exact solution of continuous injection of saturation sInj
// at tau = 0 into a streamline initially at saturation sInit,
//
//	dS/dt + d fw(S)/d tau = 0,  S(tau, 0) = sInit,  S(0, t) = sInj,
//
// (Buckley and Leverett 1942). The solution is self-similar, S = S(tau/t).
// For sInj > sInit it follows the upper concave envelope of fw on
// [sInit, sInj], for sInj < sInit the lower convex envelope (Oleinik 1959
// entropy condition; see LeVeque 2002, section 16.1, from memory): linear
// parts of the envelope are shocks moving at the chord slope, parts where the
// envelope touches fw are fans in which saturation s moves at fw'(s). The
// Welge (1952) tangent from (sInit, fw(sInit)) is the special case of an
// S-shaped curve: one fan followed by one shock. Linear, convex, concave and
// multiply inflected curves give one shock, one fan, or any alternation.
//
// The envelope is built from 2048 samples by Andrew's (1979) monotone-chain
// upper hull; tangent points are then refined by bisection on the tangency
// condition fw(y) - fw(x) - fw'(x)(y-x) = 0, so shock saturations are
// accurate to round-off given an accurate derivative. A Riemann is
// read-only after construction and safe for concurrent use if its curve is.
type Riemann struct {
	c           Curve
	sInit, sInj float64
	fInj        float64
	waves       []Wave
	fans        []fanTable // parallel to waves; empty for shocks
	sign        float64
}

// fanTable tabulates a fan in envelope coordinates u = sign*s: u ascending,
// v = speed, non-increasing.
type fanTable struct {
	u, v []float64
}

const envSamples = 2048

// NewRiemann solves the injection of sInj into sInit for the curve c. Both
// saturations must lie in [0, 1]. It returns an error if the curve is not
// finite on the interval or has a negative wave speed (ErrNegativeSpeed).
func NewRiemann(c Curve, sInit, sInj float64) (*Riemann, error) {
	if c == nil {
		return nil, errors.New("transport: Riemann problem without a fractional-flow curve")
	}
	for _, v := range [...]struct {
		name string
		s    float64
	}{{"initial", sInit}, {"injected", sInj}} {
		if !(v.s >= 0 && v.s <= 1) {
			return nil, fmt.Errorf("transport: %s saturation %g outside [0, 1]", v.name, v.s)
		}
	}
	r := &Riemann{c: c, sInit: sInit, sInj: sInj, sign: 1}
	r.fInj = c.Fw(sInj)
	if fi := c.Fw(sInit); !finite(r.fInj) || !finite(fi) {
		return nil, fmt.Errorf("transport: fractional flow not finite at s=%g or s=%g", sInit, sInj)
	}
	if sInj == sInit {
		return r, nil
	}
	if sInj < sInit {
		r.sign = -1
	}
	sg := r.sign
	e := &envelope{
		g:  func(u float64) float64 { return sg * c.Fw(sg*u) },
		dg: func(u float64) float64 { return c.DFw(sg * u) },
		lo: sg * sInit,
		hi: sg * sInj,
	}
	pieces, err := e.build()
	if err != nil {
		return nil, err
	}
	if err := r.setWaves(e, pieces); err != nil {
		return nil, err
	}
	return r, nil
}

// NewRiemannFunc is NewRiemann for a plain function fw on [0, 1], with a
// numerical derivative (see Func).
func NewRiemannFunc(fw func(float64) float64, sInit, sInj float64) (*Riemann, error) {
	if fw == nil {
		return nil, errors.New("transport: Riemann problem without a fractional-flow function")
	}
	return NewRiemann(Func(fw), sInit, sInj)
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// piece is a part of the envelope in u coordinates: a chord (shock) or a
// part on the curve (fan).
type piece struct {
	fan  bool
	a, b float64
}

type envelope struct {
	g, dg  func(float64) float64
	lo, hi float64
	du     float64
	// tolT is the round-off level of the tangency function: below it a
	// chord and the curve are collinear, and the chord is extended.
	tolT float64
}

func (e *envelope) at(k int) float64 {
	if k >= envSamples {
		return e.hi
	}
	return e.lo + float64(k)*e.du
}

// build returns the pieces of the upper concave envelope of g on [lo, hi]
// in ascending u.
func (e *envelope) build() ([]piece, error) {
	n := envSamples
	span := e.hi - e.lo
	e.du = span / float64(n)
	gs := make([]float64, n+1)
	for k := range gs {
		gs[k] = e.g(e.at(k))
		if !finite(gs[k]) {
			return nil, fmt.Errorf("transport: fractional flow not finite at s=%g", math.Abs(e.at(k)))
		}
	}
	// Upper hull by Andrew's monotone chain (Andrew 1979), left to right:
	// drop the middle point unless the turn is strictly clockwise. Sample
	// spacing is uniform, so index differences replace abscissae.
	hull := make([]int, 0, 64)
	for k := 0; k <= n; k++ {
		for len(hull) >= 2 {
			o, a := hull[len(hull)-2], hull[len(hull)-1]
			cross := float64(a-o)*(gs[k]-gs[o]) - (gs[a]-gs[o])*float64(k-o)
			if cross < 0 {
				break
			}
			hull = hull[:len(hull)-1]
		}
		hull = append(hull, k)
	}
	m := len(hull) - 1
	slope := make([]float64, m)
	scale := 0.0
	for k := range slope {
		slope[k] = (gs[hull[k+1]] - gs[hull[k]]) / (float64(hull[k+1]-hull[k]) * e.du)
		scale = math.Max(scale, math.Abs(slope[k]))
	}
	// Chords: hull edges that skip samples, and runs of collinear edges
	// (a linear stretch of the curve moves at one speed: a shock).
	tol := 1e-9 * scale
	var chords []piece
	for k := 0; k < m; {
		j := k
		for j+1 < m && math.Abs(slope[j+1]-slope[k]) <= tol {
			j++
		}
		if j > k || hull[k+1]-hull[k] > 1 {
			chords = append(chords, piece{a: e.at(hull[k]), b: e.at(hull[j+1])})
			k = j + 1
			continue
		}
		k++
	}
	e.tolT = 1e-14 * (absMax(gs) + scale*span)
	chords = e.refine(chords)
	pieces := make([]piece, 0, 2*len(chords)+1)
	last := e.lo
	for _, c := range chords {
		if c.a > last {
			pieces = append(pieces, piece{fan: true, a: last, b: c.a})
		}
		pieces = append(pieces, c)
		last = c.b
	}
	if last < e.hi {
		pieces = append(pieces, piece{fan: true, a: last, b: e.hi})
	}
	if err := e.check(pieces, gs); err != nil {
		return nil, err
	}
	return pieces, nil
}

func absMax(gs []float64) float64 {
	m := 0.0
	for _, v := range gs {
		m = math.Max(m, math.Abs(v))
	}
	return m
}

// refine moves chord ends onto the exact tangent points, merges chords
// that overlap after refinement and drops chords that collapse.
func (e *envelope) refine(chords []piece) []piece {
	span := e.hi - e.lo
	snap := 1e-12 * span
	out := chords[:0:0]
	for _, c := range chords {
		c = e.refineChord(c)
		if c.b-c.a <= snap {
			continue
		}
		for len(out) > 0 {
			prev := &out[len(out)-1]
			if c.a >= prev.b-snap {
				if c.a-prev.b <= snap {
					c.a = prev.b // constant state between two shocks (kink)
				}
				break
			}
			// Overlap: the two chords are one; merge and refine again.
			c = e.refineChord(piece{a: prev.a, b: c.b})
			out = out[:len(out)-1]
		}
		if c.a-e.lo <= snap {
			c.a = e.lo
		}
		if e.hi-c.b <= snap {
			c.b = e.hi
		}
		if c.b-c.a > snap {
			out = append(out, c)
		}
	}
	return out
}

// refineChord alternates the two tangent conditions until both ends stop
// moving; a double tangent converges quadratically.
func (e *envelope) refineChord(c piece) piece {
	span := e.hi - e.lo
	p, q := c.a, c.b
	for it := 0; it < 60; it++ {
		q2 := e.rightEnd(p, q)
		if q2-p <= 1e-12*span {
			return piece{a: p, b: p}
		}
		p2 := e.leftEnd(q2, p)
		done := math.Abs(q2-q) <= 1e-15*span && math.Abs(p2-p) <= 1e-15*span
		p, q = p2, q2
		if q-p <= 1e-12*span {
			return piece{a: p, b: p}
		}
		if done {
			break
		}
	}
	return piece{a: p, b: q}
}

// rightEnd returns the end x in (p, hi] of the envelope chord from p: the
// maximiser of the slope (g(x)-g(p))/(x-p) near the estimate x0, where the
// tangency function T(x) = g(p) - g(x) + g'(x)(x-p) changes sign from + to
// - (T is the numerator of the derivative of that slope). It returns hi if
// the slope still grows there and p if it falls from p on.
func (e *envelope) rightEnd(p, x0 float64) float64 {
	gp := e.g(p)
	tol := e.tolT
	T := func(x float64) float64 { return gp - e.g(x) + e.dg(x)*(x-p) + tol }
	a := math.Max(x0-e.du, 0.5*(p+x0))
	b := math.Min(x0+e.du, e.hi)
	for it := 0; it < 4*envSamples; it++ {
		if T(b) >= 0 {
			if b >= e.hi {
				return e.hi
			}
			a, b = b, math.Min(b+e.du, e.hi)
			continue
		}
		if ta := T(a); ta <= 0 {
			if ta == 0 {
				return a
			}
			if a-p <= 1e-13*(e.hi-e.lo) {
				return p
			}
			a, b = math.Max(a-e.du, 0.5*(a+p)), a
			continue
		}
		return bisect(T, a, b, true)
	}
	return x0
}

// leftEnd returns the start x in [lo, q) of the envelope chord ending at q:
// the minimiser of (g(q)-g(x))/(q-x), where T(x) = g(q) - g(x) - g'(x)(q-x)
// changes sign from - to +. It returns lo if the slope already grows there
// and q if it falls all the way to q.
func (e *envelope) leftEnd(q, x0 float64) float64 {
	gq := e.g(q)
	tol := e.tolT
	T := func(x float64) float64 { return gq - e.g(x) - e.dg(x)*(q-x) + tol }
	a := math.Max(x0-e.du, e.lo)
	b := math.Min(x0+e.du, 0.5*(x0+q))
	for it := 0; it < 4*envSamples; it++ {
		if T(a) >= 0 {
			if a <= e.lo {
				return e.lo
			}
			a, b = math.Max(a-e.du, e.lo), a
			continue
		}
		if tb := T(b); tb <= 0 {
			if tb == 0 {
				return b
			}
			if q-b <= 1e-13*(e.hi-e.lo) {
				return q
			}
			a, b = b, math.Min(b+e.du, 0.5*(b+q))
			continue
		}
		return bisect(T, a, b, false)
	}
	return x0
}

// bisect finds the sign change of T on [a, b]; positiveFirst tells whether
// T(a) > 0 > T(b) or the reverse.
func bisect(T func(float64) float64, a, b float64, positiveFirst bool) float64 {
	for it := 0; it < 200; it++ {
		m := 0.5 * (a + b)
		if m <= a || m >= b {
			break
		}
		if (T(m) > 0) == positiveFirst {
			a = m
		} else {
			b = m
		}
	}
	return 0.5 * (a + b)
}

// check verifies the envelope against the samples: it lies on or above
// every sample and its slope does not increase inside a fan.
func (e *envelope) check(pieces []piece, gs []float64) error {
	gmax := 0.0
	for _, v := range gs {
		gmax = math.Max(gmax, math.Abs(v))
	}
	tol := 1e-9 * (gmax + 1)
	pi := 0
	for k, gk := range gs {
		u := e.at(k)
		for pi < len(pieces)-1 && u > pieces[pi].b {
			pi++
		}
		p := pieces[pi]
		if p.fan {
			continue // the curve itself
		}
		ga, gb := e.g(p.a), e.g(p.b)
		env := ga + (gb-ga)*(u-p.a)/(p.b-p.a)
		if env < gk-tol {
			return fmt.Errorf("transport: internal error: concave envelope below fw at s=%g by %g",
				math.Abs(u), gk-env)
		}
	}
	return nil
}

// setWaves turns envelope pieces into waves ordered from the inlet (slowest)
// to the front (fastest), with fan tables.
func (r *Riemann) setWaves(e *envelope, pieces []piece) error {
	sg := r.sign
	prevFast := math.Inf(-1)
	for i := len(pieces) - 1; i >= 0; i-- {
		p := pieces[i]
		w := Wave{Behind: sg * p.b, Ahead: sg * p.a}
		var ft fanTable
		if p.fan {
			w.Kind = Fan
			m := int(math.Ceil((p.b-p.a)/e.du)) + 1
			m = min(max(m, 9), envSamples+1)
			ft.u = make([]float64, m)
			ft.v = make([]float64, m)
			for k := range ft.u {
				u := p.a + (p.b-p.a)*float64(k)/float64(m-1)
				if k == m-1 {
					u = p.b
				}
				ft.u[k] = u
				ft.v[k] = e.dg(u)
				if !finite(ft.v[k]) {
					return fmt.Errorf("transport: fractional-flow derivative not finite at s=%g", sg*u)
				}
			}
			// Monotone speeds (round-off in the derivative), not slower
			// than the wave behind.
			ft.v[m-1] = math.Max(ft.v[m-1], prevFast)
			for k := m - 2; k >= 0; k-- {
				ft.v[k] = math.Max(ft.v[k], ft.v[k+1])
			}
			w.SlowSpeed, w.FastSpeed = ft.v[m-1], ft.v[0]
		} else {
			w.Kind = Shock
			s := (e.g(p.b) - e.g(p.a)) / (p.b - p.a)
			if !finite(s) {
				return fmt.Errorf("transport: shock speed not finite between s=%g and s=%g", sg*p.a, sg*p.b)
			}
			s = math.Max(s, prevFast)
			w.SlowSpeed, w.FastSpeed = s, s
		}
		prevFast = w.FastSpeed
		r.waves = append(r.waves, w)
		r.fans = append(r.fans, ft)
	}
	if len(r.waves) > 0 {
		scale := math.Max(math.Abs(r.waves[len(r.waves)-1].FastSpeed), 1e-300)
		if r.waves[0].SlowSpeed < -1e-10*scale {
			return fmt.Errorf("%w: %g at s=%g", ErrNegativeSpeed, r.waves[0].SlowSpeed, r.waves[0].Behind)
		}
		if r.waves[0].SlowSpeed < 0 {
			r.waves[0].SlowSpeed = 0
			if r.waves[0].Kind == Shock {
				r.waves[0].FastSpeed = 0
			}
		}
	}
	return nil
}

// InitialSaturation returns the initial saturation of the streamline.
func (r *Riemann) InitialSaturation() float64 { return r.sInit }

// InjectedSaturation returns the injected saturation.
func (r *Riemann) InjectedSaturation() float64 { return r.sInj }

// Curve returns the fractional-flow curve of the solution.
func (r *Riemann) Curve() Curve { return r.c }

// Waves returns the elementary waves from the inlet (slowest) to the
// leading front (fastest); consecutive waves share a saturation, or are
// separated by a constant state where the curve has a kink. Injecting the
// initial saturation gives no waves.
func (r *Riemann) Waves() []Wave { return append([]Wave(nil), r.waves...) }

// Saturation returns S at xi = tau/t (Buckley and Leverett 1942; Welge
// 1952). On a shock speed it returns the saturation behind the shock (the
// front has arrived); beyond the leading wave it returns the initial
// saturation.
func (r *Riemann) Saturation(xi float64) float64 {
	if math.IsNaN(xi) {
		return math.NaN()
	}
	for i := range r.waves {
		w := &r.waves[i]
		if xi <= w.SlowSpeed {
			return w.Behind
		}
		if xi < w.FastSpeed {
			return r.sign * r.fans[i].invert(xi, r.dgU)
		}
	}
	return r.sInit
}

func (r *Riemann) dgU(u float64) float64 { return r.c.DFw(r.sign * u) }

// invert returns u with g'(u) = xi, for xi strictly inside the fan's speed
// range: bracket by binary search in the table, then Illinois regula falsi
// on the derivative itself.
func (t *fanTable) invert(xi float64, dg func(float64) float64) float64 {
	lo, hi := 0, len(t.v)-1
	for hi-lo > 1 {
		mid := (lo + hi) / 2
		if t.v[mid] >= xi {
			lo = mid
		} else {
			hi = mid
		}
	}
	a, b := t.u[lo], t.u[hi]
	fa, fb := t.v[lo]-xi, t.v[hi]-xi
	if fa == 0 {
		return a
	}
	tol := 1e-13 * (math.Abs(a) + math.Abs(b) + 1e-300)
	ftol := 1e-14 * (math.Abs(xi) + t.v[0])
	c := a
	side := 0
	for it := 0; it < 40; it++ {
		c = (a*fb - b*fa) / (fb - fa)
		if !(c > a && c < b) {
			c = 0.5 * (a + b)
		}
		fc := dg(c) - xi
		if math.Abs(fc) <= ftol {
			return c
		}
		if fc > 0 {
			a, fa = c, fc
			if side == 1 {
				fb *= 0.5
			}
			side = 1
		} else {
			b, fb = c, fc
			if side == -1 {
				fa *= 0.5
			}
			side = -1
		}
		if b-a <= tol {
			break
		}
	}
	return c
}

// FrontSaturation returns the saturation just behind the leading wave: the
// Welge (1952) front saturation when the leading wave is a shock, the
// initial saturation when it is a fan (no discontinuity), and the initial
// saturation when nothing is injected.
func (r *Riemann) FrontSaturation() float64 {
	if len(r.waves) == 0 {
		return r.sInit
	}
	w := r.waves[len(r.waves)-1]
	if w.Kind == Shock {
		return w.Behind
	}
	return w.Ahead
}

// FrontSpeed returns the speed of the leading wave, in tau per unit time:
// for a shock (fw(Sf)-fw(Sinit))/(Sf-Sinit) (Rankine-Hugoniot; Buckley and
// Leverett 1942), for a fan fw'(Sinit). It is 0 when nothing is injected.
func (r *Riemann) FrontSpeed() float64 {
	if len(r.waves) == 0 {
		return 0
	}
	return r.waves[len(r.waves)-1].FastSpeed
}

// Breakthrough returns the time at which the leading front reaches the end
// of a streamline of total time of flight tau: tau/FrontSpeed (+Inf if
// nothing moves).
func (r *Riemann) Breakthrough(tau float64) float64 {
	v := r.FrontSpeed()
	if v <= 0 {
		return math.Inf(1)
	}
	return tau / v
}

// OutletFw returns the water fraction leaving a streamline of total time of
// flight tau at time t: fw(S(tau/t)) (Buckley and Leverett 1942). Before
// injection starts (t <= 0) it is fw of the initial saturation.
func (r *Riemann) OutletFw(tau, t float64) float64 {
	if !(t > 0) {
		return r.c.Fw(r.sInit)
	}
	if !(tau > 0) {
		return r.fInj
	}
	return r.c.Fw(r.Saturation(tau / t))
}

// AverageSaturation returns the mean saturation over [0, tau] at time t,
// from the Welge (1952) material balance generalised to any envelope:
//
//	Savg = S2 + (fw(Sinj) - fw(S2)) / xi,  S2 = S(xi), xi = tau/t,
//
// which for Sinj = 1-Sor is Welge's Sw_avg = Sw2 + (1-fw2)/fw'(Sw2) behind
// the front. It is exact for every xi, on shocks and in fans.
func (r *Riemann) AverageSaturation(tau, t float64) float64 {
	if !(t > 0) {
		return r.sInit
	}
	if !(tau > 0) {
		return r.Saturation(0)
	}
	xi := tau / t
	s := r.Saturation(xi)
	return s + (r.fInj-r.c.Fw(s))/xi
}

// SegmentSaturation returns the mean saturation over [tau1, tau2] at time
// t, by the same material balance as AverageSaturation (Welge 1952); it is
// the exact cell average for a segment of a streamline. If tau1 == tau2 it
// returns the point value.
func (r *Riemann) SegmentSaturation(tau1, tau2, t float64) float64 {
	if !(t > 0) {
		return r.sInit
	}
	if tau2 < tau1 {
		tau1, tau2 = tau2, tau1
	}
	tau1 = math.Max(tau1, 0)
	tau2 = math.Max(tau2, 0)
	s1, s2 := r.Saturation(tau1/t), r.Saturation(tau2/t)
	if tau2 == tau1 {
		return s2
	}
	if s1 == s2 {
		return s1
	}
	return (tau2*s2 - tau1*s1 + t*(r.c.Fw(s1)-r.c.Fw(s2))) / (tau2 - tau1)
}

package transport

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"floodtrace/reservoir"
)

// quadCorey is fw for Corey exponents 2, swc = sor = 0, krw_max = kro_max = 1
// and viscosity ratio a = mu_w/mu_o, with its closed-form derivative:
//
//	fw = s^2 / (s^2 + a(1-s)^2),  fw' = 2 a s (1-s) / (s^2 + a(1-s)^2)^2.
//
// The Welge (1952) tangent from (0, 0), fw(s)/s = fw'(s), gives
// s^2 + a(1-s)^2 = 2a(1-s), that is Sf = sqrt(a/(1+a)).
type quadCorey struct{ a float64 }

func (q quadCorey) Fw(s float64) float64 { return s * s / (s*s + q.a*(1-s)*(1-s)) }
func (q quadCorey) DFw(s float64) float64 {
	d := s*s + q.a*(1-s)*(1-s)
	return 2 * q.a * s * (1 - s) / (d * d)
}

// analytic is a Curve given by a function and its closed-form derivative.
type analytic struct{ f, df func(float64) float64 }

func (c analytic) Fw(s float64) float64  { return c.f(s) }
func (c analytic) DFw(s float64) float64 { return c.df(s) }

func quadFracFlow(a float64) *FracFlow {
	return NewFracFlow(reservoir.Corey{KrwMax: 1, KroMax: 1, Nw: 2, No: 2}, a, 1)
}

// An invented sandstone for tests: Corey curves of the kind quoted in
// waterflood studies (values chosen here, not from any field).
func sandstone() *FracFlow {
	return NewFracFlow(reservoir.Corey{Swc: 0.2, Sor: 0.25, KrwMax: 0.35, KroMax: 0.9, Nw: 2.5, No: 2}, 0.5, 3)
}

func TestFracFlowQuadraticCorey(t *testing.T) {
	for _, a := range []float64{0.1, 1, 6} {
		ff := quadFracFlow(a)
		ref := quadCorey{a}
		for s := 0.0; s <= 1; s += 0.0625 {
			// Closed forms above (Buckley and Leverett 1942 fw; derivative by hand).
			if d := math.Abs(ff.Fw(s) - ref.Fw(s)); d > 1e-15 {
				t.Errorf("a=%g s=%g: fw off by %g", a, s, d)
			}
			if d := math.Abs(ff.DFw(s) - ref.DFw(s)); d > 1e-13*(1+ref.DFw(s)) {
				t.Errorf("a=%g s=%g: analytic fw' %g, closed form %g", a, s, ff.DFw(s), ref.DFw(s))
			}
			// Mobility krw/muw + kro/muo with mu_w = a, mu_o = 1.
			if d := math.Abs(ff.Mobility(s) - (s*s/a + (1-s)*(1-s))); d > 1e-15 {
				t.Errorf("a=%g s=%g: mobility off by %g", a, s, d)
			}
		}
		// M = (krw(1-sor)/muw)/(kro(swc)/muo) = 1/a here (Craig 1971 definition).
		if m := ff.EndpointMobilityRatio(); math.Abs(m-1/a) > 1e-15 {
			t.Errorf("a=%g: mobility ratio %g, want %g", a, m, 1/a)
		}
	}
}

func TestFracFlowNumericalDerivative(t *testing.T) {
	// A relative-permeability model that is not reservoir.Corey takes the
	// numerical path (Ridders 1982); it must agree with the analytic Corey
	// derivative of the same curves.
	c := reservoir.Corey{Swc: 0.2, Sor: 0.25, KrwMax: 0.35, KroMax: 0.9, Nw: 2.5, No: 2}
	num := NewFracFlow(opaque{c}, 0.5, 3)
	ana := NewFracFlow(c, 0.5, 3)
	for k := 0; k <= 55; k++ {
		s := 0.2 + 0.01*float64(k)
		// At the end points the exponent 2.5 leaves a fractional power
		// in the one-sided expansion, which extrapolation removes slowly.
		tol := 1e-10
		if k == 0 || k == 55 {
			tol = 1e-6
		}
		if d := math.Abs(num.DFw(s) - ana.DFw(s)); d > tol {
			t.Errorf("s=%g: numerical fw' %g, analytic %g", s, num.DFw(s), ana.DFw(s))
		}
	}
	if num.DFw(0.1) != 0 || num.DFw(0.9) != 0 {
		t.Error("fw' outside the mobile range should be 0")
	}
}

type opaque struct{ c reservoir.Corey }

func (o opaque) Krw(s float64) float64         { return o.c.Krw(s) }
func (o opaque) Kro(s float64) float64         { return o.c.Kro(s) }
func (o opaque) Endpoints() (swc, sor float64) { return o.c.Endpoints() }

func TestFuncDerivative(t *testing.T) {
	// Closed-form derivatives of elementary functions (calculus).
	cases := []struct {
		name  string
		f, df func(float64) float64
	}{
		{"sin", func(s float64) float64 { return math.Sin(3 * s) }, func(s float64) float64 { return 3 * math.Cos(3*s) }},
		{"exp", math.Exp, math.Exp},
		{"sqrt", math.Sqrt, func(s float64) float64 { return 0.5 / math.Sqrt(s) }},
	}
	for _, c := range cases {
		for _, s := range []float64{0, 0.01, 0.3, 0.5, 0.99, 1} {
			if c.name == "sqrt" && s == 0 {
				continue // infinite slope
			}
			got, want := Func(c.f).DFw(s), c.df(s)
			tol := 1e-9 * (1 + math.Abs(want))
			if c.name == "sqrt" {
				tol = 1e-7 * (1 + math.Abs(want))
			}
			if math.Abs(got-want) > tol {
				t.Errorf("%s'(%g) = %.15g, want %.15g", c.name, s, got, want)
			}
		}
	}
}

func TestFracFlowValidate(t *testing.T) {
	good := reservoir.Corey{KrwMax: 1, KroMax: 1, Nw: 2, No: 2}
	cases := []struct {
		name string
		ff   *FracFlow
		ok   bool
	}{
		{"good", NewFracFlow(good, 1, 2), true},
		{"nil relperm", NewFracFlow(nil, 1, 2), false},
		{"zero water viscosity", NewFracFlow(good, 0, 2), false},
		{"NaN oil viscosity", NewFracFlow(good, 1, math.NaN()), false},
		{"no mobile range", NewFracFlow(reservoir.Corey{Swc: 0.6, Sor: 0.4, KrwMax: 1, KroMax: 1, Nw: 2, No: 2}, 1, 1), false},
	}
	for _, c := range cases {
		if err := c.ff.Validate(); (err == nil) != c.ok {
			t.Errorf("%s: Validate() = %v", c.name, err)
		}
	}
	// A curve with a bad viscosity yields NaN, which the solver reports.
	if _, err := NewRiemann(NewFracFlow(good, 0, 0), 0, 1); err == nil {
		t.Error("NewRiemann accepted a curve with zero viscosities")
	}
}

func TestWelgeFrontQuadraticCorey(t *testing.T) {
	for _, a := range []float64{0.05, 0.2, 0.5, 1, 2, 5, 20} {
		want := math.Sqrt(a / (1 + a)) // Welge (1952) tangent, closed form derived above
		ref := quadCorey{a}
		curves := []struct {
			name string
			c    Curve
		}{
			{"Corey analytic", quadFracFlow(a)},
			{"plain func", Func(ref.Fw)},
		}
		for _, c := range curves {
			r, err := NewRiemann(c.c, 0, 1)
			if err != nil {
				t.Fatalf("a=%g %s: %v", a, c.name, err)
			}
			if d := math.Abs(r.FrontSaturation() - want); d > 1e-8 {
				t.Errorf("a=%g %s: front saturation %.12f, want %.12f", a, c.name, r.FrontSaturation(), want)
			}
			// Breakthrough at 1/fw'(Sf) pore volumes (Buckley and Leverett
			// 1942; Welge 1952): a streamline of time of flight tau breaks
			// through at t = tau/fw'(Sf).
			tau := 250.0
			bt := tau / ref.DFw(want)
			if d := math.Abs(r.Breakthrough(tau)-bt) / bt; d > 1e-9 {
				t.Errorf("a=%g %s: breakthrough %.10g, want %.10g", a, c.name, r.Breakthrough(tau), bt)
			}
			// The shock speed is the chord slope fw(Sf)/Sf (Rankine-Hugoniot).
			if d := math.Abs(r.FrontSpeed() - ref.Fw(want)/want); d > 1e-9 {
				t.Errorf("a=%g %s: front speed off by %g", a, c.name, d)
			}
			w := r.Waves()
			if len(w) != 2 || w[0].Kind != Fan || w[1].Kind != Shock {
				t.Errorf("a=%g %s: waves %v, want a fan then a shock", a, c.name, w)
			}
		}
	}
}

func TestSShapedFanSatisfiesFrontalAdvance(t *testing.T) {
	// Inside the fan every saturation travels at fw'(S) (Buckley and
	// Leverett 1942 frontal advance equation): check S(xi) against the
	// closed-form derivative.
	for _, a := range []float64{0.3, 1, 4} {
		ref := quadCorey{a}
		r, err := NewRiemann(quadFracFlow(a), 0, 1)
		if err != nil {
			t.Fatal(err)
		}
		sf := math.Sqrt(a / (1 + a))
		vf := ref.DFw(sf)
		for k := 1; k < 200; k++ {
			xi := vf * float64(k) / 200
			s := r.Saturation(xi)
			if s < sf || s > 1 {
				t.Fatalf("a=%g xi=%g: S=%g outside the fan [%g, 1]", a, xi, s, sf)
			}
			if d := math.Abs(ref.DFw(s) - xi); d > 1e-11 {
				t.Errorf("a=%g xi=%g: fw'(S)=%.15g", a, xi, ref.DFw(s))
			}
		}
		if s := r.Saturation(vf * 1.0000001); s != 0 {
			t.Errorf("a=%g: ahead of the front S=%g, want 0", a, s)
		}
	}
}

func TestPistonDisplacementLinear(t *testing.T) {
	// Linear fw: every saturation moves at speed 1, the displacement is a
	// piston and water arrives with the tracer (common practice).
	linearCorey := NewFracFlow(reservoir.Corey{KrwMax: 1, KroMax: 1, Nw: 1, No: 1}, 1, 1)
	for _, c := range []struct {
		name string
		c    Curve
	}{
		{"fw=s", Func(func(s float64) float64 { return s })},
		{"krw=s, kro=1-s, equal viscosities", linearCorey},
	} {
		for _, sInit := range []float64{0, 0.2, 0.55} {
			r, err := NewRiemann(c.c, sInit, 1)
			if err != nil {
				t.Fatal(err)
			}
			if d := math.Abs(r.FrontSaturation() - 1); d > 1e-12 {
				t.Errorf("%s sInit=%g: front saturation %g, want 1", c.name, sInit, r.FrontSaturation())
			}
			if d := math.Abs(r.FrontSpeed() - 1); d > 1e-12 {
				t.Errorf("%s sInit=%g: front speed %g, want 1", c.name, sInit, r.FrontSpeed())
			}
			if bt := r.Breakthrough(37); math.Abs(bt-37) > 1e-10 {
				t.Errorf("%s: breakthrough %g, want the tracer time 37", c.name, bt)
			}
			if w := r.Waves(); len(w) != 1 || w[0].Kind != Shock {
				t.Errorf("%s: waves %v, want one shock", c.name, w)
			}
		}
	}
}

func TestEnvelopeClosedForms(t *testing.T) {
	sqrtCurve := analytic{math.Sqrt, func(s float64) float64 { return 0.5 / math.Sqrt(s) }}
	cases := []struct {
		name        string
		c           Curve
		sInit, sInj float64
		kinds       []WaveKind
		exact       func(xi float64) float64 // closed-form S(xi)
		frontSpeed  float64
	}{
		{ // convex: one shock at the chord slope (Rankine-Hugoniot)
			"convex s^2", Func(func(s float64) float64 { return s * s }), 0, 1,
			[]WaveKind{Shock}, func(xi float64) float64 { return step(xi, 1, 1, 0) }, 1,
		},
		{
			"convex s^2 partial", Func(func(s float64) float64 { return s * s }), 0.2, 0.9,
			[]WaveKind{Shock}, func(xi float64) float64 { return step(xi, 1.1, 0.9, 0.2) }, 1.1,
		},
		{ // concave: a pure fan, fw'(S) = 2-2S = xi
			"concave 2s-s^2", Func(func(s float64) float64 { return 2*s - s*s }), 0, 1,
			[]WaveKind{Fan}, func(xi float64) float64 { return math.Max(0, math.Min(1, 1-xi/2)) }, 2,
		},
		{ // concave sqrt: fw'(S) = 1/(2 sqrt S) = xi, S = 1/(4 xi^2)
			"concave sqrt", sqrtCurve, 0.04, 1,
			[]WaveKind{Fan}, func(xi float64) float64 { return math.Max(0.04, math.Min(1, 1/(4*xi*xi))) }, 2.5,
		},
		{
			"concave sqrt numeric", Func(math.Sqrt), 0.04, 1,
			[]WaveKind{Fan}, func(xi float64) float64 { return math.Max(0.04, math.Min(1, 1/(4*xi*xi))) }, 2.5,
		},
		{ // injecting the lower saturation: lower convex envelope; s^2 convex -> fan S = xi/2
			"convex s^2, decreasing", Func(func(s float64) float64 { return s * s }), 0.9, 0.1,
			[]WaveKind{Fan}, func(xi float64) float64 { return math.Max(0.1, math.Min(0.9, xi/2)) }, 1.8,
		},
		{ // concave sqrt, decreasing: the chord, one shock
			"concave sqrt, decreasing", sqrtCurve, 0.81, 0.09,
			[]WaveKind{Shock}, func(xi float64) float64 { return step(xi, 0.6/0.72, 0.09, 0.81) }, 0.6 / 0.72,
		},
	}
	for _, c := range cases {
		r, err := NewRiemann(c.c, c.sInit, c.sInj)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		w := r.Waves()
		if len(w) != len(c.kinds) {
			t.Fatalf("%s: waves %v, want kinds %v", c.name, w, c.kinds)
		}
		for i := range w {
			if w[i].Kind != c.kinds[i] {
				t.Errorf("%s: wave %d is a %v, want %v", c.name, i, w[i].Kind, c.kinds[i])
			}
		}
		if d := math.Abs(r.FrontSpeed() - c.frontSpeed); d > 1e-9*c.frontSpeed {
			t.Errorf("%s: front speed %.12g, want %.12g", c.name, r.FrontSpeed(), c.frontSpeed)
		}
		for k := 0; k <= 400; k++ {
			xi := 3 * float64(k) / 400
			if math.Abs(xi-c.frontSpeed) < 1e-9 {
				continue
			}
			if got, want := r.Saturation(xi), c.exact(xi); math.Abs(got-want) > 1e-9 {
				t.Errorf("%s: S(%g) = %.12g, want %.12g", c.name, xi, got, want)
			}
		}
	}
}

// step is a single shock of speed v from behind to ahead.
func step(xi, v, behind, ahead float64) float64 {
	if xi <= v {
		return behind
	}
	return ahead
}

func TestMultipleWaves(t *testing.T) {
	// fw = s + 0.05 sin(4 pi s) has two concave humps. Its upper envelope on
	// [0.01, 1] is: fan on [0.01, 0.125], a double-tangent shock of slope 1
	// from 0.125 to 0.625 (both are crests of the sine, fw' = 1 there and
	// fw(0.625)-fw(0.125) = 0.5), a fan from 0.625 to the tangent point of
	// the chord to (1, 1), and that chord (closed form by hand).
	f := func(s float64) float64 { return s + 0.05*math.Sin(4*math.Pi*s) }
	df := func(s float64) float64 { return 1 + 0.2*math.Pi*math.Cos(4*math.Pi*s) }
	r, err := NewRiemann(analytic{f, df}, 0.01, 1)
	if err != nil {
		t.Fatal(err)
	}
	w := r.Waves()
	kinds := []WaveKind{Shock, Fan, Shock, Fan}
	if len(w) != 4 {
		t.Fatalf("waves %v", w)
	}
	for i := range w {
		if w[i].Kind != kinds[i] {
			t.Fatalf("waves %v, want kinds %v", w, kinds)
		}
	}
	if math.Abs(w[2].Behind-0.625) > 1e-10 || math.Abs(w[2].Ahead-0.125) > 1e-10 || math.Abs(w[2].FastSpeed-1) > 1e-10 {
		t.Errorf("double tangent %+v, want 0.625 -> 0.125 at speed 1", w[2])
	}
	// The tangent from (1, 1): fw(s) + fw'(s)(1-s) = 1.
	st := w[0].Ahead
	if d := f(st) + df(st)*(1-st) - 1; math.Abs(d) > 1e-12 {
		t.Errorf("tangent point %g misses the tangency condition by %g", st, d)
	}
	checkOsher(t, "two humps", r, analytic{f, df}.Fw, 0.01, 1, 200000, 1e-4)
}

// checkOsher compares S(xi) with Osher's (1984) explicit formula for the
// scalar Riemann problem (from memory): S(xi) maximises fw(s) - xi s over
// [sInit, sInj] when sInj > sInit, and minimises it when sInj < sInit;
// brute force on n+1 points.
func checkOsher(t *testing.T, name string, r *Riemann, f func(float64) float64, sInit, sInj float64, n int, tol float64) {
	t.Helper()
	ss := make([]float64, n+1)
	fs := make([]float64, n+1)
	for k := range ss {
		ss[k] = sInit + (sInj-sInit)*float64(k)/float64(n)
		fs[k] = f(ss[k])
	}
	sign := 1.0
	if sInj < sInit {
		sign = -1
	}
	var shocks []float64
	for _, w := range r.Waves() {
		if w.Kind == Shock {
			shocks = append(shocks, w.FastSpeed)
		}
	}
	vmax := r.FrontSpeed()
	for k := 0; k <= 60; k++ {
		xi := 1.2 * vmax * (float64(k) + 0.37) / 60
		near := false
		for _, v := range shocks {
			if math.Abs(xi-v) < 1e-3*(1+v) {
				near = true
			}
		}
		if near {
			continue
		}
		best, arg := math.Inf(-1), 0.0
		for i := range ss {
			if v := sign * (fs[i] - xi*ss[i]); v > best {
				best, arg = v, ss[i]
			}
		}
		if got := r.Saturation(xi); math.Abs(got-arg) > tol {
			t.Errorf("%s: S(%g) = %.8g, Osher argmax %.8g", name, xi, got, arg)
		}
	}
}

func TestWelgeAverageSaturation(t *testing.T) {
	ff := sandstone()
	swc, sor := ff.Endpoints()
	r, err := NewRiemann(ff, swc, 1-sor)
	if err != nil {
		t.Fatal(err)
	}
	const tau = 100.0
	tbt := r.Breakthrough(tau)
	// Pore volumes injected into the streamline, t/tau, as multiples of the
	// breakthrough value 1/fw'(Sf).
	for _, m := range []float64{0.4, 0.9, 1.0, 1.3, 2, 4, 10} {
		tt := m * tbt
		xi := tau / tt
		got := r.AverageSaturation(tau, tt)
		num := integrate(r, 0, tau, tt) / tau
		if d := math.Abs(got - num); d > 1e-9 {
			t.Errorf("PVI=%.3g PVIbt: AverageSaturation %.12f, quadrature of Saturation %.12f", m, got, num)
		}
		if m > 1 {
			// After breakthrough, Welge (1952): Sw_avg = Sw2 + (1-fw2)/fw'(Sw2),
			// Sw2 the outlet saturation, with fw'(Sw2) = tau/t.
			s2 := r.Saturation(xi)
			welge := s2 + (1-ff.Fw(s2))/ff.DFw(s2)
			if d := math.Abs(welge - num); d > 1e-8 {
				t.Errorf("PVI=%.3g PVIbt: Welge %.12f, quadrature %.12f", m, welge, num)
			}
			if d := math.Abs(r.OutletFw(tau, tt) - ff.Fw(s2)); d > 0 {
				t.Errorf("outlet fw off by %g", d)
			}
		}
		// Segment averages add up.
		a := r.SegmentSaturation(0, 30, tt)*30 + r.SegmentSaturation(30, 71, tt)*41 + r.SegmentSaturation(71, tau, tt)*29
		if d := math.Abs(a/tau - got); d > 1e-12 {
			t.Errorf("segment averages miss the mean by %g", d)
		}
		if d := math.Abs(r.SegmentSaturation(30, 71, tt) - integrate(r, 30, 71, tt)/41); d > 1e-9 {
			t.Errorf("segment average off the quadrature by %g", d)
		}
	}
	if r.OutletFw(tau, 0.999*tbt) != 0 || r.OutletFw(tau, tbt) == 0 {
		t.Error("outlet water fraction should jump at breakthrough")
	}
}

// integrate returns the integral of S(tau/t) over [a, b], by composite
// Gauss-Legendre on pieces split at the shocks.
func integrate(r *Riemann, a, b, t float64) float64 {
	cuts := []float64{a}
	for _, w := range r.Waves() {
		for _, v := range []float64{w.SlowSpeed, w.FastSpeed} {
			if x := v * t; x > a && x < b {
				cuts = append(cuts, x)
			}
		}
	}
	cuts = append(cuts, b)
	// Sort (few points).
	for i := range cuts {
		for j := i + 1; j < len(cuts); j++ {
			if cuts[j] < cuts[i] {
				cuts[i], cuts[j] = cuts[j], cuts[i]
			}
		}
	}
	// 5-point Gauss-Legendre nodes and weights (Abramowitz and Stegun 1964, table 25.4).
	x := [5]float64{0, 0.5384693101056831, -0.5384693101056831, 0.9061798459386640, -0.9061798459386640}
	wt := [5]float64{0.5688888888888889, 0.4786286704993665, 0.4786286704993665, 0.2369268850561891, 0.2369268850561891}
	sum := 0.0
	for i := 0; i+1 < len(cuts); i++ {
		const m = 400
		h := (cuts[i+1] - cuts[i]) / m
		for k := 0; k < m; k++ {
			c := cuts[i] + (float64(k)+0.5)*h
			for q := range x {
				sum += wt[q] * 0.5 * h * r.Saturation((c+0.5*h*x[q])/t)
			}
		}
	}
	return sum
}

func TestRiemannErrors(t *testing.T) {
	lin := Func(func(s float64) float64 { return s })
	cases := []struct {
		name        string
		c           Curve
		sInit, sInj float64
		want        error
	}{
		{"nil curve", nil, 0, 1, nil},
		{"typed nil relperm", NewFracFlow((*reservoir.Corey)(nil), 1, 1), 0, 1, nil},
		{"NaN saturation", lin, math.NaN(), 1, nil},
		{"injected above 1", lin, 0, 1.2, nil},
		{"initial below 0", lin, -0.1, 1, nil},
		{"decreasing fw", Func(func(s float64) float64 { return 1 - s }), 0, 1, ErrNegativeSpeed},
		{"NaN fw", Func(func(s float64) float64 { return math.Log(s - 0.5) }), 0, 1, nil},
	}
	for _, c := range cases {
		r, err := NewRiemann(c.c, c.sInit, c.sInj)
		if err == nil || r != nil {
			t.Errorf("%s: no error", c.name)
			continue
		}
		if c.want != nil && !errors.Is(err, c.want) {
			t.Errorf("%s: error %v, want %v", c.name, err, c.want)
		}
	}
	if _, err := NewRiemannFunc(nil, 0, 1); err == nil {
		t.Error("nil func accepted")
	}
	// Injecting above 1-sor: fw is flat there, a standing shock at the
	// inlet (speed 0) and the usual Welge solution (1952) beyond it.
	ff := sandstone()
	r0, err := NewRiemann(ff, 0.2, 1)
	if err != nil {
		t.Fatal(err)
	}
	ref, _ := NewRiemann(ff, 0.2, 0.75)
	if w := r0.Waves(); w[0].Kind != Shock || w[0].FastSpeed != 0 || math.Abs(w[0].Ahead-0.75) > 1e-12 {
		t.Errorf("standing shock expected first: %v", w)
	}
	if d := math.Abs(r0.FrontSaturation() - ref.FrontSaturation()); d > 1e-12 {
		t.Errorf("front saturation %g, want %g", r0.FrontSaturation(), ref.FrontSaturation())
	}
	// Nothing injected: no waves, nothing moves.
	r, err := NewRiemann(lin, 0.3, 0.3)
	if err != nil || len(r.Waves()) != 0 || r.Saturation(2) != 0.3 || !math.IsInf(r.Breakthrough(1), 1) {
		t.Errorf("equal saturations: %v %v", r, err)
	}
}

// randomCorey draws Corey curves over the ranges met in practice.
func randomCorey(rng *rand.Rand) (*FracFlow, float64, float64) {
	c := reservoir.Corey{
		Swc: 0.3 * rng.Float64(), Sor: 0.3 * rng.Float64(),
		KrwMax: 0.05 + 0.95*rng.Float64(), KroMax: 0.2 + 0.8*rng.Float64(),
		Nw: 1 + 5*rng.Float64(), No: 1 + 5*rng.Float64(),
	}
	ff := NewFracFlow(c, 0.2+1.8*rng.Float64(), 0.3*math.Pow(300, rng.Float64()))
	sInit := c.Swc + 0.5*(1-c.Swc-c.Sor)*rng.Float64()*rng.Float64()
	return ff, sInit, 1 - c.Sor
}

func checkRiemann(t *testing.T, name string, r *Riemann, ff Curve, sInit, sInj float64, osherN int, tol float64) {
	t.Helper()
	prev := math.Inf(1)
	vmax := r.FrontSpeed()
	if !finite(vmax) || vmax < 0 {
		t.Fatalf("%s: front speed %g", name, vmax)
	}
	for k := 0; k <= 200; k++ {
		s := r.Saturation(1.1 * vmax * float64(k) / 200)
		if !(s <= prev+1e-12) || s < sInit-1e-12 || s > sInj+1e-12 {
			t.Fatalf("%s: profile not monotone at step %d: %g after %g", name, k, s, prev)
		}
		prev = s
	}
	checkOsher(t, name, r, ff.Fw, sInit, sInj, osherN, tol)
}

func TestRandomCoreyEnvelopes(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	n := 60
	if testing.Short() {
		n = 20
	}
	for i := 0; i < n; i++ {
		ff, sInit, sInj := randomCorey(rng)
		r, err := NewRiemann(ff, sInit, sInj)
		if err != nil {
			t.Fatalf("case %d: %v", i, err)
		}
		checkRiemann(t, "random Corey", r, ff, sInit, sInj, 5000, 1e-3)
	}
}

func FuzzRiemann(f *testing.F) {
	f.Add(0.2, 0.25, 0.35, 0.9, 2.5, 2.0, 0.5, 3.0, 0.0)
	f.Add(0.0, 0.0, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 0.3)
	f.Add(0.1, 0.3, 0.1, 1.0, 6.0, 1.0, 0.3, 100.0, 0.5)
	f.Fuzz(func(t *testing.T, swc, sor, krw, kro, nw, no, muw, muo, frac float64) {
		c := reservoir.Corey{Swc: swc, Sor: sor, KrwMax: krw, KroMax: kro, Nw: nw, No: no}
		ff := NewFracFlow(c, muw, muo)
		ok := ff.Validate() == nil && krw > 0 && kro > 0 && nw >= 1 && no >= 1 && nw < 10 && no < 10 &&
			krw <= 1 && kro <= 1 && muw < 1e3 && muo < 1e3 && muw > 1e-3 && muo > 1e-3 && frac >= 0 && frac <= 1
		sInit := swc + frac*(1-swc-sor)
		r, err := NewRiemann(ff, sInit, 1-sor) // must never panic
		if !ok {
			return
		}
		if err != nil {
			t.Fatalf("%+v: %v", c, err)
		}
		checkRiemann(t, "fuzz", r, ff, sInit, 1-sor, 4000, 1e-3)
	})
}

func BenchmarkRiemann(b *testing.B) {
	ff := sandstone()
	for b.Loop() {
		if _, err := NewRiemann(ff, 0.2, 0.75); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkSaturation(b *testing.B) {
	r, err := NewRiemann(sandstone(), 0.2, 0.75)
	if err != nil {
		b.Fatal(err)
	}
	v := r.FrontSpeed()
	i := 0
	for b.Loop() {
		i++
		_ = r.OutletFw(1, 1/(v*float64(i%1000)/1000+1e-3))
	}
}

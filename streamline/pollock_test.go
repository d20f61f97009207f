package streamline

import (
	"math"
	"testing"

	"floodtrace/reservoir"
)

// simpsonTime integrates the definition of time of flight, t = integral of
// dp/v(p), from p0 to p1 for v(p) = vLo + (vHi-vLo)*p with composite
// Simpson's rule: an outside check of the closed form.
func simpsonTime(p0, p1, vLo, vHi float64) float64 {
	const n = 20000
	h := (p1 - p0) / n
	f := func(p float64) float64 { return 1 / (vLo + (vHi-vLo)*p) }
	s := f(p0) + f(p1)
	for i := 1; i < n; i++ {
		w := 2.0
		if i%2 == 1 {
			w = 4
		}
		s += w * f(p0+float64(i)*h)
	}
	return s * h / 3
}

// rk4Position integrates dp/dt = vLo + (vHi-vLo)*p over time t with the
// classical Runge-Kutta method: an outside check of advance.
func rk4Position(p, vLo, vHi, t float64) float64 {
	const n = 20000
	h := t / n
	v := func(p float64) float64 { return vLo + (vHi-vLo)*p }
	for i := 0; i < n; i++ {
		k1 := v(p)
		k2 := v(p + 0.5*h*k1)
		k3 := v(p + 0.5*h*k2)
		k4 := v(p + h*k3)
		p += h / 6 * (k1 + 2*k2 + 2*k3 + k4)
	}
	return p
}

// TestExitTime checks Pollock's (1988) exit time in one cell with a linear
// velocity against his closed form t = ln(v_exit/v_now)/A (A = vHi-vLo,
// distance/v when A = 0) and against a Simpson quadrature of the
// definition t = integral dp/v(p).
func TestExitTime(t *testing.T) {
	tests := []struct {
		name          string
		p, vLo, vHi   float64
		dir           int
		analytic      float64 // Pollock's closed form; NaN = compute it
		quadratureTol float64
	}{
		{"accelerating from the west face", 0, 1, 2, 1, math.Log(2) / 1, 1e-12},
		{"decelerating mid-cell", 0.3, 2, 0.5, 1, math.NaN(), 1e-12},
		{"backward from the east face", 1, -0.5, -3, -1, math.NaN(), 1e-12},
		{"westward towards a slow face", 0.7, -1, -1e-3, -1, math.NaN(), 1e-9},
		{"uniform velocity", 0.2, 0.8, 0.8, 1, 1, 1e-12},
		{"almost uniform (A = 1e-13)", 0.2, 0.8, 0.8 + 1e-13, 1, 1, 1e-12},
		{"on the exit face already", 1, 0.5, 0.25, 1, 0, 0},
		{"tiny velocities", 0.5, 1e-200, 3e-200, 1, math.NaN(), 1e-12},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			dt, dir := exitTime(tc.p, tc.vLo, tc.vHi)
			if dir != tc.dir {
				t.Fatalf("direction %d, want %d", dir, tc.dir)
			}
			target := 1.0
			if dir < 0 {
				target = 0
			}
			want := tc.analytic
			if math.IsNaN(want) {
				a := tc.vHi - tc.vLo
				vExit := tc.vLo + a*target
				want = math.Log(vExit/(tc.vLo+a*tc.p)) / a
			}
			if e := math.Abs(dt - want); e > 1e-13*math.Max(1, math.Abs(want)) {
				t.Errorf("exit time %.17g, closed form %.17g", dt, want)
			}
			if tc.quadratureTol > 0 {
				q := simpsonTime(tc.p, target, tc.vLo, tc.vHi)
				if e := math.Abs(dt-q) / q; e > tc.quadratureTol {
					t.Errorf("exit time %.17g, quadrature %.17g (rel. error %.2g)", dt, q, e)
				}
			}
		})
	}
}

// TestExitTimeNever checks the cases where a particle cannot leave along
// an axis: zero velocity, and a velocity that vanishes inside the cell (a
// stagnation coordinate, approached in infinite time).
func TestExitTimeNever(t *testing.T) {
	for _, c := range [][3]float64{{0.5, 1, -1}, {0.2, 1, -1}, {0.9, 1, -1}, {0.3, 0, 0}, {0, 0, 1}, {1, -1, 0}} {
		if dt, dir := exitTime(c[0], c[1], c[2]); dir != 0 || !math.IsInf(dt, 1) {
			t.Errorf("exitTime(%v) = %g, %d; want +Inf, 0", c, dt, dir)
		}
	}
}

// TestAdvance checks the position reached after a given time against a
// Runge-Kutta integration of dp/dt = v(p).
func TestAdvance(t *testing.T) {
	for _, c := range [][4]float64{{0.1, 1, 3, 0.4}, {0.9, -2, -0.5, 0.3}, {0.5, 0.2, 0.2, 1.5}, {0.5, 1, -1, 3}, {0.25, 0.3, 0.3 + 1e-12, 2}} {
		got := advance(c[0], c[1], c[2], c[3])
		want := rk4Position(c[0], c[1], c[2], c[3])
		if math.Abs(got-want) > 1e-12 {
			t.Errorf("advance(%v) = %.17g, Runge-Kutta %.17g", c, got, want)
		}
	}
}

// linearField samples the interstitial velocity V = (c*x, -c*y), a
// stagnation-point flow whose streamlines are the hyperbolas x*y = const
// with x(t) = x0*exp(c*t), on a grid. Each velocity component varies
// linearly in its own direction, so Pollock's (1988) interpolation is exact
// in every cell and traced paths and times must match the closed form to
// round-off. Pore volume per cell = DX*DY*m, face flux = V*face length*m.
func linearField(c, m float64) *Field {
	g := reservoir.Grid{NX: 12, NY: 10, DX: 0.75, DY: 0.6, X0: 0.5, Y0: 0.25}
	f := &Field{Grid: g, PoreVolume: make([]float64, g.N()), FluxX: make([]float64, g.NXFaces()), FluxY: make([]float64, g.NYFaces())}
	for k := range f.PoreVolume {
		f.PoreVolume[k] = g.DX * g.DY * m
	}
	for j := 0; j < g.NY; j++ {
		for i := 0; i <= g.NX; i++ {
			f.FluxX[g.XFace(i, j)] = c * (g.X0 + float64(i)*g.DX) * g.DY * m
		}
	}
	for j := 0; j <= g.NY; j++ {
		for i := 0; i < g.NX; i++ {
			f.FluxY[g.YFace(i, j)] = -c * (g.Y0 + float64(j)*g.DY) * g.DX * m
		}
	}
	return f
}

func tracePoint(f *Field, x, y, sign float64) *half {
	tr := newTracer(f, Settings{MaxSteps: 1000, KeepPaths: true})
	i, j, _ := f.Grid.Locate(x, y)
	k := f.Grid.Index(i, j)
	xi := (x-f.Grid.X0)/f.Grid.DX - float64(i)
	eta := (y-f.Grid.Y0)/f.Grid.DY - float64(j)
	h := &half{}
	h.reset()
	tr.point(h, k, xi, eta)
	tr.run(h, k, xi, eta, sign, -1, 0)
	return h
}

func TestLinearFieldExact(t *testing.T) {
	const c = 0.013 // 1/day
	f := linearField(c, 7.5)
	x0, y0 := 2.0, 2.5
	xmax := f.Grid.X0 + f.Grid.Width()
	ymax := f.Grid.Y0 + f.Grid.Height()
	for _, tc := range []struct {
		name string
		sign float64
		want float64 // closed-form time to the grid edge
	}{
		{"forward to the east edge", 1, math.Log(xmax/x0) / c},
		{"backward to the north edge", -1, math.Log(ymax/y0) / c},
	} {
		h := tracePoint(f, x0, y0, tc.sign)
		if h.end != Boundary {
			t.Fatalf("%s: ended by %v", tc.name, h.end)
		}
		total := 0.0
		for _, v := range h.tau {
			total += v
		}
		if e := relErr(total, tc.want); e > 1e-12 {
			t.Errorf("%s: time of flight %.15g, closed form %.15g (rel. error %.2g)", tc.name, total, tc.want, e)
		}
		for _, p := range h.path {
			if e := relErr(p[0]*p[1], x0*y0); e > 1e-12 {
				t.Errorf("%s: point %v is off the hyperbola x*y = %g (rel. error %.2g)", tc.name, p, x0*y0, e)
			}
		}
		if len(h.cells) < 5 {
			t.Errorf("%s: crossed only %d cells", tc.name, len(h.cells))
		}
	}
}

// TestDiagonalCorners traces uniform flow at 45 degrees started exactly on
// a grid vertex: the line passes through cell corners, where both exit
// times tie. Time of flight is distance over speed (common practice) and
// only the diagonal cells take a measurable share of it.
func TestDiagonalCorners(t *testing.T) {
	g := reservoir.Grid{NX: 8, NY: 8, DX: 3, DY: 3}
	f := &Field{Grid: g, PoreVolume: make([]float64, g.N()), FluxX: make([]float64, g.NXFaces()), FluxY: make([]float64, g.NYFaces())}
	const u, m = 0.2, 0.35 // velocity per axis (ft/day) and pore volume per area
	for k := range f.PoreVolume {
		f.PoreVolume[k] = g.DX * g.DY * m
	}
	for k := range f.FluxX {
		f.FluxX[k] = u * g.DY * m
	}
	for k := range f.FluxY {
		f.FluxY[k] = u * g.DX * m
	}
	h := tracePoint(f, 0, 0, 1)
	total := 0.0
	for n, k := range h.cells {
		total += h.tau[n]
		if i, j := g.IJ(int(k)); i != j && h.tau[n] > 1e-9*g.DX/u {
			t.Errorf("cell (%d,%d) off the diagonal holds tau %g", i, j, h.tau[n])
		}
	}
	if e := relErr(total, g.Width()/u); e > 1e-12 {
		t.Errorf("time of flight %.15g, want %.15g", total, g.Width()/u)
	}
	if h.end != Boundary {
		t.Errorf("ended by %v, want boundary", h.end)
	}
}

package pressure

import (
	"math"
	"slices"
	"testing"

	"floodtrace/reservoir"
)

// dipping sets a plane depth D = d0 + ax*x + ay*y (cell centres) and the
// densities on m.
func dipping(m *reservoir.Model, d0, ax, ay, rhoW, rhoO float64) {
	m.Depth = make([]float64, m.Grid.N())
	for k := range m.Depth {
		x, y := m.Grid.Center(k)
		m.Depth[k] = d0 + ax*x + ay*y
	}
	m.Fluids.WaterDensity, m.Fluids.OilDensity = rhoW, rhoO
}

// TestHydrostaticEquilibrium: a closed dipping box whose one well is on
// BHP control is at hydrostatic equilibrium, p = BHP + rho gamma (D -
// D_well) (hydrostatics, common practice): every face flux and the well
// rate are zero to round-off, in both unit systems and for a non-uniform
// but hydrostatically layered density. Without any well the box carries
// no flux at all.
func TestHydrostaticEquilibrium(t *testing.T) {
	for _, units := range []reservoir.UnitSystem{reservoir.Field, reservoir.Metric} {
		m := reservoir.NewUniform(9, 6, 50, 40, 120, 0.2, 20)
		m.Units = units
		m.Fluids = reservoir.Fluids{WaterViscosity: 0.5, OilViscosity: 2, InitialSw: 0.25, WaterDensity: 64, OilDensity: 49}
		m.RelPerm = reservoir.Corey{Swc: 0.2, Sor: 0.2, KrwMax: 0.3, KroMax: 0.8, Nw: 2, No: 2}
		dipping(m, 5000, 0.12, -0.07, 64, 49)
		mustAddWell(t, m, "P", reservoir.Producer, 4, 2, reservoir.BHPControl, 2500)
		sol, err := Solve(Input{Model: m}, Settings{Tol: 1e-14})
		if err != nil {
			t.Fatal(err)
		}
		rho := MixtureDensity(m, 0.25)
		gam := units.GravityGradient()
		scale := 0.0 // largest gravity flux of a face, the size round-off is measured against
		pb, _ := newProblem(Input{Model: m})
		for _, v := range append(slices.Clone(pb.gx), pb.gy...) {
			scale = math.Max(scale, math.Abs(v))
		}
		worst := 0.0
		for _, v := range append(slices.Clone(sol.FluxX), sol.FluxY...) {
			worst = math.Max(worst, math.Abs(v))
		}
		if worst > 1e-9*scale || math.Abs(sol.Wells[0].Q) > 1e-9*scale {
			t.Errorf("%s: largest flux %.3g, well rate %.3g (gravity flux scale %.3g)", units, worst, sol.Wells[0].Q, scale)
		}
		wc := sol.Wells[0].Cell
		for k := range sol.P {
			want := 2500 + rho*gam*(m.Depth[k]-m.Depth[wc])
			if math.Abs(sol.P[k]-want) > 1e-9*2500 {
				t.Fatalf("%s: cell %d: p %.12g, hydrostatic %.12g", units, k, sol.P[k], want)
			}
		}
		m.Wells = nil
		sol, err = Solve(Input{Model: m}, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		for _, v := range append(sol.FluxX, sol.FluxY...) {
			if v != 0 {
				t.Fatalf("%s: a closed box without wells carries flux %g", units, v)
			}
		}
	}
}

// TestGravityChannel: in a tilted one-dimensional channel carrying the
// injected rate Q, Darcy's law with gravity (Darcy 1856; the potential
// p - rho gamma D, common practice) gives the pressure step between
// neighbouring cells p_i - p_{i+1} = Q/T - rho gamma (D_{i+1} - D_i), for
// injection down-dip and up-dip; every face carries Q.
func TestGravityChannel(t *testing.T) {
	for _, slope := range []float64{0.2, -0.2} {
		m := reservoir.NewUniform(30, 1, 40, 40, 200, 0.2, 10)
		m.Fluids = reservoir.Fluids{WaterViscosity: 1, OilViscosity: 1, WaterDensity: 62.4, OilDensity: 62.4}
		dipping(m, 6000, slope, 0, 62.4, 62.4)
		mustAddWell(t, m, "I", reservoir.Injector, 0, 0, reservoir.RateControl, 300)
		mustAddWell(t, m, "P", reservoir.Producer, 29, 0, reservoir.BHPControl, 1500)
		mob := uniformMobility(m, 1)
		sol, err := Solve(Input{Model: m, Mobility: mob}, Settings{Tol: 1e-14})
		if err != nil {
			t.Fatal(err)
		}
		T := 0.001127 * 200 * 10 * 40 / 40 // Darcy factor k h dy / dx, harmonic of equal halves
		for i := 0; i+1 < 30; i++ {
			want := 300/T - 62.4/144*(m.Depth[i+1]-m.Depth[i])
			if got := sol.P[i] - sol.P[i+1]; math.Abs(got-want) > 1e-8*math.Abs(want) {
				t.Errorf("slope %g: step %d: %.12g, want %.12g", slope, i, got, want)
			}
			if f := sol.FluxX[m.Grid.XFace(i+1, 0)]; math.Abs(f-300) > 1e-8*300 {
				t.Errorf("slope %g: face %d flux %.12g", slope, i+1, f)
			}
		}
	}
}

// TestUniformDepthChangesNothing: a uniform depth gives bit for bit the
// solution of the case without depth (no depth difference across any
// face), and random mobility and density fields keep each cell's balance
// to round-off with gravity on.
func TestUniformDepthChangesNothing(t *testing.T) {
	for seed := uint64(1); seed <= 3; seed++ {
		m, mob := randomCase(t, 30, 20, seed+70, seed == 2)
		base, err := Solve(Input{Model: m, Mobility: mob}, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		m.Depth = make([]float64, m.Grid.N())
		for k := range m.Depth {
			m.Depth[k] = 7000
		}
		m.Fluids.WaterDensity, m.Fluids.OilDensity = 63, 45
		flat, err := Solve(Input{Model: m, Mobility: mob}, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		if !slices.Equal(base.P, flat.P) && !allNaNEqual(base.P, flat.P) || !slices.Equal(base.FluxX, flat.FluxX) || !slices.Equal(base.FluxY, flat.FluxY) {
			t.Errorf("seed %d: a uniform depth changed the solution", seed)
		}
		dipping(m, 7000, 0.3, 0.1, 63, 45)
		rho := make([]float64, m.Grid.N())
		for k := range rho {
			rho[k] = 45 + 18*float64((k*7919)%13)/12
		}
		sol, err := Solve(Input{Model: m, Mobility: mob, Density: rho}, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		inj := 0.0
		for _, w := range sol.Wells {
			inj += math.Max(w.Q, 0)
		}
		g := m.Grid
		worst := 0.0
		for j := 0; j < g.NY; j++ {
			for i := 0; i < g.NX; i++ {
				k := g.Index(i, j)
				out := sol.FluxX[g.XFace(i+1, j)] - sol.FluxX[g.XFace(i, j)] + sol.FluxY[g.YFace(i, j+1)] - sol.FluxY[g.YFace(i, j)]
				worst = math.Max(worst, math.Abs(out-sol.Source[k])/inj)
			}
		}
		if worst > 1e-8 || sol.MassBalance > 1e-8 {
			t.Errorf("seed %d: worst cell imbalance %.3g, mass balance %.3g", seed, worst, sol.MassBalance)
		}
	}
}

func allNaNEqual(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] && !(math.IsNaN(a[i]) && math.IsNaN(b[i])) {
			return false
		}
	}
	return true
}

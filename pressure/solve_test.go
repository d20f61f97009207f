package pressure

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"floodtrace/reservoir"
)

// randomCase builds a small heterogeneous model: log-normal kx (sigma of
// ln k = 1), ky = kx times a random factor in [0.3, 1], random thickness,
// a few random fault multipliers, a random mobility field and wells on
// both controls. The seed fixes everything.
func randomCase(t testing.TB, nx, ny int, seed uint64, allRate bool) (*reservoir.Model, []float64) {
	r := rand.New(rand.NewPCG(seed, 11))
	m := reservoir.NewUniform(nx, ny, 30+40*r.Float64(), 30+40*r.Float64(), 100, 0.2, 20)
	for k := range m.PermEast {
		m.PermEast[k] = 100 * math.Exp(r.NormFloat64())
		m.PermNorth[k] = m.PermEast[k] * (0.3 + 0.7*r.Float64())
		m.Thickness[k] = 5 + 30*r.Float64()
	}
	for f := range m.TransMultX {
		if r.IntN(8) == 0 {
			m.TransMultX[f] = 0.1 + 0.9*r.Float64()
		}
	}
	for f := range m.TransMultY {
		if r.IntN(8) == 0 {
			m.TransMultY[f] = 0.1 + 0.9*r.Float64()
		}
	}
	mob := make([]float64, nx*ny)
	for k := range mob {
		mob[k] = 0.2 + 3*r.Float64()
	}
	used := map[int]bool{}
	cell := func() (int, int) {
		for {
			i, j := r.IntN(nx), r.IntN(ny)
			if !used[j*nx+i] {
				used[j*nx+i] = true
				return i, j
			}
		}
	}
	i, j := cell()
	mustAddWell(t, m, "I-1", reservoir.Injector, i, j, reservoir.RateControl, 300+500*r.Float64())
	i, j = cell()
	if allRate {
		mustAddWell(t, m, "I-2", reservoir.Injector, i, j, reservoir.RateControl, 200)
		qi := m.Wells[0].Rate + 200
		i, j = cell()
		mustAddWell(t, m, "P-1", reservoir.Producer, i, j, reservoir.RateControl, 0.4*qi)
		i, j = cell()
		mustAddWell(t, m, "P-2", reservoir.Producer, i, j, reservoir.RateControl, 0.6*qi)
	} else {
		mustAddWell(t, m, "I-2", reservoir.Injector, i, j, reservoir.BHPControl, 2500)
		i, j = cell()
		mustAddWell(t, m, "P-1", reservoir.Producer, i, j, reservoir.BHPControl, 800)
		i, j = cell()
		mustAddWell(t, m, "P-2", reservoir.Producer, i, j, reservoir.RateControl, 250)
	}
	for w := range m.Wells {
		m.Wells[w].Skin = 2 * r.Float64()
	}
	return m, mob
}

// denseReference assembles the pressure equations of a fully active,
// connected model directly from their definitions into a dense matrix
// and solves them with gonum's dense Cholesky factorization (the
// reference). Rows and columns of the gauge cell, if any, are dropped.
func denseReference(t *testing.T, m *reservoir.Model, mob []float64, gauge int) []float64 {
	t.Helper()
	g := m.Grid
	n := g.N()
	a := mat.NewSymDense(n, nil)
	b := make([]float64, n)
	link := func(k, l int, tk, tl, mult float64) {
		T := 0.001127 * mult * tk * tl / (tk + tl)
		a.SetSym(k, k, a.At(k, k)+T)
		a.SetSym(l, l, a.At(l, l)+T)
		a.SetSym(k, l, a.At(k, l)-T)
	}
	for j := 0; j < g.NY; j++ {
		for i := 0; i < g.NX; i++ {
			k := g.Index(i, j)
			if i+1 < g.NX { // half-cell k*h*dy/(dx/2), mobility inside
				l := k + 1
				link(k, l, mob[k]*m.PermEast[k]*m.Thickness[k]*g.DY/(g.DX/2),
					mob[l]*m.PermEast[l]*m.Thickness[l]*g.DY/(g.DX/2), m.TransMultX[g.XFace(i+1, j)])
			}
			if j+1 < g.NY {
				l := k + g.NX
				link(k, l, mob[k]*m.PermNorth[k]*m.Thickness[k]*g.DX/(g.DY/2),
					mob[l]*m.PermNorth[l]*m.Thickness[l]*g.DX/(g.DY/2), m.TransMultY[g.YFace(i, j+1)])
			}
		}
	}
	for _, w := range m.Wells {
		k := w.Cell
		kx, ky := m.PermEast[k], m.PermNorth[k]
		// Peaceman (1983) equivalent radius and well index, written out.
		ro := 0.28 * math.Sqrt(math.Sqrt(ky/kx)*g.DX*g.DX+math.Sqrt(kx/ky)*g.DY*g.DY) /
			(math.Pow(ky/kx, 0.25) + math.Pow(kx/ky, 0.25))
		wi := mob[k] * 2 * math.Pi * 0.001127 * math.Sqrt(kx*ky) * m.Thickness[k] / (math.Log(ro/w.Radius) + w.Skin)
		switch {
		case w.Control == reservoir.BHPControl:
			a.SetSym(k, k, a.At(k, k)+wi)
			b[k] += wi * w.BHP
		case w.Type == reservoir.Injector:
			b[k] += w.Rate
		default:
			b[k] -= w.Rate
		}
	}
	keep := make([]int, 0, n)
	for k := 0; k < n; k++ {
		if k != gauge {
			keep = append(keep, k)
		}
	}
	ar := mat.NewSymDense(len(keep), nil)
	br := mat.NewVecDense(len(keep), nil)
	for u, k := range keep {
		br.SetVec(u, b[k])
		for v, l := range keep[:u+1] {
			ar.SetSym(u, v, a.At(k, l))
		}
	}
	var ch mat.Cholesky
	if !ch.Factorize(ar) {
		t.Fatal("dense reference matrix is not positive definite")
	}
	var x mat.VecDense
	if err := ch.SolveVecTo(&x, br); err != nil {
		t.Fatal(err)
	}
	p := make([]float64, n)
	for u, k := range keep {
		p[k] = x.AtVec(u)
	}
	return p
}

// TestAgainstDenseCholesky compares the sparse assembly and solve with
// the equations assembled independently and solved by gonum's dense
// Cholesky factorization (the reference library), to 1e-8 relative.
func TestAgainstDenseCholesky(t *testing.T) {
	cases := []struct {
		name    string
		nx, ny  int
		seed    uint64
		allRate bool
	}{
		{"7x5", 7, 5, 1, false},
		{"9x9", 9, 9, 2, false},
		{"12x6", 12, 6, 3, false},
		{"15x11", 15, 11, 4, false},
		{"8x8-all-rate", 8, 8, 5, true},
		{"13x7-all-rate", 13, 7, 6, true},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			m, mob := randomCase(t, tc.nx, tc.ny, tc.seed, tc.allRate)
			sol, err := Solve(Input{Model: m, Mobility: mob}, Settings{Tol: 1e-13})
			if err != nil {
				t.Fatal(err)
			}
			gauge := -1
			if tc.allRate {
				if len(sol.Gauge) != 1 {
					t.Fatalf("gauge cells %v, want one", sol.Gauge)
				}
				gauge = sol.Gauge[0]
			}
			ref := denseReference(t, m, mob, gauge)
			scale := 0.0
			for _, v := range ref {
				scale = math.Max(scale, math.Abs(v))
			}
			for k := range ref {
				if d := math.Abs(sol.P[k] - ref[k]); d > 1e-8*scale {
					t.Fatalf("cell %d: p = %.12g, dense Cholesky %.12g", k, sol.P[k], ref[k])
				}
			}
			// BHP-well rates against the reference pressures.
			for w, wr := range sol.Wells {
				if m.Wells[w].Control != reservoir.BHPControl {
					continue
				}
				want := wr.WI * (m.Wells[w].BHP - ref[wr.Cell])
				if math.Abs(wr.Q-want) > 1e-7*math.Abs(want)+1e-9 {
					t.Errorf("well %s: rate %.10g, from dense solution %.10g", wr.Name, wr.Q, want)
				}
			}
		})
	}
}

// fiveSpot is a symmetric five-spot on an odd n x n grid: a rate injector
// in the centre and four BHP producers in the corners.
func fiveSpot(t *testing.T, n int, q float64) *reservoir.Model {
	m := reservoir.NewUniform(n, n, 40, 40, 80, 0.2, 25)
	c := n / 2
	mustAddWell(t, m, "I-1", reservoir.Injector, c, c, reservoir.RateControl, q)
	for w, ij := range [][2]int{{0, 0}, {n - 1, 0}, {0, n - 1}, {n - 1, n - 1}} {
		mustAddWell(t, m, "P-"+string(rune('1'+w)), reservoir.Producer, ij[0], ij[1], reservoir.BHPControl, 1000)
	}
	return m
}

// TestFiveSpotSymmetry: in a symmetric five-spot the four producers get
// equal rates (symmetry of the problem, common practice), to 1e-10
// relative, and they produce what the injector injects.
func TestFiveSpotSymmetry(t *testing.T) {
	for _, n := range []int{5, 21, 41} {
		m := fiveSpot(t, n, 1000)
		sol, err := Solve(Input{Model: m}, Settings{Tol: 1e-14})
		if err != nil {
			t.Fatal(err)
		}
		q0 := sol.Wells[1].Q
		for _, w := range sol.Wells[2:] {
			if math.Abs(w.Q-q0) > 1e-10*math.Abs(q0) {
				t.Errorf("n=%d: producer %s rate %.15g, producer P-1 %.15g", n, w.Name, w.Q, q0)
			}
		}
		if math.Abs(4*q0+1000) > 1e-8*1000 {
			t.Errorf("n=%d: producers make %.12g, injector injects 1000", n, -4*q0)
		}
		if sol.MassBalance > 1e-10 {
			t.Errorf("n=%d: mass balance %g", n, sol.MassBalance)
		}
	}
}

// TestBHPLimits: a rate-controlled injector whose BHP would exceed MaxBHP
// and rate-controlled producers whose BHP would fall below MinBHP are put
// on BHP control at the limit with a lower rate, and say so (well
// control switching, common practice).
func TestBHPLimits(t *testing.T) {
	t.Run("injector", func(t *testing.T) {
		m := fiveSpot(t, 21, 1000)
		free, err := Solve(Input{Model: m}, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		if free.Wells[0].LimitReached || len(free.Warnings) != 0 {
			t.Fatalf("no limit set, yet %+v, %q", free.Wells[0], free.Warnings)
		}
		natural := free.Wells[0].BHP
		limit := natural - 0.3*(natural-1000)
		m.Wells[0].MaxBHP = limit
		sol, err := Solve(Input{Model: m}, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		w := sol.Wells[0]
		if !w.LimitReached || w.Control != reservoir.BHPControl || w.BHP != limit {
			t.Errorf("injector: %+v; want BHP control at %g with LimitReached", w, limit)
		}
		// Linearity: the rate scales with the drawdown, 0.7 of the target.
		if want := 0.7 * 1000; math.Abs(w.Q-want) > 1e-6*want {
			t.Errorf("injector rate at the limit %.10g, want %.10g (linear system)", w.Q, want)
		}
		if len(sol.Warnings) != 1 || !strings.Contains(sol.Warnings[0], "I-1") || !strings.Contains(sol.Warnings[0], "limit") {
			t.Errorf("warnings %q", sol.Warnings)
		}
		// A limit above the natural BHP changes nothing.
		m.Wells[0].MaxBHP = natural + 1
		sol, err = Solve(Input{Model: m}, Settings{})
		if err != nil || sol.Wells[0].LimitReached || sol.Wells[0].Q != 1000 {
			t.Errorf("limit above natural BHP: %+v, %v", sol.Wells[0], err)
		}
	})
	t.Run("producers", func(t *testing.T) {
		m := reservoir.NewUniform(21, 21, 40, 40, 80, 0.2, 25)
		mustAddWell(t, m, "I-1", reservoir.Injector, 10, 10, reservoir.BHPControl, 3000)
		for w, ij := range [][2]int{{0, 0}, {20, 0}, {0, 20}, {20, 20}} {
			p := mustAddWell(t, m, "P-"+string(rune('1'+w)), reservoir.Producer, ij[0], ij[1], reservoir.RateControl, 400)
			p.MinBHP = 500
		}
		// P-1 asks far more than the others can give at 500 psi.
		m.Wells[1].Rate = 5000
		sol, err := Solve(Input{Model: m}, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		p1 := sol.Wells[1]
		if !p1.LimitReached || p1.BHP != 500 || -p1.Q >= 5000 || -p1.Q <= 0 {
			t.Errorf("P-1: %+v; want BHP control at 500 with a rate below 5000", p1)
		}
		for _, w := range sol.Wells[2:] {
			if w.LimitReached || w.Q != -400 || w.BHP < 500 {
				t.Errorf("%s: %+v; want rate 400 above its limit", w.Name, w)
			}
		}
	})
}

// TestLimitsSettle checks on random cases that the controls in force
// after switching satisfy every limit: a rate-controlled well is within
// its limit; a switched well sits at its limit and flows no more than its
// target (consistency of the control logic, common practice).
func TestLimitsSettle(t *testing.T) {
	switched, kept := 0, 0
	for seed := uint64(1); seed <= 8; seed++ {
		m, mob := randomCase(t, 14, 11, seed+20, false)
		base, err := Solve(Input{Model: m, Mobility: mob}, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		// Limits on the rate wells near their natural BHPs.
		r := rand.New(rand.NewPCG(seed, 3))
		for w := range m.Wells {
			wl := &m.Wells[w]
			if wl.Control != reservoir.RateControl {
				continue
			}
			b := base.Wells[w].BHP
			if wl.Type == reservoir.Injector {
				wl.MaxBHP = b * (0.97 + 0.06*r.Float64())
			} else {
				wl.MinBHP = b * (0.97 + 0.06*r.Float64())
			}
		}
		sol, err := Solve(Input{Model: m, Mobility: mob}, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		for w, wr := range sol.Wells {
			wl := m.Wells[w]
			if wl.Control != reservoir.RateControl {
				continue
			}
			inj := wl.Type == reservoir.Injector
			lim := wl.MinBHP
			if inj {
				lim = wl.MaxBHP
			}
			if wr.LimitReached {
				switched++
			} else {
				kept++
			}
			switch {
			case wr.LimitReached:
				if wr.BHP != lim || math.Abs(wr.Q) > wl.Rate*(1+1e-9) {
					t.Errorf("seed %d, %s: switched but BHP %g (limit %g), rate %g (target %g)", seed, wl.Name, wr.BHP, lim, wr.Q, wl.Rate)
				}
			case inj && wr.BHP > lim*(1+1e-12), !inj && wr.BHP < lim*(1-1e-12):
				t.Errorf("seed %d, %s: rate control with BHP %g beyond limit %g", seed, wl.Name, wr.BHP, lim)
			}
		}
	}
	if switched == 0 || kept == 0 {
		t.Errorf("%d wells switched and %d kept their rate: the cases do not exercise both", switched, kept)
	}
	t.Logf("%d wells switched, %d kept their rate", switched, kept)
}

// TestUnbalancedAllRate: an incompressible region whose wells are all
// rate-controlled needs balanced rates; otherwise an input error that
// names the wells (solvability of the Neumann problem, common practice).
func TestUnbalancedAllRate(t *testing.T) {
	m := reservoir.NewUniform(15, 15, 50, 50, 100, 0.2, 20)
	mustAddWell(t, m, "East-Inj", reservoir.Injector, 2, 2, reservoir.RateControl, 1000)
	mustAddWell(t, m, "West-Prod", reservoir.Producer, 12, 12, reservoir.RateControl, 800)
	_, err := Solve(Input{Model: m}, Settings{})
	if err == nil {
		t.Fatal("unbalanced all-rate system solved without error")
	}
	for _, s := range []string{"East-Inj", "West-Prod", "balance"} {
		if !strings.Contains(err.Error(), s) {
			t.Errorf("error %q does not mention %q", err, s)
		}
	}
	m.Wells[1].Rate = 1000
	sol, err := Solve(Input{Model: m}, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if p := sol.P[sol.Gauge[0]]; p != 0 {
		t.Errorf("gauge cell pressure %g, want 0", p)
	}
	if !strings.Contains(strings.Join(sol.Warnings, "\n"), "relative") {
		t.Errorf("no warning about relative pressures: %q", sol.Warnings)
	}
}

// TestSealedRegions: cells cut off from every open well by a sealing
// fault, an inactive strip or a shut well carry no flow, get NaN
// pressure and are reported; fluxes stay finite (connected components of
// the transmissibility graph, common practice).
func TestSealedRegions(t *testing.T) {
	t.Run("fault", func(t *testing.T) {
		m := reservoir.NewUniform(20, 20, 50, 50, 100, 0.2, 20)
		g := m.Grid
		for j := 15; j < 20; j++ {
			m.TransMultX[g.XFace(15, j)] = 0
		}
		for i := 15; i < 20; i++ {
			m.TransMultY[g.YFace(i, 15)] = 0
		}
		mustAddWell(t, m, "I", reservoir.Injector, 2, 2, reservoir.RateControl, 500)
		mustAddWell(t, m, "P", reservoir.Producer, 12, 12, reservoir.BHPControl, 1000)
		sol := solveOK(t, m)
		checkSealed(t, sol, 25, func(i, j int) bool { return i >= 15 && j >= 15 })
	})
	t.Run("inactive-strip-and-gauge", func(t *testing.T) {
		m := reservoir.NewUniform(21, 10, 50, 50, 100, 0.2, 20)
		g := m.Grid
		for j := 0; j < 10; j++ {
			m.Active[g.Index(10, j)] = false
			m.Active[g.Index(15, j)] = false
		}
		// West: BHP-driven. Middle (11..14): all-rate balanced. East: no wells.
		mustAddWell(t, m, "I-W", reservoir.Injector, 2, 2, reservoir.RateControl, 500)
		mustAddWell(t, m, "P-W", reservoir.Producer, 8, 8, reservoir.BHPControl, 1000)
		mustAddWell(t, m, "I-M", reservoir.Injector, 11, 1, reservoir.RateControl, 300)
		mustAddWell(t, m, "P-M", reservoir.Producer, 14, 8, reservoir.RateControl, 300)
		sol := solveOK(t, m)
		checkSealed(t, sol, 50, func(i, j int) bool { return i > 15 })
		if len(sol.Gauge) != 1 || sol.Gauge[0] != g.Index(11, 0) {
			t.Errorf("gauge %v, want the first cell of the middle region %d", sol.Gauge, g.Index(11, 0))
		}
		if sol.Wells[1].Q >= 0 || math.Abs(sol.Wells[1].Q+500) > 1e-6 {
			t.Errorf("west producer rate %g, want -500", sol.Wells[1].Q)
		}
		for _, k := range []int{g.Index(10, 3), g.Index(15, 3)} {
			if !math.IsNaN(sol.P[k]) {
				t.Errorf("inactive cell %d has pressure %g", k, sol.P[k])
			}
		}
	})
	t.Run("shut-well", func(t *testing.T) {
		m := reservoir.NewUniform(20, 20, 50, 50, 100, 0.2, 20)
		g := m.Grid
		for j := 15; j < 20; j++ {
			m.TransMultX[g.XFace(15, j)] = 0
		}
		for i := 15; i < 20; i++ {
			m.TransMultY[g.YFace(i, 15)] = 0
		}
		mustAddWell(t, m, "I", reservoir.Injector, 2, 2, reservoir.RateControl, 500)
		mustAddWell(t, m, "P", reservoir.Producer, 12, 12, reservoir.BHPControl, 1000)
		s := mustAddWell(t, m, "P-NE", reservoir.Producer, 17, 17, reservoir.BHPControl, 1000)
		s.Shut = true
		sol := solveOK(t, m)
		checkSealed(t, sol, 25, func(i, j int) bool { return i >= 15 && j >= 15 })
		if w := sol.Wells[2]; !w.Shut || w.Q != 0 {
			t.Errorf("shut well: %+v", w)
		}
	})
}

func solveOK(t *testing.T, m *reservoir.Model) *Solution {
	t.Helper()
	sol, err := Solve(Input{Model: m}, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	return sol
}

func checkSealed(t *testing.T, sol *Solution, want int, sealed func(i, j int) bool) {
	t.Helper()
	g := sol.Grid
	if len(sol.Unconnected) != want {
		t.Errorf("%d unconnected cells, want %d", len(sol.Unconnected), want)
	}
	for _, k := range sol.Unconnected {
		if i, j := g.IJ(k); !sealed(i, j) {
			t.Errorf("cell (%d,%d) reported unconnected", i, j)
		}
		if !math.IsNaN(sol.P[k]) {
			t.Errorf("unconnected cell %d has pressure %g", k, sol.P[k])
		}
	}
	for f, v := range append(append([]float64{}, sol.FluxX...), sol.FluxY...) {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			t.Fatalf("face %d flux %g", f, v)
		}
	}
	found := false
	for _, w := range sol.Warnings {
		if strings.Contains(w, "not connected") && strings.Contains(w, "cell (i=") {
			found = true
		}
	}
	if !found {
		t.Errorf("no warning about unconnected cells: %q", sol.Warnings)
	}
}

// TestCellMassBalance: the TPFA fluxes out of each cell add up to its well
// source (discrete conservation, the defining property of a finite-volume
// scheme), to 1e-8 relative to the total injection, on heterogeneous
// cases with faults, inactive cells and both controls.
func TestCellMassBalance(t *testing.T) {
	for seed := uint64(1); seed <= 4; seed++ {
		m, mob := randomCase(t, 40, 30, seed+40, seed%2 == 0)
		r := rand.New(rand.NewPCG(seed, 5))
		for k := range m.Active {
			if r.IntN(15) == 0 {
				busy := false
				for _, w := range m.Wells {
					busy = busy || w.Cell == k
				}
				m.Active[k] = busy
			}
		}
		sol, err := Solve(Input{Model: m, Mobility: mob}, Settings{})
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
		if worst > 1e-8 {
			t.Errorf("seed %d: worst cell imbalance %.3g of the injection", seed, worst)
		}
		if sol.MassBalance > 1e-8 {
			t.Errorf("seed %d: mass balance %.3g", seed, sol.MassBalance)
		}
	}
}

// TestInitialMobility: with no mobility array, the solve uses the initial
// total mobility krw(Swi)/muw + kro(Swi)/muo. Corey (1954) values worked
// by hand: swc = 0.2, sor = 0.2, Swi = 0.3 gives Swn = 1/6; krw =
// 0.4*(1/6)^2 = 1/90, kro = 0.9*(5/6)^2 = 0.625; with muw = 0.5, muo = 2:
// lambda = 1/45 + 0.3125 = 0.33472...
func TestInitialMobility(t *testing.T) {
	m := fiveSpot(t, 11, 500)
	m.RelPerm = reservoir.Corey{Swc: 0.2, Sor: 0.2, KrwMax: 0.4, KroMax: 0.9, Nw: 2, No: 2}
	m.Fluids = reservoir.Fluids{WaterViscosity: 0.5, OilViscosity: 2, InitialSw: 0.3}
	lam, err := InitialMobility(m)
	if err != nil {
		t.Fatal(err)
	}
	if want := 1.0/45 + 0.3125; math.Abs(lam-want) > 1e-14 {
		t.Fatalf("initial mobility %.15g, want %.15g", lam, want)
	}
	a, err := Solve(Input{Model: m}, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	b, err := Solve(Input{Model: m, Mobility: uniformMobility(m, 1/lam)}, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	for k := range a.P {
		if math.Abs(a.P[k]-b.P[k]) > 1e-9*math.Abs(b.P[k]) {
			t.Fatalf("cell %d: %g with nil mobility, %g with the explicit array", k, a.P[k], b.P[k])
		}
	}
}

// TestBadInput: malformed input gives an error naming the problem, never
// a panic.
func TestBadInput(t *testing.T) {
	base := func() *reservoir.Model {
		m := reservoir.NewUniform(6, 5, 50, 50, 100, 0.2, 20)
		mustAddWell(t, m, "I-1", reservoir.Injector, 1, 1, reservoir.RateControl, 100)
		mustAddWell(t, m, "P-1", reservoir.Producer, 4, 3, reservoir.BHPControl, 500)
		return m
	}
	cases := []struct {
		name string
		edit func(in *Input)
		want string
	}{
		{"nil model", func(in *Input) { in.Model = nil }, "no model"},
		{"empty grid", func(in *Input) { in.Model.Grid.NX = 0 }, "grid of 0 x 5"},
		{"bad cell size", func(in *Input) { in.Model.Grid.DY = -1 }, "cell size"},
		{"short perm", func(in *Input) { in.Model.PermEast = in.Model.PermEast[:3] }, "PermEast has 3 values"},
		{"short multipliers", func(in *Input) { in.Model.TransMultY = nil }, "TransMultY has 0 values"},
		{"negative perm", func(in *Input) { in.Model.PermNorth[7] = -5 }, "cell (i=1, j=1)"},
		{"NaN thickness", func(in *Input) { in.Model.Thickness[2] = math.NaN() }, "thickness NaN"},
		{"negative multiplier", func(in *Input) { in.Model.TransMultX[3] = -1 }, "x-face 3"},
		{"mobility length", func(in *Input) { in.Mobility = make([]float64, 4) }, "Mobility has 4 values"},
		{"mobility NaN", func(in *Input) {
			in.Mobility = uniformMobility(in.Model, 1)
			in.Mobility[9] = math.NaN()
		}, "total mobility NaN"},
		{"no relperm", func(in *Input) { in.Model.RelPerm = nil }, "relative permeability"},
		{"zero viscosity", func(in *Input) { in.Model.Fluids.OilViscosity = 0 }, "viscosities"},
		{"well outside", func(in *Input) { in.Model.Wells[0].I = 9 }, "outside"},
		{"well cell mismatch", func(in *Input) { in.Model.Wells[0].Cell = 2 }, "does not match"},
		{"inactive well cell", func(in *Input) { in.Model.Active[in.Model.Wells[1].Cell] = false }, "inactive"},
		{"negative rate", func(in *Input) { in.Model.Wells[0].Rate = -3 }, "not negative"},
		{"unknown control", func(in *Input) { in.Model.Wells[0].Control = "choke" }, "unknown control"},
		{"unknown type", func(in *Input) { in.Model.Wells[0].Type = "observer" }, "unknown well type"},
		{"NaN BHP", func(in *Input) { in.Model.Wells[1].BHP = math.NaN() }, "bottom-hole pressure"},
		{"huge wellbore", func(in *Input) { in.Model.Wells[1].Radius = 40 }, "too large"},
		{"negative skin too big", func(in *Input) { in.Model.Wells[1].Skin = -10 }, "ln(ro/rw)+skin"},
		{"zero mobility at well", func(in *Input) {
			in.Mobility = uniformMobility(in.Model, 1)
			in.Mobility[in.Model.Wells[0].Cell] = 0
		}, "zero total mobility"},
		{"zero perm at well", func(in *Input) { in.Model.PermEast[in.Model.Wells[1].Cell] = 0 }, "positive permeability"},
		{"negative limit", func(in *Input) { in.Model.Wells[0].MaxBHP = -1 }, "BHP limits"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			in := Input{Model: base()}
			tc.edit(&in)
			_, err := Solve(in, Settings{})
			if err == nil {
				t.Fatalf("no error, want one containing %q", tc.want)
			}
			if !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %q does not contain %q", err, tc.want)
			}
			if _, err := Assemble(in); err == nil {
				t.Errorf("Assemble accepted the input")
			}
		})
	}
}

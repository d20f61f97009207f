package pressure

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"floodtrace/pressure/sparse"
	"floodtrace/reservoir"
)

// TestBackflowPair: one injector and one producer at the ends of a row of
// cells. When the pressure the injector would have to overcome (the
// producer's BHP, since nothing else flows) is above its max_bhp or its
// BHP, it injects nothing and says so, the producer produces nothing, and
// the row sits at the producer's BHP (incompressible flow with no source:
// uniform pressure, Darcy 1856). When the limit is above the producer's
// BHP, the injector held at its limit flows
// q = (limit - pbh) / (2/cf + (nx-1)*dx*mu/(c*k*A)), the two Peaceman
// (1978) connections and the linear Darcy resistance between the well
// cells in series (exact for two-point fluxes in one dimension).
func TestBackflowPair(t *testing.T) {
	const nx, dx, dy, k, h, mu = 21, 100.0, 100.0, 100.0, 20.0, 1.0
	cases := []struct {
		name      string
		ctl       reservoir.Control
		rate      float64 // injector rate (rate control)
		inj       float64 // injector max_bhp (rate control) or bhp (BHP control)
		prodBHP   float64
		backflow  bool
		wantLimit string // the limit the warning names
	}{
		{"max_bhp 4000, producer bhp 5000", reservoir.RateControl, 500, 4000, 5000, true, "max_bhp 4000"},
		{"max_bhp 100, producer bhp 800", reservoir.RateControl, 500, 100, 800, true, "max_bhp 100"},
		{"bhp injector 3000, producer bhp 3500", reservoir.BHPControl, 0, 3000, 3500, true, "bhp 3000"},
		{"max_bhp 4000, producer bhp 3000 (flows at its limit)", reservoir.RateControl, 5000, 4000, 3000, false, ""},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			m := reservoir.NewUniform(nx, 1, dx, dy, k, 0.2, h)
			var in *reservoir.Well
			if tc.ctl == reservoir.RateControl {
				in = mustAddWell(t, m, "INJ", reservoir.Injector, 0, 0, reservoir.RateControl, tc.rate)
				in.MaxBHP = tc.inj
			} else {
				mustAddWell(t, m, "INJ", reservoir.Injector, 0, 0, reservoir.BHPControl, tc.inj)
			}
			mustAddWell(t, m, "PRD", reservoir.Producer, nx-1, 0, reservoir.BHPControl, tc.prodBHP)
			sol, err := Solve(Input{Model: m, Mobility: uniformMobility(m, mu)}, Settings{Tol: 1e-13})
			if err != nil {
				t.Fatal(err)
			}
			wi, wp := sol.Wells[0], sol.Wells[1]
			if tc.backflow {
				if !wi.Backflow || wi.Q != 0 || wi.Shut || wp.Backflow || wp.Q != 0 {
					t.Fatalf("INJ %+v, PRD %+v: want the injector shut for backflow, both rates 0", wi, wp)
				}
				if tc.ctl == reservoir.RateControl && !wi.LimitReached {
					t.Errorf("INJ: LimitReached not set")
				}
				for i, p := range sol.P {
					if math.Abs(p-tc.prodBHP) > 1e-12*tc.prodBHP { // measured 1.1e-15
						t.Errorf("cell %d: p = %.12g, want the producer's BHP %g", i, p, tc.prodBHP)
					}
				}
				if math.Abs(wi.BHP-tc.prodBHP) > 1e-12*tc.prodBHP {
					t.Errorf("INJ reports %.12g, want the pressure it must overcome %g", wi.BHP, tc.prodBHP)
				}
				msg := strings.Join(sol.Warnings, "\n")
				need := fmt.Sprintf("need more than %.6g psi", tc.prodBHP)
				if !strings.Contains(msg, "well INJ: injects nothing") || !strings.Contains(msg, need) || !strings.Contains(msg, tc.wantLimit) {
					t.Errorf("warnings %q: want INJ, %q and %q", sol.Warnings, need, tc.wantLimit)
				}
				return
			}
			if wi.Backflow || !wi.LimitReached || wi.BHP != tc.inj {
				t.Fatalf("INJ %+v: want it at its limit %g, flowing", wi, tc.inj)
			}
			c := m.Units.Darcy()
			want := (tc.inj - tc.prodBHP) / (1/wi.WI + 1/wp.WI + float64(nx-1)*dx*mu/(c*k*dy*h))
			if math.Abs(wi.Q-want) > 1e-12*want || math.Abs(wp.Q+want) > 1e-12*want { // measured 8e-14
				t.Errorf("rates %.12g, %.12g; Darcy in series %.12g", wi.Q, wp.Q, want)
			}
		})
	}
}

// solveSystem solves an assembled system with conjugate gradients and
// returns the cell pressures (NaN off the unknowns, 0 on gauge cells).
func solveSystem(t *testing.T, sys *System, n int) []float64 {
	t.Helper()
	x := make([]float64, len(sys.Unknown))
	pre, err := sparse.NewIC0(sys.A)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := sparse.CG(sys.A, sys.B, x, pre, sparse.CGSettings{Tol: 1e-13}); err != nil {
		t.Fatal(err)
	}
	p := make([]float64, n)
	for k := range p {
		p[k] = math.NaN()
	}
	for u, k := range sys.Unknown {
		p[k] = x[u]
	}
	return p
}

// TestBackflowSink: two rate injectors in the west, two BHP producers
// near them, and far to the east a low-BHP producer with a high-BHP one
// beside it. Without the constraint the high-BHP producer injects into
// the pressure sink of its neighbour (checked on the unconstrained
// system). With it, that producer is shut, the others produce, the rates
// balance (incompressible flow, conservation to round-off), and the
// pressures are those of the same case with that well removed
// (superposition: a shut well is no well).
func TestBackflowSink(t *testing.T) {
	build := func(withHigh bool) *reservoir.Model {
		m := reservoir.NewUniform(31, 11, 50, 50, 120, 0.2, 20)
		mustAddWell(t, m, "I-1", reservoir.Injector, 3, 5, reservoir.RateControl, 2000)
		mustAddWell(t, m, "I-2", reservoir.Injector, 8, 5, reservoir.RateControl, 2000)
		mustAddWell(t, m, "P-1", reservoir.Producer, 5, 0, reservoir.BHPControl, 1000)
		mustAddWell(t, m, "P-2", reservoir.Producer, 6, 10, reservoir.BHPControl, 1000)
		mustAddWell(t, m, "P-LO", reservoir.Producer, 30, 5, reservoir.BHPControl, 300)
		if withHigh {
			mustAddWell(t, m, "P-HI", reservoir.Producer, 28, 5, reservoir.BHPControl, 1000)
		}
		return m
	}
	m := build(true)
	sys, err := Assemble(Input{Model: m})
	if err != nil {
		t.Fatal(err)
	}
	free := solveSystem(t, sys, m.Grid.N())
	sol := solveOK(t, m)
	hi := sol.Wells[5]
	if q := hi.WI * (1000 - free[hi.Cell]); !(q > 1) {
		t.Fatalf("setup: without the constraint P-HI would flow %g (want injection), cell pressure %g", q, free[hi.Cell])
	}
	t.Logf("without the constraint P-HI injects %.4g", hi.WI*(1000-free[hi.Cell]))
	if !hi.Backflow || hi.Q != 0 {
		t.Fatalf("P-HI %+v: want shut for backflow", hi)
	}
	net, inj := 0.0, 0.0
	for _, w := range sol.Wells[:5] {
		if w.Backflow || w.Shut {
			t.Errorf("%s shut: %+v", w.Name, w)
		}
		if w.Type == reservoir.Producer && !(w.Q < 0) {
			t.Errorf("%s does not produce: %g", w.Name, w.Q)
		}
		net += w.Q
		inj += math.Max(w.Q, 0)
	}
	if math.Abs(net) > 5e-11*inj { // measured 5e-12 (solver tolerance 1e-10)
		t.Errorf("net rate %g of %g injected", net, inj)
	}
	ref := solveOK(t, build(false))
	for k := range sol.P {
		if d := math.Abs(sol.P[k] - ref.P[k]); d > 2e-10*ref.P[k] { // measured 3.9e-11
			t.Fatalf("cell %d: p = %.12g, %.12g without P-HI", k, sol.P[k], ref.P[k])
		}
	}
	for w := range ref.Wells {
		if d := math.Abs(sol.Wells[w].Q - ref.Wells[w].Q); d > 5e-11*inj { // measured 7e-12
			t.Errorf("%s: rate %.12g, %.12g without P-HI", ref.Wells[w].Name, sol.Wells[w].Q, ref.Wells[w].Q)
		}
	}
	msg := strings.Join(sol.Warnings, "\n")
	if want := fmt.Sprintf("well P-HI: produces nothing: its cell pressure with the well shut, %.6g psi, is below its bhp 1000", ref.P[hi.Cell]); !strings.Contains(msg, want) {
		t.Errorf("warnings %q, want %q", sol.Warnings, want)
	}
}

// TestAtmosphericFloor: a rate producer without min_bhp that asks more
// than the row can give is held at atmospheric pressure (14.7 psi, 1.01325
// bar; common practice) instead of drawing its cell below zero. In this
// row (rate injector in the middle cell, the floored producer at the west
// end, a BHP producer at the east end, equal resistance R = 1/cf +
// 10*dx*mu/(c*k*A) on each side, Darcy 1856 and Peaceman 1978 in series)
// the floored producer takes q = (qi + (pbh - patm)/R) / 2. A rate-only
// (gauged) row keeps relative pressures: no floor applies there.
func TestAtmosphericFloor(t *testing.T) {
	const nx, dx, dy, k, h, mu, qi = 21, 100.0, 100.0, 10.0, 20.0, 1.0, 300.0
	cases := []struct {
		units reservoir.UnitSystem
		pbh   float64
		atm   float64
	}{
		{reservoir.Field, 1000, 14.7},
		{reservoir.Metric, 70, 1.01325},
	}
	for _, tc := range cases {
		t.Run(string(tc.units), func(t *testing.T) {
			m := reservoir.NewUniform(nx, 1, dx, dy, k, 0.2, h)
			m.Units = tc.units
			mustAddWell(t, m, "PRD-R", reservoir.Producer, 0, 0, reservoir.RateControl, 20*qi)
			mustAddWell(t, m, "PRD-B", reservoir.Producer, nx-1, 0, reservoir.BHPControl, tc.pbh)
			mustAddWell(t, m, "INJ", reservoir.Injector, nx/2, 0, reservoir.RateControl, qi)
			sol, err := Solve(Input{Model: m, Mobility: uniformMobility(m, mu)}, Settings{Tol: 1e-13})
			if err != nil {
				t.Fatal(err)
			}
			r := sol.Wells[0]
			if !r.LimitReached || r.Control != reservoir.BHPControl || r.BHP != tc.atm || r.Relative {
				t.Fatalf("PRD-R %+v: want it held at %g", r, tc.atm)
			}
			R := 1/r.WI + float64(nx/2)*dx*mu/(m.Units.Darcy()*k*dy*h)
			want := (qi + (tc.pbh-tc.atm)/R) / 2
			if math.Abs(-r.Q-want) > 1e-12*want { // measured 2.7e-13
				t.Errorf("PRD-R rate %.12g, want %.12g", -r.Q, want)
			}
			for i, p := range sol.P {
				if !(p >= tc.atm*(1-1e-12)) {
					t.Errorf("cell %d: p = %g below the floor", i, p)
				}
			}
			for _, w := range sol.Wells {
				if w.BHP < 0 || (w.Type == reservoir.Producer) != (w.Q < 0) {
					t.Errorf("%s: %+v", w.Name, w)
				}
			}
			if msg := strings.Join(sol.Warnings, "\n"); !strings.Contains(msg, "PRD-R: default BHP floor") || !strings.Contains(msg, "atmospheric") {
				t.Errorf("warnings %q", sol.Warnings)
			}

			// The same row with rates only: pressures relative, no floor.
			g := reservoir.NewUniform(nx, 1, dx, dy, k, 0.2, h)
			g.Units = tc.units
			mustAddWell(t, g, "PRD-R", reservoir.Producer, 0, 0, reservoir.RateControl, 20*qi)
			mustAddWell(t, g, "INJ", reservoir.Injector, nx/2, 0, reservoir.RateControl, 20*qi)
			gs := solveOK(t, g)
			if w := gs.Wells[0]; !w.Relative || w.LimitReached || w.Q != -20*qi || !(w.BHP < 0) {
				t.Errorf("gauged PRD-R %+v: want rate %g, relative (negative) BHP, no limit", w, 20*qi)
			}
		})
	}
}

// TestBackflowRandom checks on random cases with BHP wells on both sides
// of one another the complementarity the constraint promises (a well with
// a check valve, common practice): no open well flows against its type,
// and every well shut for backflow would flow against its type at its cell
// pressure (or exactly not at all).
func TestBackflowRandom(t *testing.T) {
	shutSome := 0
	for seed := uint64(1); seed <= 40; seed++ {
		m, mob := randomCase(t, 12, 9, seed, false)
		r := rand.New(rand.NewPCG(seed, 5))
		m.Wells[0].MaxBHP = 500 + 3000*r.Float64() // I-1 (rate)
		m.Wells[1].BHP = 500 + 3000*r.Float64()    // I-2 (BHP)
		m.Wells[2].BHP = 500 + 3000*r.Float64()    // P-1 (BHP)
		sol, err := Solve(Input{Model: m, Mobility: mob}, Settings{})
		if err != nil {
			t.Fatalf("seed %d: %v", seed, err)
		}
		for _, w := range sol.Wells {
			if (w.Type == reservoir.Injector && w.Q < 0) || (w.Type == reservoir.Producer && w.Q > 0) {
				t.Errorf("seed %d: %s flows against its type: %+v", seed, w.Name, w)
			}
			if !w.Backflow {
				continue
			}
			shutSome++
			var limit float64
			switch {
			case w.Name == "I-1":
				limit = m.Wells[0].MaxBHP
			default:
				limit = m.Wells[map[string]int{"I-2": 1, "P-1": 2, "P-2": 3}[w.Name]].BHP
				if w.Name == "P-2" {
					limit = m.Units.Atmospheric()
				}
			}
			pc := sol.P[w.Cell]
			if (w.Type == reservoir.Injector && pc < limit*(1-1e-7)) || (w.Type == reservoir.Producer && pc > limit*(1+1e-7)) {
				t.Errorf("seed %d: %s shut for backflow, but its cell pressure %g would let it flow at %g", seed, w.Name, pc, limit)
			}
		}
		if sol.MassBalance > 1e-8 {
			t.Errorf("seed %d: mass balance %g", seed, sol.MassBalance)
		}
	}
	if shutSome == 0 {
		t.Error("no random case shut a well: the test checks nothing")
	}
	t.Logf("%d wells shut for backflow over 40 cases", shutSome)
}

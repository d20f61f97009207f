package pressure

import (
	"math"
	"runtime"
	"testing"

	"floodtrace/internal/benchcase"
	"floodtrace/reservoir"
)

// frontMobility is a made-up displacement: the total mobility rises from
// lam by up to a factor 1+amp inside circles of radius r around the
// injectors, smoothly across a band of 500 ft (an invented front, the
// shape of a waterflood's mobility after breakthrough of a favourable
// displacement; only its smoothness matters here).
func frontMobility(m *reservoir.Model, lam, amp, r float64) []float64 {
	g := m.Grid
	mob := make([]float64, g.N())
	for k := range mob {
		i, j := k%g.NX, k/g.NX
		x, y := (float64(i)+0.5)*g.DX, (float64(j)+0.5)*g.DY
		f := 0.0
		for _, w := range m.Wells {
			if w.Type != reservoir.Injector {
				continue
			}
			d := math.Hypot(x-w.X, y-w.Y)
			f = math.Max(f, 0.5*(1-math.Tanh((d-r)/500)))
		}
		mob[k] = lam * (1 + amp*f)
	}
	return mob
}

// A sequence of solves with slowly changing mobility gives the pressures
// and rates of independent solves to the solve tolerance, reuses the
// preconditioner while the mobility stays within ReuseChange of the one
// it was built for, builds a fresh one after a large change, and takes
// fewer iterations than independent solves.
func TestSequenceMatchesSolve(t *testing.T) {
	m, err := benchcase.Pattern(100)
	if err != nil {
		t.Fatal(err)
	}
	lam, err := InitialMobility(m)
	if err != nil {
		t.Fatal(err)
	}
	steps := []struct {
		amp, r  float64
		rebuild bool // a fresh preconditioner is expected in this step
	}{
		{0.2, 1000, true}, // first solve
		{0.2, 1020, false},
		{0.25, 1040, false},
		{0.3, 1060, false},
		{3, 1100, true}, // mobility up to 3 times that of the set-up: rebuilt
		{3, 1120, false},
	}
	seq := NewSequence(Settings{})
	fresh := 0
	for n, st := range steps {
		in := Input{Model: m, Mobility: frontMobility(m, lam, st.amp, st.r)}
		want, err := Solve(in, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		fresh += want.Iterations
		built := seq.Stats().Built
		got, err := seq.Solve(in)
		if err != nil {
			t.Fatal(err)
		}
		if rebuilt := seq.Stats().Built > built; rebuilt != st.rebuild {
			t.Errorf("step %d: preconditioner rebuilt %v, want %v (stats %+v)", n, rebuilt, st.rebuild, seq.Stats())
		}
		// Both solves meet a relative residual of 1e-10; the pressures
		// agree to far less than that relative to the pressure drop
		// (measured: at most 2.3e-12; tolerance a few times that).
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, v := range want.P {
			if !math.IsNaN(v) {
				lo, hi = math.Min(lo, v), math.Max(hi, v)
			}
		}
		worst := 0.0
		for k, v := range want.P {
			if math.IsNaN(v) != math.IsNaN(got.P[k]) {
				t.Fatalf("step %d: cell %d: pressure %v, want %v", n, k, got.P[k], v)
			}
			if !math.IsNaN(v) {
				worst = math.Max(worst, math.Abs(got.P[k]-v)/(hi-lo))
			}
		}
		t.Logf("step %d: %d iterations (independent solve %d), pressure difference %.2g of the drop", n, got.Iterations, want.Iterations, worst)
		if worst > 1e-11 {
			t.Errorf("step %d: pressures differ by %.3g of the pressure drop, want <= 1e-11", n, worst)
		}
		for w := range want.Wells {
			a, b := got.Wells[w].Q, want.Wells[w].Q
			if math.Abs(a-b) > 1e-7*math.Abs(b)+1e-9 {
				t.Errorf("step %d: well %s rate %v, want %v", n, want.Wells[w].Name, a, b)
			}
		}
	}
	st := seq.Stats()
	t.Logf("sequence %+v; independent solves %d iterations", st, fresh)
	if st.Solves != len(steps) || st.Built != 2 || st.Reused != len(steps)-2 {
		t.Errorf("stats %+v, want %d solves, 2 set-ups, %d reuses", st, len(steps), len(steps)-2)
	}
	if st.Iterations >= fresh {
		t.Errorf("sequence took %d iterations, independent solves %d: the warm start saved nothing", st.Iterations, fresh)
	}
}

// A preconditioner reused across a change it cannot take (mobility up to
// 21 times that of its set-up; ReuseChange set so high that it is tried)
// stops at its iteration cap, and the solve goes on with a fresh one to
// the same answer as Solve.
func TestSequenceWornPreconditioner(t *testing.T) {
	m, err := benchcase.Pattern(100)
	if err != nil {
		t.Fatal(err)
	}
	lam, err := InitialMobility(m)
	if err != nil {
		t.Fatal(err)
	}
	seq := NewSequence(Settings{})
	seq.ReuseChange = 1e9
	if _, err := seq.Solve(Input{Model: m}); err != nil {
		t.Fatal(err)
	}
	in := Input{Model: m, Mobility: frontMobility(m, lam, 20, 2000)}
	got, err := seq.Solve(in)
	if err != nil {
		t.Fatal(err)
	}
	want, err := Solve(in, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	st := seq.Stats()
	t.Logf("stats %+v; %d iterations, independent solve %d", st, got.Iterations, want.Iterations)
	if st.Built != 2 || st.Reused != 0 {
		t.Errorf("stats %+v, want 2 set-ups (the second after the reused one gave up) and no completed reuse", st)
	}
	for k, v := range want.P {
		if d := math.Abs(got.P[k] - v); d > 1e-6 || math.IsNaN(d) != math.IsNaN(v) {
			t.Fatalf("cell %d: pressure %v, want %v", k, got.P[k], v)
		}
	}
}

// A negative ReuseChange builds a preconditioner for every solve (warm
// start only), and the results are the same for GOMAXPROCS 1 and 4.
func TestSequenceNoReuseAndDeterminism(t *testing.T) {
	m, err := benchcase.Pattern(100)
	if err != nil {
		t.Fatal(err)
	}
	lam, err := InitialMobility(m)
	if err != nil {
		t.Fatal(err)
	}
	run := func(procs int, reuse float64) ([][]float64, SequenceStats) {
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
		seq := NewSequence(Settings{})
		seq.ReuseChange = reuse
		var ps [][]float64
		for s := 0; s < 3; s++ {
			sol, err := seq.Solve(Input{Model: m, Mobility: frontMobility(m, lam, 0.1*float64(s), 1000)})
			if err != nil {
				t.Fatal(err)
			}
			ps = append(ps, sol.P)
		}
		return ps, seq.Stats()
	}
	_, st := run(2, -1)
	if st.Built != 3 || st.Reused != 0 {
		t.Errorf("ReuseChange -1: stats %+v, want 3 set-ups and no reuse", st)
	}
	p1, _ := run(1, 0)
	p4, _ := run(4, 0)
	for s := range p1 {
		for k := range p1[s] {
			if math.Float64bits(p1[s][k]) != math.Float64bits(p4[s][k]) {
				t.Fatalf("solve %d, cell %d: %v with GOMAXPROCS 1, %v with 4", s, k, p1[s][k], p4[s][k])
			}
		}
	}
}

func TestMobilityChange(t *testing.T) {
	active := []bool{true, true, false}
	for _, c := range []struct {
		name string
		a, b []float64
		want float64
	}{
		{"same", []float64{1, 2, 3}, []float64{1, 2, 3}, 0},
		{"ten percent up", []float64{1, 2, 3}, []float64{1.1, 2, 3}, 0.1},
		{"halved", []float64{1, 2, 3}, []float64{1, 1, 3}, 0.5},
		{"inactive ignored", []float64{1, 2, 3}, []float64{1, 2, 300}, 0},
		{"from zero", []float64{0, 2, 3}, []float64{1, 2, 3}, math.Inf(1)},
		{"NaN", []float64{1, 2, 3}, []float64{math.NaN(), 2, 3}, math.Inf(1)},
	} {
		if got := mobilityChange(c.a, c.b, active); math.Abs(got-c.want) > 1e-15 && got != c.want {
			t.Errorf("%s: %v, want %v", c.name, got, c.want)
		}
	}
}

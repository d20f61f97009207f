package balance

import (
	"errors"
	"math"
	"strings"
	"testing"

	"floodtrace/flood"
	"floodtrace/reservoir"
)

// thief returns two injectors at equal rates on the west side and two
// producers on the east side, with a streak of twenty times the
// permeability joining I-1 to P-1 along the south row: I-1's water cycles
// through the streak (a thief zone) while I-2 sweeps the matrix.
func thief(t *testing.T) *reservoir.Model {
	t.Helper()
	nx, ny, dx := 30, 13, 20.0
	m := reservoir.NewUniform(nx, ny, dx, dx, 100, 0.2, 10)
	m.Fluids = reservoir.Fluids{WaterViscosity: 0.5, OilViscosity: 1, InitialSw: 0.2}
	m.RelPerm = reservoir.Corey{Swc: 0.2, Sor: 0.2, KrwMax: 0.3, KroMax: 0.9, Nw: 2, No: 2}
	jStreak := 2
	for i := 1; i < nx-1; i++ {
		k := jStreak*nx + i
		m.PermEast[k] *= 20
		m.PermNorth[k] *= 20
	}
	c := func(i int) float64 { return (float64(i) + 0.5) * dx }
	for _, w := range []struct {
		name string
		typ  reservoir.WellType
		i, j int
	}{{"I-1", reservoir.Injector, 1, jStreak}, {"I-2", reservoir.Injector, 1, ny - 1 - jStreak}, {"P-1", reservoir.Producer, nx - 2, jStreak}, {"P-2", reservoir.Producer, nx - 2, ny - 1 - jStreak}} {
		ctl, v := reservoir.RateControl, 100.0
		if w.typ == reservoir.Producer {
			ctl, v = reservoir.BHPControl, 1000
		}
		if err := m.PlaceWell(w.name, w.typ, c(w.i), c(w.j), ctl, v); err != nil {
			t.Fatal(err)
		}
	}
	for i := range m.Wells {
		if m.Wells[i].Type == reservoir.Injector {
			m.Wells[i].MinRate, m.Wells[i].MaxRate = 20, 180
		}
	}
	m.Run = reservoir.RunSettings{End: 1200, ReportEvery: 100, Streamlines: 600}
	return m
}

func TestThiefStreak(t *testing.T) {
	m := thief(t)
	res, err := Balance(m, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	i1, i2 := res.Injectors[0], res.Injectors[1]
	if i1.Name != "I-1" || i2.Name != "I-2" {
		t.Fatalf("injectors %s, %s", i1.Name, i2.Name)
	}
	// The thief injector is the less efficient one now (Thiele and
	// Batycky 2006: water cycled through a thief zone moves little oil).
	if !(i1.EfficiencyNow < i2.EfficiencyNow) {
		t.Errorf("efficiency now: I-1 %g, I-2 %g; the thief I-1 should be lower", i1.EfficiencyNow, i2.EfficiencyNow)
	}
	if !res.Improved || !(i1.RateRecommended < i1.RateNow) || !(i2.RateRecommended > i2.RateNow) {
		t.Fatalf("balance did not move water away from the thief: I-1 %g -> %g, I-2 %g -> %g (improved %v)",
			i1.RateNow, i1.RateRecommended, i2.RateNow, i2.RateRecommended, res.Improved)
	}
	// Same total (the default): to the projection's precision.
	if math.Abs(res.TotalRecommended-res.TotalNow) > 1e-6*res.TotalNow {
		t.Errorf("total injection %g, was %g", res.TotalRecommended, res.TotalNow)
	}
	if !(res.Recommended.Objective > res.Now.Objective) {
		t.Errorf("recommended oil %g not above current %g", res.Recommended.Objective, res.Now.Objective)
	}
	// Brute force over splits of the same total (the check the issue
	// asks for): the recommendation is within margin of the best split.
	fc := &forecaster{m: m, s: Settings{Horizon: m.Run.End}, adj: []int{0, 1}, inj: res.Injectors}
	bestSplit, bestOil := 0.0, math.Inf(-1)
	for f := 0.1; f < 0.95; f += 0.1 {
		out, err := fc.run([]float64{200 * f, 200 * (1 - f)})
		if err != nil {
			t.Fatal(err)
		}
		if out.Objective > bestOil {
			bestSplit, bestOil = f, out.Objective
		}
	}
	// Measured: the recommendation equals the best split (I-1 at its
	// min_rate, the oil falls monotonically with I-1's share).
	const margin = 0.002 // 0.2 % of the best split's oil
	t.Logf("now %.1f, recommended %.1f (I-1 %.1f), best split %.1f at I-1 share %.1f", res.Now.Objective, res.Recommended.Objective, i1.RateRecommended, bestOil, bestSplit)
	if res.Recommended.Objective < bestOil*(1-margin) {
		t.Errorf("recommended oil %g is more than %g below the best split's %g (I-1 share %.1f)", res.Recommended.Objective, margin, bestOil, bestSplit)
	}
}

func TestLimitsHonoured(t *testing.T) {
	m := thief(t)
	base, err := (&forecaster{m: m, s: Settings{Horizon: m.Run.End}, adj: []int{0, 1}, inj: []Injector{{Name: "I-1", Well: 0}, {Name: "I-2", Well: 1}}}).run([]float64{100, 100})
	if err != nil {
		t.Fatal(err)
	}
	// I-2 may take 25 % more pressure drive than it has now, much less
	// than the water balance would give it.
	m.Wells[1].MaxBHP = 1000 + 1.25*(base.MaxBHP[1]-1000)
	m.Wells[0].MinRate, m.Wells[0].MaxRate = 40, 160
	m.Wells[1].MinRate, m.Wells[1].MaxRate = 40, 170
	res, err := Balance(m, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	rec := res.Recommended
	for j, in := range res.Injectors {
		w := m.Wells[in.Well]
		if in.RateRecommended < w.MinRate*(1-1e-12) || in.RateRecommended > w.MaxRate*(1+1e-12) {
			t.Errorf("%s: recommended %g outside [%g, %g]", in.Name, in.RateRecommended, w.MinRate, w.MaxRate)
		}
		if w.MaxBHP > 0 && rec.MaxBHP[j] > w.MaxBHP*(1+1e-9) {
			t.Errorf("%s: forecast BHP %g above max_bhp %g", in.Name, rec.MaxBHP[j], w.MaxBHP)
		}
	}
	i2 := res.Injectors[1]
	t.Logf("I-2: %g -> %g (limit %q, max_bhp %g, forecast BHP %g)", i2.RateNow, i2.RateRecommended, i2.Limit, m.Wells[1].MaxBHP, rec.MaxBHP[1])
	if i2.Limit != "max_bhp" {
		t.Errorf("I-2 limit %q, want max_bhp", i2.Limit)
	}
	// The recommended rate is what the well can take at its limit: the
	// rate set is not above the rate achieved in the forecast.
	if i2.RateRecommended > rec.Achieved[1]*(1+1e-3) {
		t.Errorf("I-2 recommended %g but achieves %g at its max_bhp", i2.RateRecommended, rec.Achieved[1])
	}
	if !(rec.Objective >= res.Now.Objective) {
		t.Errorf("recommended %g below current %g", rec.Objective, res.Now.Objective)
	}
}

func TestBadInput(t *testing.T) {
	m := thief(t)
	m.Path = "thief.yaml"
	var ie *reservoir.InputError
	if _, err := Balance(m, Settings{Objective: Value}); !errors.As(err, &ie) || !strings.Contains(err.Error(), "value block") {
		t.Errorf("objective value without a value block: %v", err)
	}
	if _, err := Balance(m, Settings{Horizon: -5}); !errors.As(err, &ie) || !strings.Contains(err.Error(), "horizon") {
		t.Errorf("negative horizon: %v", err)
	}
	// A horizon before the end of history cannot be checked yet: cases
	// have no history on this branch.
}

func TestProject(t *testing.T) {
	for _, c := range []struct {
		name      string
		y, lo, hi []float64
		total     float64
		want      []float64
	}{
		// The Euclidean projection onto {sum = total} within the box
		// (definition): an equal shift, then clipping and a new shift.
		{"shift", []float64{10, 20}, []float64{0, 0}, []float64{100, 100}, 40, []float64{15, 25}},
		{"clip low", []float64{1, 50}, []float64{5, 5}, []float64{100, 100}, 40, []float64{5, 35}},
		{"clip high", []float64{90, 10, 10}, []float64{0, 0, 0}, []float64{50, 50, 50}, 90, []float64{50, 20, 20}},
	} {
		got := project(c.y, c.lo, c.hi, c.total)
		for j := range got {
			if math.Abs(got[j]-c.want[j]) > 1e-9 {
				t.Errorf("%s: project = %v, want %v", c.name, got, c.want)
				break
			}
		}
	}
}

func TestFreeTotalWithinLimits(t *testing.T) {
	m := thief(t)
	res, err := Balance(m, Settings{FreeTotal: true})
	if err != nil {
		t.Fatal(err)
	}
	for _, in := range res.Injectors {
		w := m.Wells[in.Well]
		if in.RateRecommended < w.MinRate*(1-1e-12) || in.RateRecommended > w.MaxRate*(1+1e-12) {
			t.Errorf("%s: recommended %g outside [%g, %g]", in.Name, in.RateRecommended, w.MinRate, w.MaxRate)
		}
	}
	if !(res.Recommended.Objective >= res.Now.Objective) {
		t.Errorf("recommended %g below current %g", res.Recommended.Objective, res.Now.Objective)
	}
	t.Logf("free total: %g -> %g, oil %g -> %g", res.TotalNow, res.TotalRecommended, res.Now.Objective, res.Recommended.Objective)
	// All producers on rate control: the total cannot move.
	for i := range m.Wells {
		if m.Wells[i].Type == reservoir.Producer {
			m.Wells[i].Control, m.Wells[i].Rate = reservoir.RateControl, 100
		}
	}
	var ie *reservoir.InputError
	if _, err := Balance(m, Settings{FreeTotal: true}); !errors.As(err, &ie) || !strings.Contains(err.Error(), "BHP control") {
		t.Errorf("free total with every well on rate control: %v", err)
	}
}

func TestFlagProducers(t *testing.T) {
	r := &flood.Result{Producers: []flood.Producer{{Name: "P-1"}, {Name: "P-2"}}}
	e := &flood.Efficiencies{ProducerOil: []float64{2, 40}, ProducerInflow: []float64{100, 100},
		Pairs: []flood.PairEfficiency{{Injector: "I-1", Producer: "P-1", WaterRate: 30}, {Injector: "I-2", Producer: "P-1", WaterRate: 70}, {Injector: "I-1", Producer: "P-2", WaterRate: 100}}}
	got := flagProducers(e, r)
	// P-1 makes 0.02 of the water reaching it (below FlagEfficiency 0.05),
	// P-2 0.4: only P-1, with its injectors largest water rate first.
	if len(got) != 1 || got[0].Name != "P-1" || math.Abs(got[0].Efficiency-0.02) > 1e-12 || strings.Join(got[0].Injectors, ",") != "I-2,I-1" {
		t.Errorf("flagged %+v, want P-1 (0.02) fed by I-2, I-1", got)
	}
}

func TestThiefProducerFlagged(t *testing.T) {
	m := thief(t)
	// By day 500 P-1 has watered out through the streak (measured: oil
	// 0.031 of the water reaching it over days 450-500) while P-2 still
	// makes 0.098.
	m.Run.End, m.Run.ReportEvery = 500, 50
	res, err := Balance(m, Settings{MaxIterations: 1})
	if err != nil {
		t.Fatal(err)
	}
	found := false
	for _, f := range res.Flagged {
		t.Logf("flagged %s (%.3f) fed by %v", f.Name, f.Efficiency, f.Injectors)
		if f.Name == "P-1" && len(f.Injectors) > 0 && f.Injectors[0] == "I-1" {
			found = true
		}
		if f.Name == "P-2" {
			t.Errorf("P-2, the producer of the swept side, flagged")
		}
	}
	if !found {
		t.Errorf("P-1, at the end of the streak, not flagged with I-1 first: %+v", res.Flagged)
	}
}

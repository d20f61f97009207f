package balance

import (
	"testing"

	"floodtrace/reservoir"
)

// TestProducerLiquidLimit: a max_rate on the thief producer P-1 holds it
// in every solve of every forecast balance makes (the engine honours the
// limit, pressure.Solve), balance.json names it, and the recommendation
// still beats the current rates.
func TestProducerLiquidLimit(t *testing.T) {
	m := thief(t)
	free, err := (&forecaster{m: m, s: Settings{Horizon: m.Run.End}, adj: []int{0, 1}, inj: []Injector{{Name: "I-1", Well: 0}, {Name: "I-2", Well: 1}}}).run([]float64{100, 100})
	if err != nil {
		t.Fatal(err)
	}
	p1 := 2
	if m.Wells[p1].Name != "P-1" || m.Wells[p1].Type != reservoir.Producer {
		t.Fatalf("well 2 is %s", m.Wells[p1].Name)
	}
	first := rateAt(free.Run, "P-1", 0)
	cap := 0.8 * first
	m.Wells[p1].MaxRate = cap
	res, err := Balance(m, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("P-1 produces %.1f at the current rates without a limit; limit %.1f; I-1 %.1f -> %.1f; oil %.0f -> %.0f",
		first, cap, res.Injectors[0].RateNow, res.Injectors[0].RateRecommended, res.Now.Objective, res.Recommended.Objective)
	for name, f := range map[string]*Forecast{"now": res.Now, "recommended": res.Recommended} {
		for _, w := range f.Run.WellLog {
			if w.Well == "P-1" && w.Rate > cap*(1+1e-9) {
				t.Errorf("%s forecast: P-1 produces %g at day %g, above its max_rate %g", name, w.Rate, w.Time, cap)
			}
		}
	}
	if len(res.Now.AtMaxRate) != 1 || res.Now.AtMaxRate[0] != "P-1" {
		t.Errorf("producers held at max_rate now: %v, want P-1", res.Now.AtMaxRate)
	}
	if s := res.Summary(); res.Recommended.AtMaxRate != nil && len(s.ProducersAtMaxRate) == 0 {
		t.Errorf("balance.json does not name the producers at max_rate")
	}
	if !(res.Recommended.Objective >= res.Now.Objective) {
		t.Errorf("recommended %g below current %g", res.Recommended.Objective, res.Now.Objective)
	}
}

package screen

import (
	"testing"

	"floodtrace/pressure"
	"floodtrace/reservoir"
)

// TestScreenAppliesLimits: the economic limits of the case's run block
// reach every candidate's run, the candidates' new producers inherit them,
// and a producer that reaches its water-cut limit is shut in (it produces
// nothing after its limit day), so a layout that waters out early is not
// credited with the oil it would produce past the limit.
func TestScreenAppliesLimits(t *testing.T) {
	const maxWC = 0.6
	s := smallSpec(t)
	s.Base.Run.MaxWaterCut = maxWC
	p := mustPlan(t, s)
	shut := 0
	for ci, c := range p.Candidates {
		if c.Kind != KindLayout && c.Kind != KindPattern {
			continue
		}
		m := p.Model(ci, 0)
		if m.Run.MaxWaterCut != maxWC {
			t.Fatalf("candidate %s: run max_water_cut %g; want the case's %g", c.Name, m.Run.MaxWaterCut, maxWC)
		}
		for i, w := range m.Wells {
			if wc, _ := m.ProducerLimits(i); w.Type == reservoir.Producer && wc != maxWC {
				t.Fatalf("candidate %s: producer %s has max_water_cut %g; want the run's %g", c.Name, w.Name, wc, maxWC)
			}
		}
		res, err := p.RunCandidate(ci, 0, pressure.Settings{})
		if err != nil {
			t.Fatal(err)
		}
		for _, P := range res.Producers {
			if P.Limit == "" {
				continue
			}
			shut++
			for k, tk := range res.Times {
				if tk > P.LimitDay && P.OilRate[k]+P.WaterRate[k] != 0 {
					t.Fatalf("candidate %s: producer %s flows on day %g after its limit on day %g", c.Name, P.Name, tk, P.LimitDay)
				}
			}
		}
	}
	if shut == 0 {
		t.Fatal("no producer of the layouts and patterns reached the water-cut limit: the test checks nothing")
	}
	t.Logf("%d producers shut at max_water_cut %g", shut, maxWC)
}

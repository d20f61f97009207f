package balance

import (
	"fmt"
	"math"
	"testing"

	"floodtrace/reservoir"
)

// benchHistory gives benchCase a two-year history in eight quarters: the
// injectors at 1500 to 2500 bbl/day (I1 the most), the producers sharing
// the injection equally, oil and water.
func benchHistory(m *reservoir.Model) {
	h := &reservoir.History{File: "history.csv", Drive: reservoir.DriveRates, Line: 1}
	for k := range 8 {
		a, b := 91.25*float64(k), 91.25*float64(k+1)
		total := 0.0
		for i := range 10 {
			q := 2500 - 100*float64(i)
			total += q
			h.Rows = append(h.Rows, reservoir.HistoryRow{Well: fmt.Sprintf("I%d", i+1), Start: a, End: b, Oil: math.NaN(), Water: math.NaN(), Injected: q * (b - a), BHP: math.NaN()})
		}
		for i := range 6 {
			v := total / 6 * (b - a)
			h.Rows = append(h.Rows, reservoir.HistoryRow{Well: fmt.Sprintf("P%d", i+1), Start: a, End: b, Oil: 0.8 * v, Water: 0.2 * v, Injected: math.NaN(), BHP: math.NaN()})
		}
	}
	m.History = h
}

// BenchmarkBalance100Variants balances the 100 x 100 case for value, after
// a history, and with a liquid limit on every producer.
func BenchmarkBalance100Variants(b *testing.B) {
	for _, c := range []struct {
		name  string
		setup func(*reservoir.Model)
		s     Settings
	}{
		{"value", func(m *reservoir.Model) {
			m.Value = &reservoir.Economics{OilPrice: 60, WaterCost: 2, InjectionCost: 0.5, DiscountRate: 0.1}
		}, Settings{Objective: Value}},
		{"history", benchHistory, Settings{}},
		{"producer-limits", func(m *reservoir.Model) {
			for i := range m.Wells {
				if m.Wells[i].Type == reservoir.Producer {
					m.Wells[i].MaxRate = 4000
				}
			}
		}, Settings{}},
	} {
		b.Run(c.name, func(b *testing.B) {
			m := benchCase(b)
			c.setup(m)
			for b.Loop() {
				r, err := Balance(m, c.s)
				if err != nil {
					b.Fatal(err)
				}
				b.ReportMetric(float64(r.Forecasts), "forecasts")
				b.ReportMetric(100*(r.Recommended.Objective/r.Now.Objective-1), "gain%")
				b.ReportMetric(float64(len(r.Recommended.AtMaxRate)), "held")
			}
		})
	}
}

// BenchmarkBalance100HistoryLight is the history variant with 1250
// streamlines (a quarter).
func BenchmarkBalance100HistoryLight(b *testing.B) {
	m := benchCase(b)
	benchHistory(m)
	s := Settings{}
	s.Flood.Streamlines = 1250
	for b.Loop() {
		r, err := Balance(m, s)
		if err != nil {
			b.Fatal(err)
		}
		b.ReportMetric(float64(r.Forecasts), "forecasts")
		b.ReportMetric(100*(r.Recommended.Objective/r.Now.Objective-1), "gain%")
	}
}

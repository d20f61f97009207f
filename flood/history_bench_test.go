package flood

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"floodtrace/internal/benchcase"
	"floodtrace/reservoir"
)

// historyBenchModel is the benchmark pattern (internal/benchcase) on a
// 100 x 100 grid with 20 wells (8 rate injectors, 12 BHP producers), ten
// years, and, when noise >= 0, ten years of invented monthly history
// (2400 rows): each well's rate varies from month to month by up to
// noise (relative, uniform) around a plan, the producers' water cut
// rising over the years.
func historyBenchModel(b *testing.B, noise float64) *reservoir.Model {
	m, err := benchcase.Pattern(100)
	if err != nil {
		b.Fatal(err)
	}
	m.Wells = nil
	m.Run = reservoir.RunSettings{End: 3650, ReportEvery: 30, Snapshots: []float64{3650}, Streamlines: 2000, PressureUpdates: 1}
	for k := range 8 {
		x, y := 1250+2500*float64(k%4), 3000+4000*float64(k/4)
		if err := m.PlaceWell(fmt.Sprintf("I%d", k+1), reservoir.Injector, x, y, reservoir.RateControl, 1500); err != nil {
			b.Fatal(err)
		}
	}
	for k := range 12 {
		x, y := 800+2800*float64(k%4), 800+4200*float64(k/4)
		if err := m.PlaceWell(fmt.Sprintf("P%d", k+1), reservoir.Producer, x, y, reservoir.BHPControl, 500); err != nil {
			b.Fatal(err)
		}
	}
	if noise < 0 {
		return m
	}
	rng := rand.New(rand.NewPCG(7, 15))
	var rows []reservoir.HistoryRow
	nan := math.NaN()
	for month := range 120 {
		s, e := float64(month)*3650/120, float64(month+1)*3650/120
		d := e - s
		var prod float64
		for k := range 12 {
			liq := 1000 * (1 + noise*(2*rng.Float64()-1)) * d
			wc := math.Min(0.9, float64(month)/100)
			rows = append(rows, reservoir.HistoryRow{Well: fmt.Sprintf("P%d", k+1), Start: s, End: e, Oil: liq * (1 - wc), Water: liq * wc, Injected: nan, BHP: nan})
			prod += liq
		}
		for k := range 8 {
			rows = append(rows, reservoir.HistoryRow{Well: fmt.Sprintf("I%d", k+1), Start: s, End: e, Oil: nan, Water: nan, Injected: prod / 8 * (1 + noise*(2*rng.Float64()-1)), BHP: nan})
		}
	}
	m.History = &reservoir.History{Drive: reservoir.DriveRates, Rows: rows}
	return m
}

// BenchmarkHistory: a run without history (fixed streamlines, and with
// 120 monthly pressure updates) against runs driven by 2400 rows of
// monthly history whose rates move by 2% (grouped) and by 20% (nearly
// every month re-solved). Recorded in docs/PERFORMANCE.md.
func BenchmarkHistory(b *testing.B) {
	for _, bc := range []struct {
		name    string
		noise   float64
		updates int
	}{{"none", -1, 1}, {"none_updates120", -1, 120}, {"history_noise2pct", 0.02, 1}, {"history_noise20pct", 0.2, 1}} {
		b.Run(bc.name, func(b *testing.B) {
			m := historyBenchModel(b, bc.noise)
			m.Run.PressureUpdates = bc.updates
			var r *Result
			for b.Loop() {
				var err error
				if r, err = Run(m, Settings{Workers: 1}); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(r.Solves), "solves")
		})
	}
}

// BenchmarkHistoryPlan: turning 2400 rows of monthly history into
// schedule events (grouping included).
func BenchmarkHistoryPlan(b *testing.B) {
	m := historyBenchModel(b, 0.2)
	for b.Loop() {
		if _, _, err := historyModel(m); err != nil {
			b.Fatal(err)
		}
	}
}

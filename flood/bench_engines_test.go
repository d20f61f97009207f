package flood

import (
	"sync"
	"testing"
)

var engineRef struct {
	once sync.Once
	grid *Result
	err  error
}

// BenchmarkEngines200 times the engines on the case of docs/ENGINES.md: a
// 200 x 200 log-normal permeability field (reservoir/synth, ln k standard
// deviation 1), an injector in the centre and BHP producers in the
// corners, Corey curves with end-point mobility ratio 4.4, run to 1 pore
// volume injected with a report every 0.02 pore volumes and 4000
// streamlines. It reports each streamline run's RMS water-cut difference
// from the grid engine (the IMPES reference) as "rms-vs-grid". Run it with
//
//	go test ./flood -run '^$' -bench Engines200 -benchtime 1x -timeout 30m
func BenchmarkEngines200(b *testing.B) {
	m := heteroCase(b, 200, 11, 0.4, 0.5, 0.9, 5)
	pvDays := m.TotalPoreVolume() / 200
	m.Run.End = pvDays
	m.Run.ReportEvery = 0.02 * pvDays
	m.Run.Streamlines = 4000
	m.Run.Snapshots = []float64{m.Run.End}
	reference := func(b *testing.B) *Result {
		engineRef.once.Do(func() {
			engineRef.grid, engineRef.err = RunGrid(m, Settings{Frames: -1}, GridOptions{})
		})
		if engineRef.err != nil {
			b.Fatal(engineRef.err)
		}
		return engineRef.grid
	}
	b.Run("grid", func(b *testing.B) {
		var r *Result
		for b.Loop() {
			var err error
			r, err = RunGrid(m, Settings{Frames: -1}, GridOptions{})
			if err != nil {
				b.Fatal(err)
			}
		}
		engineRef.once.Do(func() { engineRef.grid = r })
		b.ReportMetric(float64(r.Solves), "solves")
	})
	for _, c := range []struct {
		name    string
		updates int
	}{{"fixed", 1}, {"updates-5", 5}, {"updates-10", 10}, {"updates-20", 20}} {
		b.Run(c.name, func(b *testing.B) {
			mm := *m
			mm.Run.PressureUpdates = c.updates
			var r *Result
			for b.Loop() {
				var err error
				r, err = Run(&mm, Settings{Frames: -1})
				if err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(waterCutRMS(b, r, reference(b)), "rms-vs-grid")
			b.ReportMetric(r.MassBalanceError, "mass-balance")
		})
	}
}

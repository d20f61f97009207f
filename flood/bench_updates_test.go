package flood

import (
	"math"
	"os"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"floodtrace/reservoir"
	"floodtrace/reservoir/synth"
)

// updatesCase200x150 is the pressure-update benchmark case of
// docs/PERFORMANCE.md (issue 19, item 3): 200 x 150 cells of 20 ft, a
// log-normal permeability field from reservoir/synth (ln k mean 4.6,
// standard deviation 1, ranges 10 x 5 cells at azimuth 30, seed 19), a
// rate injector in the centre and BHP producers in the four corners, Corey
// curves with end-point mobility ratio (0.5/0.5)/(1/5) = 5, run to one pore
// volume injected with a report every 0.02 pore volumes, 2000 streamlines,
// no frames and no pictures. Invented data.
func updatesCase200x150(t testing.TB) *reservoir.Model {
	t.Helper()
	const nx, ny, d = 200, 150, 20.0
	m := reservoir.NewUniform(nx, ny, d, d, 100, 0.2, 10)
	perm, poro, err := synth.Generate(synth.Settings{NX: nx, NY: ny, DX: d, DY: d, RangeMajor: 10 * d, RangeMinor: 5 * d,
		Azimuth: 30, LogMean: 4.6, LogStd: 1, Seed: 19})
	if err != nil {
		t.Fatal(err)
	}
	copy(m.PermEast, perm)
	copy(m.PermNorth, perm)
	copy(m.Porosity, poro)
	m.RelPerm = reservoir.Corey{Swc: 0.2, Sor: 0.2, KrwMax: 0.5, KroMax: 1, Nw: 2, No: 2}
	m.Fluids = reservoir.Fluids{WaterViscosity: 0.5, OilViscosity: 5, InitialSw: 0.2}
	lx, ly := float64(nx)*d, float64(ny)*d
	for _, w := range []struct {
		name string
		typ  reservoir.WellType
		x, y float64
	}{{"I-1", reservoir.Injector, lx / 2, ly / 2}, {"P-1", reservoir.Producer, 10, 10}, {"P-2", reservoir.Producer, lx - 10, 10},
		{"P-3", reservoir.Producer, 10, ly - 10}, {"P-4", reservoir.Producer, lx - 10, ly - 10}} {
		c, v := reservoir.BHPControl, 1000.0
		if w.typ == reservoir.Injector {
			c, v = reservoir.RateControl, 200
		}
		if err := m.PlaceWell(w.name, w.typ, w.x, w.y, c, v); err != nil {
			t.Fatal(err)
		}
	}
	pvDays := m.TotalPoreVolume() / 200
	m.Run.End = pvDays
	m.Run.ReportEvery = 0.02 * pvDays
	m.Run.Streamlines = 2000
	m.Run.Snapshots = []float64{m.Run.End}
	return m
}

var updatesRef struct {
	once    sync.Once
	grid    *Result
	elapsed time.Duration
	steps   int // saturation steps of the grid run, from its log line
	err     error
}

// BenchmarkUpdates200x150 times the pressure-update engine on
// updatesCase200x150 with 5, 10, 20 and 40 updates against the grid engine
// (the IMPES reference, run once per process and timed). Each update run
// reports "rms-vs-grid" (RMS water-cut difference over the producers and
// report times), "x-faster" (grid time over the run's time per operation)
// and the magnitude of its mass balance error in units of 1e-12. Run it with
//
//	go test ./flood -run '^$' -bench Updates200x150 -benchtime 1x -timeout 30m
//
// and, to profile the update runs without the grid engine, with
// FLOODTRACE_BENCH_NO_GRID=1 and -cpuprofile.
func BenchmarkUpdates200x150(b *testing.B) {
	m := updatesCase200x150(b)
	reference := func(b *testing.B) (*Result, time.Duration) {
		updatesRef.once.Do(func() {
			logf := func(format string, args ...any) {
				if strings.HasPrefix(format, "grid engine: %d saturation steps") && len(args) > 0 {
					updatesRef.steps, _ = args[0].(int)
				}
			}
			t0 := time.Now()
			updatesRef.grid, updatesRef.err = RunGrid(m, Settings{Frames: -1, Log: logf}, GridOptions{})
			updatesRef.elapsed = time.Since(t0)
		})
		if updatesRef.err != nil {
			b.Fatal(updatesRef.err)
		}
		return updatesRef.grid, updatesRef.elapsed
	}
	b.Run("grid", func(b *testing.B) {
		g, el := reference(b)
		for b.Loop() {
		}
		b.ReportMetric(el.Seconds(), "s-grid")
		b.ReportMetric(float64(g.Solves), "solves")
		if updatesRef.steps == 0 {
			b.Fatal("grid engine: no saturation step count in its log")
		}
		// The grid engine's cost per cell and saturation step (its
		// pressure solves included), recorded in docs/ENGINES.md.
		b.ReportMetric(float64(updatesRef.steps), "sat-steps")
		b.ReportMetric(el.Seconds()*1e9/(float64(updatesRef.steps)*float64(m.Grid.N())), "ns/cell-step")
	})
	// The case's 2000 streamlines with 5 to 40 updates, then 10 and 20
	// updates with 1000 streamlines (run.streamlines: the fill lines still
	// cover every flowing cell).
	type variant struct{ updates, lines int }
	variants := []variant{{5, 0}, {10, 0}, {20, 0}, {40, 0}, {10, 1000}, {20, 1000}}
	for _, v := range variants {
		name := "updates-" + strconv.Itoa(v.updates)
		if v.lines > 0 {
			name += "-lines-" + strconv.Itoa(v.lines)
		}
		b.Run(name, func(b *testing.B) {
			mm := *m
			mm.Run.PressureUpdates = v.updates
			if v.lines > 0 {
				mm.Run.Streamlines = v.lines
			}
			var r *Result
			t0 := time.Now()
			for b.Loop() {
				var err error
				r, err = Run(&mm, Settings{Frames: -1})
				if err != nil {
					b.Fatal(err)
				}
			}
			per := time.Since(t0).Seconds() / float64(b.N)
			b.ReportMetric(math.Abs(r.MassBalanceError)*1e12, "mass-balance-x1e12")
			if os.Getenv("FLOODTRACE_BENCH_NO_GRID") != "" {
				return // profiling the update runs alone
			}
			g, el := reference(b)
			b.ReportMetric(waterCutRMS(b, r, g), "rms-vs-grid")
			b.ReportMetric(el.Seconds()/per, "x-faster")
		})
	}
}

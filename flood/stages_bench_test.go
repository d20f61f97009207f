package flood

import (
	"fmt"
	"sync"
	"testing"

	"floodtrace/internal/benchcase"
	"floodtrace/pressure"
	"floodtrace/reservoir"
	"floodtrace/streamline"
	"floodtrace/transport"
)

// The Stage benchmarks time each stage of a run on the benchmark pattern
// of docs/PERFORMANCE.md at 100x100, 300x300 and 1000x1000 cells (the
// last skipped under -short): a 10 km square of log-normal permeability
// (reservoir/synth, ln k standard deviation 1.5, ranges 1500 m x 600 m at
// azimuth 30, seed 3), four rate injectors and five BHP producers.

var stageModels sync.Map // n -> *reservoir.Model

// stageModel returns the benchmark pattern on an n x n grid.
func stageModel(b *testing.B, n int) *reservoir.Model {
	b.Helper()
	if n >= 1000 && testing.Short() {
		b.Skip("1000x1000 under -short")
	}
	if m, ok := stageModels.Load(n); ok {
		return m.(*reservoir.Model)
	}
	m, err := benchcase.Pattern(n)
	if err != nil {
		b.Fatal(err)
	}
	stageModels.Store(n, m)
	return m
}

var stageSizes = []int{100, 300, 1000}

// stageTraced is the benchmark pattern solved and traced.
type stageTraced struct {
	m   *reservoir.Model
	sol *pressure.Solution
	tr  *streamline.Result
	rs  *blTable
}

var stageTraces sync.Map // n -> *stageTraced

func stageTrace(b *testing.B, n int) *stageTraced {
	if st, ok := stageTraces.Load(n); ok {
		return st.(*stageTraced)
	}
	m := stageModel(b, n)
	sol, err := pressure.Solve(pressure.Input{Model: m}, pressure.Settings{})
	if err != nil {
		b.Fatal(err)
	}
	tr, err := streamline.Trace(Field(m, sol), streamline.Settings{Count: m.Run.Streamlines, KeepPaths: true, MaxPathPoints: MaxPathPoints})
	if err != nil {
		b.Fatal(err)
	}
	ff := transport.NewFracFlow(m.RelPerm, m.Fluids.WaterViscosity, m.Fluids.OilViscosity)
	_, sor := m.RelPerm.Endpoints()
	rs, err := transport.NewRiemann(ff, m.Fluids.InitialSw, 1-sor)
	if err != nil {
		b.Fatal(err)
	}
	st := &stageTraced{m: m, sol: sol, tr: tr, rs: newBLTable(rs, ff)}
	stageTraces.Store(n, st)
	return st
}

// BenchmarkStageMapping times the streamline-to-cell bookkeeping (the flat
// line set with time of flight rescaled to the cell pore volumes) and one
// saturation map at the end of the run.
func BenchmarkStageMapping(b *testing.B) {
	for _, n := range stageSizes {
		b.Run(fmt.Sprintf("%dx%d", n, n), func(b *testing.B) {
			st := stageTrace(b, n)
			pv := st.m.PoreVolumes()
			var ls *lineSet
			for b.Loop() {
				ls = mustLineSet(b, st.tr, pv)
				ls.cellSaturation(st.m, st.rs, st.m.Run.End, st.m.Fluids.InitialSw, 0)
			}
			b.ReportMetric(float64(len(ls.cell)), "segments")
		})
	}
}

// BenchmarkStageTransport times the transport stage of a fixed-streamline
// run after the line set is built: Buckley-Leverett curves of every
// producer at the 122 report times, the snapshot and the animation frames
// (8 to 40 saturation maps, by size), and the material balance.
func BenchmarkStageTransport(b *testing.B) {
	for _, n := range stageSizes {
		b.Run(fmt.Sprintf("%dx%d", n, n), func(b *testing.B) {
			st := stageTrace(b, n)
			ls := mustLineSet(b, st.tr, st.m.PoreVolumes())
			var r *Result
			for b.Loop() {
				r = &Result{Model: st.m, PoreVolume: st.m.TotalPoreVolume(), OOIP: st.m.OOIP()}
				r.fixedTransport(st.m, st.sol, ls, st.rs, Settings{})
			}
			b.ReportMetric(float64(len(r.Frames)), "frames")
		})
	}
}

package streamline_test

import (
	"fmt"
	"sync"
	"testing"

	"floodtrace/internal/benchcase"
	"floodtrace/reservoir"
	"floodtrace/streamline"
)

// The Stage benchmarks time each stage of a run on the benchmark pattern
// of docs/PERFORMANCE.md at 100x100, 300x300 and 1000x1000 cells (the
// last skipped under -short): a 10 km square of log-normal permeability
// (reservoir/synth, ln k standard deviation 1.5, ranges 1500 m x 600 m at
// azimuth 30, seed 3), four rate injectors and five BHP producers.

var stageModels sync.Map // n -> *reservoir.Model
var stageFields sync.Map // n -> *streamline.Field

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

// stageField returns the solved flow field of the benchmark pattern.
func stageField(b *testing.B, n int) *streamline.Field {
	if f, ok := stageFields.Load(n); ok {
		return f.(*streamline.Field)
	}
	f := solve(b, stageModel(b, n))
	stageFields.Store(n, f)
	return f
}

// BenchmarkStageTrace times the tracing stage as a run does it: 5000
// streamlines launched from the injectors, fill lines from uncovered
// cells, stream-tube fluxes, time-of-flight maps, partitions, allocation,
// polylines kept (at most 400 points each).
func BenchmarkStageTrace(b *testing.B) {
	for _, n := range stageSizes {
		b.Run(fmt.Sprintf("%dx%d", n, n), func(b *testing.B) {
			f := stageField(b, n)
			var r *streamline.Result
			for b.Loop() {
				var err error
				if r, err = streamline.Trace(f, streamline.Settings{Count: 5000, KeepPaths: true, MaxPathPoints: 400}); err != nil {
					b.Fatal(err)
				}
			}
			segs := 0
			for i := range r.Lines {
				segs += len(r.Lines[i].Cells)
			}
			b.ReportMetric(float64(len(r.Lines)), "lines")
			b.ReportMetric(float64(segs), "segments")
		})
	}
}

// BenchmarkStageRescale times Result.Rescale, the flat segments with the
// time of flight rescaled to the pore volumes, on the lines of
// BenchmarkStageTrace.
func BenchmarkStageRescale(b *testing.B) {
	for _, n := range stageSizes {
		b.Run(fmt.Sprintf("%dx%d", n, n), func(b *testing.B) {
			f := stageField(b, n)
			r, err := streamline.Trace(f, streamline.Settings{Count: 5000})
			if err != nil {
				b.Fatal(err)
			}
			for b.Loop() {
				if _, err := r.Rescale(f.PoreVolume); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

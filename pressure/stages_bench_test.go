package pressure

import (
	"fmt"
	"sync"
	"testing"

	"floodtrace/internal/benchcase"
	"floodtrace/pressure/sparse"
	"floodtrace/reservoir"
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

// BenchmarkStageAssemble times the assembly of the pressure system.
func BenchmarkStageAssemble(b *testing.B) {
	for _, n := range stageSizes {
		b.Run(fmt.Sprintf("%dx%d", n, n), func(b *testing.B) {
			m := stageModel(b, n)
			for b.Loop() {
				if _, err := Assemble(Input{Model: m}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkStagePreconditioner times the set-up of the default
// preconditioner (GridPreconditioner: IC(0) below AMGThreshold unknowns,
// the structured multigrid above).
func BenchmarkStagePreconditioner(b *testing.B) {
	for _, n := range stageSizes {
		b.Run(fmt.Sprintf("%dx%d", n, n), func(b *testing.B) {
			m := stageModel(b, n)
			sys, err := Assemble(Input{Model: m})
			if err != nil {
				b.Fatal(err)
			}
			for b.Loop() {
				if _, _, err := GridPreconditioner(sys, m.Grid); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkStageSolve times conjugate gradients to a relative residual of
// 1e-10 (the default of Settings.Tol) with the default preconditioner
// already built, from a zero start, and reports the iterations.
func BenchmarkStageSolve(b *testing.B) {
	for _, n := range stageSizes {
		b.Run(fmt.Sprintf("%dx%d", n, n), func(b *testing.B) {
			m := stageModel(b, n)
			sys, err := Assemble(Input{Model: m})
			if err != nil {
				b.Fatal(err)
			}
			pre, _, err := GridPreconditioner(sys, m.Grid)
			if err != nil {
				b.Fatal(err)
			}
			x := make([]float64, len(sys.B))
			var res sparse.CGResult
			for b.Loop() {
				clear(x)
				if res, err = sparse.CG(sys.A, sys.B, x, pre, sparse.CGSettings{Tol: 1e-10}); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(res.Iterations), "iterations")
		})
	}
}

// BenchmarkStagePressure times the whole pressure stage as a run does it
// (Solve: assembly, preconditioner, conjugate gradients, fluxes).
func BenchmarkStagePressure(b *testing.B) {
	for _, n := range stageSizes {
		b.Run(fmt.Sprintf("%dx%d", n, n), func(b *testing.B) {
			m := stageModel(b, n)
			var sol *Solution
			for b.Loop() {
				var err error
				if sol, err = Solve(Input{Model: m}, Settings{}); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(sol.Iterations), "iterations")
		})
	}
}

// BenchmarkStageUpdates times ten pressure solves of a run with pressure
// updates, an invented front of doubling total mobility moving 100 ft per
// solve from the injectors (frontMobility), as independent Solve calls
// and through one Sequence (warm start, preconditioner reuse).
func BenchmarkStageUpdates(b *testing.B) {
	for _, n := range stageSizes {
		m := stageModel(b, n)
		lam, err := InitialMobility(m)
		if err != nil {
			b.Fatal(err)
		}
		mobs := make([][]float64, 10)
		for s := range mobs {
			mobs[s] = frontMobility(m, lam, 1, 1000+100*float64(s))
		}
		for _, mode := range []string{"independent", "sequence"} {
			b.Run(fmt.Sprintf("%dx%d/%s", n, n, mode), func(b *testing.B) {
				its, built := 0, 0
				for b.Loop() {
					seq := NewSequence(Settings{})
					its, built = 0, 0
					for _, mob := range mobs {
						var sol *Solution
						if mode == "sequence" {
							sol, err = seq.Solve(Input{Model: m, Mobility: mob})
						} else {
							sol, err = Solve(Input{Model: m, Mobility: mob}, Settings{})
							built++
						}
						if err != nil {
							b.Fatal(err)
						}
						its += sol.Iterations
					}
					if mode == "sequence" {
						built = seq.Stats().Built
					}
				}
				b.ReportMetric(float64(its), "iterations")
				b.ReportMetric(float64(built), "set-ups")
			})
		}
	}
}

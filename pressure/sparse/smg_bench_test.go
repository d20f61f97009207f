package sparse

import (
	"fmt"
	"testing"
)

// amgBenchCells returns the box cells of the unknowns of the benchmark
// problem of size index k (every cell: the problem has no inactive cell).
func amgBenchCells(k int) []int {
	a, _ := amgBenchProblem(k)
	cells := make([]int, a.N)
	for u := range cells {
		cells[u] = u
	}
	return cells
}

// BenchmarkSMGSetup times NewSMG on the problems of the AMG benchmarks.
func BenchmarkSMGSetup(b *testing.B) {
	for k, s := range amgBenchSizes {
		b.Run(fmt.Sprintf("%dx%d", s, s), func(b *testing.B) {
			a, _ := amgBenchProblem(k)
			cells := amgBenchCells(k)
			b.ReportAllocs()
			b.ResetTimer()
			for b.Loop() {
				if _, err := NewSMG(a, s, s, cells); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkSMGSolve times SMG-preconditioned conjugate gradients from zero
// to a relative residual of 1e-8, with the hierarchy built beforehand.
func BenchmarkSMGSolve(b *testing.B) {
	for k, s := range amgBenchSizes {
		b.Run(fmt.Sprintf("%dx%d", s, s), func(b *testing.B) {
			a, rhs := amgBenchProblem(k)
			h, err := NewSMG(a, s, s, amgBenchCells(k))
			if err != nil {
				b.Fatal(err)
			}
			x := make([]float64, a.N)
			its := 0
			b.ReportAllocs()
			b.ResetTimer()
			for b.Loop() {
				clear(x)
				res, err := CG(a, rhs, x, h, CGSettings{Tol: 1e-8})
				if err != nil {
					b.Fatal(err)
				}
				its = res.Iterations
			}
			b.ReportMetric(float64(its), "iterations")
		})
	}
}

package sparse

import (
	"fmt"
	"sync"
	"testing"
)

// amgBenchSizes are the grid sizes of the AMG benchmarks (issue 9).
var amgBenchSizes = []int{100, 300, 1000}

// amgBenchCase is the benchmark problem: a log-normal permeability field of
// log standard deviation 2 with a correlation length of 10% of the domain,
// four bottom-hole-pressure producers and two rate injectors (see
// newAMGProblem). Matrices are built once per size and shared.
type amgBenchCase struct {
	once sync.Once
	a    *CSR
	b    []float64
}

var amgBenchCases = make([]amgBenchCase, len(amgBenchSizes))

func amgBenchProblem(k int) (*CSR, []float64) {
	c := &amgBenchCases[k]
	c.once.Do(func() {
		s := amgBenchSizes[k]
		c.a, c.b, _ = newAMGProblem(fieldLogNormal2, s, s, 1).assemble()
	})
	return c.a, c.b
}

// BenchmarkAMGSetup times NewAMGWith with default settings.
func BenchmarkAMGSetup(b *testing.B) {
	for k, s := range amgBenchSizes {
		b.Run(fmt.Sprintf("%dx%d", s, s), func(b *testing.B) {
			a, _ := amgBenchProblem(k)
			b.ReportAllocs()
			b.ResetTimer()
			for b.Loop() {
				if _, err := NewAMGWith(a, AMGSettings{}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkAMGSolve times AMG-preconditioned conjugate gradients from zero
// to a relative residual of 1e-8, with the hierarchy built beforehand.
func BenchmarkAMGSolve(b *testing.B) {
	for k, s := range amgBenchSizes {
		b.Run(fmt.Sprintf("%dx%d", s, s), func(b *testing.B) {
			a, rhs := amgBenchProblem(k)
			h, err := NewAMGWith(a, AMGSettings{})
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

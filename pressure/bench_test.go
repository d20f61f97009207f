package pressure

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"floodtrace/reservoir"
)

// logNormalModel is a heterogeneous benchmark case: an n x n grid of 50 ft
// cells with log-normal permeability (geometric mean 100 md, sigma of ln k
// = 1.5, smoothed over a few cells so the field has some correlation),
// kv/kh of one, an injector at the centre on rate control with a BHP
// limit and four BHP producers near the corners. Fields come from a fixed
// seed, so every run sees the same case.
func logNormalModel(n int, seed uint64) *reservoir.Model {
	m := reservoir.NewUniform(n, n, 50, 50, 100, 0.2, 30)
	r := rand.New(rand.NewPCG(seed, 7))
	z := make([]float64, n*n)
	for k := range z {
		z[k] = r.NormFloat64()
	}
	// Two passes of a 3x3 box filter give a short correlation length.
	for pass := 0; pass < 2; pass++ {
		s := make([]float64, len(z))
		for j := 0; j < n; j++ {
			for i := 0; i < n; i++ {
				sum, c := 0.0, 0
				for dj := -1; dj <= 1; dj++ {
					for di := -1; di <= 1; di++ {
						if ii, jj := i+di, j+dj; ii >= 0 && ii < n && jj >= 0 && jj < n {
							sum += z[jj*n+ii]
							c++
						}
					}
				}
				s[j*n+i] = sum / float64(c)
			}
		}
		z = s
	}
	// Rescale to unit variance, then to the wanted sigma.
	var mean, v float64
	for _, x := range z {
		mean += x
	}
	mean /= float64(len(z))
	for _, x := range z {
		v += (x - mean) * (x - mean)
	}
	sd := math.Sqrt(v / float64(len(z)))
	for k := range z {
		kk := 100 * math.Exp(1.5*(z[k]-mean)/sd)
		m.PermEast[k], m.PermNorth[k] = kk, kk
	}
	c := n / 2
	e := n / 10
	g := m.Grid
	at := func(i, j int) (float64, float64) { return (float64(i) + 0.5) * g.DX, (float64(j) + 0.5) * g.DY }
	x, y := at(c, c)
	_ = m.PlaceWell("I-1", reservoir.Injector, x, y, reservoir.RateControl, 2000)
	m.Wells[0].MaxBHP = 1e6
	for w, ij := range [][2]int{{e, e}, {n - 1 - e, e}, {e, n - 1 - e}, {n - 1 - e, n - 1 - e}} {
		x, y := at(ij[0], ij[1])
		_ = m.PlaceWell(fmt.Sprintf("P-%d", w+1), reservoir.Producer, x, y, reservoir.BHPControl, 500)
	}
	return m
}

func BenchmarkSolve200(b *testing.B) {
	m := logNormalModel(200, 1)
	in := Input{Model: m, Mobility: uniformMobility(m, 1)}
	var sol *Solution
	for b.Loop() {
		var err error
		if sol, err = Solve(in, Settings{}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(sol.Iterations), "iterations")
}

func BenchmarkAssemble(b *testing.B) {
	for _, n := range []int{100, 300, 1000} {
		b.Run(fmt.Sprint(n), func(b *testing.B) {
			m := logNormalModel(n, 2)
			in := Input{Model: m, Mobility: uniformMobility(m, 1)}
			for b.Loop() {
				if _, err := Assemble(in); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

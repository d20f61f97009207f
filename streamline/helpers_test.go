package streamline_test

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"floodtrace/pressure"
	"floodtrace/reservoir"
	"floodtrace/streamline"
)

// fieldOf converts a pressure solution to the tracer's input.
func fieldOf(m *reservoir.Model, sol *pressure.Solution) *streamline.Field {
	f := &streamline.Field{Grid: m.Grid, PoreVolume: m.PoreVolumes(), Active: m.Active, FluxX: sol.FluxX, FluxY: sol.FluxY}
	for _, w := range sol.Wells {
		f.Wells = append(f.Wells, streamline.Well{Name: w.Name, Cell: w.Cell, Q: w.Q})
	}
	return f
}

// solve runs the pressure solve of m and returns the tracer's input.
func solve(tb testing.TB, m *reservoir.Model) *streamline.Field {
	tb.Helper()
	sol, err := pressure.Solve(pressure.Input{Model: m}, pressure.Settings{})
	if err != nil {
		tb.Fatal(err)
	}
	return fieldOf(m, sol)
}

// addWellAt places a well at the centre of cell (i, j).
func addWellAt(tb testing.TB, m *reservoir.Model, name string, typ reservoir.WellType, i, j int, c reservoir.Control, v float64) {
	tb.Helper()
	x := m.Grid.X0 + (float64(i)+0.5)*m.Grid.DX
	y := m.Grid.Y0 + (float64(j)+0.5)*m.Grid.DY
	if err := m.PlaceWell(name, typ, x, y, c, v); err != nil {
		tb.Fatal(err)
	}
}

// quarterFiveSpot is one quarter of a repeated five-spot pattern on an n x n
// grid of a homogeneous, isotropic reservoir: the injector in the
// south-west corner cell, the producer (on BHP control) in the north-east
// corner cell, no-flow edges along the symmetry lines of the pattern. With
// a tracer (unit mobility ratio) its breakthrough in pore volumes equals
// the areal sweep efficiency at breakthrough of the five-spot, 0.7178
// (Craig 1971, SPE Monograph 3, after Muskat's exact solution; from
// memory).
func quarterFiveSpot(tb testing.TB, n int) *streamline.Field {
	m := reservoir.NewUniform(n, n, 20, 20, 150, 0.25, 12)
	addWellAt(tb, m, "I-1", reservoir.Injector, 0, 0, reservoir.RateControl, 400)
	addWellAt(tb, m, "P-1", reservoir.Producer, n-1, n-1, reservoir.BHPControl, 1000)
	return solve(tb, m)
}

// heterogeneous returns an n x n model with smoothed log-normal
// permeability (geometric mean 80 md, standard deviation of ln k 1.2),
// porosity correlated with it, and a pattern of injectors and producers:
// injectors on a coarse lattice, producers between them. The field comes
// from a fixed seed.
func heterogeneous(tb testing.TB, n int, seed uint64) *reservoir.Model {
	m := reservoir.NewUniform(n, n, 40, 40, 80, 0.2, 25)
	rng := rand.New(rand.NewPCG(seed, 99))
	z := make([]float64, n*n)
	for k := range z {
		z[k] = rng.NormFloat64()
	}
	tmp := make([]float64, n*n)
	for pass := 0; pass < 3; pass++ { // separable 5-point box filter, x then y
		for j := 0; j < n; j++ {
			for i := 0; i < n; i++ {
				s, c := 0.0, 0
				for d := -2; d <= 2; d++ {
					if ii := i + d; ii >= 0 && ii < n {
						s += z[j*n+ii]
						c++
					}
				}
				tmp[j*n+i] = s / float64(c)
			}
		}
		for j := 0; j < n; j++ {
			for i := 0; i < n; i++ {
				s, c := 0.0, 0
				for d := -2; d <= 2; d++ {
					if jj := j + d; jj >= 0 && jj < n {
						s += tmp[jj*n+i]
						c++
					}
				}
				z[j*n+i] = s / float64(c)
			}
		}
	}
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
		g := (z[k] - mean) / sd
		m.PermEast[k] = 80 * math.Exp(1.2*g)
		m.PermNorth[k] = m.PermEast[k]
		m.Porosity[k] = 0.2 + 0.03*g
	}
	step := max(4, n/3)
	w := 0
	for j := step / 2; j < n; j += step {
		for i := step / 2; i < n; i += step {
			w++
			addWellAt(tb, m, fmt.Sprintf("I-%d", w), reservoir.Injector, i, j, reservoir.RateControl, 500)
		}
	}
	p := 0
	for j := 0; j < n; j += step {
		for i := 0; i < n; i += step {
			p++
			addWellAt(tb, m, fmt.Sprintf("P-%d", p), reservoir.Producer, i, j, reservoir.BHPControl, 800)
		}
	}
	return m
}

package transport

import (
	"math"
	"testing"
)

// TestAdvanceGravityZeroIsAdvance: with all gravity coefficients 0,
// AdvanceGravity is first-order upwind (Godunov 1959) and gives Advance's
// saturations and outlet fraction; with gravity it conserves water,
// sum(s dtau) changing by (fw(sInj) - out) dt to round-off, and a
// down-dip coefficient moves the water further than an up-dip one.
func TestAdvanceGravityZeroIsAdvance(t *testing.T) {
	fw := Func(func(s float64) float64 { return s * s / (s*s + (1-s)*(1-s)) })
	fl, err := NewFlux(fw)
	if err != nil {
		t.Fatal(err)
	}
	gr := NewGravity(func(s float64) float64 { return s * s }, func(s float64) float64 { return (1 - s) * (1 - s) })
	n := 60
	dtau := make([]float64, n)
	for i := range dtau {
		dtau[i] = 1 + 0.5*math.Sin(float64(i))
	}
	a, b := make([]float64, n), make([]float64, n)
	var w Workspace
	oa, _, err := w.Advance(a, dtau, 1, 20, fl, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	ob, _, err := w.AdvanceGravity(b, dtau, make([]float64, n), 1, 20, fl, gr, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	for i := range a {
		if math.Abs(a[i]-b[i]) > 1e-12 {
			t.Fatalf("segment %d: %g with zero gravity, %g without", i, b[i], a[i])
		}
	}
	if math.Abs(oa-ob) > 1e-12 {
		t.Errorf("outlet %g vs %g", ob, oa)
	}
	front := map[float64]float64{}
	for _, G := range []float64{0.6, -0.6} {
		s := make([]float64, n)
		g := make([]float64, n)
		for i := range g {
			g[i] = G
		}
		out, _, err := w.AdvanceGravity(s, dtau, g, 1, 30, fl, gr, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		vol := 0.0
		for i := range s {
			vol += s[i] * dtau[i]
			if s[i] > 1e-3 {
				front[G] = float64(i)
			}
		}
		if want := (1 - out) * 30; math.Abs(vol-want) > 1e-12*want {
			t.Errorf("G %g: water %g, injected less produced %g", G, vol, want)
		}
	}
	if !(front[0.6] > front[-0.6]) {
		t.Errorf("front at segment %g down-dip, %g up-dip", front[0.6], front[-0.6])
	}
}

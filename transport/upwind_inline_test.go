package transport

import (
	"math/rand/v2"
	"testing"
)

// fullUpwind is Workspace.upwind with every fractional flow through
// Flux.Fw, as it was before Fw was written out in the sweep; the reference
// of TestUpwindInlineFw.
func fullUpwind(s, r []float64, fin float64, nsub int, fl *Flux) float64 {
	n := len(s)
	out := 0.0
	for range nsub {
		fr := fl.Fw(s[n-1])
		out += fr
		for i := n - 1; i > 0; i-- {
			fi := fl.Fw(s[i-1])
			s[i] -= r[i] * (fr - fi)
			fr = fi
		}
		s[0] -= r[0] * (fr - fin)
	}
	return out
}

// TestUpwindInlineFw: the sweep with the table evaluation written out must
// give Flux.Fw's sweep bit for bit (a differential test, common practice),
// on random lines that include saturations at and beyond the ends of the
// table (0, 1, and the table's clamps).
func TestUpwindInlineFw(t *testing.T) {
	fl, err := NewFlux(sandstone())
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(19, 3))
	var w Workspace
	for trial := range 300 {
		n := 1 + rng.IntN(120)
		s, dtau := randomLine(rng, n, 0.5, 0.2, 0.75)
		for range rng.IntN(4) {
			s[rng.IntN(n)] = []float64{0, 1, 0.2, 0.8}[rng.IntN(4)]
		}
		nsub := 1 + rng.IntN(2*n+1)
		hmin := dtau[0]
		for _, h := range dtau {
			hmin = min(hmin, h)
		}
		dts := 0.5 * hmin / fl.MaxSpeed(0, 1)
		w.ratio = grow(w.ratio, n)
		for i, h := range dtau {
			w.ratio[i] = dts / h
		}
		ref := append([]float64(nil), s...)
		fin := fl.Fw(0.75)
		wantOut := fullUpwind(ref, w.ratio, fin, nsub, fl)
		gotOut := w.upwind(s, fin, nsub, fl)
		if gotOut != wantOut {
			t.Fatalf("trial %d (n %d, %d steps): outlet flux %.17g, through Fw %.17g", trial, n, nsub, gotOut, wantOut)
		}
		for i := range s {
			if s[i] != ref[i] {
				t.Fatalf("trial %d (n %d, %d steps): node %d %.17g, through Fw %.17g", trial, n, nsub, i, s[i], ref[i])
			}
		}
	}
}

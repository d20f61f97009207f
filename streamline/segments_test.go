package streamline

import (
	"math"
	"testing"
)

// TestRescaleHoldsPoreVolume checks the bookkeeping of Rescale on two
// channels of contrasting permeability: after rescaling, the segments in
// every crossed cell hold its pore volume (sum of flux times rescaled time
// of flight; the definition of the rescaling, common practice), the
// rescaled time of flight grows along each line, and the pair volumes add
// up to the pore volume of the crossed cells.
func TestRescaleHoldsPoreVolume(t *testing.T) {
	for _, r := range []float64{1, 10} {
		f := twoChannels(25, r, false)
		res, err := Trace(f, Settings{Count: 60})
		if err != nil {
			t.Fatal(err)
		}
		sg, err := res.Rescale(f.PoreVolume)
		if err != nil {
			t.Fatal(err)
		}
		held := make([]float64, len(f.PoreVolume))
		for i := range res.Lines {
			q := res.Lines[i].Flux
			for s := sg.Start[i]; s < sg.Start[i+1]; s++ {
				if s > sg.Start[i] && sg.Entry[s] != sg.Exit[s-1] {
					t.Fatalf("r=%g line %d segment %d: entry %g is not the exit %g before it", r, i, s, sg.Entry[s], sg.Exit[s-1])
				}
				if sg.Exit[s] < sg.Entry[s] {
					t.Fatalf("r=%g line %d segment %d: time of flight decreases", r, i, s)
				}
				held[sg.Cell[s]] += q * (sg.Exit[s] - sg.Entry[s])
			}
			if n := sg.Start[i+1]; n > sg.Start[i] && sg.Total[i] != sg.Exit[n-1] {
				t.Fatalf("r=%g line %d: total %g, last exit %g", r, i, sg.Total[i], sg.Exit[n-1])
			}
		}
		crossed := 0.0
		for c, v := range held {
			if res.Volume[c] > 0 {
				crossed += f.PoreVolume[c]
				if math.Abs(v-f.PoreVolume[c]) > 1e-12*f.PoreVolume[c] {
					t.Errorf("r=%g cell %d: lines hold %.15g, pore volume %.15g", r, c, v, f.PoreVolume[c])
				}
			}
		}
		sum := 0.0
		for _, v := range res.PairVolumes(sg) {
			sum += v
		}
		if math.Abs(sum-crossed) > 1e-9*crossed {
			t.Errorf("r=%g: pair volumes add up to %.12g, crossed pore volume %.12g", r, sum, crossed)
		}
	}
}

// TestRescaleBadInput checks that Rescale reports a pore-volume count that
// does not match the grid and lines whose cells were released.
func TestRescaleBadInput(t *testing.T) {
	f := twoChannels(10, 2, false)
	res, err := Trace(f, Settings{Count: 20})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := res.Rescale(f.PoreVolume[:3]); err == nil {
		t.Error("short pore volumes: no error")
	}
	res.ReleaseCells()
	for i := range res.Lines {
		if res.Lines[i].Cells != nil || res.Lines[i].Tau != nil {
			t.Fatalf("line %d keeps its cells after ReleaseCells", i)
		}
	}
}

// TestDiagnosticsTwoLayers checks the one-call diagnostics against the
// closed form of two equal layers of permeability ratio r (Shook and
// Mitchell 2009, from memory; derived above TestLorenzTwoLayers): Lorenz
// (r-1)/(2(r+1)), and the resampled curve at Phi = 1/2 the fast layer's
// share of the flow r/(r+1).
func TestDiagnosticsTwoLayers(t *testing.T) {
	for _, r := range []float64{1, 5} {
		f := twoChannels(25, r, false)
		res, err := Trace(f, Settings{Count: 60})
		if err != nil {
			t.Fatal(err)
		}
		d := res.Diagnostics(f.PoreVolume, 101)
		if want := (r - 1) / (2 * (r + 1)); math.Abs(d.Lorenz-want) > 1e-12 {
			t.Errorf("r=%g: Lorenz %.15g, closed form %.15g", r, d.Lorenz, want)
		}
		if len(d.Phi) != 101 || d.Phi[0] != 0 || d.Phi[100] != 1 || math.Abs(d.Phi[50]-0.5) > 1e-15 {
			t.Fatalf("r=%g: resampled Phi %v", r, d.Phi)
		}
		if want := r / (r + 1); math.Abs(d.F[50]-want) > 1e-12 {
			t.Errorf("r=%g: F(1/2) = %.15g, want %.15g", r, d.F[50], want)
		}
		if len(d.TD) < 2 || len(d.TD) != len(d.Ev) {
			t.Errorf("r=%g: sweep curve %v, %v", r, d.TD, d.Ev)
		}
	}
	// Nothing traced: nothing flows, the coefficient is undefined (NaN,
	// null in summary.json), not 0, which would claim a uniform sweep.
	empty := &Result{TOF: []float64{math.NaN()}, BackTOF: []float64{math.NaN()}}
	if d := empty.Diagnostics([]float64{1}, 101); !math.IsNaN(d.Lorenz) || d.Phi != nil {
		t.Errorf("no line: %+v", d)
	}
}

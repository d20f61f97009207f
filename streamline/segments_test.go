package streamline

import (
	"math"
	"slices"
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
				if sg.Exit[s] < sg.Entry(i, s) {
					t.Fatalf("r=%g line %d segment %d: time of flight decreases", r, i, s)
				}
				held[sg.Cell[s]] += q * (sg.Exit[s] - sg.Entry(i, s))
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

// TestTakeSegments checks that the segments made in the lines' storage
// (TakeSegments), and those of Rescale from the traced volumes of the
// maps, are bit for bit those of the definition: the traced volume of
// each cell summed over the lines in line order, then each line's time of
// flight rescaled and accumulated (computed here from copies of the lines,
// which Rescale cannot take for views of its storage).
func TestTakeSegments(t *testing.T) {
	f := twoChannels(25, 10, false)
	res, err := Trace(f, Settings{Count: 60})
	if err != nil {
		t.Fatal(err)
	}
	// The definition, on copies of the lines.
	own := &Result{Lines: append([]Line(nil), res.Lines...), TOF: res.TOF, Stagnant: res.Stagnant}
	for i := range own.Lines {
		own.Lines[i].Cells = append([]int32(nil), res.Lines[i].Cells...)
		own.Lines[i].Tau = append([]float64(nil), res.Lines[i].Tau...)
	}
	want, err := own.Rescale(f.PoreVolume)
	if err != nil {
		t.Fatal(err)
	}
	viaRescale, err := res.Rescale(f.PoreVolume)
	if err != nil {
		t.Fatal(err)
	}
	taken, err := res.TakeSegments(f.PoreVolume)
	if err != nil {
		t.Fatal(err)
	}
	for name, sg := range map[string]*Segments{"Rescale": viaRescale, "TakeSegments": taken} {
		if !slices.Equal(sg.Start, want.Start) || !slices.Equal(sg.Cell, want.Cell) || sg.Uncovered != want.Uncovered {
			t.Fatalf("%s: segments differ in their lines or cells", name)
		}
		for s := range want.Exit {
			if math.Float64bits(sg.Exit[s]) != math.Float64bits(want.Exit[s]) {
				t.Fatalf("%s: segment %d exits at %v, the definition gives %v", name, s, sg.Exit[s], want.Exit[s])
			}
		}
		for i := range want.Total {
			if math.Float64bits(sg.Total[i]) != math.Float64bits(want.Total[i]) {
				t.Fatalf("%s: line %d total %v, the definition gives %v", name, i, sg.Total[i], want.Total[i])
			}
		}
	}
	for i := range res.Lines {
		if res.Lines[i].Cells != nil || res.Lines[i].Tau != nil {
			t.Fatalf("line %d keeps its cells after TakeSegments", i)
		}
	}
	if _, err := res.Rescale(f.PoreVolume); err == nil {
		t.Error("Rescale after TakeSegments: no error")
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
	if _, err := res.Rescale(f.PoreVolume); err == nil {
		t.Error("Rescale after ReleaseCells: no error")
	}
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

// TestVolumesOnlySameAsFull checks that a trace with Settings.VolumesOnly
// gives the lines, traced volumes, stagnant cells, producer partition,
// pairs and rescaled segments of the full trace bit for bit, and leaves
// the time-of-flight maps and the injector partition out.
func TestVolumesOnlySameAsFull(t *testing.T) {
	for _, sealed := range []bool{false, true} {
		f := twoChannels(25, 10, sealed)
		for _, workers := range []int{1, 3} {
			full, err := Trace(f, Settings{Count: 60, Workers: workers})
			if err != nil {
				t.Fatal(err)
			}
			lean, err := Trace(f, Settings{Count: 60, Workers: workers, VolumesOnly: true})
			if err != nil {
				t.Fatal(err)
			}
			if lean.TOF != nil || lean.BackTOF != nil || lean.Travel != nil || lean.InjectorPartition != nil {
				t.Fatalf("sealed %v: VolumesOnly made a time-of-flight map or the injector partition", sealed)
			}
			if len(lean.Lines) != len(full.Lines) || !slices.Equal(lean.ProducerPartition, full.ProducerPartition) ||
				!slices.Equal(lean.Stagnant, full.Stagnant) || !slices.Equal(lean.Pairs, full.Pairs) {
				t.Fatalf("sealed %v, %d workers: lines, partition, stagnant cells or pairs differ", sealed, workers)
			}
			for c := range full.Volume {
				if math.Float64bits(lean.Volume[c]) != math.Float64bits(full.Volume[c]) {
					t.Fatalf("sealed %v: cell %d volume %v, full trace %v", sealed, c, lean.Volume[c], full.Volume[c])
				}
			}
			a, err := full.Rescale(f.PoreVolume)
			if err != nil {
				t.Fatal(err)
			}
			b, err := lean.Rescale(f.PoreVolume)
			if err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(a.Cell, b.Cell) || !slices.Equal(a.Exit, b.Exit) || !slices.Equal(a.Total, b.Total) || a.Uncovered != b.Uncovered {
				t.Fatalf("sealed %v: rescaled segments differ", sealed)
			}
		}
	}
}

package streamline

import (
	"math"
	"strings"
	"testing"

	"floodtrace/reservoir"
)

func emptyField(nx, ny int, pv float64) *Field {
	g := reservoir.Grid{NX: nx, NY: ny, DX: 10, DY: 10}
	f := &Field{Grid: g, PoreVolume: make([]float64, g.N()), FluxX: make([]float64, g.NXFaces()), FluxY: make([]float64, g.NYFaces())}
	for k := range f.PoreVolume {
		f.PoreVolume[k] = pv
	}
	return f
}

func hasWarning(r *Result, sub string) bool {
	for _, w := range r.Warnings {
		if strings.Contains(w, sub) {
			return true
		}
	}
	return false
}

// TestSaddle: two injectors face each other across a cell that sends the
// flow north and south to two producers. The middle launch point of each
// injector face (9 points, the 5th at the centre) runs into the saddle
// point at the centre of that cell and must stop there (stagnation) with
// no flux; the other lines split evenly, so by symmetry each pair carries
// half of each rate.
func TestSaddle(t *testing.T) {
	const q = 3.0
	f := emptyField(3, 3, 50)
	g := f.Grid
	f.FluxX[g.XFace(1, 1)] = q  // west injector into the centre
	f.FluxX[g.XFace(2, 1)] = -q // east injector into the centre
	f.FluxY[g.YFace(1, 1)] = -q // centre to the south producer
	f.FluxY[g.YFace(1, 2)] = q  // centre to the north producer
	f.Wells = []Well{
		{"I-W", g.Index(0, 1), q}, {"I-E", g.Index(2, 1), q},
		{"P-S", g.Index(1, 0), -q}, {"P-N", g.Index(1, 2), -q},
	}
	r, err := Trace(f, Settings{Count: 2 * 9})
	if err != nil {
		t.Fatal(err)
	}
	stag := 0
	for _, l := range r.Lines {
		if l.End == Stagnation {
			stag++
			if l.Flux != 0 || l.Producer != -1 {
				t.Errorf("stagnant line carries flux %g to producer %d", l.Flux, l.Producer)
			}
		}
	}
	if stag != 2 || !hasWarning(r, "stagnation") {
		t.Errorf("%d stagnant lines, warnings %q; want 2 and a warning", stag, r.Warnings)
	}
	if len(r.Pairs) != 4 {
		t.Fatalf("pairs %+v, want 4", r.Pairs)
	}
	for _, p := range r.Pairs {
		if math.Abs(p.Rate-q/2) > 1e-12 || math.Abs(p.FractionOfInjector-0.5) > 1e-12 || math.Abs(p.FractionOfProducer-0.5) > 1e-12 {
			t.Errorf("pair %+v, want half of each rate", p)
		}
	}
}

// TestWeakProducer: a producer half-way along a channel takes half of the
// flow and passes the rest on to a producer at the end. The lines entering
// the middle of its face (those nearest the well) end there, the others go
// on; the fluxes then match both producer rates exactly.
func TestWeakProducer(t *testing.T) {
	const q = 4.0
	f := emptyField(11, 1, 20)
	g := f.Grid
	for i := 1; i <= 5; i++ {
		f.FluxX[g.XFace(i, 0)] = 2 * q
	}
	for i := 6; i < 11; i++ {
		f.FluxX[g.XFace(i, 0)] = q
	}
	f.Wells = []Well{{"I", 0, 2 * q}, {"P-mid", 5, -q}, {"P-end", 10, -q}}
	r, err := Trace(f, Settings{Count: 40})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Warnings) > 0 {
		t.Errorf("warnings %q", r.Warnings)
	}
	arrived := make([]float64, 3)
	for _, l := range r.Lines {
		if l.Producer < 0 {
			t.Fatalf("line ends by %v", l.End)
		}
		arrived[l.Producer] += l.Flux
	}
	for w := 1; w < 3; w++ {
		if math.Abs(arrived[w]-q) > 1e-9*q {
			t.Errorf("producer %d receives %g, rate %g", w, arrived[w], q)
		}
	}
	if len(r.Pairs) != 2 || math.Abs(r.Pairs[0].FractionOfInjector-0.5) > 1e-12 {
		t.Errorf("pairs %+v", r.Pairs)
	}
	// Cells upstream of the weak producer hold exactly their pore volume
	// (uniform flux 2q), and so do the cells downstream of it (flux q).
	for k := 1; k < 10; k++ {
		if k != 5 && relErr(r.Volume[k], 20) > 1e-12 {
			t.Errorf("cell %d: traced volume %g, pore volume 20", k, r.Volume[k])
		}
	}
}

// TestStepCap: a closed loop of flux around a grid vertex has no wells and
// no end; every line must stop at the step cap and be reported.
func TestStepCap(t *testing.T) {
	const q = 1.0
	f := emptyField(2, 2, 10)
	g := f.Grid
	f.FluxX[g.XFace(1, 0)] = q  // (0,0) -> (1,0)
	f.FluxY[g.YFace(1, 1)] = q  // (1,0) -> (1,1)
	f.FluxX[g.XFace(1, 1)] = -q // (1,1) -> (0,1)
	f.FluxY[g.YFace(0, 1)] = -q // (0,1) -> (0,0)
	const maxSteps = 9
	r, err := Trace(f, Settings{MaxSteps: maxSteps})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Lines) == 0 || !hasWarning(r, "step cap") {
		t.Fatalf("%d lines, warnings %q", len(r.Lines), r.Warnings)
	}
	for _, l := range r.Lines {
		if l.Start != StepCap || l.End != StepCap || len(l.Cells) > 2*maxSteps || l.Flux != 0 {
			t.Errorf("line %+v", l)
		}
	}
	for k := range r.Stagnant {
		if !r.Stagnant[k] || !math.IsNaN(r.TOF[k]) {
			t.Errorf("cell %d: stagnant %v, TOF %g; want true, NaN (no line with flux)", k, r.Stagnant[k], r.TOF[k])
		}
	}
}

// TestInconsistentBoundary: flux leaving through the grid edge ends the
// line with a reason and a warning instead of a panic.
func TestInconsistentBoundary(t *testing.T) {
	f := emptyField(4, 1, 10)
	g := f.Grid
	for i := 1; i <= 4; i++ {
		f.FluxX[g.XFace(i, 0)] = 2
	}
	f.Wells = []Well{{"I", 0, 2}}
	r, err := Trace(f, Settings{Count: 8})
	if err != nil {
		t.Fatal(err)
	}
	if !hasWarning(r, "grid edge") {
		t.Errorf("warnings %q", r.Warnings)
	}
	for _, l := range r.Lines {
		if l.End != Boundary || len(l.Cells) != 4 {
			t.Errorf("line ends %v after %d cells", l.End, len(l.Cells))
		}
	}
}

func TestBadInput(t *testing.T) {
	good := func() *Field {
		f := emptyField(3, 2, 5)
		f.FluxX[f.Grid.XFace(1, 0)] = 1
		f.Wells = []Well{{"I", 0, 1}, {"P", 1, -1}}
		return f
	}
	tests := []struct {
		name string
		mod  func(f *Field, s *Settings)
		want string
	}{
		{"no grid", func(f *Field, s *Settings) { f.Grid.NX = 0 }, "Grid"},
		{"NaN cell size", func(f *Field, s *Settings) { f.Grid.DY = math.NaN() }, "Grid"},
		{"short pore volume", func(f *Field, s *Settings) { f.PoreVolume = f.PoreVolume[1:] }, "PoreVolume"},
		{"negative pore volume", func(f *Field, s *Settings) { f.PoreVolume[2] = -1 }, "PoreVolume[2]"},
		{"short active", func(f *Field, s *Settings) { f.Active = []bool{true} }, "Active"},
		{"short x flux", func(f *Field, s *Settings) { f.FluxX = f.FluxX[:3] }, "FluxX"},
		{"infinite y flux", func(f *Field, s *Settings) { f.FluxY[4] = math.Inf(1) }, "FluxY[4]"},
		{"well outside", func(f *Field, s *Settings) { f.Wells[1].Cell = 6 }, "outside"},
		{"NaN rate", func(f *Field, s *Settings) { f.Wells[0].Q = math.NaN() }, "rate"},
		{"two wells in a cell", func(f *Field, s *Settings) { f.Wells[1].Cell = 0 }, "share"},
		{"well in an inactive cell", func(f *Field, s *Settings) { f.Active = []bool{true, false, true, true, true, true} }, "inactive"},
		{"negative count", func(f *Field, s *Settings) { s.Count = -1 }, "negative"},
		{"negative workers", func(f *Field, s *Settings) { s.Workers = -2 }, "negative"},
	}
	for _, tc := range tests {
		f, s := good(), Settings{}
		tc.mod(f, &s)
		r, err := Trace(f, s)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: result %v, error %v; want an error about %q", tc.name, r != nil, err, tc.want)
		}
	}
	if _, err := Trace(nil, Settings{}); err == nil {
		t.Error("nil field accepted")
	}
	if _, err := Trace(good(), Settings{}); err != nil {
		t.Errorf("good field refused: %v", err)
	}
}

// TestNoFlow: a field without flux (shut wells, or wells in cells that
// carry nothing) gives no lines, all active cells stagnant, NaN times and
// a warning for the producer that receives nothing.
func TestNoFlow(t *testing.T) {
	f := emptyField(4, 3, 7)
	f.Wells = []Well{{"I", 0, 0}, {"P", 11, -2}}
	r, err := Trace(f, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Lines) != 0 || len(r.Pairs) != 0 || !hasWarning(r, `producer "P"`) {
		t.Errorf("%d lines, pairs %v, warnings %q", len(r.Lines), r.Pairs, r.Warnings)
	}
	for k := range r.Stagnant {
		if !r.Stagnant[k] || !math.IsNaN(r.TOF[k]) || !math.IsNaN(r.BackTOF[k]) || r.InjectorPartition[k] != -1 {
			t.Errorf("cell %d: stagnant %v, TOF %g, back TOF %g, partition %d", k, r.Stagnant[k], r.TOF[k], r.BackTOF[k], r.InjectorPartition[k])
		}
	}
}

package render

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"floodtrace/reservoir"
)

// TestChangeMapLines: the change map with streamlines darkens the pixels
// along a line (a uniform multiplier of 1 is near white, so the line must
// show, if faintly at this size), leaves a pixel far from every line as DrawField draws it, and
// takes many lines (drawn every k-th) and refuses a malformed one.
func TestChangeMapLines(t *testing.T) {
	g := reservoir.Grid{NX: 40, NY: 20, DX: 25, DY: 25}
	s := Scene{Title: "Change map test", Subtitle: "change", Grid: g, LengthUnit: "ft",
		Wells: []WellMark{{Name: "I-1", X: 50, Y: 250, Injector: true}, {Name: "P-1", X: 950, Y: 250}}}
	v := make([]float64, g.N())
	for k := range v {
		v[k] = 1
	}
	sc := Scale{Label: "Multiplier", Unit: "ratio", Min: 0.1, Max: 10, Log: true, Map: &ChangeColors}
	line := Polyline{X: []float64{50, 950}, Y: []float64{250, 250}, TotalTOF: 100}
	plain, err := DrawField(s, v, sc, 1600, 1000)
	if err != nil {
		t.Fatal(err)
	}
	with, err := drawFieldLines(s, v, sc, []Polyline{line}, 1600, 1000)
	if err != nil {
		t.Fatal(err)
	}
	c, err := newMapCanvas(s, 1600, 1000)
	if err != nil {
		t.Fatal(err)
	}
	onX, onY := c.l.ToPixel(700, 250)
	offX, offY := c.l.ToPixel(700, 60)
	// The darkest pixel across the line: the line is under a pixel wide
	// at this size and antialiased, so it covers no pixel fully (full
	// cover at alpha 150/255 would give a red of about 119 over 249;
	// measured 205). A tenth darker shows it is drawn.
	r0, _, _, _ := plain.At(int(onX), int(onY)).RGBA()
	r1 := r0
	for dy := -3; dy <= 3; dy++ {
		r, _, _, _ := with.At(int(onX), int(onY)+dy).RGBA()
		r1 = min(r1, r)
	}
	if !(r1 < r0*9/10) {
		t.Errorf("pixels across the line: darkest red %d with the line, %d without; want it darker by a tenth at least", r1>>8, r0>>8)
	}
	if plain.At(int(offX), int(offY)) != with.At(int(offX), int(offY)) {
		t.Errorf("pixel far from the line changed: %v -> %v", plain.At(int(offX), int(offY)), with.At(int(offX), int(offY)))
	}
	many := make([]Polyline, 1000)
	for i := range many {
		y := 10 + 480*float64(i)/1000
		many[i] = Polyline{X: []float64{50, 950}, Y: []float64{y, y}}
	}
	if _, err := drawFieldLines(s, v, sc, many, 800, 500); err != nil {
		t.Fatal(err)
	}
	if _, err := drawFieldLines(s, v, sc, []Polyline{{X: []float64{1, 2}, Y: []float64{1}}}, 800, 500); err == nil {
		t.Error("a line with 2 x and 1 y values was accepted")
	}
}

// TestCalibrationReport: report.html holds every producer's row, escapes
// a name with markup, embeds each picture given with its caption (the
// water-cut chart named by its producer) and refuses a missing picture.
func TestCalibrationReport(t *testing.T) {
	dir := t.TempDir()
	files := []string{CalibrationChangeMap, CalibrationWaterCutChart(1, "P<2>")}
	for _, f := range files {
		if err := os.MkdirAll(filepath.Join(dir, filepath.Dir(f)), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, f), []byte("\x89PNG fake"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	rep := CalibrationReport{Title: "Report test", Headline: []string{"misfit 80.0 → 20.0 days"},
		Rows:        []CalibrationRow{{Producer: "P-1", ShiftBefore: "-40.0", ShiftAfter: "2.0"}, {Producer: "P<2>", ShiftBefore: "75.5", ShiftAfter: "-3.1"}},
		Constrained: "The data constrain 12 cells.", Warnings: []string{"P-3 has no water"}}
	name, err := WriteCalibrationReport(dir, rep, files)
	if err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(filepath.Join(dir, name))
	if err != nil {
		t.Fatal(err)
	}
	html := string(b)
	for _, want := range []string{"<td>P-1</td>", "-40.0", "75.5", "P&lt;2&gt;", "misfit 80.0 → 20.0 days", "The data constrain 12 cells.", "P-3 has no water",
		"Producer P&lt;2&gt;: water cut observed", "with the streamlines of the calibrated map", "data:image/png;base64,"} {
		if !strings.Contains(html, want) {
			t.Errorf("report.html lacks %q", want)
		}
	}
	if strings.Contains(html, "<td>P<2>") {
		t.Error("report.html does not escape a producer name")
	}
	if n := strings.Count(html, "<figure>"); n != 2 {
		t.Errorf("%d figures, want 2", n)
	}
	if _, err := WriteCalibrationReport(dir, rep, []string{"maps/missing.png"}); err == nil {
		t.Error("a missing picture was accepted")
	}
}

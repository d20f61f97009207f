package render

import (
	"bytes"
	"math"
	"strings"
	"testing"
)

// TestOverlayMarkers: the markers of an overlay land where the layout
// transform puts their map positions, a value square takes the colour of
// its value on the overlay's scale, a cross is red, a hollow square leaves
// the field visible at its centre, and the legend's colour bar is the
// overlay's scale (its top near the top colour of that map), not the
// field's.
func TestOverlayMarkers(t *testing.T) {
	c := newSynthCase()
	s := c.scene()
	v := c.satValues(1095)
	field := Scale{Label: "Water saturation", Min: 0.2, Max: 0.75, Map: &SaturationColors}
	g := s.Grid
	at := func(i, j int) (float64, float64) { return c.wellXY([2]int{i, j}) }
	x1, y1 := at(10, 30)
	x2, y2 := at(40, 10)
	x3, y3 := at(12, 12)
	x4, y4 := at(45, 25)
	ov := Overlay{
		Size:  100,
		Scale: Scale{Label: "Objective", Min: 0, Max: 10, Map: &TimeOfFlightColors},
		Markers: []Marker{
			{X: x1, Y: y1, Shape: MarkValue, Value: 10, Rank: 1},
			{X: x2, Y: y2, Shape: MarkValue, Value: 0},
			{X: x3, Y: y3, Shape: MarkCross},
			{X: x4, Y: y4, Shape: MarkHollow},
		},
		Keys: []MarkerKey{{Label: "Node", Shape: MarkValue}, {Label: "Best", Ranked: true},
			{Label: "Failed", Shape: MarkCross}, {Label: "Skipped", Shape: MarkHollow}},
		FieldLabel: "Water saturation (grey)",
	}
	for _, sz := range [][2]int{{1920, 1080}, {960, 540}} {
		img, err := DrawFieldOverlay(s, v, field, ov, sz[0], sz[1])
		if err != nil {
			t.Fatal(err)
		}
		l, err := NewLayout(g, sz[0], sz[1])
		if err != nil {
			t.Fatal(err)
		}
		px := func(x, y float64) (int, int) {
			a, b := l.ToPixel(x, y)
			return int(a), int(b)
		}
		a, b := px(x1, y1)
		if got, want := rgbaAt(img, a, b), TimeOfFlightColors.At(1); got != want {
			t.Errorf("%v: best marker centre %v, want the top colour %v", sz, got, want)
		}
		a, b = px(x2, y2)
		if got, want := rgbaAt(img, a, b), TimeOfFlightColors.At(0); got != want {
			t.Errorf("%v: low marker centre %v, want the bottom colour %v", sz, got, want)
		}
		a, b = px(x3, y3)
		if got := rgbaAt(img, a, b); got.R < 150 || got.G > 90 || got.B > 90 {
			t.Errorf("%v: cross centre %v, want red", sz, got)
		}
		a, b = px(x4, y4)
		if got, want := rgbaAt(img, a, b), SaturationColors.At(field.T(v[g.Index(45, 25)])); got != want {
			t.Errorf("%v: hollow marker centre %v, want the field colour %v", sz, got, want)
		}
		// A frame surrounds the ranked marker: ink just outside the square.
		a, b = px(x1, y1)
		half := math.Max(4*l.S, math.Min(14*l.S, 100*l.PixelsPerUnit))
		if got := rgbaAt(img, a, b-int(math.Round(half+4*l.S))); got.R > 90 {
			t.Errorf("%v: no frame above the ranked marker (%v)", sz, got)
		}
		// The bar's second row (the first meets the frame) is within a
		// few levels of the overlay's top colour.
		bx := (l.Bar.Min.X + l.Bar.Max.X) / 2
		got, want := rgbaAt(img, bx, l.Bar.Min.Y+1), TimeOfFlightColors.At(1)
		if d := math.Abs(float64(got.R)-float64(want.R)) + math.Abs(float64(got.G)-float64(want.G)) + math.Abs(float64(got.B)-float64(want.B)); d > 12 {
			t.Errorf("%v: colour bar top %v, want near the overlay's top colour %v", sz, got, want)
		}
	}
	// Deterministic.
	a, _ := DrawFieldOverlay(s, v, field, ov, 800, 450)
	b, _ := DrawFieldOverlay(s, v, field, ov, 800, 450)
	if !bytes.Equal(a.Pix, b.Pix) {
		t.Error("two drawings differ")
	}
}

// TestOverlayBadInput: a marker without a position or a bad size is an
// error, not a panic.
func TestOverlayBadInput(t *testing.T) {
	c := newSynthCase()
	s := c.scene()
	v := c.satValues(365)
	for _, tc := range []struct {
		name string
		ov   Overlay
		want string
	}{
		{"NaN position", Overlay{Markers: []Marker{{X: math.NaN(), Y: 1}}}, "no position"},
		{"infinite size", Overlay{Size: math.Inf(1)}, "marker size"},
		{"negative size", Overlay{Size: -1}, "marker size"},
	} {
		_, err := DrawFieldOverlay(s, v, Scale{}, tc.ov, 640, 360)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want %q", tc.name, err, tc.want)
		}
	}
}

package render

import (
	"image"
	"image/color"
	"math"
	"testing"
)

// distinctColours counts the distinct colours of an image, up to limit.
func distinctColours(img image.Image, limit int) int {
	seen := map[color.RGBA]bool{}
	b := img.Bounds()
	for y := b.Min.Y; y < b.Max.Y; y += 2 {
		for x := b.Min.X; x < b.Max.X; x += 2 {
			r, g, bb, a := img.At(x, y).RGBA()
			seen[color.RGBA{uint8(r >> 8), uint8(g >> 8), uint8(bb >> 8), uint8(a >> 8)}] = true
			if len(seen) >= limit {
				return len(seen)
			}
		}
	}
	return len(seen)
}

func rgbaAt(img image.Image, x, y int) color.RGBA {
	r, g, b, a := img.At(x, y).RGBA()
	return color.RGBA{uint8(r >> 8), uint8(g >> 8), uint8(b >> 8), uint8(a >> 8)}
}

// TestSweptPixel: in the synthetic saturation map, the cells next to the
// injector are swept (Sw = 0.75, the top of the scale) and the pixel at
// their centre, found through the layout transform, has exactly the
// colour-map colour of that saturation; a dry cell far away has the colour
// of the initial saturation, and the inactive corner is grey.
func TestSweptPixel(t *testing.T) {
	c := newSynthCase()
	s := c.scene()
	v := c.satValues(1095)
	sc := Scale{Label: "Water saturation", Unit: "fraction", Min: 0.2, Max: 0.75, Map: &SaturationColors}
	for _, sz := range [][2]int{{1920, 1080}, {1000, 700}} {
		img, err := DrawField(s, v, sc, sz[0], sz[1])
		if err != nil {
			t.Fatal(err)
		}
		l, err := NewLayout(s.Grid, sz[0], sz[1])
		if err != nil {
			t.Fatal(err)
		}
		g := s.Grid
		check := func(i, j int, want color.RGBA, what string) {
			t.Helper()
			px, py := l.CellPixel(i, j)
			if got := rgbaAt(img, px, py); got != want {
				t.Errorf("%dx%d: %s cell (%d,%d) pixel (%d,%d) = %v, want %v", sz[0], sz[1], what, i, j, px, py, got, want)
			}
		}
		si, sj := c.inj[0]-2, c.inj[1]-2
		sw := v[g.Index(si, sj)]
		if sw != c.swf {
			t.Fatalf("synthetic cell next to the injector has Sw %v, want %v", sw, c.swf)
		}
		wet := SaturationColors.At(1)
		check(si, sj, wet, "swept")
		if l := toCIELab(wet).L; l > 25 {
			t.Errorf("high-saturation colour %v has L* %.1f, want dark", wet, l)
		}
		check(c.inj[0]+2, c.inj[1]-1, wet, "swept")
		check(55, 2, SaturationColors.At(0), "dry")
		check(59, 39, colInactive, "inactive")
	}
}

// TestColourBarOrder samples the colour bar from bottom to top: CIE L*
// falls monotonically (light = low, dark = high for every sequential map)
// and the ends are the ends of the colour map.
func TestColourBarOrder(t *testing.T) {
	c := newSynthCase()
	s := c.scene()
	for _, m := range allMaps {
		cm := m.m
		sc := Scale{Label: m.name, Min: 0, Max: 1, Map: &cm}
		img, err := DrawField(s, c.satValues(365), sc, 1280, 720)
		if err != nil {
			t.Fatal(err)
		}
		l, _ := NewLayout(s.Grid, 1280, 720)
		b := l.Bar
		x := (b.Min.X + b.Max.X) / 2
		prev := math.Inf(1)
		for y := b.Max.Y - 1; y >= b.Min.Y; y-- {
			L := toCIELab(rgbaAt(img, x, y)).L
			if L > prev+0.3 {
				t.Fatalf("%s: bar lightness rises at row %d (%.2f after %.2f)", m.name, y, L, prev)
			}
			prev = math.Min(prev, L)
		}
		if got := rgbaAt(img, x, b.Max.Y-1); got != cm.At(0) {
			t.Errorf("%s: bar bottom %v, want %v", m.name, got, cm.At(0))
		}
		if got := rgbaAt(img, x, b.Min.Y); got != cm.At(1) {
			t.Errorf("%s: bar top %v, want %v", m.name, got, cm.At(1))
		}
	}
}

// TestWellsAboveStreamlines: streamlines run straight through both wells,
// yet the symbol colours are intact at the well centres.
func TestWellsAboveStreamlines(t *testing.T) {
	c := newSynthCase()
	s := c.scene()
	ix, iy := c.wellXY(c.inj)
	px, py := c.wellXY(c.prods[0])
	var lines []Polyline
	for n := range 50 {
		d := float64(n-25) * 4
		lines = append(lines, Polyline{X: []float64{ix - 400 + d, ix, px, px + 300}, Y: []float64{iy + d, iy, py, py - d}, TotalTOF: 100 + float64(n)})
	}
	img, err := drawStreamlines(s, lines, Scale{}, 1600, 900)
	if err != nil {
		t.Fatal(err)
	}
	l, _ := NewLayout(s.Grid, 1600, 900)
	x, y := l.ToPixel(ix, iy)
	if got := rgbaAt(img, int(x), int(y)); got != colInjector {
		t.Errorf("injector centre %v, want %v", got, colInjector)
	}
	x, y = l.ToPixel(px, py)
	if got := rgbaAt(img, int(x), int(y)); got != colWhite {
		t.Errorf("producer core %v, want %v", got, colWhite)
	}
	// The lines are there: a pixel halfway between the wells is a line colour.
	x, y = l.ToPixel((ix+px)/2, (iy+py)/2)
	if got := rgbaAt(img, int(x), int(y)); got == colCanvas {
		t.Errorf("no streamline drawn between the wells")
	}
	if n := distinctColours(img, 50); n < 50 {
		t.Errorf("streamline map has %d colours", n)
	}
}

// TestPartitionColours: each partition takes its palette fill and the
// legend lists only the wells present.
func TestPartitionColours(t *testing.T) {
	c := newSynthCase()
	s := c.scene()
	g := s.Grid
	part := make([]int, g.N())
	for k := range part {
		i, _ := g.IJ(k)
		if i < 30 {
			part[k] = 2
		} else {
			part[k] = 3
		}
	}
	part[g.Index(10, 10)] = 0
	img, err := drawPartition(s, part, []string{"I-1", "P-1", "P-2"}, "Producer partition", 1200, 800)
	if err != nil {
		t.Fatal(err)
	}
	l, _ := NewLayout(g, 1200, 800)
	for _, cs := range []struct {
		i, j int
		want color.RGBA
	}{{20, 30, categoricalFill(0)}, {40, 20, categoricalFill(1)}} {
		x, y := l.CellPixel(cs.i, cs.j)
		if got := rgbaAt(img, x, y); got != cs.want {
			t.Errorf("cell (%d,%d) = %v, want %v", cs.i, cs.j, got, cs.want)
		}
	}
	x, y := l.CellPixel(10, 10)
	if got := rgbaAt(img, x, y); got != colNoData && got != colNoDataHat {
		t.Errorf("unflooded cell = %v, want the no-value fill", got)
	}
}

func TestDrawErrors(t *testing.T) {
	c := newSynthCase()
	s := c.scene()
	v := c.satValues(365)
	if _, err := DrawField(s, v[:10], Scale{}, 800, 600); err == nil {
		t.Error("short values: no error")
	}
	if _, err := DrawField(s, v, Scale{}, 20, 600); err == nil {
		t.Error("tiny picture: no error")
	}
	if _, err := DrawField(s, v, Scale{Log: true, Min: -1, Max: 1}, 800, 600); err == nil {
		t.Error("bad log scale: no error")
	}
	bad := s
	bad.Active = bad.Active[:5]
	if _, err := DrawField(bad, v, Scale{}, 800, 600); err == nil {
		t.Error("short mask: no error")
	}
	bad = s
	bad.Wells = []WellMark{{Name: "X", X: math.NaN()}}
	if _, err := DrawField(bad, v, Scale{}, 800, 600); err == nil {
		t.Error("NaN well: no error")
	}
	part := make([]int, s.Grid.N())
	part[3] = 9
	if _, err := drawPartition(s, part, []string{"A"}, "x", 800, 600); err == nil {
		t.Error("partition index out of range: no error")
	}
	if _, err := drawStreamlines(s, []Polyline{{X: []float64{1, 2}, Y: []float64{1}}}, Scale{}, 800, 600); err == nil {
		t.Error("ragged streamline: no error")
	}
}

// TestMapSizes: every kind of map honours the requested size and is not
// blank.
func TestMapSizes(t *testing.T) {
	c := newSynthCase()
	s := c.scene()
	part := make([]int, s.Grid.N())
	for k := range part {
		part[k] = 1 + k%2
	}
	for _, sz := range [][2]int{{640, 480}, {1366, 768}, {900, 1200}} {
		imgs := map[string]func() (*image.RGBA, error){
			"field":       func() (*image.RGBA, error) { return DrawField(s, c.satValues(1825), Scale{}, sz[0], sz[1]) },
			"partition":   func() (*image.RGBA, error) { return drawPartition(s, part, []string{"A", "B"}, "x", sz[0], sz[1]) },
			"streamlines": func() (*image.RGBA, error) { return drawStreamlines(s, nil, Scale{}, sz[0], sz[1]) },
		}
		for name, f := range imgs {
			img, err := f()
			if err != nil {
				t.Fatalf("%s %v: %v", name, sz, err)
			}
			if b := img.Bounds(); b.Dx() != sz[0] || b.Dy() != sz[1] {
				t.Errorf("%s: size %v, want %v", name, b, sz)
			}
			if n := distinctColours(img, 20); n < 20 {
				t.Errorf("%s %v: only %d colours", name, sz, n)
			}
		}
	}
}

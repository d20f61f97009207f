package render

import (
	"image/color"
	"math"
	"testing"
)

func near(a, b, tol float64) bool { return math.Abs(a-b) <= tol }

// TestOklabReference checks the sRGB to Oklab conversion against the
// reference values of Ottosson (2020) as quoted in the CSS Color Module
// Level 4 examples (from memory): red = oklch(62.8% 0.2577 29.23),
// lime = oklab(0.8664 -0.2339 0.1795), blue = oklab(0.4520 -0.0325
// -0.3115), white = (1, 0, 0).
func TestOklabReference(t *testing.T) {
	redA := 0.25768 * math.Cos(29.2339*math.Pi/180)
	redB := 0.25768 * math.Sin(29.2339*math.Pi/180)
	cases := []struct {
		name string
		c    color.RGBA
		want Lab
		tol  float64
	}{
		{"white", color.RGBA{255, 255, 255, 255}, Lab{1, 0, 0}, 2e-4},
		{"black", color.RGBA{0, 0, 0, 255}, Lab{0, 0, 0}, 1e-9},
		{"red", color.RGBA{255, 0, 0, 255}, Lab{0.62796, redA, redB}, 1e-3},
		{"lime", color.RGBA{0, 255, 0, 255}, Lab{0.86644, -0.23389, 0.17950}, 1e-3},
		{"blue", color.RGBA{0, 0, 255, 255}, Lab{0.45201, -0.03246, -0.31153}, 1e-3},
	}
	for _, c := range cases {
		got := toOklab(c.c)
		if !near(got.L, c.want.L, c.tol) || !near(got.A, c.want.A, c.tol) || !near(got.B, c.want.B, c.tol) {
			t.Errorf("%s: Oklab %+v, want %+v", c.name, got, c.want)
		}
	}
}

// TestCIELabReference checks CIE 1976 L*a*b* (D65) against values widely
// tabulated for sRGB colours (from memory): red (53.24, 80.09, 67.20),
// white (100, 0, 0), #777777 L* = 50.03.
func TestCIELabReference(t *testing.T) {
	cases := []struct {
		c    color.RGBA
		want Lab
	}{
		{color.RGBA{255, 0, 0, 255}, Lab{53.24, 80.09, 67.20}},
		{color.RGBA{255, 255, 255, 255}, Lab{100, 0, 0}},
		{color.RGBA{0x77, 0x77, 0x77, 255}, Lab{50.03, 0, 0}},
	}
	for _, c := range cases {
		got := toCIELab(c.c)
		if !near(got.L, c.want.L, 0.06) || !near(got.A, c.want.A, 0.06) || !near(got.B, c.want.B, 0.06) {
			t.Errorf("%v: L*a*b* %+v, want %+v", c.c, got, c.want)
		}
	}
}

func TestOklabRoundTrip(t *testing.T) {
	for r := 0; r < 256; r += 15 {
		for g := 0; g < 256; g += 15 {
			for b := 0; b < 256; b += 15 {
				c := color.RGBA{uint8(r), uint8(g), uint8(b), 255}
				back := fromOklab(toOklab(c))
				if back != c {
					t.Fatalf("round trip %v -> %v", c, back)
				}
			}
		}
	}
}

func TestParseHex(t *testing.T) {
	for _, c := range []struct {
		in   string
		want color.RGBA
		ok   bool
	}{
		{"#0072b2", color.RGBA{0, 0x72, 0xb2, 255}, true},
		{"D55E00", color.RGBA{0xd5, 0x5e, 0, 255}, true},
		{"#12345", color.RGBA{}, false},
		{"#12345g", color.RGBA{}, false},
	} {
		got, err := ParseHex(c.in)
		if (err == nil) != c.ok || got != c.want {
			t.Errorf("ParseHex(%q) = %v, %v", c.in, got, err)
		}
		if c.ok && hexString(got) != "#"+lower(c.in) {
			t.Errorf("HexString(%v) = %s", got, hexString(got))
		}
	}
}

func lower(s string) string {
	if s[0] == '#' {
		s = s[1:]
	}
	b := []byte(s)
	for i, ch := range b {
		if ch >= 'A' && ch <= 'Z' {
			b[i] = ch + 32
		}
	}
	return string(b)
}

var allMaps = []struct {
	name    string
	m       Colormap
	anchors []string
}{
	{"saturation", SaturationColors, yellowGreenBlue},
	{"time of flight", TimeOfFlightColors, yellowOrangeRed},
	{"pressure", PressureColors, bluePurple},
}

// TestColormapEndpoints: the maps start and end at the published
// ColorBrewer end colours (Brewer 2003).
func TestColormapEndpoints(t *testing.T) {
	for _, c := range allMaps {
		first, last := hex(c.anchors[0]), hex(c.anchors[len(c.anchors)-1])
		if d := rgbDist(c.m.At(0), first); d > 1 {
			t.Errorf("%s: At(0) = %v, want %v", c.name, c.m.At(0), first)
		}
		if d := rgbDist(c.m.At(1), last); d > 1 {
			t.Errorf("%s: At(1) = %v, want %v", c.name, c.m.At(1), last)
		}
		if c.m.Len() != 256 {
			t.Errorf("%s: %d entries", c.name, c.m.Len())
		}
	}
}

func rgbDist(a, b color.RGBA) float64 {
	return math.Max(math.Abs(float64(a.R)-float64(b.R)), math.Max(math.Abs(float64(a.G)-float64(b.G)), math.Abs(float64(a.B)-float64(b.B))))
}

// TestColormapPerceptualSteps: equal steps in value are equal steps of
// Oklab distance (the equalisation of Kovesi 2015). Chunks of 15 entries
// are compared so that 8-bit rounding and the clipping of the few colours
// just outside the sRGB gamut do not dominate.
func TestColormapPerceptualSteps(t *testing.T) {
	for _, c := range allMaps {
		var ds []float64
		for i := 0; i+15 < c.m.Len(); i += 15 {
			a, b := toOklab(c.m.Entry(i)), toOklab(c.m.Entry(i+15))
			ds = append(ds, math.Sqrt((a.L-b.L)*(a.L-b.L)+(a.A-b.A)*(a.A-b.A)+(a.B-b.B)*(a.B-b.B)))
		}
		lo, hi := math.Inf(1), 0.0
		for _, d := range ds {
			lo, hi = math.Min(lo, d), math.Max(hi, d)
		}
		if hi/lo > 1.2 {
			t.Errorf("%s: Oklab steps range %.4f..%.4f (ratio %.3f), want nearly equal", c.name, lo, hi, hi/lo)
		}
	}
}

// TestColormapLightnessMonotone: every sequential map runs from light to
// dark in CIE L* (common practice for sequential maps; Brewer 2003).
func TestColormapLightnessMonotone(t *testing.T) {
	for _, c := range allMaps {
		prev := math.Inf(1)
		for i := range c.m.Len() {
			l := toCIELab(c.m.Entry(i)).L
			if l > prev+0.3 {
				t.Fatalf("%s: L* rises from %.2f to %.2f at entry %d", c.name, prev, l, i)
			}
			prev = math.Min(prev, l)
		}
		if l0, l1 := toCIELab(c.m.At(0)).L, toCIELab(c.m.At(1)).L; l0-l1 < 60 {
			t.Errorf("%s: lightness range %.1f..%.1f too small", c.name, l1, l0)
		}
	}
}

func TestNewColormapErrors(t *testing.T) {
	red := color.RGBA{255, 0, 0, 255}
	for _, c := range []struct {
		anchors []color.RGBA
		n       int
	}{
		{[]color.RGBA{red}, 10},
		{[]color.RGBA{red, red}, 10},
		{[]color.RGBA{red, {0, 0, 255, 255}}, 1},
	} {
		if _, err := NewColormap("x", c.anchors, c.n); err == nil {
			t.Errorf("NewColormap(%v, %d): no error", c.anchors, c.n)
		}
	}
}

// TestCategoricalFill: fills are lighter versions of the Okabe and Ito
// (2008) colours and stay distinct from each other.
func TestCategoricalFill(t *testing.T) {
	seen := map[color.RGBA]bool{}
	for i := range Categorical {
		f := categoricalFill(i)
		if toCIELab(f).L <= toCIELab(Categorical[i]).L {
			t.Errorf("fill %d %v not lighter than %v", i, f, Categorical[i])
		}
		if seen[f] {
			t.Errorf("fill %d repeats", i)
		}
		seen[f] = true
	}
}

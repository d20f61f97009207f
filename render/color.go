package render

import (
	"fmt"
	"image/color"
	"math"
)

// Lab is a colour in a perceptual colour space: lightness L and the two
// opponent axes A (green-red) and B (blue-yellow).
type Lab struct{ L, A, B float64 }

// srgbToLinear decodes one sRGB channel in [0,1] to linear light
// (IEC 61966-2-1:1999).
func srgbToLinear(c float64) float64 {
	if c <= 0.04045 {
		return c / 12.92
	}
	return math.Pow((c+0.055)/1.055, 2.4)
}

// linearToSRGB encodes linear light in [0,1] to an sRGB channel
// (IEC 61966-2-1:1999).
func linearToSRGB(c float64) float64 {
	if c <= 0.0031308 {
		return 12.92 * c
	}
	return 1.055*math.Pow(c, 1/2.4) - 0.055
}

func linearRGB(c color.RGBA) (r, g, b float64) {
	return srgbToLinear(float64(c.R) / 255), srgbToLinear(float64(c.G) / 255), srgbToLinear(float64(c.B) / 255)
}

// toOklab converts an opaque sRGB colour to Oklab, with L in [0,1]
// (Ottosson 2020, "A perceptual color space for image processing").
func toOklab(c color.RGBA) Lab {
	r, g, b := linearRGB(c)
	l := math.Cbrt(0.4122214708*r + 0.5363325363*g + 0.0514459929*b)
	m := math.Cbrt(0.2119034982*r + 0.6806995451*g + 0.1073969566*b)
	s := math.Cbrt(0.0883024619*r + 0.2817188376*g + 0.6299787005*b)
	return Lab{
		L: 0.2104542553*l + 0.7936177850*m - 0.0040720468*s,
		A: 1.9779984951*l - 2.4285922050*m + 0.4505937099*s,
		B: 0.0259040371*l + 0.7827717662*m - 0.8086757660*s,
	}
}

// fromOklab converts an Oklab colour to sRGB, clipping each channel to the
// sRGB gamut (Ottosson 2020).
func fromOklab(p Lab) color.RGBA {
	l := p.L + 0.3963377774*p.A + 0.2158037573*p.B
	m := p.L - 0.1055613458*p.A - 0.0638541728*p.B
	s := p.L - 0.0894841775*p.A - 1.2914855480*p.B
	l, m, s = l*l*l, m*m*m, s*s*s
	r := 4.0767416621*l - 3.3077115913*m + 0.2309699292*s
	g := -1.2684380046*l + 2.6097574011*m - 0.3413193965*s
	b := -0.0041960863*l - 0.7034186147*m + 1.7076147010*s
	return color.RGBA{R: to8(linearToSRGB(r)), G: to8(linearToSRGB(g)), B: to8(linearToSRGB(b)), A: 255}
}

func to8(v float64) uint8 {
	if !(v > 0) {
		return 0
	}
	if v >= 1 {
		return 255
	}
	return uint8(math.Round(v * 255))
}

// toCIELab converts an opaque sRGB colour to CIE 1976 L*a*b* under the D65
// white point, L* in [0,100] (CIE 15:2004; sRGB primaries of
// IEC 61966-2-1).
func toCIELab(c color.RGBA) Lab {
	r, g, b := linearRGB(c)
	x := (0.4124564*r + 0.3575761*g + 0.1804375*b) / 0.95047
	y := 0.2126729*r + 0.7151522*g + 0.0721750*b
	z := (0.0193339*r + 0.1191920*g + 0.9503041*b) / 1.08883
	f := func(t float64) float64 {
		const d = 6.0 / 29
		if t > d*d*d {
			return math.Cbrt(t)
		}
		return t/(3*d*d) + 4.0/29
	}
	fx, fy, fz := f(x), f(y), f(z)
	return Lab{L: 116*fy - 16, A: 500 * (fx - fy), B: 200 * (fy - fz)}
}

// mixOklab blends two colours in Oklab: t = 0 gives a, t = 1 gives b.
func mixOklab(a, b color.RGBA, t float64) color.RGBA {
	p, q := toOklab(a), toOklab(b)
	return fromOklab(Lab{p.L + t*(q.L-p.L), p.A + t*(q.A-p.A), p.B + t*(q.B-p.B)})
}

// hex parses "#rrggbb"; it panics on a malformed constant, so use it only
// for the package's own literals.
func hex(s string) color.RGBA {
	c, err := ParseHex(s)
	if err != nil {
		panic(err)
	}
	return c
}

// ParseHex parses a colour written "#rrggbb" or "rrggbb".
func ParseHex(s string) (color.RGBA, error) {
	if len(s) > 0 && s[0] == '#' {
		s = s[1:]
	}
	if len(s) != 6 {
		return color.RGBA{}, fmt.Errorf("render: colour %q is not #rrggbb", s)
	}
	var v [3]uint8
	for i := range 3 {
		var x uint8
		for _, ch := range s[2*i : 2*i+2] {
			x <<= 4
			switch {
			case ch >= '0' && ch <= '9':
				x |= uint8(ch - '0')
			case ch >= 'a' && ch <= 'f':
				x |= uint8(ch-'a') + 10
			case ch >= 'A' && ch <= 'F':
				x |= uint8(ch-'A') + 10
			default:
				return color.RGBA{}, fmt.Errorf("render: colour %q has a non-hex digit", s)
			}
		}
		v[i] = x
	}
	return color.RGBA{R: v[0], G: v[1], B: v[2], A: 255}, nil
}

// hexString writes a colour as "#rrggbb".
func hexString(c color.RGBA) string { return fmt.Sprintf("#%02x%02x%02x", c.R, c.G, c.B) }

// Colormap is a sequential colour map: a table of colours at equal steps of
// perceptual distance, from the colour of the smallest value (At(0)) to the
// colour of the largest (At(1)). The zero value is not usable; build one
// with NewColormap or use the package's maps.
type Colormap struct {
	name string
	lut  []color.RGBA
}

// NewColormap builds a colour map of n entries (n >= 2) from anchor colours
// given in order. The anchors are joined by straight segments in Oklab
// (Ottosson 2020) and the path is resampled at equal arc length, so equal
// steps in value give equal perceptual steps along the whole map: the
// equalisation of perceptual contrast proposed by Kovesi (2015, "Good
// colour maps: how to design them", arXiv:1509.03700).
func NewColormap(name string, anchors []color.RGBA, n int) (Colormap, error) {
	if len(anchors) < 2 {
		return Colormap{}, fmt.Errorf("render: colour map %q needs at least 2 anchors, has %d", name, len(anchors))
	}
	if n < 2 {
		return Colormap{}, fmt.Errorf("render: colour map %q needs at least 2 entries, asked for %d", name, n)
	}
	pts := make([]Lab, len(anchors))
	cum := make([]float64, len(anchors))
	for i, a := range anchors {
		pts[i] = toOklab(a)
		if i > 0 {
			d := pts[i]
			p := pts[i-1]
			cum[i] = cum[i-1] + math.Sqrt((d.L-p.L)*(d.L-p.L)+(d.A-p.A)*(d.A-p.A)+(d.B-p.B)*(d.B-p.B))
		}
	}
	total := cum[len(cum)-1]
	if !(total > 0) {
		return Colormap{}, fmt.Errorf("render: colour map %q has identical anchors", name)
	}
	lut := make([]color.RGBA, n)
	seg := 1
	for e := range n {
		s := total * float64(e) / float64(n-1)
		for seg < len(cum)-1 && cum[seg] < s {
			seg++
		}
		a, b := pts[seg-1], pts[seg]
		t := 0.0
		if w := cum[seg] - cum[seg-1]; w > 0 {
			t = (s - cum[seg-1]) / w
		}
		t = math.Max(0, math.Min(1, t))
		lut[e] = fromOklab(Lab{a.L + t*(b.L-a.L), a.A + t*(b.A-a.A), a.B + t*(b.B-a.B)})
	}
	return Colormap{name: name, lut: lut}, nil
}

// Name returns the colour map's name.
func (c Colormap) Name() string { return c.name }

// Len returns the number of entries in the table.
func (c Colormap) Len() int { return len(c.lut) }

// Index returns the table entry for t in [0,1] (clamped; NaN gives 0).
func (c Colormap) Index(t float64) int {
	if !(t > 0) {
		return 0
	}
	if t >= 1 {
		return len(c.lut) - 1
	}
	return int(t*float64(len(c.lut)-1) + 0.5)
}

// At returns the colour at t in [0,1] (clamped).
func (c Colormap) At(t float64) color.RGBA { return c.lut[c.Index(t)] }

// Entry returns table entry i.
func (c Colormap) Entry(i int) color.RGBA { return c.lut[i] }

// Anchor colours. The sequential anchors are the 9-class ColorBrewer
// schemes (Brewer 2003; Harrower and Brewer 2003, "ColorBrewer.org: an
// online tool for selecting colour schemes for maps", The Cartographic
// Journal 40(1)); values from memory.
var (
	// yellowGreenBlue is ColorBrewer YlGnBu: dry = pale, wet = dark blue.
	yellowGreenBlue = []string{"#ffffd9", "#edf8b1", "#c7e9b4", "#7fcdbb", "#41b6c4", "#1d91c0", "#225ea8", "#253494", "#081d58"}
	// yellowOrangeRed is ColorBrewer YlOrRd: a warm sequential map.
	yellowOrangeRed = []string{"#ffffcc", "#ffeda0", "#fed976", "#feb24c", "#fd8d3c", "#fc4e2a", "#e31a1c", "#bd0026", "#800026"}
	// purpleOrange is ColorBrewer PuOr reversed (orange at the low end):
	// a diverging map with a pale neutral middle.
	purpleOrange = []string{"#b35806", "#e08214", "#fdb863", "#fee0b6", "#f7f7f7", "#d8daeb", "#b2abd2", "#8073ac", "#542788"}
	// bluePurple is ColorBrewer BuPu.
	bluePurple = []string{"#f7fcfd", "#e0ecf4", "#bfd3e6", "#9ebcda", "#8c96c6", "#8c6bb1", "#88419d", "#810f7c", "#4d004b"}
)

func mustColormap(name string, anchors []string) Colormap {
	cs := make([]color.RGBA, len(anchors))
	for i, a := range anchors {
		cs[i] = hex(a)
	}
	m, err := NewColormap(name, cs, 256)
	if err != nil {
		panic(err)
	}
	return m
}

// The package's colour maps, 256 entries each, equal Oklab steps.
var (
	// SaturationColors runs from pale yellow (dry) to dark blue (wet),
	// after ColorBrewer YlGnBu (Brewer 2003).
	SaturationColors = mustColormap("water saturation", yellowGreenBlue)
	// TimeOfFlightColors runs from pale yellow (early arrival) through
	// orange to dark red (late arrival), after ColorBrewer YlOrRd
	// (Brewer 2003).
	TimeOfFlightColors = mustColormap("time of flight", yellowOrangeRed)
	// PressureColors runs from near white (low) to deep purple (high),
	// after ColorBrewer BuPu (Brewer 2003).
	PressureColors = mustColormap("pressure", bluePurple)
	// BreakthroughErrorColors is diverging, centred on a pale neutral
	// middle: orange (low: the model's water arrives early) to purple
	// (high: late), after ColorBrewer PuOr (Brewer 2003).
	BreakthroughErrorColors = mustColormap("breakthrough error", purpleOrange)
)

// Categorical is the colour-blind-safe palette of Okabe and Ito (2008,
// "Color Universal Design", J*FLY), reordered so the two strongest colours
// come first and yellow, weak on white paper, comes last; values from
// memory.
var Categorical = []color.RGBA{
	hex("#0072b2"), // blue
	hex("#d55e00"), // vermillion
	hex("#009e73"), // bluish green
	hex("#cc79a7"), // reddish purple
	hex("#e69f00"), // orange
	hex("#56b4e9"), // sky blue
	hex("#000000"), // black
	hex("#f0e442"), // yellow
}

// categoricalFill returns a lighter version of palette colour i (cycling),
// blended towards white in Oklab so that symbols and lines drawn on top of
// an area fill stay readable.
func categoricalFill(i int) color.RGBA {
	c := Categorical[i%len(Categorical)]
	return mixOklab(c, color.RGBA{255, 255, 255, 255}, 0.45)
}

// Fixed colours of the map layout.
var (
	colPage        = color.RGBA{255, 255, 255, 255}
	colInk         = hex("#1f2328") // text and frames
	colInkSoft     = hex("#5b6470") // secondary text
	colRule        = hex("#c9ced6") // thin rules
	colInactive    = hex("#d5d5d2") // outside the reservoir: light neutral grey
	colNoData      = hex("#f1f0ec") // active but no value (no flow)
	colNoDataHat   = hex("#d9d7d0") // hatch over no-data cells
	colFault       = hex("#16181c")
	colFaultOnDark = hex("#e8eaed") // faults over the dark streamline canvas
	colInjector    = hex("#0072b2") // Okabe-Ito blue
	colProducer    = hex("#d55e00") // Okabe-Ito vermillion
	colCanvas      = hex("#161a22") // streamline background (active cells)
	colWhite       = color.RGBA{255, 255, 255, 255}
	colWarn        = hex("#b3261e")
)

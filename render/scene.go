package render

import (
	"fmt"
	"image"
	"math"
	"sort"
	"strconv"
	"strings"

	"floodtrace/reservoir"
)

// Default picture sizes in pixels.
const (
	DefaultWidth     = 1920
	DefaultHeight    = 1080
	DefaultGIFWidth  = 960
	DefaultGIFHeight = 540
	// MaxSide bounds either side of a picture.
	MaxSide = 10000
	// MinSide is the smallest side that still leaves room for the layout.
	MinSide = 120
)

// Scene is what every map shares: the titles, the grid, the active cells,
// the wells and the faults. Active may be nil (every cell active).
type Scene struct {
	Title      string // first line, usually the case title
	Subtitle   string // second line: quantity and time
	Grid       reservoir.Grid
	Active     []bool
	Wells      []WellMark
	Faults     [][][2]float64 // polylines in map coordinates
	FaultNames []string       // optional, parallel to Faults
	LengthUnit string         // "ft" or "m"
	Note       string         // optional footer text
	// Depth, when set, draws depth contours on the map and the dip in the
	// legend (a case with a depth map; see NewStructure).
	Depth *Structure
}

// WellMark places a well symbol.
type WellMark struct {
	Name     string
	X, Y     float64 // map coordinates
	Injector bool
}

// Scale maps values to colours. Min and Max both zero means "from the
// data". With Log, values are mapped by their logarithm and must be
// positive. The zero value (nil Map) uses SaturationColors.
type Scale struct {
	Label, Unit string
	Min, Max    float64
	Log         bool
	Map         *Colormap
	// ExtendMin and ExtendMax say that some values lie below Min or above
	// Max (they take the end colours); the colour bar then ends in a point.
	ExtendMin, ExtendMax bool
}

func (sc Scale) colormap() Colormap {
	if sc.Map == nil || sc.Map.Len() == 0 {
		return SaturationColors
	}
	return *sc.Map
}

// T returns the position of v on the scale in [0,1] (clamped), or NaN for
// NaN (and, on a log scale, for v <= 0 it returns 0).
func (sc Scale) T(v float64) float64 {
	if math.IsNaN(v) {
		return math.NaN()
	}
	var t float64
	if sc.Log {
		if v <= 0 {
			return 0
		}
		t = (math.Log(v) - math.Log(sc.Min)) / (math.Log(sc.Max) - math.Log(sc.Min))
	} else {
		t = (v - sc.Min) / (sc.Max - sc.Min)
	}
	return math.Max(0, math.Min(1, t))
}

// Value is the inverse of T.
func (sc Scale) Value(t float64) float64 {
	if sc.Log {
		return math.Exp(math.Log(sc.Min) + t*(math.Log(sc.Max)-math.Log(sc.Min)))
	}
	return sc.Min + t*(sc.Max-sc.Min)
}

// Resolve returns the scale with Min and Max filled from the finite values
// of the active cells when both are zero, widened when the data are
// constant. It reports an error when no usable value exists or the bounds
// are invalid.
func (sc Scale) Resolve(values []float64, active []bool) (Scale, error) {
	if active != nil && len(active) != len(values) {
		return sc, fmt.Errorf("render: scale %q: %d values for %d mask cells", sc.Label, len(values), len(active))
	}
	if sc.Min == 0 && sc.Max == 0 {
		lo, hi := math.Inf(1), math.Inf(-1)
		for k, v := range values {
			if active != nil && !active[k] || math.IsNaN(v) || math.IsInf(v, 0) {
				continue
			}
			if sc.Log && v <= 0 {
				continue
			}
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
		if lo > hi {
			return sc, fmt.Errorf("render: no finite value to scale %q", sc.Label)
		}
		sc.Min, sc.Max = lo, hi
	}
	if math.IsNaN(sc.Min) || math.IsNaN(sc.Max) || math.IsInf(sc.Min, 0) || math.IsInf(sc.Max, 0) {
		return sc, fmt.Errorf("render: scale %q has bounds %v..%v", sc.Label, sc.Min, sc.Max)
	}
	if sc.Min > sc.Max {
		return sc, fmt.Errorf("render: scale %q has min %v above max %v", sc.Label, sc.Min, sc.Max)
	}
	if sc.Log && sc.Min <= 0 {
		return sc, fmt.Errorf("render: log scale %q needs a positive minimum, has %v", sc.Label, sc.Min)
	}
	if sc.Min == sc.Max {
		if sc.Log {
			sc.Min, sc.Max = sc.Min/2, sc.Max*2
		} else if d := math.Abs(sc.Min) * 0.05; d > 0 {
			sc.Min, sc.Max = sc.Min-d, sc.Max+d
		} else {
			sc.Min, sc.Max = sc.Min-0.5, sc.Max+0.5
		}
	}
	return sc, nil
}

// robustRange returns the lo and hi quantiles (in [0,1], nearest rank) of
// the finite values of the active cells, positive ones only when positive
// is set, and whether any value lies outside that range. ok is false when
// there is no value.
func robustRange(values []float64, active []bool, lo, hi float64, positive bool) (qlo, qhi float64, below, above, ok bool) {
	var v []float64
	for k, x := range values {
		if active != nil && !active[k] || math.IsNaN(x) || math.IsInf(x, 0) || positive && x <= 0 {
			continue
		}
		v = append(v, x)
	}
	if len(v) == 0 {
		return 0, 0, false, false, false
	}
	sort.Float64s(v)
	q := func(p float64) float64 {
		i := int(math.Round(p * float64(len(v)-1)))
		return v[min(max(i, 0), len(v)-1)]
	}
	qlo, qhi = q(lo), q(hi)
	return qlo, qhi, v[0] < qlo, v[len(v)-1] > qhi, true
}

// Layout is the placement of a map picture: the header, the map and the
// legend panel. ToPixel and ToMap convert between map coordinates and
// pixel coordinates (origin top-left, y down), so tests and callers can
// find where a cell or a well lands.
type Layout struct {
	W, H int
	// S is the size factor relative to 1920x1080; every length of the
	// layout (fonts, symbols, margins) is multiplied by it.
	S float64
	// Map is the pixel rectangle covered by the grid; the reservoir's
	// aspect ratio is preserved.
	Map image.Rectangle
	// PixelsPerUnit is the number of pixels per map length unit.
	PixelsPerUnit float64
	// Panel is the legend panel on the right.
	Panel image.Rectangle
	// Bar is the colour bar; the smallest value is at the bottom.
	Bar image.Rectangle
	// Margin and HeaderBottom place the title block.
	Margin       float64
	HeaderBottom float64
	grid         reservoir.Grid
}

// NewLayout computes the layout of a w x h picture of the grid.
func NewLayout(g reservoir.Grid, w, h int) (Layout, error) {
	if err := checkSize(w, h); err != nil {
		return Layout{}, err
	}
	if g.NX <= 0 || g.NY <= 0 || !(g.DX > 0) || !(g.DY > 0) {
		return Layout{}, fmt.Errorf("render: invalid grid %dx%d cells of %vx%v", g.NX, g.NY, g.DX, g.DY)
	}
	s := math.Min(float64(w)/DefaultWidth, float64(h)/DefaultHeight)
	l := Layout{W: w, H: h, S: s, grid: g}
	m := 32 * s
	l.Margin = m
	l.HeaderBottom = m + 104*s
	footer := 46 * s
	pw := math.Max(300*s, math.Min(0.2*float64(w), 420*s))
	px0 := float64(w) - m - pw
	top := l.HeaderBottom + 14*s
	bottom := float64(h) - footer
	l.Panel = image.Rect(int(px0), int(top), int(float64(w)-m), int(bottom))

	ax0, ax1 := m, px0-44*s
	ay0, ay1 := top, bottom-10*s
	wm, hm := g.Width(), g.Height()
	ppu := math.Min((ax1-ax0)/wm, (ay1-ay0)/hm)
	mw := int(math.Floor(wm * ppu))
	mh := int(math.Floor(hm * ppu))
	if mw < 2 || mh < 2 {
		return Layout{}, fmt.Errorf("render: %dx%d pixels leave no room for the map", w, h)
	}
	ppu = math.Min(float64(mw)/wm, float64(mh)/hm)
	// The tight pixel cover of the grid at that scale.
	mw = int(math.Ceil(wm*ppu - 1e-6))
	mh = int(math.Ceil(hm*ppu - 1e-6))
	x0 := int(math.Round(ax0 + ((ax1-ax0)-float64(mw))/2))
	y0 := int(math.Round(ay0 + ((ay1-ay0)-float64(mh))/2))
	l.Map = image.Rect(x0, y0, x0+mw, y0+mh)
	l.PixelsPerUnit = ppu

	bw := int(math.Round(36 * s))
	bx := l.Panel.Min.X + int(math.Round(4*s))
	by := l.Panel.Min.Y + int(math.Round(104*s))
	bh := int(math.Round(0.40 * float64(l.Panel.Dy())))
	l.Bar = image.Rect(bx, by, bx+bw, by+bh)
	return l, nil
}

func checkSize(w, h int) error {
	if w < MinSide || h < MinSide || w > MaxSide || h > MaxSide {
		return fmt.Errorf("render: picture size %dx%d outside %d..%d pixels a side", w, h, MinSide, MaxSide)
	}
	return nil
}

// ToPixel returns the pixel position (x right, y down) of a map point.
func (l Layout) ToPixel(x, y float64) (px, py float64) {
	px = float64(l.Map.Min.X) + (x-l.grid.X0)*l.PixelsPerUnit
	py = float64(l.Map.Min.Y) + (l.grid.Y0+l.grid.Height()-y)*l.PixelsPerUnit
	return px, py
}

// ToMap returns the map point at a pixel position.
func (l Layout) ToMap(px, py float64) (x, y float64) {
	x = l.grid.X0 + (px-float64(l.Map.Min.X))/l.PixelsPerUnit
	y = l.grid.Y0 + l.grid.Height() - (py-float64(l.Map.Min.Y))/l.PixelsPerUnit
	return x, y
}

// CellPixel returns the pixel at the centre of cell (i, j).
func (l Layout) CellPixel(i, j int) (px, py int) {
	x := l.grid.X0 + (float64(i)+0.5)*l.grid.DX
	y := l.grid.Y0 + (float64(j)+0.5)*l.grid.DY
	fx, fy := l.ToPixel(x, y)
	return int(math.Floor(fx)), int(math.Floor(fy))
}

// niceNumber returns a "nice" number (1, 2, 5 or 10 times a power of ten)
// close to x: rounded when round is set, else the smallest nice number not
// below x (Heckbert 1990, "Nice numbers for graph labels", Graphics Gems).
func niceNumber(x float64, round bool) float64 {
	if !(x > 0) {
		return 0
	}
	e := math.Floor(math.Log10(x))
	p := math.Pow(10, e)
	f := x / p
	var n float64
	if round {
		switch {
		case f < 1.5:
			n = 1
		case f < 3:
			n = 2
		case f < 7:
			n = 5
		default:
			n = 10
		}
	} else {
		switch {
		case f <= 1:
			n = 1
		case f <= 2:
			n = 2
		case f <= 5:
			n = 5
		default:
			n = 10
		}
	}
	return n * p
}

// linearTicks returns about n nice tick values inside [lo, hi] and the
// tick step (Heckbert 1990, "Nice numbers for graph labels").
func linearTicks(lo, hi float64, n int) (ticks []float64, step float64) {
	if !(hi > lo) || n < 2 {
		return []float64{lo}, 0
	}
	step = niceNumber(niceNumber(hi-lo, false)/float64(n-1), true)
	eps := step * 1e-9
	for v := math.Ceil((lo-eps)/step) * step; v <= hi+eps; v += step {
		if math.Abs(v) < eps {
			v = 0
		}
		ticks = append(ticks, v)
	}
	return ticks, step
}

// logTicks returns tick values inside [lo, hi] (lo > 0): the powers of ten,
// with 2 and 5 times them added when fewer than three decades are spanned.
func logTicks(lo, hi float64) []float64 {
	if !(lo > 0) || !(hi > lo) {
		return []float64{lo}
	}
	var out []float64
	e0, e1 := int(math.Floor(math.Log10(lo))), int(math.Ceil(math.Log10(hi)))
	mult := []float64{1}
	if e1-e0 <= 3 {
		mult = []float64{1, 2, 5}
	}
	if e1-e0 > 8 {
		// Many decades: every other one.
		mult = []float64{1}
	}
	stride := 1
	if e1-e0 > 8 {
		stride = 2
	}
	for e := e0; e <= e1; e++ {
		if (e-e0)%stride != 0 {
			continue
		}
		p := math.Pow(10, float64(e))
		for _, m := range mult {
			v := m * p
			if v >= lo*(1-1e-9) && v <= hi*(1+1e-9) {
				out = append(out, v)
			}
		}
	}
	if len(out) < 2 {
		lin, _ := linearTicks(lo, hi, 4)
		return lin
	}
	return out
}

// FormatNumber writes v with the given number of decimals and thousands
// separators ("12,500", "0.35", "-3.2").
func FormatNumber(v float64, decimals int) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	if math.IsInf(v, 0) {
		if v > 0 {
			return "inf"
		}
		return "-inf"
	}
	if decimals < 0 {
		decimals = 0
	}
	s := strconv.FormatFloat(v, 'f', decimals, 64)
	neg := strings.HasPrefix(s, "-")
	if neg {
		s = s[1:]
	}
	intPart, frac := s, ""
	if i := strings.IndexByte(s, '.'); i >= 0 {
		intPart, frac = s[:i], s[i:]
	}
	if len(intPart) > 3 {
		var b strings.Builder
		lead := len(intPart) % 3
		if lead > 0 {
			b.WriteString(intPart[:lead])
		}
		for i := lead; i < len(intPart); i += 3 {
			if b.Len() > 0 {
				b.WriteByte(',')
			}
			b.WriteString(intPart[i : i+3])
		}
		intPart = b.String()
	}
	if neg && strings.Trim(intPart+frac, "0.,") != "" {
		return "-" + intPart + frac
	}
	return intPart + frac
}

// decimalsFor returns the decimals needed to print multiples of step.
func decimalsFor(step float64) int {
	if !(step > 0) {
		return 2
	}
	d := int(math.Ceil(-math.Log10(step) - 1e-9))
	if d < 0 {
		return 0
	}
	if d > 6 {
		return 6
	}
	return d
}

// formatTick writes a log-scale tick value compactly.
func formatLogTick(v float64) string {
	if v >= 1 {
		return FormatNumber(v, 0)
	}
	return strconv.FormatFloat(v, 'g', 3, 64)
}

// scaleBarLength returns the longest nice length (1, 2 or 5 times a power
// of ten) not above maxLen map units, and the number of segments to draw.
func scaleBarLength(maxLen float64) (length float64, segments int) {
	if !(maxLen > 0) {
		return 0, 0
	}
	e := math.Floor(math.Log10(maxLen))
	p := math.Pow(10, e)
	for _, m := range []float64{5, 2, 1} {
		if m*p <= maxLen*(1+1e-12) {
			length = m * p
			break
		}
	}
	switch length / p {
	case 5:
		segments = 5
	case 2:
		segments = 4
	default:
		segments = 4
	}
	return length, segments
}

package render

import (
	"bytes"
	"fmt"
	"image/color"
	"io"
	"math"
	"regexp"
	"strings"
	"sync"

	xfont "golang.org/x/image/font"
	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/goregular"
	"golang.org/x/image/font/opentype"
	"gonum.org/v1/plot"
	pfont "gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Series is one line of a chart. Points with a NaN coordinate are
// skipped. A Reference series (a guide such as the 45-degree line) is
// drawn thin, grey and dashed. A series without points appears only in
// the legend (a key for a line style, for instance).
type Series struct {
	Name      string
	X, Y      []float64
	Reference bool
	// Style, when set, replaces the automatic colour and dash pattern;
	// the series then takes no slot of the automatic styles.
	Style *LineStyle
	// NoLegend leaves the series out of the legend.
	NoLegend bool
	// Marks are indices of points of X, Y marked with a ring in the
	// series' colour: where a well's curve stops (an economic limit). A
	// chart with marks has a legend entry for them (Chart.MarkName).
	Marks []int
	// Points draws the series as filled dots (observed values) instead
	// of a line, in its Style colour (ink when Style is nil); it takes no
	// slot of the automatic styles.
	Points bool
}

// LineStyle is the colour and dash pattern of a chart line. Dashes are
// alternating dash and gap lengths in points at 1920x1080 (they scale with
// the chart); nil is a solid line.
type LineStyle struct {
	Color  color.RGBA
	Dashes []float64
}

// Chart is a line chart: a title block, the axes, and a legend to the
// right of the plot with every series' name. Axis bounds both zero mean
// "from the data".
type Chart struct {
	Title, Subtitle string
	XLabel, YLabel  string
	LegendTitle     string
	Series          []Series
	XMin, XMax      float64
	YMin, YMax      float64
	// MarkName is the legend entry of the series' Marks ("Shut in at
	// economic limit" when empty).
	MarkName string
	// StartDate (YYYY-MM-DD), when set, is the date of x = 0 of a chart
	// whose x axis is days: the axis then shows calendar dates (dateTicker).
	StartDate string
}

// chartTypeface is the name under which the Go fonts are registered in
// gonum/plot's font cache.
const chartTypeface = "Go"

var chartFontOnce sync.Once
var chartFontErr error

func registerChartFonts() error {
	chartFontOnce.Do(func() {
		reg, err := opentype.Parse(goregular.TTF)
		if err != nil {
			chartFontErr = fmt.Errorf("render: parsing Go regular: %w", err)
			return
		}
		bd, err := opentype.Parse(gobold.TTF)
		if err != nil {
			chartFontErr = fmt.Errorf("render: parsing Go bold: %w", err)
			return
		}
		pfont.DefaultCache.Add(pfont.Collection{
			{Font: pfont.Font{Typeface: chartTypeface}, Face: reg},
			{Font: pfont.Font{Typeface: chartTypeface, Weight: xfont.WeightBold}, Face: bd},
		})
	})
	return chartFontErr
}

func chartFont(size vg.Length, b bool) pfont.Font {
	f := pfont.Font{Typeface: chartTypeface, Size: size}
	if b {
		f.Weight = xfont.WeightBold
	}
	return f
}

// seriesDashes are the dash patterns (in units of the chart's size factor)
// that, with the colours, keep lines apart in grey print.
var seriesDashes = [][]float64{
	nil, {8, 4}, {2, 3}, {10, 3, 2, 3}, {4, 3}, {14, 5}, {2, 3, 7, 3}, {1, 3},
}

// SeriesStyle returns the colour and dash pattern (points, for a chart of
// size factor 1) of series i: the categorical palette, and a dash pattern
// that changes with the colour so that no two of the first 64 series look
// alike.
func SeriesStyle(i int) (color.RGBA, []float64) {
	n := len(Categorical)
	return Categorical[i%n], seriesDashes[(i+i/n)%len(seriesDashes)]
}

// niceTicker marks about n nice values (Heckbert 1990).
type niceTicker struct{ n int }

// Ticks implements plot.Ticker.
func (t niceTicker) Ticks(lo, hi float64) []plot.Tick {
	vs, step := linearTicks(lo, hi, t.n)
	dec := decimalsFor(step)
	out := make([]plot.Tick, 0, len(vs))
	for _, v := range vs {
		out = append(out, plot.Tick{Value: v, Label: FormatNumber(v, dec)})
	}
	return out
}

func cleanXY(x, y []float64) plotter.XYs {
	n := min(len(x), len(y))
	out := make(plotter.XYs, 0, n)
	for i := range n {
		if math.IsNaN(x[i]) || math.IsNaN(y[i]) || math.IsInf(x[i], 0) || math.IsInf(y[i], 0) {
			continue
		}
		out = append(out, plotter.XY{X: x[i], Y: y[i]})
	}
	return out
}

// lineChart draws c into a w x h pixel file at path, "png" (default) or
// "svg"; the file is written atomically.
func lineChart(path string, c Chart, w, h int, format string) error {
	var buf bytes.Buffer
	if err := WriteChart(&buf, c, w, h, format); err != nil {
		return err
	}
	return writeFileAtomic(path, buf.Bytes())
}

var svgSize = regexp.MustCompile(`<svg width="[0-9.e+-]+pt" height="[0-9.e+-]+pt"`)

// WriteChart draws c as a w x h pixel picture in the format ("png" or
// "svg") to wr. An SVG's width and height are w and h CSS pixels.
func WriteChart(wr io.Writer, c Chart, w, h int, format string) error {
	if err := checkSize(w, h); err != nil {
		return err
	}
	if format == "" {
		format = "png"
	}
	if format != "png" && format != "svg" {
		return fmt.Errorf("render: chart format %q, want png or svg", format)
	}
	if err := registerChartFonts(); err != nil {
		return err
	}
	const dpi = 96
	wpt := vg.Length(float64(w) * 72 / dpi)
	hpt := vg.Length(float64(h) * 72 / dpi)
	var cv vg.CanvasWriterTo
	if format == "svg" {
		cv = vgsvg.New(wpt, hpt)
	} else {
		cv = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(wpt, hpt), vgimg.UseDPI(dpi))}
	}
	if err := drawChart(draw.New(cv), c, float64(hpt)/810, format == "png"); err != nil {
		return err
	}
	if format == "png" {
		// The maps' encoder, not the canvas's default (slower, with the
		// best compression).
		return writePNG(wr, cv.(vgimg.PngCanvas).Image())
	}
	var b bytes.Buffer
	if _, err := cv.WriteTo(&b); err != nil {
		return err
	}
	out := svgSize.ReplaceAllLiteral(b.Bytes(), fmt.Appendf(nil, `<svg width="%d" height="%d"`, w, h))
	// Viewers without the Go font fall back to a sans-serif face.
	out = bytes.ReplaceAll(out, []byte("font-family:"+chartTypeface+";"),
		[]byte("font-family:"+chartTypeface+",'DejaVu Sans','Helvetica Neue',Arial,sans-serif;"))
	_, err := wr.Write(out)
	return err
}

// drawChart lays the chart out on dc; k scales every length (1 at
// 1440x810 points, i.e. 1920x1080 pixels). On a raster canvas, which
// starts white, the page is not filled again (each fill rasterises the
// whole picture).
func drawChart(dc draw.Canvas, c Chart, k float64, raster bool) (err error) {
	defer func() {
		// gonum/plot panics on some degenerate input; report it instead.
		if r := recover(); r != nil {
			err = fmt.Errorf("render: drawing chart %q: %v", c.Title, r)
		}
	}()
	L := func(v float64) vg.Length { return vg.Length(v * k) }
	ink, soft := colInk, colInkSoft
	if !raster {
		dc.SetColor(colWhite)
		dc.Fill(dc.Rectangle.Path())
	}

	W := dc.Max.X - dc.Min.X
	margin := L(26)
	// Title block.
	ts := text.Style{Color: ink, Font: chartFont(L(24), true), Handler: plot.DefaultTextHandler, XAlign: draw.XLeft, YAlign: draw.YTop}
	y := dc.Max.Y - margin
	dc.FillText(ts, vg.Point{X: dc.Min.X + margin, Y: y}, truncateVG(ts, c.Title, W-2*margin))
	y -= L(34)
	if c.Subtitle != "" {
		ss := ts
		ss.Color = soft
		ss.Font = chartFont(L(16), false)
		dc.FillText(ss, vg.Point{X: dc.Min.X + margin, Y: y}, truncateVG(ss, c.Subtitle, W-2*margin))
		y -= L(26)
	}
	header := dc.Max.Y - y + L(10)

	// Lines.
	p := plot.New()
	p.BackgroundColor = color.Transparent
	if raster {
		p.BackgroundColor = nil // a transparent fill changes no pixel
	}
	tick := text.Style{Color: ink, Font: chartFont(L(14), false), Handler: plot.DefaultTextHandler}
	lab := text.Style{Color: ink, Font: chartFont(L(16), false), Handler: plot.DefaultTextHandler}
	for _, ax := range []*plot.Axis{&p.X, &p.Y} {
		ax.LineStyle = draw.LineStyle{Color: soft, Width: L(1.2)}
		ax.Tick.LineStyle = draw.LineStyle{Color: soft, Width: L(1)}
		ax.Tick.Length = L(6)
		ax.Padding = L(4)
		ax.Label.Padding = L(8)
		ax.Tick.Marker = niceTicker{n: 7}
	}
	if c.StartDate != "" {
		dt, err := newDateTicker(c.StartDate)
		if err != nil {
			return fmt.Errorf("render: chart %q: %w", c.Title, err)
		}
		p.X.Tick.Marker = dt
	}
	p.X.Tick.Label = tick
	p.X.Tick.Label.XAlign, p.X.Tick.Label.YAlign = draw.XCenter, draw.YTop
	p.Y.Tick.Label = tick
	p.Y.Tick.Label.XAlign, p.Y.Tick.Label.YAlign = draw.XRight, draw.YCenter
	p.X.Label.TextStyle = lab
	p.X.Label.TextStyle.XAlign, p.X.Label.TextStyle.YAlign = draw.XCenter, draw.YBottom
	p.Y.Label.TextStyle = lab
	p.Y.Label.TextStyle.XAlign, p.Y.Label.TextStyle.YAlign = draw.XCenter, draw.YBottom
	p.X.Label.Text = c.XLabel
	p.Y.Label.Text = c.YLabel
	grid := plotter.NewGrid()
	gl := draw.LineStyle{Color: color.RGBA{226, 230, 235, 255}, Width: L(1)}
	grid.Vertical, grid.Horizontal = gl, gl
	p.Add(grid)

	legStyle := text.Style{Color: ink, Font: chartFont(L(17), false), Handler: plot.DefaultTextHandler, XAlign: draw.XLeft, YAlign: draw.YCenter}
	thumbW := L(46)
	type entry struct {
		name  string
		thumb plot.Thumbnailer
	}
	var entries []entry
	any := false
	var marks, dots []*plotter.Scatter
	xlo, xhi, ylo, yhi := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	idx := 0
	for _, s := range c.Series {
		xy := cleanXY(s.X, s.Y)
		if s.Points {
			col := colInk
			if s.Style != nil {
				col = s.Style.Color
			}
			sc := &plotter.Scatter{XYs: xy, GlyphStyle: draw.GlyphStyle{Color: col, Radius: L(4.5), Shape: draw.CircleGlyph{}}}
			if len(xy) > 0 {
				dots = append(dots, sc)
				any = true
				for _, q := range xy {
					xlo, xhi = math.Min(xlo, q.X), math.Max(xhi, q.X)
					ylo, yhi = math.Min(ylo, q.Y), math.Max(yhi, q.Y)
				}
			}
			if !s.NoLegend {
				entries = append(entries, entry{s.Name, sc})
			}
			continue
		}
		line := &plotter.Line{XYs: xy}
		switch {
		case s.Reference:
			line.LineStyle = draw.LineStyle{Color: color.RGBA{138, 143, 152, 255}, Width: L(1.6), Dashes: []vg.Length{L(6), L(5)}}
		case s.Style != nil:
			ds := make([]vg.Length, len(s.Style.Dashes))
			for i, d := range s.Style.Dashes {
				ds[i] = L(d)
			}
			line.LineStyle = draw.LineStyle{Color: s.Style.Color, Width: L(3), Dashes: ds}
		default:
			col, dash := SeriesStyle(idx)
			idx++
			ds := make([]vg.Length, len(dash))
			for i, d := range dash {
				ds[i] = L(d)
			}
			line.LineStyle = draw.LineStyle{Color: col, Width: L(3), Dashes: ds}
		}
		if len(xy) > 0 {
			p.Add(line)
			any = true
			for _, q := range xy {
				xlo, xhi = math.Min(xlo, q.X), math.Max(xhi, q.X)
				ylo, yhi = math.Min(ylo, q.Y), math.Max(yhi, q.Y)
			}
		}
		if !s.NoLegend {
			entries = append(entries, entry{s.Name, line})
		}
		if ring := markRing(s, line.LineStyle.Color, L); ring != nil {
			marks = append(marks, ring)
		}
	}
	// The dots and the rings go on top of every line, the rings with one
	// legend entry.
	for _, d := range dots {
		p.Add(d)
	}
	for _, ring := range marks {
		p.Add(ring)
	}
	if len(marks) > 0 {
		name := c.MarkName
		if name == "" {
			name = "Shut in at economic limit"
		}
		key := &plotter.Scatter{GlyphStyle: draw.GlyphStyle{Color: ink, Radius: L(7), Shape: draw.RingGlyph{}}}
		entries = append(entries, entry{name, key})
	}
	// Axis ranges: given, or the data padded to whole tick steps.
	setRange := func(ax *plot.Axis, gmin, gmax, lo, hi float64) {
		if gmin != 0 || gmax != 0 {
			ax.Min, ax.Max = gmin, gmax
			return
		}
		if !any || !(hi >= lo) {
			ax.Min, ax.Max = 0, 1
			return
		}
		if hi == lo {
			d := math.Max(math.Abs(lo)*0.1, 1)
			lo, hi = lo-d, hi+d
		}
		_, step := linearTicks(lo, hi, 7)
		ax.Min = math.Floor(lo/step+1e-9) * step
		ax.Max = math.Ceil(hi/step-1e-9) * step
	}
	setRange(&p.X, c.XMin, c.XMax, xlo, xhi)
	setRange(&p.Y, c.YMin, c.YMax, ylo, yhi)

	// Legend panel on the right, as wide as its longest name.
	legW := L(120)
	for _, e := range entries {
		if wd := legStyle.Width(e.name) + thumbW + L(14); wd > legW {
			legW = wd
		}
	}
	lt := text.Style{Color: soft, Font: chartFont(L(16), true), Handler: plot.DefaultTextHandler, XAlign: draw.XLeft, YAlign: draw.YTop}
	if wd := lt.Width(c.LegendTitle); wd > legW {
		legW = wd
	}
	if maxW := W * 0.32; legW > maxW {
		legW = maxW
	}
	plotArea := draw.Crop(dc, margin*0.6, -(legW + margin*1.6), margin*0.7, -header)
	p.Draw(plotArea)

	lx := dc.Max.X - legW - margin
	ly := dc.Max.Y - header - L(4)
	if c.LegendTitle != "" {
		dc.FillText(lt, vg.Point{X: lx, Y: ly}, c.LegendTitle)
		ly -= L(30)
	}
	rowH := L(30)
	for _, e := range entries {
		if ly-rowH < dc.Min.Y+margin {
			break
		}
		icon := draw.Canvas{Canvas: dc.Canvas, Rectangle: vg.Rectangle{
			Min: vg.Point{X: lx, Y: ly - rowH}, Max: vg.Point{X: lx + thumbW, Y: ly}}}
		e.thumb.Thumbnail(&icon)
		dc.FillText(legStyle, vg.Point{X: lx + thumbW + L(12), Y: ly - rowH/2}, truncateVG(legStyle, e.name, legW-thumbW-L(12)))
		ly -= rowH
	}
	return nil
}

// markRing returns the rings of the series' Marks in colour col, or nil
// when it has none with finite coordinates.
func markRing(s Series, col color.Color, L func(float64) vg.Length) *plotter.Scatter {
	var xy plotter.XYs
	for _, i := range s.Marks {
		if i >= 0 && i < len(s.X) && i < len(s.Y) && !math.IsNaN(s.X[i]) && !math.IsInf(s.X[i], 0) && !math.IsNaN(s.Y[i]) && !math.IsInf(s.Y[i], 0) {
			xy = append(xy, plotter.XY{X: s.X[i], Y: s.Y[i]})
		}
	}
	if len(xy) == 0 {
		return nil
	}
	return &plotter.Scatter{XYs: xy, GlyphStyle: draw.GlyphStyle{Color: col, Radius: L(7), Shape: draw.RingGlyph{}}}
}

// truncateVG shortens s with an ellipsis to fit width w in style sty.
func truncateVG(sty text.Style, s string, w vg.Length) string {
	if sty.Width(s) <= w {
		return s
	}
	r := []rune(s)
	for len(r) > 1 {
		r = r[:len(r)-1]
		t := strings.TrimSpace(string(r)) + "…"
		if sty.Width(t) <= w {
			return t
		}
	}
	return "…"
}

package render

import (
	"bytes"
	"fmt"
	"image"
	"image/color"
	"math"
	"path/filepath"

	"floodtrace/runfolder"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// histData is a run's match with its production history (match.csv and
// the history object of summary.json), read once by prepare.
type histData struct {
	sum    *runfolder.History
	rows   map[string][]runfolder.MatchRow // per well, in time order
	starts map[string][]float64            // the start of each row's period
	// producers with history rows, in the order of summary.json's wells
	producers []string
	// bo and bw turn the surface volumes of match.csv into the reservoir
	// volumes of producers.csv (setFVF, from summary.json); 1 without them.
	bo, bw float64
}

// loadHistory reads match.csv when the summary has a history; a missing
// match.csv is a note, a malformed one an error.
func (r *run) loadHistory() error {
	h := r.sum.History
	if h == nil {
		return nil
	}
	if !exists(filepath.Join(r.dir, runfolder.MatchFile)) {
		r.rep.note("match.csv missing: no history pictures")
		return nil
	}
	rows, err := runfolder.ReadMatch(r.dir)
	if err != nil {
		return fmt.Errorf("render: %w", err)
	}
	d := &histData{sum: h, rows: map[string][]runfolder.MatchRow{}, starts: map[string][]float64{}, bo: 1, bw: 1}
	for _, m := range rows {
		prev := 0.0
		if rs := d.rows[m.Well]; len(rs) > 0 {
			prev = rs[len(rs)-1].Time
		}
		d.rows[m.Well] = append(d.rows[m.Well], m)
		d.starts[m.Well] = append(d.starts[m.Well], prev)
	}
	for _, w := range r.sum.Wells {
		if w.Type == "producer" && len(d.rows[w.Name]) > 0 {
			d.producers = append(d.producers, w.Name)
		}
	}
	r.hist = d
	return nil
}

// setFVF takes the formation volume factors that turn match.csv's
// surface volumes into producers.csv's reservoir ones from summary.json
// (1 when the case gives none: the two are then the same volumes).
func (d *histData) setFVF(s *runfolder.Summary) {
	if s.OilFVF != nil && *s.OilFVF > 0 {
		d.bo = float64(*s.OilFVF)
	}
	if s.WaterFVF != nil && *s.WaterFVF > 0 {
		d.bw = float64(*s.WaterFVF)
	}
}

// observed returns the observed values of a producer in reservoir
// volumes: x the middle of each period for the water cut and the rates
// (averages over the period), its end for cumulative volumes.
func (d *histData) observed(well, quantity string) (x, y []float64) {
	rs, st := d.rows[well], d.starts[well]
	for k, m := range rs {
		mid := (st[k] + m.Time) / 2
		switch quantity {
		case "water_cut":
			v := m.ObsWaterCut
			if d.bo != 1 || d.bw != 1 {
				o, w := m.ObsOilRate*d.bo, m.ObsWaterRate*d.bw
				v = w / (o + w)
			}
			x, y = append(x, mid), append(y, v)
		case "oil_rate":
			x, y = append(x, mid), append(y, m.ObsOilRate*d.bo)
		case "cum_oil":
			x, y = append(x, m.Time), append(y, m.ObsCumOil*d.bo)
		}
	}
	return x, y
}

// historySeries adds to the model series of a producer chart the
// observed values of each producer with history (dots in the colour of
// its model line), a legend key for them and the end of the history.
func (r *run) historySeries(series []Series, quantity string) []Series {
	d := r.hist
	if d == nil {
		return series
	}
	ymax := 0.0
	for i, s := range series {
		if len(d.rows[s.Name]) == 0 {
			continue
		}
		col, _ := SeriesStyle(i)
		x, y := d.observed(s.Name, quantity)
		series = append(series, Series{Name: s.Name, X: x, Y: y, Points: true, Style: &LineStyle{Color: col}, NoLegend: true})
	}
	for _, s := range series {
		for _, v := range s.Y {
			if !math.IsNaN(v) && !math.IsInf(v, 0) {
				ymax = math.Max(ymax, v)
			}
		}
	}
	if quantity == "water_cut" {
		ymax = 1
	}
	end := float64(d.sum.EndDays)
	series = append(series, Series{Name: "Observed (history)", Points: true},
		Series{Name: "End of history (" + r.dayText(end, d.sum.EndDate) + ")", X: []float64{end, end}, Y: []float64{0, ymax}, Reference: true})
	return series
}

// dayText writes a day as its date when there is one: "2022-12-31", else
// "day 1096".
func (r *run) dayText(day float64, date string) string {
	if date != "" {
		return date
	}
	return "day " + FormatNumber(day, decimalsForDay(day))
}

// historyCaption is the sentence the producer charts add with a history.
func (r *run) historyCaption(what string) string {
	if r.hist == nil {
		return ""
	}
	return " Dots are the observed " + what + " of the history (match.csv, averages over each period at its middle, in reservoir volumes); the grey dashed line is the end of the history: the model after it is the forecast."
}

// timeAxis returns the label and the start date of the charts whose x
// axis is days: calendar dates when the summary has start_date.
func (r *run) timeAxis() (label, start string) {
	if r.sum.StartDate != "" {
		return "Date", r.sum.StartDate
	}
	return "Time (days)", ""
}

// Panel is one panel of a SmallMultiples chart: a well's model curve and
// its observed values.
type Panel struct {
	Title string
	// Model is the model's curve, Observed the observed values (dots).
	ModelX, ModelY       []float64
	ObservedX, ObservedY []float64
}

// SmallMultiples is a grid of panels of one quantity, one per well, on
// the same axes, with a vertical line at End (the end of the history):
// the model is solid before it and dashed after (the forecast).
type SmallMultiples struct {
	Title, Subtitle string
	XLabel, YLabel  string
	Panels          []Panel
	End             float64
	YMin, YMax      float64
	// StartDate, when set, puts calendar dates on the x axes (Chart).
	StartDate string
}

// Small-multiples colours: the model line and the observed dots.
var (
	smModelColor    = Categorical[0]
	smObservedColor = Categorical[1]
)

// smallMultiplesGrid returns the rectangles (in pixels, y down) of n
// panels in a w x h picture: as many columns as keep the panels about
// 16:10, under a header of headerFrac of the height.
func smallMultiplesGrid(n, w, h int) []image.Rectangle {
	if n <= 0 {
		return nil
	}
	k := float64(h) / 1080
	top := int(130 * k)
	margin := int(20 * k)
	best, bestCols := math.Inf(1), 1
	for cols := 1; cols <= n; cols++ {
		rows := (n + cols - 1) / cols
		pw := float64(w-2*margin) / float64(cols)
		ph := float64(h-top-margin) / float64(rows)
		if d := math.Abs(math.Log(pw / ph / 1.6)); d < best {
			best, bestCols = d, cols
		}
	}
	cols := bestCols
	rows := (n + cols - 1) / cols
	pw := (w - 2*margin) / cols
	ph := (h - top - margin) / rows
	out := make([]image.Rectangle, n)
	for i := range n {
		x0 := margin + (i%cols)*pw
		y0 := top + (i/cols)*ph
		out[i] = image.Rect(x0, y0, x0+pw, y0+ph)
	}
	return out
}

// WriteSmallMultiples draws sm as a w x h picture in the format ("png"
// or "svg") to wr.
func WriteSmallMultiples(wr *bytes.Buffer, sm SmallMultiples, w, h int, format string) (err error) {
	if err := checkSize(w, h); err != nil {
		return err
	}
	if err := registerChartFonts(); err != nil {
		return err
	}
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("render: drawing chart %q: %v", sm.Title, r)
		}
	}()
	const dpi = 96
	wpt, hpt := vg.Length(float64(w)*72/dpi), vg.Length(float64(h)*72/dpi)
	var cv vg.CanvasWriterTo
	if format == "svg" {
		cv = vgsvg.New(wpt, hpt)
	} else {
		cv = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(wpt, hpt), vgimg.UseDPI(dpi))}
	}
	dc := draw.New(cv)
	k := float64(hpt) / 810
	L := func(v float64) vg.Length { return vg.Length(v * k) }
	px := func(p float64) vg.Length { return vg.Length(p * 72 / dpi) }
	if format == "svg" {
		dc.SetColor(colWhite)
		dc.Fill(dc.Rectangle.Path())
	}
	margin := L(26)
	ts := text.Style{Color: colInk, Font: chartFont(L(24), true), Handler: plot.DefaultTextHandler, XAlign: draw.XLeft, YAlign: draw.YTop}
	y := dc.Max.Y - margin
	dc.FillText(ts, vg.Point{X: margin, Y: y}, truncateVG(ts, sm.Title, dc.Max.X-2*margin))
	ss := ts
	ss.Color, ss.Font = colInkSoft, chartFont(L(15), false)
	dc.FillText(ss, vg.Point{X: margin, Y: y - L(34)}, truncateVG(ss, sm.Subtitle, dc.Max.X-2*margin))
	var dt plot.Ticker
	if sm.StartDate != "" {
		t, err := newDateTicker(sm.StartDate)
		if err != nil {
			return fmt.Errorf("render: chart %q: %w", sm.Title, err)
		}
		cols := 1
		if g := smallMultiplesGrid(len(sm.Panels), w, h); len(g) > 1 && g[1].Min.Y == g[0].Min.Y {
			cols = (w - 2*g[0].Min.X) / g[0].Dx()
		}
		t.max = max(3, 8/cols+1)
		dt = t
	}
	// One x range for all panels.
	xhi := sm.End
	for _, p := range sm.Panels {
		for _, v := range append(append([]float64{}, p.ModelX...), p.ObservedX...) {
			if !math.IsNaN(v) && !math.IsInf(v, 0) {
				xhi = math.Max(xhi, v)
			}
		}
	}
	if !(xhi > 0) {
		xhi = 1
	}
	tick := text.Style{Color: colInk, Font: chartFont(L(12), false), Handler: plot.DefaultTextHandler}
	lab := text.Style{Color: colInkSoft, Font: chartFont(L(13), false), Handler: plot.DefaultTextHandler}
	for i, r := range smallMultiplesGrid(len(sm.Panels), w, h) {
		pn := sm.Panels[i]
		p := plot.New()
		p.BackgroundColor = nil
		if format == "svg" {
			p.BackgroundColor = color.Transparent
		}
		p.Title.Text = pn.Title
		p.Title.TextStyle = text.Style{Color: colInk, Font: chartFont(L(15), true), Handler: plot.DefaultTextHandler, XAlign: draw.XCenter, YAlign: draw.YBottom}
		p.Title.Padding = L(4)
		for _, ax := range []*plot.Axis{&p.X, &p.Y} {
			ax.LineStyle = draw.LineStyle{Color: colInkSoft, Width: L(1)}
			ax.Tick.LineStyle = draw.LineStyle{Color: colInkSoft, Width: L(1)}
			ax.Tick.Length = L(4)
			ax.Padding = L(2)
			ax.Label.Padding = L(4)
			ax.Tick.Marker = niceTicker{n: 5}
			ax.Tick.Label = tick
			ax.Label.TextStyle = lab
		}
		if dt != nil {
			p.X.Tick.Marker = dt
		}
		p.X.Tick.Label.XAlign, p.X.Tick.Label.YAlign = draw.XCenter, draw.YTop
		p.Y.Tick.Label.XAlign, p.Y.Tick.Label.YAlign = draw.XRight, draw.YCenter
		p.X.Label.TextStyle.XAlign, p.X.Label.TextStyle.YAlign = draw.XCenter, draw.YBottom
		p.Y.Label.TextStyle.XAlign, p.Y.Label.TextStyle.YAlign = draw.XCenter, draw.YBottom
		p.X.Label.Text, p.Y.Label.Text = sm.XLabel, sm.YLabel
		p.X.Min, p.X.Max = 0, xhi
		p.Y.Min, p.Y.Max = sm.YMin, sm.YMax
		grid := plotter.NewGrid()
		gl := draw.LineStyle{Color: color.RGBA{226, 230, 235, 255}, Width: L(0.8)}
		grid.Vertical, grid.Horizontal = gl, gl
		p.Add(grid)
		var hx, hy, fx, fy []float64
		for j := range min(len(pn.ModelX), len(pn.ModelY)) {
			if pn.ModelX[j] <= sm.End {
				hx, hy = append(hx, pn.ModelX[j]), append(hy, pn.ModelY[j])
			}
			if pn.ModelX[j] >= sm.End {
				fx, fy = append(fx, pn.ModelX[j]), append(fy, pn.ModelY[j])
			}
		}
		if len(hx) > 0 && len(fx) > 0 && fx[0] > sm.End {
			// The forecast starts where the history ends.
			fx, fy = append([]float64{hx[len(hx)-1]}, fx...), append([]float64{hy[len(hy)-1]}, fy...)
		}
		end := &plotter.Line{XYs: plotter.XYs{{X: sm.End, Y: sm.YMin}, {X: sm.End, Y: sm.YMax}},
			LineStyle: draw.LineStyle{Color: color.RGBA{138, 143, 152, 255}, Width: L(1.4), Dashes: []vg.Length{L(5), L(4)}}}
		p.Add(end)
		if xy := cleanXY(hx, hy); len(xy) > 0 {
			p.Add(&plotter.Line{XYs: xy, LineStyle: draw.LineStyle{Color: smModelColor, Width: L(2.4)}})
		}
		if xy := cleanXY(fx, fy); len(xy) > 0 {
			p.Add(&plotter.Line{XYs: xy, LineStyle: draw.LineStyle{Color: smModelColor, Width: L(2.4), Dashes: []vg.Length{L(7), L(4)}}})
		}
		if xy := cleanXY(pn.ObservedX, pn.ObservedY); len(xy) > 0 {
			p.Add(&plotter.Scatter{XYs: xy, GlyphStyle: draw.GlyphStyle{Color: smObservedColor, Radius: L(3.2), Shape: draw.CircleGlyph{}}})
		}
		// r is in pixels from the top; the canvas counts from the bottom.
		area := draw.Canvas{Canvas: dc.Canvas, Rectangle: vg.Rectangle{
			Min: vg.Point{X: px(float64(r.Min.X)) + L(6), Y: hpt - px(float64(r.Max.Y)) + L(22)},
			Max: vg.Point{X: px(float64(r.Max.X)) - L(10), Y: hpt - px(float64(r.Min.Y)) - L(4)}}}
		p.Draw(area)
	}
	if format == "png" {
		return writePNG(wr, cv.(vgimg.PngCanvas).Image())
	}
	b := new(bytes.Buffer)
	if _, err := cv.WriteTo(b); err != nil {
		return err
	}
	out := svgSize.ReplaceAllLiteral(b.Bytes(), fmt.Appendf(nil, `<svg width="%d" height="%d"`, w, h))
	out = bytes.ReplaceAll(out, []byte("font-family:"+chartTypeface+";"),
		[]byte("font-family:"+chartTypeface+",'DejaVu Sans','Helvetica Neue',Arial,sans-serif;"))
	_, err = wr.Write(out)
	return err
}

// historyCharts prepares the small-multiples chart of the producers'
// water cuts against their history (t is producers.csv).
func (r *run) historyCharts(t *Table) {
	d := r.hist
	if d == nil || len(d.producers) == 0 {
		return
	}
	names, xs, ys := t.seriesBy("well", runfolder.ColTime, "water_cut")
	idx := map[string]int{}
	for i, n := range names {
		idx[n] = i
	}
	rms := map[string]*float64{}
	bt := map[string]*float64{}
	for _, w := range d.sum.Wells {
		rms[w.Name], bt[w.Name] = w.WaterCutRMS, w.BreakthroughErrorDays
	}
	label, start := r.timeAxis()
	sm := SmallMultiples{Title: "Water cut against history, one panel per producer",
		Subtitle: "Dots: observed · solid line: model over the history · dashed: forecast · grey line: end of history (" +
			r.dayText(float64(d.sum.EndDays), d.sum.EndDate) + ") · " + r.scene.Title,
		XLabel: label, YLabel: "Water cut", End: float64(d.sum.EndDays), YMin: 0, YMax: 1, StartDate: start}
	for _, n := range d.producers {
		pn := Panel{Title: n}
		if v := rms[n]; v != nil {
			pn.Title += " · RMS " + FormatNumber(*v, 3)
		}
		if v := bt[n]; v != nil {
			pn.Title += " · breakthrough " + signedDays(*v)
		}
		if i, ok := idx[n]; ok {
			pn.ModelX, pn.ModelY = xs[i], ys[i]
		}
		pn.ObservedX, pn.ObservedY = d.observed(n, "water_cut")
		sm.Panels = append(sm.Panels, pn)
	}
	rel := filepath.Join(runfolder.ChartsDir, "history_water_cut."+r.opt.Format)
	w, h, format := r.opt.Width, r.opt.Height, r.opt.Format
	r.pics = append(r.pics, picture{kind: chartPicture, rel: rel,
		caption: fmt.Sprintf("Water cut of each of the %d producers with history: observed (dots) and model (line), the forecast dashed after the end of the history.", len(sm.Panels)),
		draw: func() ([]byte, error) {
			var b bytes.Buffer
			if err := WriteSmallMultiples(&b, sm, w, h, format); err != nil {
				return nil, fmt.Errorf("render: %s: %w", rel, err)
			}
			return b.Bytes(), nil
		}})
}

// signedDays writes a breakthrough error: "30 d late", "61 d early",
// "on time".
func signedDays(v float64) string {
	switch {
	case v > 0:
		return FormatNumber(v, decimalsForDay(v)) + " d late"
	case v < 0:
		return FormatNumber(-v, decimalsForDay(-v)) + " d early"
	}
	return "on time"
}

// errorScale is the diverging scale of the breakthrough-error map:
// symmetric about 0, to the largest error rounded up to a nice number.
func errorScale(errs []float64) Scale {
	m := 0.0
	for _, v := range errs {
		if !math.IsNaN(v) {
			m = math.Max(m, math.Abs(v))
		}
	}
	if m == 0 {
		m = 30
	}
	m = niceNumber(m, false)
	return Scale{Label: "Breakthrough error", Unit: "days, model − observed", Min: -m, Max: m, Map: &BreakthroughErrorColors}
}

// errorMap prepares the map of the producers coloured by their
// breakthrough error, over the saturation at the end of the history (the
// last snapshot at or before it, else the first after).
func (r *run) errorMap() error {
	d := r.hist
	if d == nil || len(d.producers) == 0 {
		return nil
	}
	files := r.snapshotFiles()
	var snap *frameFile
	for i := range files {
		if snap == nil || files[i].Day <= float64(d.sum.EndDays) {
			snap = &files[i]
		}
	}
	g := r.scene.Grid
	vals := make([]float64, g.NX*g.NY)
	for k := range vals {
		vals[k] = math.NaN()
	}
	fieldLabel := "No saturation snapshot"
	if snap != nil {
		v, err := r.readASC(snap.Path)
		if err != nil {
			return err
		}
		vals = v
		fieldLabel = "Water saturation, " + r.dayText(snap.Day, dateOf(r.sum.StartDate, snap.Day))
	}
	byName := map[string]runfolder.HistoryWell{}
	for _, w := range d.sum.Wells {
		byName[w.Name] = w
	}
	var errs []float64
	ov := Overlay{FieldLabel: fieldLabel, Pixels: 30}
	hollow := false
	for _, n := range d.producers {
		for _, w := range r.scene.Wells {
			if w.Name != n {
				continue
			}
			e := byName[n].BreakthroughErrorDays
			if e == nil {
				ov.Markers = append(ov.Markers, Marker{X: w.X, Y: w.Y, Shape: MarkHollow})
				hollow = true
				continue
			}
			ov.Markers = append(ov.Markers, Marker{X: w.X, Y: w.Y, Shape: MarkValue, Value: *e})
			errs = append(errs, *e)
		}
	}
	ov.Scale = errorScale(errs)
	lo, hi := ov.Scale.Min, ov.Scale.Max
	ov.Keys = []MarkerKey{{Label: "Model early (water before observed)", Value: &lo}, {Label: "Model late (water after observed)", Value: &hi}}
	if hollow {
		ov.Keys = append(ov.Keys, MarkerKey{Label: "No breakthrough to compare", Shape: MarkHollow})
	}
	s := r.scene
	s.Subtitle = "Breakthrough error of each producer, model − observed · history to " + r.dayText(float64(d.sum.EndDays), d.sum.EndDate)
	sc, w, h := r.satSc, r.opt.Width, r.opt.Height
	r.addMap(filepath.Join(runfolder.MapsDir, "breakthrough_error.png"),
		"Breakthrough error of each producer with history (model − observed water breakthrough, days): orange where the model's water arrives early, purple where it arrives late, over the water saturation.",
		runfolder.MatchFile, func() (*image.RGBA, error) { return DrawFieldOverlay(s, vals, sc, ov, w, h) })
	return nil
}

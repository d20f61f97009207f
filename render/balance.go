package render

import (
	"bytes"
	"fmt"
	"image"
	"image/color"
	"math"
	"os"
	"path/filepath"
	"sort"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"floodtrace/runfolder"
)

// PairLine is one injector-producer pair drawn on the pair map: a line
// from the injector to the producer whose width is the water rate and
// whose colour is the pair efficiency.
type PairLine struct {
	X0, Y0, X1, Y1        float64 // injector and producer, map coordinates
	WaterRate, Efficiency float64
}

// Forecast is a forecast's field curves at its report times.
type Forecast struct {
	Times, OilRate, WaterCut []float64
}

// BalancePictures is the data of floodtrace balance's pictures: the
// injectors' efficiencies now and with the recommended rates, the pairs
// of both forecasts, and both forecasts' field curves.
type BalancePictures struct {
	Scene                      Scene
	Injectors                  []string
	EffNow, EffRecommended     []float64
	PairsNow, PairsRecommended []PairLine
	Now, Recommended           Forecast
	RateUnit, VolumeUnit       string
}

// Balance picture files, relative to the balance folder.
const (
	BalanceEfficiencyChart = runfolder.ChartsDir + "/balance_efficiency.png"
	BalanceOilChart        = runfolder.ChartsDir + "/balance_oil_rate.png"
	BalanceWaterCutChart   = runfolder.ChartsDir + "/balance_water_cut.png"
	BalancePairsNowMap     = runfolder.MapsDir + "/balance_pairs_now.png"
	BalancePairsRecMap     = runfolder.MapsDir + "/balance_pairs_recommended.png"
)

// WriteBalancePictures draws the balance pictures into dir (w x h pixels,
// PNG) and returns their names relative to dir.
func WriteBalancePictures(dir string, p BalancePictures, w, h int) ([]string, error) {
	if err := checkSize(w, h); err != nil {
		return nil, err
	}
	for _, sub := range []string{runfolder.MapsDir, runfolder.ChartsDir} {
		if err := os.MkdirAll(filepath.Join(dir, sub), 0o755); err != nil {
			return nil, fmt.Errorf("render: %w", err)
		}
	}
	var files []string
	bars, err := efficiencyBars(p, w, h)
	if err != nil {
		return nil, err
	}
	if err := writeFileAtomic(filepath.Join(dir, BalanceEfficiencyChart), bars); err != nil {
		return nil, err
	}
	files = append(files, BalanceEfficiencyChart)
	for _, c := range []struct {
		file, title, unit string
		now, rec          []float64
	}{
		{BalanceOilChart, "Field oil rate", p.RateUnit, p.Now.OilRate, p.Recommended.OilRate},
		{BalanceWaterCutChart, "Field water cut", "fraction", p.Now.WaterCut, p.Recommended.WaterCut},
	} {
		ch := Chart{Title: p.Scene.Title, Subtitle: c.title + ": current against recommended injection rates",
			XLabel: "time (days)", YLabel: c.title + " (" + c.unit + ")", LegendTitle: "injection rates",
			Series: []Series{{Name: "current", X: p.Now.Times, Y: c.now}, {Name: "recommended", X: p.Recommended.Times, Y: c.rec}}}
		if err := lineChart(filepath.Join(dir, c.file), ch, w, h, "png"); err != nil {
			return nil, err
		}
		files = append(files, c.file)
	}
	maxRate, maxEff := 0.0, 0.0
	for _, l := range append(append([]PairLine(nil), p.PairsNow...), p.PairsRecommended...) {
		maxRate = math.Max(maxRate, l.WaterRate)
		if !math.IsNaN(l.Efficiency) {
			maxEff = math.Max(maxEff, l.Efficiency)
		}
	}
	if maxEff <= 0 {
		maxEff = 1
	}
	for _, m := range []struct {
		file, what string
		pairs      []PairLine
	}{{BalancePairsNowMap, "current rates", p.PairsNow}, {BalancePairsRecMap, "recommended rates", p.PairsRecommended}} {
		s := p.Scene
		s.Subtitle = "Well pairs at the " + m.what + ": line width = water rate, colour = efficiency"
		img, err := drawPairMap(s, m.pairs, Scale{Label: "Pair efficiency", Unit: "oil per unit of injected water", Min: 0, Max: maxEff, Map: &TimeOfFlightColors}, maxRate, w, h)
		if err != nil {
			return nil, err
		}
		b, err := encodePNG(m.file, img)
		if err != nil {
			return nil, err
		}
		if err := writeFileAtomic(filepath.Join(dir, m.file), b); err != nil {
			return nil, err
		}
		files = append(files, m.file)
	}
	return files, nil
}

// drawPairMap draws the reservoir with a line per pair, width in
// proportion to the water rate (maxRate the widest) and colour the
// efficiency on sc; the widest lines are drawn first.
func drawPairMap(s Scene, pairs []PairLine, sc Scale, maxRate float64, w, h int) (*image.RGBA, error) {
	c, err := newMapCanvas(s, w, h)
	if err != nil {
		return nil, err
	}
	col := make([]color.RGBA, s.Grid.N())
	for k := range col {
		if c.active(k) {
			col[k] = color.RGBA{236, 236, 232, 255}
		} else {
			col[k] = colInactive
		}
	}
	c.fillCells(col)
	cm := sc.colormap()
	order := make([]int, len(pairs))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return pairs[order[a]].WaterRate > pairs[order[b]].WaterRate })
	dc := c.dc
	c.clipMap()
	dc.SetLineCapRound()
	for _, i := range order {
		l := pairs[i]
		if !(l.WaterRate > 0) || maxRate <= 0 {
			continue
		}
		ax, ay := c.l.ToPixel(l.X0, l.Y0)
		bx, by := c.l.ToPixel(l.X1, l.Y1)
		dc.SetLineWidth(math.Max(1, 22*c.l.S*l.WaterRate/maxRate))
		if math.IsNaN(l.Efficiency) {
			dc.SetColor(colNoData)
		} else {
			dc.SetColor(cm.At(sc.T(l.Efficiency)))
		}
		dc.DrawLine(ax, ay, bx, by)
		dc.Stroke()
	}
	dc.ResetClip()
	c.outline()
	c.faults(false)
	c.wells()
	c.faultLabels()
	c.header()
	c.panelHeading(sc.Label, sc.Unit)
	c.colourBar(sc)
	c.symbolLegend(float64(c.l.Bar.Max.Y)+56*c.l.S, c.standardEntries(""))
	c.northAndScale()
	return c.img, nil
}

// efficiencyBars draws each injector's efficiency now and with the
// recommended rates as grouped bars (PNG bytes).
func efficiencyBars(p BalancePictures, w, h int) (data []byte, err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("render: drawing the efficiency bars: %v", r)
		}
	}()
	if err := registerChartFonts(); err != nil {
		return nil, err
	}
	if len(p.EffNow) != len(p.Injectors) || len(p.EffRecommended) != len(p.Injectors) || len(p.Injectors) == 0 {
		return nil, fmt.Errorf("render: %d injectors with %d and %d efficiencies", len(p.Injectors), len(p.EffNow), len(p.EffRecommended))
	}
	const dpi = 96
	wpt, hpt := vg.Length(float64(w)*72/dpi), vg.Length(float64(h)*72/dpi)
	k := float64(hpt) / 810
	pl := plot.New()
	pl.Title.Text = p.Scene.Title + "\nInjection efficiency (attributed oil over injected water) per injector"
	pl.Title.TextStyle.Font = chartFont(vg.Length(20*k), true)
	pl.Y.Label.Text = "efficiency (oil per unit of water)"
	pl.Y.Label.TextStyle.Font = chartFont(vg.Length(16*k), false)
	pl.Y.Tick.Label.Font = chartFont(vg.Length(14*k), false)
	pl.X.Tick.Label.Font = chartFont(vg.Length(14*k), false)
	pl.Legend.TextStyle.Font = chartFont(vg.Length(14*k), false)
	pl.Legend.Top = true
	clean := func(v []float64) plotter.Values {
		out := make(plotter.Values, len(v))
		for i, x := range v {
			if !math.IsNaN(x) && !math.IsInf(x, 0) {
				out[i] = x
			}
		}
		return out
	}
	bw := vg.Length(math.Min(90, 700/float64(len(p.Injectors))) * k)
	now, err := plotter.NewBarChart(clean(p.EffNow), bw)
	if err != nil {
		return nil, err
	}
	rec, err := plotter.NewBarChart(clean(p.EffRecommended), bw)
	if err != nil {
		return nil, err
	}
	c0, _ := SeriesStyle(0)
	c1, _ := SeriesStyle(1)
	now.Color, now.LineStyle.Width, now.Offset = c0, 0, -bw/2
	rec.Color, rec.LineStyle.Width, rec.Offset = c1, 0, bw/2
	pl.Add(now, rec)
	pl.Legend.Add("current rates", now)
	pl.Legend.Add("recommended rates", rec)
	pl.NominalX(p.Injectors...)
	top := 0.0
	for _, v := range append(clean(p.EffNow), clean(p.EffRecommended)...) {
		top = math.Max(top, v)
	}
	if top <= 0 {
		top = 1
	}
	n := float64(len(p.Injectors))
	pl.X.Min, pl.X.Max, pl.Y.Min, pl.Y.Max = -0.7, n-0.3, 0, 1.25*top
	pl.Legend.XOffs, pl.Legend.YOffs = vg.Length(-10*k), vg.Length(-10*k)
	cv := vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(wpt, hpt), vgimg.UseDPI(dpi))}
	m := vg.Length(24 * k)
	pl.Draw(draw.Crop(draw.New(cv), m, -m, m, -m))
	var buf bytes.Buffer
	if _, err := cv.WriteTo(&buf); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

package render

import (
	"floodtrace/runfolder"

	"bytes"
	"fmt"
	"math"
	"path/filepath"
)

// producerOrder returns the producer names of the summary, then any other
// name met in the table, so that every producer appears in the legend.
func (r *run) producerOrder(found []string) []string {
	var out []string
	seen := map[string]bool{}
	for _, p := range r.sum.Producers {
		if !seen[p.Name] {
			out = append(out, p.Name)
			seen[p.Name] = true
		}
	}
	if len(out) == 0 {
		for _, w := range r.sum.Wells {
			if w.Type == "producer" && !seen[w.Name] {
				out = append(out, w.Name)
				seen[w.Name] = true
			}
		}
	}
	for _, n := range found {
		if n != "" && !seen[n] {
			out = append(out, n)
			seen[n] = true
		}
	}
	return out
}

// perWell builds one series per producer from table t.
func (r *run) perWell(t *Table, x, y string) []Series {
	names, xs, ys := t.seriesBy("well", x, y)
	idx := map[string]int{}
	for i, n := range names {
		idx[n] = i
	}
	var out []Series
	for _, n := range r.producerOrder(names) {
		s := Series{Name: n}
		if i, ok := idx[n]; ok {
			s.X, s.Y = xs[i], ys[i]
		}
		out = append(out, s)
	}
	return out
}

// markLimits marks, on the series of table t (one per well, x against
// y), the point of the report day at which each producer reached its
// economic limit (summary.json limit_days). With stop, the curve ends
// there: a shut-in well's water cut is not a value of the reservoir (the
// file holds 0 for it), so the water-cut curves stop at the ring.
func (r *run) markLimits(t *Table, x, y string, series []Series, stop bool) []Series {
	days := map[string]float64{}
	for _, p := range r.sum.Producers {
		if p.LimitDays != nil {
			days[p.Name] = *p.LimitDays
		}
	}
	if len(days) == 0 || !t.Has("time_days") {
		return series
	}
	count, mark := map[string]int{}, map[string]int{}
	for row := range t.Rows {
		name := t.Str(row, "well")
		if math.IsNaN(t.Num(row, x)) || math.IsNaN(t.Num(row, y)) {
			continue
		}
		k := count[name]
		count[name]++
		if d, ok := days[name]; ok && math.Abs(t.Num(row, "time_days")-d) <= 1e-9*math.Max(1, d) {
			mark[name] = k
		}
	}
	for i := range series {
		if k, ok := mark[series[i].Name]; ok {
			series[i].Marks = []int{k}
			if stop && k+1 < len(series[i].X) {
				series[i].X, series[i].Y = series[i].X[:k+1], series[i].Y[:k+1]
			}
		}
	}
	return series
}

// limitCaption is the sentence a chart caption adds when producers were
// shut in at their economic limits.
func (r *run) limitCaption() string {
	for _, p := range r.sum.Producers {
		if p.LimitDays != nil {
			return " A ring marks the report time at which a producer reached its economic limit and was shut in."
		}
	}
	return ""
}

func (r *run) chart(name string, c Chart, caption string) error {
	rel := filepath.Join(runfolder.ChartsDir, name+"."+r.opt.Format)
	w, h, format := r.opt.Width, r.opt.Height, r.opt.Format
	r.pics = append(r.pics, picture{kind: chartPicture, rel: rel, caption: caption, draw: func() ([]byte, error) {
		var b bytes.Buffer
		if err := WriteChart(&b, c, w, h, format); err != nil {
			return nil, fmt.Errorf("render: %s: %w", rel, err)
		}
		return b.Bytes(), nil
	}})
	return nil
}

func (r *run) drawCharts() error {
	title := r.scene.Title
	u := r.sum.UnitLabels
	if p := filepath.Join(r.dir, runfolder.ProducersFile); exists(p) {
		t, err := readTable(p)
		if err != nil {
			return err
		}
		if err := t.need(p, "time_days", "well", "water_cut", "oil_rate", "cum_oil"); err != nil {
			return err
		}
		xl, start := r.timeAxis()
		wc := r.markLimits(t, "time_days", "water_cut", r.perWell(t, "time_days", "water_cut"), true)
		rate := r.markLimits(t, "time_days", "oil_rate", r.perWell(t, "time_days", "oil_rate"), false)
		cum := r.markLimits(t, "time_days", "cum_oil", r.perWell(t, "time_days", "cum_oil"), false)
		if r.hist != nil {
			r.hist.setFVF(r.sum)
			wc, rate, cum = r.historySeries(wc, "water_cut"), r.historySeries(rate, "oil_rate"), r.historySeries(cum, "cum_oil")
		}
		if err := r.chart("water_cut", Chart{Title: "Water cut by producer", Subtitle: title,
			XLabel: xl, YLabel: "Water cut (fraction)", LegendTitle: "Producer",
			Series: wc, YMin: 0, YMax: 1, StartDate: start},
			"Water cut of each producer against time."+r.limitCaption()+r.historyCaption("water cuts")); err != nil {
			return err
		}
		if err := r.chart("oil_rate", Chart{Title: "Oil rate by producer", Subtitle: title,
			XLabel: xl, YLabel: "Oil rate (" + u.Rate + ")", LegendTitle: "Producer",
			Series: rate, StartDate: start},
			"Oil rate of each producer (reservoir volumes)."+r.limitCaption()+r.historyCaption("oil rates")); err != nil {
			return err
		}
		if err := r.chart("cumulative_oil", Chart{Title: "Cumulative oil by producer", Subtitle: title,
			XLabel: xl, YLabel: "Cumulative oil (" + u.Volume + ")", LegendTitle: "Producer",
			Series: cum, StartDate: start},
			"Cumulative oil of each producer (reservoir volumes)."+r.limitCaption()+r.historyCaption("cumulative oil, at the end of each period,")); err != nil {
			return err
		}
		r.historyCharts(t)
	} else {
		r.rep.note("producers.csv missing: no producer charts")
	}
	if p := filepath.Join(r.dir, runfolder.FieldFile); exists(p) {
		t := r.field
		if err := t.need(p, "pvi", "recovery_factor", "water_cut"); err != nil {
			return err
		}
		var pvi, rf, wc []float64
		for i := range t.Rows {
			pvi = append(pvi, t.Num(i, "pvi"))
			rf = append(rf, t.Num(i, "recovery_factor"))
			wc = append(wc, t.Num(i, "water_cut"))
		}
		field := []Series{{Name: "Recovery factor", X: pvi, Y: rf}, {Name: "Water cut", X: pvi, Y: wc}}
		caption := "Field recovery factor (fraction of the original oil in place) and water cut against pore volumes injected."
		markName := ""
		if r.sum.FieldLimitDays != nil && len(pvi) > 0 {
			for i := range field {
				field[i].Marks = []int{len(pvi) - 1}
			}
			markName = "Run ended at field water-cut limit"
			caption += fmt.Sprintf(" The run ended on day %s, when the field water cut reached its limit (rings).", FormatNumber(*r.sum.FieldLimitDays, 6))
		}
		if err := r.chart("field_performance", Chart{Title: "Field recovery and water cut", Subtitle: title,
			XLabel: "Pore volumes injected (PVI)", YLabel: "Fraction", LegendTitle: "Field",
			Series: field, YMin: 0, YMax: 1, MarkName: markName},
			caption); err != nil {
			return err
		}
	} else {
		r.rep.note("field.csv missing: no field chart")
	}
	if p := filepath.Join(r.dir, runfolder.EffectiveCurvesFile); exists(p) {
		t, err := readTable(p)
		if err != nil {
			return err
		}
		if err := t.need(p, "well", "avg_water_saturation", "water_cut"); err != nil {
			return err
		}
		if err := r.chart("dynamic_curves", Chart{Title: "Dynamic curve of each producer", Subtitle: "Water cut against the average water saturation of the volume each producer drains · " + title,
			XLabel: "Average water saturation of the drained volume (fraction)", YLabel: "Water cut (fraction)", LegendTitle: "Producer",
			Series: r.markLimits(t, "avg_water_saturation", "water_cut", r.perWell(t, "avg_water_saturation", "water_cut"), true), YMin: 0, YMax: 1},
			"Dynamic curve of each producer: its water cut against the average water saturation of the pore volume that drains to it."+r.limitCaption()); err != nil {
			return err
		}
	} else {
		r.rep.note("effective_curves.csv missing: no dynamic-curve chart")
	}
	if p := filepath.Join(r.dir, runfolder.FPhiFile); exists(p) {
		t, err := readTable(p)
		if err != nil {
			return err
		}
		if err := t.need(p, "phi", "f"); err != nil {
			return err
		}
		var phi, F []float64
		for i := range t.Rows {
			phi = append(phi, t.Num(i, "phi"))
			F = append(F, t.Num(i, "f"))
		}
		lc := runfolder.Value(r.sum.LorenzCoefficient)
		name := "F–Φ curve"
		if !math.IsNaN(lc) {
			name = "F–Φ curve (Lc = " + FormatNumber(lc, 3) + ")"
		}
		if err := r.chart("f_phi", Chart{Title: "Flow capacity against storage capacity · Lorenz coefficient " + FormatNumber(lc, 3),
			Subtitle: title, XLabel: "Storage capacity Φ (fraction of pore volume)", YLabel: "Flow capacity F (fraction of flow)",
			LegendTitle: "Curve",
			Series:      []Series{{Name: name, X: phi, Y: F}, {Name: "Homogeneous (Lc = 0)", X: []float64{0, 1}, Y: []float64{0, 1}, Reference: true}},
			XMin:        0, XMax: 1, YMin: 0, YMax: 1},
			"F–Φ curve: the fraction of flow carried by the fastest fraction of the pore volume; the Lorenz coefficient is twice the area between the curve and the diagonal."); err != nil {
			return err
		}
	} else {
		r.rep.note(runfolder.FPhiFile + " missing: no F-Phi chart")
	}
	if p := filepath.Join(r.dir, runfolder.SweepFile); exists(p) {
		t, err := readTable(p)
		if err != nil {
			return err
		}
		if err := t.need(p, "td", "sweep"); err != nil {
			return err
		}
		var tD, sw []float64
		for i := range t.Rows {
			tD = append(tD, t.Num(i, "td"))
			sw = append(sw, t.Num(i, "sweep"))
		}
		if len(cleanXY(tD, sw)) > 1 {
			end := float64(r.sum.Field.FinalPVI)
			series := []Series{{Name: "Sweep efficiency", X: tD, Y: sw}}
			if end > 0 {
				series = append(series, Series{Name: fmt.Sprintf("End of the run (%s PV injected)", FormatNumber(end, 2)),
					X: []float64{end, end}, Y: []float64{0, 1}, Reference: true})
			}
			if err := r.chart("sweep", Chart{Title: "Sweep efficiency against dimensionless time", Subtitle: title,
				XLabel: "Dimensionless time tD (pore volumes)", YLabel: "Sweep efficiency (fraction)", LegendTitle: "Curve",
				Series: series, XMin: 0, XMax: sweepRange(tD, sw, end), YMin: 0, YMax: 1},
				"Volumetric sweep efficiency from the time-of-flight distribution against dimensionless time, up to a few pore volumes past the end of the run (the curve creeps on for thousands of pore volumes through nearly stagnant cells)."); err != nil {
				return err
			}
		}
	} else {
		r.rep.note(runfolder.SweepFile + " missing: no sweep chart")
	}
	return nil
}

// sweepRange is the end of the sweep chart's time axis: the range that
// carries information. The time-of-flight sweep curve creeps on for
// thousands of pore volumes through nearly stagnant cells, which would
// squash the part that matters against the axis. The axis ends where the
// sweep comes within 0.02 of its final value, but no later than 5 pore
// volumes past the end of the run (end, in pore volumes injected) and no
// earlier than twice it; never past the data.
func sweepRange(tD, sw []float64, end float64) float64 {
	n := min(len(tD), len(sw))
	if n == 0 {
		return 0
	}
	last, final := tD[n-1], sw[n-1]
	settle := last
	for k := range n {
		if final-sw[k] <= 0.02 {
			settle = tD[k]
			break
		}
	}
	x := settle
	if end > 0 {
		x = min(max(settle, 2*end), end+5)
	}
	return min(x, last)
}

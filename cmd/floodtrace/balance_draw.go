package main

import (
	"fmt"
	"strings"

	"floodtrace/balance"
	"floodtrace/flood"
	"floodtrace/render"
	"floodtrace/reservoir"
)

// drawBalance hands render the data of the balance pictures and returns
// their names relative to dir.
func drawBalance(dir string, r *balance.Result, w, h int) ([]string, error) {
	m := r.Model
	_, _, _, rate, _, vol := m.Units.Labels()
	s := caseScene(m)
	p := render.BalancePictures{Scene: s, RateUnit: rate, VolumeUnit: vol,
		Now: forecastCurves(r.Now.Run), Recommended: forecastCurves(r.Recommended.Run)}
	for _, in := range r.Injectors {
		p.Injectors = append(p.Injectors, in.Name)
		p.EffNow = append(p.EffNow, in.EfficiencyNow)
		p.EffRecommended = append(p.EffRecommended, in.EfficiencyRecommended)
	}
	lines := func(e *flood.Efficiencies) []render.PairLine {
		var out []render.PairLine
		for _, pe := range e.Pairs {
			a, b := m.Wells[pe.InjectorWell], m.Wells[pe.ProducerWell]
			out = append(out, render.PairLine{X0: a.X, Y0: a.Y, X1: b.X, Y1: b.Y, WaterRate: pe.WaterRate, Efficiency: pe.Efficiency})
		}
		return out
	}
	p.PairsNow, p.PairsRecommended = lines(r.Now.Eff), lines(r.Recommended.Eff)
	files, err := render.WriteBalancePictures(dir, p, w, h)
	if err != nil {
		return nil, err
	}
	rep := render.BalanceReport{Title: m.Title, RateUnit: rate}
	what, amount := objectiveWords(r, vol)
	What := strings.ToUpper(what[:1]) + what[1:]
	gain := r.Recommended.Objective - r.Now.Objective
	if r.Improved {
		rep.Headline = append(rep.Headline, fmt.Sprintf("%s: %s at the current rates, %s at the recommended rates (%s%s).",
			What, amount(r.Now.Objective), amount(r.Recommended.Objective), signed(amount(gain)), percent(r.Now.Objective, r.Recommended.Objective)))
	} else {
		over := fmt.Sprintf("over %g days", r.Horizon)
		if r.HistoryEnd > 0 || r.Objective == balance.Value {
			over = "(" + what + ")"
		}
		rep.Headline = append(rep.Headline, fmt.Sprintf("No rates found that beat the current ones %s (%s %s): keep the current rates.", over, r.Objective, amount(r.Now.Objective)))
	}
	rep.Headline = append(rep.Headline, fmt.Sprintf("Total injection %.1f %s now, %.1f %s recommended (%s).", r.TotalNow, rate, r.TotalRecommended, rate,
		map[bool]string{true: "free within the limits", false: "held"}[r.FreeTotal]))
	for _, in := range r.Injectors {
		rep.Rows = append(rep.Rows, render.BalanceRow{Injector: in.Name, RateNow: fmt.Sprintf("%.1f", in.RateNow), RateRecommended: fmt.Sprintf("%.1f", in.RateRecommended),
			Change: fmt.Sprintf("%+.1f", in.RateRecommended-in.RateNow), EfficiencyNow: fmt.Sprintf("%.3f", in.EfficiencyNow),
			EfficiencyRecommended: fmt.Sprintf("%.3f", in.EfficiencyRecommended), Limit: in.Limit})
	}
	for _, f := range r.Flagged {
		rep.Flags = append(rep.Flags, fmt.Sprintf("%s: oil %.3f of the water reaching it, fed by %s. A candidate for a rate cut, a shut-in or a conformance job.",
			f.Name, f.Efficiency, strings.Join(f.Injectors, ", ")))
	}
	of := "the oil at the horizon"
	if r.Objective == balance.Value {
		of = "the discounted value at the horizon"
	}
	rep.Method = []string{
		fmt.Sprintf("Each round proposes new rates by the efficiency-weighted reallocation of Thiele and Batycky (2006), q' = q (e/ē)^%g with each change at most the step times the rate, and by a finite-difference gradient of %s through the flood engine; each proposal is forecast and kept only if it beats the best rates so far, otherwise the step is halved.", r.Exponent, of),
		fmt.Sprintf("%d rounds, %d forecasts. Efficiencies are taken over the whole horizon: the pair water rates of each forecast's first solve, and each producer's average oil rate from day %g to day %g shared among its injectors by those rates.", len(r.Iterations), r.Forecasts, r.HistoryEnd, r.Horizon),
	}
	if r.HistoryEnd > 0 {
		rep.Method = append(rep.Method, fmt.Sprintf("The case's history drives the wells up to its end, day %g, as in a run; the rates apply from there on.", r.HistoryEnd))
	}
	rf, err := render.WriteBalanceReport(dir, rep, files)
	if err != nil {
		return nil, err
	}
	return append(files, rf), nil
}

func forecastCurves(r *flood.Result) render.Forecast {
	return render.Forecast{Times: r.Times, OilRate: r.FieldOilRate, WaterCut: r.FieldWaterCut}
}

// caseScene is the map scene of a case: its grid, outline, wells and
// faults, titled with the case title.
func caseScene(m *reservoir.Model) render.Scene {
	length, _, _, _, _, _ := m.Units.Labels()
	s := render.Scene{Title: m.Title, Grid: m.Grid, Active: m.Active, LengthUnit: length}
	for _, wl := range m.Wells {
		s.Wells = append(s.Wells, render.WellMark{Name: wl.Name, X: wl.X, Y: wl.Y, Injector: wl.Type == reservoir.Injector})
	}
	for _, f := range m.Faults {
		s.Faults = append(s.Faults, f.Trace)
		s.FaultNames = append(s.FaultNames, f.Name)
	}
	return s
}

package main

import (
	"floodtrace/balance"
	"floodtrace/flood"
	"floodtrace/render"
)

// drawBalance hands render the data of the balance pictures and returns
// their names relative to dir.
func drawBalance(dir string, r *balance.Result, w, h int) ([]string, error) {
	m := r.Model
	length, _, _, rate, _, vol := m.Units.Labels()
	s := render.Scene{Title: m.Title, Grid: m.Grid, Active: m.Active, LengthUnit: length}
	for _, wl := range m.Wells {
		s.Wells = append(s.Wells, render.WellMark{Name: wl.Name, X: wl.X, Y: wl.Y, Injector: wl.Type == "injector"})
	}
	for _, f := range m.Faults {
		s.Faults = append(s.Faults, f.Trace)
		s.FaultNames = append(s.FaultNames, f.Name)
	}
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
	return render.WriteBalancePictures(dir, p, w, h)
}

func forecastCurves(r *flood.Result) render.Forecast {
	return render.Forecast{Times: r.Times, OilRate: r.FieldOilRate, WaterCut: r.FieldWaterCut}
}

package main

import (
	"fmt"
	"math"
	"strings"

	"floodtrace/calibrate"
	"floodtrace/render"
)

// calibrationLines returns the streamlines of the calibrated map's run
// that end at a matched producer, for the change map.
func calibrationLines(r *calibrate.Result) []render.Polyline {
	fr := r.FinalRun
	if fr == nil || fr.Trace == nil {
		return nil
	}
	m := r.Calibrated
	matched := map[string]bool{}
	for _, p := range r.Producers {
		matched[p.Name] = true
	}
	var out []render.Polyline
	for _, l := range fr.Trace.Lines {
		if l.Producer < 0 || l.Producer >= len(m.Wells) || !matched[m.Wells[l.Producer].Name] || len(l.Path) < 2 {
			continue
		}
		pl := render.Polyline{Producer: m.Wells[l.Producer].Name, Flux: l.Flux, TotalTOF: l.TotalTau}
		for _, q := range l.Path {
			pl.X = append(pl.X, q[0])
			pl.Y = append(pl.Y, q[1])
		}
		out = append(out, pl)
	}
	return out
}

// calibrationReport is the text of the calibration folder's report.html.
func calibrationReport(r *calibrate.Result) render.CalibrationReport {
	s := r.Summary()
	days := func(v float64) string {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return "none"
		}
		return fmt.Sprintf("%.1f", v)
	}
	frac := func(v float64) string {
		if math.IsNaN(v) {
			return "none"
		}
		return fmt.Sprintf("%.3f", v)
	}
	rep := render.CalibrationReport{Title: r.Calibrated.Title, Warnings: s.Warnings}
	rep.Headline = []string{
		fmt.Sprintf("Travel-time misfit %.1f → %.1f days; water-cut RMS %.3f → %.3f.", float64(s.Misfit.Before), float64(s.Misfit.After), float64(s.WaterCutRMS.Before), float64(s.WaterCutRMS.After)),
		fmt.Sprintf("%d accepted update(s), %d forward runs; multipliers %.3g to %.3g.", s.Iterations, s.Forward, float64(s.Constrained.MinMultiplier), float64(s.Constrained.MaxMultiplier)),
	}
	for _, p := range r.Producers {
		rep.Rows = append(rep.Rows, render.CalibrationRow{Producer: p.Name, ShiftBefore: days(p.ShiftBefore), ShiftAfter: days(p.ShiftAfter),
			BreakthroughBefore: days(p.BreakthroughErrorBefore), BreakthroughAfter: days(p.BreakthroughErrorAfter),
			WaterCutBefore: frac(p.WaterCutRMSBefore), WaterCutAfter: frac(p.WaterCutRMSAfter)})
	}
	rep.Constrained = fmt.Sprintf("The data constrain %d of the active cells (%.0f%%): those crossed by streamlines that reach the matched producers, in the given map or an accepted one. Every other cell keeps the given permeability.",
		s.Constrained.Cells, 100*float64(s.Constrained.Fraction))
	if len(s.Settings.KeepNearWells) > 0 {
		rep.Constrained += fmt.Sprintf(" %d cell(s) around %s are held at it (keep_near_wells).", s.Constrained.Kept, strings.Join(s.Settings.KeepNearWells, ", "))
	}
	st := s.Settings
	rep.Method = []string{
		"Generalized travel-time inversion (He, Datta-Gupta and Yoon 2002; Vasco, Yoon and Datta-Gupta 1999): per producer the time shift that best aligns the model water cut with the observed one over the history window, its sensitivity to each cell's log-permeability from the time of flight the streamlines spend in the cell over the Buckley-Leverett front speed, and a damped, smoothed least-squares update solved by LSQR (Paige and Saunders 1982); each step is halved until the misfit does not rise.",
		fmt.Sprintf("Settings: at most %d iteration(s), damping %g, smoothness %g, multipliers in [%g, %g].", st.Iterations, float64(st.Damping), float64(st.Smoothness), float64(st.MinMultiplier), float64(st.MaxMultiplier)),
	}
	return rep
}

package main

import (
	"math"

	"floodtrace/calibrate"
	"floodtrace/flood"
	"floodtrace/render"
)

// drawCalibration hands render the data of the calibration pictures and
// returns their names relative to dir.
func drawCalibration(dir string, r *calibrate.Result, prior []float64, w, h int) ([]string, error) {
	m := r.Calibrated
	s := caseScene(m)
	_, perm, _, _, _, _ := m.Units.Labels()
	p := render.CalibrationPictures{Scene: s, PermUnit: perm, Prior: prior, Calibrated: m.PermEast,
		MultiplierRange: math.Max(r.Settings.MaxMultiplier, 1/r.Settings.MinMultiplier)}
	p.Multiplier = make([]float64, len(prior))
	for k, x := range r.LogMultiplier {
		p.Multiplier[k] = math.Exp(x)
	}
	for _, it := range r.Iterations {
		p.Iteration = append(p.Iteration, float64(it.Iteration))
		p.Misfit = append(p.Misfit, it.TravelTimeMisfit)
	}
	end := m.History.End()
	for _, pm := range r.Producers {
		pc := render.ProducerCurves{Name: pm.Name, HistoryEnd: end, Times: r.PriorRun.Times}
		for _, mr := range r.PriorRun.History.Match {
			if mr.Well == pm.Name && !math.IsNaN(mr.ObsWaterCut) {
				pc.ObsTimes = append(pc.ObsTimes, (mr.Start+mr.End)/2)
				pc.Observed = append(pc.Observed, mr.ObsWaterCut)
			}
		}
		pc.Prior = waterCut(r.PriorRun, pm.Name)
		pc.Calibrated = waterCut(r.FinalRun, pm.Name)
		p.Producers = append(p.Producers, pc)
	}
	p.Lines = calibrationLines(r)
	files, err := render.WriteCalibrationPictures(dir, p, w, h)
	if err != nil {
		return nil, err
	}
	rf, err := render.WriteCalibrationReport(dir, calibrationReport(r), files)
	if err != nil {
		return nil, err
	}
	return append(files, rf), nil
}

func waterCut(r *flood.Result, name string) []float64 {
	for _, p := range r.Producers {
		if p.Name == name {
			return p.WaterCut
		}
	}
	return nil
}

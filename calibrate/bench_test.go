package calibrate

import (
	"fmt"
	"math"
	"testing"

	"floodtrace/flood"
	"floodtrace/internal/benchcase"
	"floodtrace/reservoir"
)

// benchModels returns the truth and the prior of the calibration
// benchmark: the benchmark pattern (internal/benchcase) on a 100 x 100
// grid, its log-normal map the truth, with 20 wells (8 rate injectors, 12
// BHP producers, as flood's history benchmark) over ten years; the
// history is the truth's monthly volumes (the producers', and the
// injectors' with drive: rates), the prior a homogeneous map of the
// truth's arithmetic mean.
func benchModels(b *testing.B, drive reservoir.HistoryDrive) (truth, prior *reservoir.Model) {
	m, err := benchcase.Pattern(100)
	if err != nil {
		b.Fatal(err)
	}
	m.Wells = nil
	m.Run = reservoir.RunSettings{End: 3650, ReportEvery: 30, Snapshots: []float64{3650}, Streamlines: 2000, PressureUpdates: 1}
	for k := range 8 {
		x, y := 1250+2500*float64(k%4), 3000+4000*float64(k/4)
		if err := m.PlaceWell(fmt.Sprintf("I%d", k+1), reservoir.Injector, x, y, reservoir.RateControl, 1500); err != nil {
			b.Fatal(err)
		}
	}
	for k := range 12 {
		x, y := 800+2800*float64(k%4), 800+4200*float64(k/4)
		if err := m.PlaceWell(fmt.Sprintf("P%d", k+1), reservoir.Producer, x, y, reservoir.BHPControl, 500); err != nil {
			b.Fatal(err)
		}
	}
	r, err := flood.Run(m, flood.Settings{Workers: 1})
	if err != nil {
		b.Fatal(err)
	}
	var rows []reservoir.HistoryRow
	nan := math.NaN()
	for _, p := range r.Producers {
		po, pw, t0 := 0.0, 0.0, 0.0
		for k, t := range r.Times {
			if t == 0 {
				continue
			}
			rows = append(rows, reservoir.HistoryRow{Well: p.Name, Start: t0, End: t, Oil: math.Max(0, p.CumOil[k]-po), Water: math.Max(0, p.CumWater[k]-pw), Injected: nan, BHP: nan})
			po, pw, t0 = p.CumOil[k], p.CumWater[k], t
		}
	}
	if drive == reservoir.DriveRates {
		for _, in := range r.Injectors {
			t0 := 0.0
			for _, t := range r.Times {
				if t == 0 {
					continue
				}
				rows = append(rows, reservoir.HistoryRow{Well: in.Name, Start: t0, End: t, Oil: nan, Water: nan, Injected: in.Rate * (t - t0), BHP: nan})
				t0 = t
			}
		}
	}
	pc := *m
	mean := 0.0
	for _, v := range m.PermEast {
		mean += v
	}
	mean /= float64(len(m.PermEast))
	pc.PermEast, pc.PermNorth = make([]float64, len(m.PermEast)), make([]float64, len(m.PermEast))
	for k := range pc.PermEast {
		pc.PermEast[k], pc.PermNorth[k] = mean, mean
	}
	pc.History = &reservoir.History{Drive: drive, Rows: rows}
	return m, &pc
}

// BenchmarkCalibrate100: the calibration of the 100 x 100, 20-well,
// ten-year case with the default settings, the history compared only
// (controls) and driving the wells' rates (rates). Recorded in
// docs/PERFORMANCE.md.
func BenchmarkCalibrate100(b *testing.B) {
	for _, drive := range []reservoir.HistoryDrive{reservoir.DriveControls, reservoir.DriveRates} {
		b.Run(string(drive), func(b *testing.B) {
			_, prior := benchModels(b, drive)
			var res *Result
			for b.Loop() {
				var err error
				if res, err = Calibrate(prior, Options{Workers: 1}); err != nil {
					b.Fatal(err)
				}
			}
			first, last := res.Iterations[0], res.Iterations[len(res.Iterations)-1]
			b.ReportMetric(float64(res.ForwardRuns), "runs")
			b.ReportMetric(float64(len(res.Iterations)-1), "iterations")
			b.ReportMetric(first.TravelTimeMisfit, "misfit0_days")
			b.ReportMetric(last.TravelTimeMisfit, "misfit_days")
			b.ReportMetric(last.WaterCutRMS/first.WaterCutRMS, "wc_rms_ratio")
		})
	}
}

package calibrate

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"floodtrace/flood"
	"floodtrace/internal/outdir"
	"floodtrace/reservoir"
	"floodtrace/runfolder"
)

// Synthetic truth (invented): a 30x20 grid with a high-permeability
// channel along x through the middle rows, an injector at the west end of
// the channel and four producers; the prior is homogeneous with the
// truth's arithmetic mean.
const (
	synthNX, synthNY = 30, 20
	synthBack        = 80.0  // md outside the channel
	synthChannel     = 800.0 // md in the channel
	synthHistoryEnd  = 1500.0
	synthPeriod      = 50.0
	synthEnd         = 3000.0
)

func inChannel(i, j int) bool { return j >= 8 && j <= 11 && i >= 2 }

func synthCase(perm float64, extra string) string {
	return fmt.Sprintf(`title: calibrate synthetic truth
units: field
grid: {nx: %d, ny: %d, dx: 50, dy: 50, origin: [0, 0]}
rock: {perm: %g, porosity: 0.2, thickness: 20}
fluids: {water_viscosity: 0.5, oil_viscosity: 1.5, initial_water_saturation: 0.2}
relperm:
  corey: {swc: 0.2, sor: 0.2, krw_max: 0.4, kro_max: 0.9, nw: 2, no: 2}
wells:
  - {name: I-1, type: injector, x: 75, y: 500, bhp: 3500}
  - {name: P-1, type: producer, x: 1425, y: 500, bhp: 500}
  - {name: P-2, type: producer, x: 1425, y: 925, bhp: 500}
  - {name: P-3, type: producer, x: 1425, y: 75, bhp: 500}
  - {name: P-4, type: producer, x: 750, y: 925, bhp: 500}
run: {end: %g, report_every: %g, streamlines: 600}
%s`, synthNX, synthNY, perm, synthEnd, synthPeriod/5, extra)
}

func load(t *testing.T, dir, text string) *reservoir.Model {
	t.Helper()
	p := filepath.Join(dir, "case.yaml")
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	m, err := reservoir.Load(p)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// truthRun builds the truth model and runs it.
func truthRun(t *testing.T, dir string) (*flood.Result, float64) {
	m := load(t, dir, synthCase(synthBack, ""))
	mean := 0.0
	for k := range m.PermEast {
		i, j := m.Grid.IJ(k)
		v := synthBack
		if inChannel(i, j) {
			v = synthChannel
		}
		m.PermEast[k], m.PermNorth[k] = v, v
		mean += v
	}
	r, err := flood.Run(m, flood.Settings{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	return r, mean / float64(len(m.PermEast))
}

// writeHistory writes the producers' surface volumes of r per period up
// to synthHistoryEnd (the pattern of flood's history tests: a history
// made from a run's own volumes).
func writeHistory(t *testing.T, r *flood.Result, path string) {
	var b strings.Builder
	b.WriteString("well,day,oil,water,injected,bhp\n")
	at := func(day float64) int {
		for k, tt := range r.Times {
			if math.Abs(tt-day) < 1e-9 {
				return k
			}
		}
		t.Fatalf("no report on day %g", day)
		return -1
	}
	for _, p := range r.Producers {
		po, pw := 0.0, 0.0
		for e := synthPeriod; e <= synthHistoryEnd+1e-9; e += synthPeriod {
			i := at(e)
			fmt.Fprintf(&b, "%s,%g,%.10g,%.10g,,\n", p.Name, e, math.Max(0, p.CumOil[i]-po), math.Max(0, p.CumWater[i]-pw))
			po, pw = p.CumOil[i], p.CumWater[i]
		}
	}
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
}

// forecastRMS is the root mean square difference of the producers' water
// cuts of a and b over the report times after the history.
func forecastRMS(a, b *flood.Result) float64 {
	sq, n := 0.0, 0
	for p := range a.Producers {
		for k, tt := range a.Times {
			if tt > synthHistoryEnd {
				d := a.Producers[p].WaterCut[k] - b.Producers[p].WaterCut[k]
				sq += d * d
				n++
			}
		}
	}
	return math.Sqrt(sq / float64(n))
}

// TestSyntheticTruth calibrates the homogeneous prior to the history of
// the channelled truth. Self-consistency checks of a history-matching
// method (common practice; the synthetic-truth design of Vasco, Yoon and
// Datta-Gupta 1999, section 5): the travel-time misfit falls by most of
// its initial value, the calibrated map is higher in the channel than
// outside, and the forecast beyond the history is closer to the truth's
// than the prior's is.
func TestSyntheticTruth(t *testing.T) {
	dir := t.TempDir()
	truth, mean := truthRun(t, dir)
	writeHistory(t, truth, filepath.Join(dir, "history.csv"))
	m := load(t, dir, synthCase(mean, "history: {file: history.csv, drive: controls}\ncalibration: {iterations: 8}\n"))
	res, err := Calibrate(m, Options{Workers: 1, Log: t.Logf})
	if err != nil {
		t.Fatal(err)
	}
	first, last := res.Iterations[0], res.Iterations[len(res.Iterations)-1]
	t.Logf("misfit %.4g -> %.4g days, water-cut RMS %.4g -> %.4g, %d forward runs", first.TravelTimeMisfit, last.TravelTimeMisfit, first.WaterCutRMS, last.WaterCutRMS, last.ForwardRuns)
	for k := 1; k < len(res.Iterations); k++ {
		if res.Iterations[k].TravelTimeMisfit > res.Iterations[k-1].TravelTimeMisfit {
			t.Errorf("iteration %d raised the misfit: %g from %g", k, res.Iterations[k].TravelTimeMisfit, res.Iterations[k-1].TravelTimeMisfit)
		}
	}
	if !(last.TravelTimeMisfit < 0.3*first.TravelTimeMisfit) {
		t.Errorf("travel-time misfit %g -> %g: want a fall by at least 70 %%", first.TravelTimeMisfit, last.TravelTimeMisfit)
	}
	// Mean log multiplier in and out of the channel, over the cells the
	// data constrain.
	var in, out float64
	var nin, nout int
	for k, v := range res.LogMultiplier {
		if !res.Constrained[k] {
			continue
		}
		i, j := m.Grid.IJ(k)
		if inChannel(i, j) {
			in += v
			nin++
		} else {
			out += v
			nout++
		}
	}
	in /= float64(nin)
	out /= float64(nout)
	t.Logf("mean ln multiplier: channel %.3f, elsewhere %.3f", in, out)
	if !(in > out+0.1) {
		t.Errorf("channel mean ln multiplier %g not above the rest's %g", in, out)
	}
	prior, calib := forecastRMS(res.PriorRun, truth), forecastRMS(res.FinalRun, truth)
	t.Logf("forecast water-cut RMS against the truth: prior %.4g, calibrated %.4g", prior, calib)
	if !(calib < prior) {
		t.Errorf("calibrated forecast RMS %g not below the prior's %g", calib, prior)
	}
	checkOutputs(t, res, filepath.Join(dir, "out"))
}

// checkOutputs writes the calibration folder and reads it back: the
// calibrated case loads from the folder with the calibrated map (to the
// raster's digits) and its run reproduces the final forward run's water
// cuts; calibration.csv has a row per iteration and calibration.json a
// producer per matched well.
func checkOutputs(t *testing.T, res *Result, out string) {
	t.Helper()
	d, err := outdir.Open(out, false)
	if err != nil {
		t.Fatal(err)
	}
	if err := res.Write(d, out); err != nil {
		t.Fatal(err)
	}
	if err := d.Close(); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(out, runfolder.CalibratedPermYFile)); !os.IsNotExist(err) {
		t.Errorf("%s written for a case without perm_y (%v)", runfolder.CalibratedPermYFile, err)
	}
	m, err := reservoir.Load(filepath.Join(out, runfolder.CalibratedCaseFile))
	if err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for k, v := range m.PermEast {
		worst = math.Max(worst, math.Abs(v-res.Calibrated.PermEast[k])/res.Calibrated.PermEast[k])
		if m.PermNorth[k] != v {
			t.Fatalf("cell %d: perm_y %g differs from perm %g", k, m.PermNorth[k], v)
		}
	}
	// The raster keeps runfolder.RasterDigits significant digits.
	if worst > 1e-5 {
		t.Errorf("calibrated map read back differs by %.3g relative", worst)
	}
	if m.History == nil || len(m.History.Rows) != len(res.Calibrated.History.Rows) {
		t.Fatal("the calibrated case lost its history")
	}
	csv, err := os.ReadFile(filepath.Join(out, runfolder.CalibrationFile))
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(csv)), "\n")
	if lines[0] != strings.Join(runfolder.CalibrationColumns, ",") || len(lines) != len(res.Iterations)+1 {
		t.Errorf("calibration.csv: header %q and %d lines for %d iterations", lines[0], len(lines), len(res.Iterations))
	}
	js, err := os.ReadFile(filepath.Join(out, runfolder.CalibrationJSONFile))
	if err != nil {
		t.Fatal(err)
	}
	var s Summary
	if err := json.Unmarshal(js, &s); err != nil {
		t.Fatal(err)
	}
	if len(s.Producers) != len(res.Producers) || s.Constrained.Cells == 0 || !(float64(s.Misfit.After) < float64(s.Misfit.Before)) {
		t.Errorf("calibration.json: %d producers, %d constrained cells, misfit %v -> %v", len(s.Producers), s.Constrained.Cells, s.Misfit.Before, s.Misfit.After)
	}
}

// TestUnconstrainedCellsKeepTheMap: matching P-1 alone, the cells that no
// streamline reaching P-1 crosses keep the given permeability exactly,
// and some cells are such (issue 16: no change where no streamline
// carries information).
func TestUnconstrainedCellsKeepTheMap(t *testing.T) {
	dir := t.TempDir()
	truth, mean := truthRun(t, dir)
	writeHistory(t, truth, filepath.Join(dir, "history.csv"))
	m := load(t, dir, synthCase(mean, "history: {file: history.csv, drive: controls}\ncalibration: {iterations: 2, wells: [P-1]}\n"))
	res, err := Calibrate(m, Options{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Producers) != 1 || res.Producers[0].Name != "P-1" {
		t.Fatalf("matched %v, want P-1 alone", res.Producers)
	}
	free, changed := 0, 0
	for k, v := range res.LogMultiplier {
		if v != 0 {
			changed++
		}
		if !res.Constrained[k] {
			free++
			if v != 0 || res.Calibrated.PermEast[k] != m.PermEast[k] {
				t.Fatalf("cell %d, crossed by no streamline to P-1, has multiplier %g", k, math.Exp(v))
			}
		}
	}
	t.Logf("%d cells changed, %d of %d not constrained", changed, free, len(res.LogMultiplier))
	if free == 0 || changed == 0 {
		t.Errorf("%d unconstrained and %d changed cells: the check says nothing", free, changed)
	}
}

// TestSyntheticTruthRateDrive: the same truth and prior with the history
// driving the wells by their observed rates (the default drive): the
// producers are then held at their rates and their rows come from
// RateShiftRow. The misfit falls by most of its value (measured 243 to
// 49 days) and the channel comes out higher than the rest.
func TestSyntheticTruthRateDrive(t *testing.T) {
	dir := t.TempDir()
	truth, mean := truthRun(t, dir)
	path := filepath.Join(dir, "history.csv")
	writeHistory(t, truth, path)
	// The injector's rows: its rate of the (only) solve over each period.
	q := math.NaN()
	for _, x := range truth.WellLog {
		if x.Well == "I-1" {
			q = x.Rate
		}
	}
	var b strings.Builder
	for e := synthPeriod; e <= synthHistoryEnd+1e-9; e += synthPeriod {
		fmt.Fprintf(&b, "I-1,%g,,,%.10g,\n", e, q*synthPeriod)
	}
	f, err := os.OpenFile(path, os.O_APPEND|os.O_WRONLY, 0)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := f.WriteString(b.String()); err != nil {
		t.Fatal(err)
	}
	f.Close()
	m := load(t, dir, synthCase(mean, "history: {file: history.csv}\ncalibration: {iterations: 5}\n"))
	res, err := Calibrate(m, Options{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	first, last := res.Iterations[0], res.Iterations[len(res.Iterations)-1]
	t.Logf("misfit %.4g -> %.4g days, water-cut RMS %.4g -> %.4g, %d forward runs", first.TravelTimeMisfit, last.TravelTimeMisfit, first.WaterCutRMS, last.WaterCutRMS, res.ForwardRuns)
	if !(last.TravelTimeMisfit < 0.4*first.TravelTimeMisfit) {
		t.Errorf("travel-time misfit %g -> %g: want a fall by at least 60 %%", first.TravelTimeMisfit, last.TravelTimeMisfit)
	}
	var in, out float64
	var nin, nout int
	for k, v := range res.LogMultiplier {
		if i, j := m.Grid.IJ(k); inChannel(i, j) {
			in += v
			nin++
		} else {
			out += v
			nout++
		}
	}
	in, out = in/float64(nin), out/float64(nout)
	t.Logf("mean ln multiplier: channel %.3f, elsewhere %.3f", in, out)
	if !(in > out+0.1) {
		t.Errorf("channel mean ln multiplier %g not above the rest's %g", in, out)
	}
}

package main

import (
	"bytes"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"floodtrace/flood"
	"floodtrace/render"
	"floodtrace/reservoir"
	"floodtrace/runfolder"
)

// TestCalibrateInputErrors: calibrate on a case without a history, or
// with a calibration block the loader refuses, exits 1 naming the file.
func TestCalibrateInputErrors(t *testing.T) {
	for _, c := range []struct{ name, path, want string }{
		{"no history", filepath.Join("..", "..", "testdata", "odd", "max_bhp_100", "case.yaml"), "calibrate needs a production history"},
		{"block without history", filepath.Join("..", "..", "testdata", "bad", "calibration_without_history", "case.yaml"), "calibration: needs a production history"},
		{"dry history", filepath.Join("..", "..", "testdata", "bad", "calibration_dry_history", "case.yaml"), "no producer ever shows water"},
	} {
		t.Run(c.name, func(t *testing.T) {
			code, _, errOut := run(t, "calibrate", c.path, "--out", t.TempDir(), "-q")
			if code != 1 || !strings.Contains(errOut, c.want) {
				t.Errorf("exit %d, stderr %q; want 1 and %q", code, errOut, c.want)
			}
		})
	}
	if code, _, _ := run(t, "calibrate", "x.yaml"); code != 2 {
		t.Errorf("calibrate without --out: exit %d, want 2", code)
	}
}

// calibrationCase writes a small case (invented) whose prior perm and
// perm_y are maps, and a history made from a run of a truth with a
// high-permeability row band (the pattern of the history tests: the
// volumes of a run fed back as observations). It returns the case path.
func calibrationCase(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	const nx, ny = 20, 12
	grid := func(v func(i, j int) float64) string {
		var b strings.Builder
		fmt.Fprintf(&b, "ncols %d\nnrows %d\nxllcorner 0\nyllcorner 0\ncellsize 50\nNODATA_value -9999\n", nx, ny)
		for j := ny - 1; j >= 0; j-- {
			for i := 0; i < nx; i++ {
				if i > 0 {
					b.WriteByte(' ')
				}
				fmt.Fprintf(&b, "%g", v(i, j))
			}
			b.WriteByte('\n')
		}
		return b.String()
	}
	channel := func(i, j int) float64 {
		if j >= 5 && j <= 7 {
			return 600
		}
		return 60
	}
	write := func(name, text string) {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	write("truth.asc", grid(channel))
	write("prior.asc", grid(func(int, int) float64 { return (3*600 + 9*60) / 12.0 }))
	text := func(perm, extra string) string {
		return `title: calibrate command test
units: field
grid: {nx: 20, ny: 12, dx: 50, dy: 50, origin: [0, 0]}
rock: {perm: ` + perm + `, perm_y: ` + perm + `, porosity: 0.2, thickness: 20}
fluids: {water_viscosity: 0.5, oil_viscosity: 1.5, initial_water_saturation: 0.2}
relperm:
  corey: {swc: 0.2, sor: 0.2, krw_max: 0.4, kro_max: 0.9, nw: 2, no: 2}
wells:
  - {name: I-1, type: injector, x: 75, y: 325, bhp: 3500}
  - {name: P-1, type: producer, x: 925, y: 325, bhp: 500}
  - {name: P-2, type: producer, x: 925, y: 575, bhp: 500}
run: {end: 2000, report_every: 20, streamlines: 300}
` + extra
	}
	write("truth.yaml", text("truth.asc", ""))
	truth, err := reservoir.Load(filepath.Join(dir, "truth.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	r, err := flood.Run(truth, flood.Settings{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	b.WriteString("well,day,oil,water,injected,bhp\n")
	for _, p := range r.Producers {
		po, pw := 0.0, 0.0
		for k, tt := range r.Times {
			if tt == 0 || tt > 1200 || int(tt)%60 != 0 {
				continue
			}
			fmt.Fprintf(&b, "%s,%g,%.10g,%.10g,,\n", p.Name, tt, math.Max(0, p.CumOil[k]-po), math.Max(0, p.CumWater[k]-pw))
			po, pw = p.CumOil[k], p.CumWater[k]
		}
	}
	write("history.csv", b.String())
	write("case.yaml", text("prior.asc", "history: {file: history.csv, drive: controls}\ncalibration: {iterations: 3, keep_near_wells: [I-1], radius: 60}\n"))
	return filepath.Join(dir, "case.yaml")
}

// TestCalibrateCommand: the folder holds both calibrated maps and a case
// that runs; the cells kept near I-1 keep the prior (without
// keep_near_wells five of them change); a second calibration gives the
// same maps and calibration.json with another number of workers
// (deterministic).
func TestCalibrateCommand(t *testing.T) {
	path := calibrationCase(t)
	outs := []string{filepath.Join(t.TempDir(), "a"), filepath.Join(t.TempDir(), "b")}
	for k, out := range outs {
		workers := []string{"1", "2"}[k]
		if code, _, errOut := run(t, "calibrate", path, "--out", out, "-q", "--size", "800x500", "--workers", workers); code != 0 {
			t.Fatalf("calibrate: exit %d: %s", code, errOut)
		}
	}
	for _, name := range []string{runfolder.CalibratedPermFile, runfolder.CalibratedPermYFile, runfolder.CalibrationJSONFile, runfolder.CalibratedCaseFile} {
		a, errA := os.ReadFile(filepath.Join(outs[0], name))
		b, errB := os.ReadFile(filepath.Join(outs[1], name))
		if errA != nil || errB != nil {
			t.Fatalf("%s: %v %v", name, errA, errB)
		}
		if !bytes.Equal(a, b) {
			t.Errorf("%s differs between two calibrations", name)
		}
	}
	for _, name := range []string{render.CalibrationPriorMap, render.CalibrationCalibratedMap, render.CalibrationChangeMap, render.CalibrationMisfitChart,
		render.CalibrationWaterCutChart(0, "P-1"), render.CalibrationWaterCutChart(1, "P-2")} {
		if st, err := os.Stat(filepath.Join(outs[0], name)); err != nil || st.Size() == 0 {
			t.Errorf("picture %s: %v", name, err)
		}
	}
	// report.html: one row per matched producer, the cells kept named.
	if b, err := os.ReadFile(filepath.Join(outs[0], runfolder.ReportFile)); err != nil {
		t.Error(err)
	} else {
		for _, want := range []string{"<td>P-1</td>", "<td>P-2</td>", "around I-1 are held at it", "Producer P-2: water cut observed"} {
			if !strings.Contains(string(b), want) {
				t.Errorf("report.html lacks %q", want)
			}
		}
	}
	prior, err := reservoir.Load(path)
	if err != nil {
		t.Fatal(err)
	}
	m, err := reservoir.Load(filepath.Join(outs[0], runfolder.CalibratedCaseFile))
	if err != nil {
		t.Fatal(err)
	}
	changed := 0
	for k := range m.PermEast {
		if m.PermEast[k] != prior.PermEast[k] {
			changed++
		}
	}
	if changed == 0 {
		t.Error("the calibrated map equals the prior")
	}
	w := prior.Wells[prior.WellIndex("I-1")]
	for k := range m.PermEast {
		x, y := m.Grid.Center(k)
		if math.Hypot(x-w.X, y-w.Y) <= 60 && (m.PermEast[k] != prior.PermEast[k] || m.PermNorth[k] != prior.PermNorth[k]) {
			t.Errorf("cell %d near I-1 changed: %g -> %g", k, prior.PermEast[k], m.PermEast[k])
		}
	}
	if code, _, errOut := run(t, "run", filepath.Join(outs[0], runfolder.CalibratedCaseFile), "--out", filepath.Join(t.TempDir(), "run"), "-q", "--pictures", "none"); code != 0 {
		t.Errorf("run of case_calibrated.yaml: exit %d: %s", code, errOut)
	}
}

package main

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"floodtrace/reservoir"
	"floodtrace/runfolder"
	"floodtrace/screen"
)

// ensembleSpec writes three invented realizations beside the case of
// calibrationCase (a homogeneous map at the prior's mean, a band of high
// permeability a row lower than the truth's, an east-west gradient) and a
// screening spec naming them; it returns the spec path.
func ensembleSpec(t *testing.T) string {
	t.Helper()
	dir := filepath.Dir(calibrationCase(t))
	const nx, ny = 20, 12
	maps := map[string]func(i, j int) float64{
		"real_1.asc": func(int, int) float64 { return 195 },
		"real_2.asc": func(i, j int) float64 {
			if j >= 4 && j <= 6 {
				return 500
			}
			return 90
		},
		"real_3.asc": func(i, j int) float64 { return 100 + 10*float64(i) },
	}
	if err := os.MkdirAll(filepath.Join(dir, "maps"), 0o755); err != nil {
		t.Fatal(err)
	}
	for name, v := range maps {
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
		if err := os.WriteFile(filepath.Join(dir, "maps", name), []byte(b.String()), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	spec := `base: case.yaml
candidates:
  infill: {type: producer, bhp: 500, spacing: [500, 300], min_distance: 200}
realizations: [maps/real_*.asc]
`
	path := filepath.Join(dir, "spec.yaml")
	if err := os.WriteFile(path, []byte(spec), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// TestCalibrateEnsemble: an unsharded ensemble calibration gives one
// subfolder per realization and a table with the misfit before and after;
// shards 1/2 and 2/2 follow screening's round-robin rule, cover every
// realization once between them, and merged give the same maps,
// calibration.json and table as the unsharded run (calibration.csv differs
// only in its seconds column, a clock time).
func TestCalibrateEnsemble(t *testing.T) {
	spec := ensembleSpec(t)
	// The outputs lie beside the case, so that case_calibrated.yaml holds
	// relative paths (absolute past two folders up).
	base := filepath.Dir(spec)
	whole := filepath.Join(base, "whole")
	common := []string{"--ensemble", "-q", "--pictures", "none", "--iterations", "2", "--workers", "1"}
	if code, _, errOut := run(t, append([]string{"calibrate", spec, "--out", whole}, common...)...); code != 0 {
		t.Fatalf("calibrate --ensemble: exit %d: %s", code, errOut)
	}
	table, err := os.ReadFile(filepath.Join(whole, runfolder.CalibrationEnsembleFile))
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(table)), "\n")
	if len(lines) != 4 || lines[0] != strings.Join(runfolder.CalibrationEnsembleColumns, ",") {
		t.Fatalf("calibration_ensemble.csv:\n%s", table)
	}
	t.Logf("calibration_ensemble.csv:\n%s", table)
	folders := []string{"real_1", "real_2", "real_3"}
	for i, f := range folders {
		if !strings.HasPrefix(lines[i+1], fmt.Sprintf("%d,%s.asc,%s,", i+1, f, f)) {
			t.Errorf("row %d: %q", i+1, lines[i+1])
		}
		if _, err := os.Stat(filepath.Join(whole, f, runfolder.CalibratedCaseFile)); err != nil {
			t.Error(err)
		}
	}
	// Every realization's travel-time misfit falls (measured: by 51 to 82% in two iterations).
	for _, l := range lines[1:] {
		var before, after float64
		var name, folder string
		var it, fw int
		if _, err := fmt.Sscanf(strings.ReplaceAll(l, ",", " "), "%d %s %s %d %d %g %g", &it, &name, &folder, &it, &fw, &before, &after); err != nil {
			t.Fatalf("row %q: %v", l, err)
		}
		if !(after < 0.8*before) {
			t.Errorf("%s: travel-time misfit %g -> %g, want a fall by a fifth at least", name, before, after)
		}
	}
	// The homogeneous realization is the case's own prior map: its
	// calibrated maps are those of calibrating the case itself.
	single := filepath.Join(base, "single")
	if code, _, errOut := run(t, "calibrate", filepath.Join(filepath.Dir(spec), "case.yaml"), "--out", single, "-q", "--pictures", "none", "--iterations", "2", "--workers", "1"); code != 0 {
		t.Fatalf("calibrate case: exit %d: %s", code, errOut)
	}
	for _, n := range []string{runfolder.CalibratedPermFile, runfolder.CalibratedPermYFile, runfolder.CalibrationJSONFile} {
		a, errA := os.ReadFile(filepath.Join(single, n))
		b, errB := os.ReadFile(filepath.Join(whole, "real_1", n))
		if errA != nil || errB != nil || !bytes.Equal(a, b) {
			t.Errorf("%s: real_1 differs from the calibration of the case itself (%v %v)", n, errA, errB)
		}
	}

	var parts []string
	cover := map[string]int{}
	for _, k := range []string{"1/2", "2/2"} {
		part := filepath.Join(base, "part"+k[:1])
		parts = append(parts, part)
		if code, _, errOut := run(t, append([]string{"calibrate", spec, "--out", part, "--shard", k}, common...)...); code != 0 {
			t.Fatalf("shard %s: exit %d: %s", k, code, errOut)
		}
		for _, f := range folders {
			if _, err := os.Stat(filepath.Join(part, f)); err == nil {
				cover[f]++
			}
		}
	}
	// Round robin over three realizations: 1/2 has the first and third.
	if want := screen.ShardIndices(1, 2, 3); len(want) != 2 || want[0] != 0 || want[1] != 2 {
		t.Errorf("ShardIndices(1, 2, 3) = %v, want [0 2]", want)
	}
	if _, err := os.Stat(filepath.Join(parts[0], "real_2")); err == nil {
		t.Error("shard 1/2 calibrated real_2, which is shard 2/2's")
	}
	for _, f := range folders {
		if cover[f] != 1 {
			t.Errorf("%s is in %d shard(s), want 1", f, cover[f])
		}
	}
	merged := filepath.Join(base, "merged")
	if code, _, errOut := run(t, "calibrate", "merge", parts[0], parts[1], "--out", merged, "-q"); code != 0 {
		t.Fatalf("merge: exit %d: %s", code, errOut)
	}
	same := []string{runfolder.CalibrationEnsembleFile, runfolder.CalibrationEnsembleJSONFile}
	for _, f := range folders {
		for _, n := range []string{runfolder.CalibratedPermFile, runfolder.CalibratedPermYFile, runfolder.CalibrationJSONFile, runfolder.CalibratedCaseFile} {
			same = append(same, f+"/"+n)
		}
	}
	for _, rel := range same {
		a, errA := os.ReadFile(filepath.Join(whole, rel))
		b, errB := os.ReadFile(filepath.Join(merged, rel))
		if errA != nil || errB != nil || !bytes.Equal(a, b) {
			t.Errorf("%s: merged shards differ from the unsharded run (%v %v)", rel, errA, errB)
		}
	}
	// Merged into a folder two levels deeper, each case_calibrated.yaml
	// still finds its maps and history (its paths are rewritten).
	deep := filepath.Join(base, "x", "y", "merged")
	if code, _, errOut := run(t, "calibrate", "merge", parts[0], parts[1], "--out", deep, "-q"); code != 0 {
		t.Fatalf("merge: exit %d: %s", code, errOut)
	}
	for _, f := range folders {
		m, err := reservoir.Load(filepath.Join(deep, f, runfolder.CalibratedCaseFile))
		if err != nil {
			t.Errorf("%s: %v", f, err)
		} else if m.History == nil {
			t.Errorf("%s: the merged case_calibrated.yaml lost its history", f)
		}
	}
	for _, f := range folders {
		a, _ := os.ReadFile(filepath.Join(whole, f, runfolder.CalibrationFile))
		b, _ := os.ReadFile(filepath.Join(merged, f, runfolder.CalibrationFile))
		if x, y := dropLastColumn(a), dropLastColumn(b); x == "" || x != y {
			t.Errorf("%s/calibration.csv differs beyond the seconds column:\n%s\n%s", f, a, b)
		}
	}
	// A second unsharded run into the same folder is allowed (the files
	// are floodtrace's own), the merge refuses a part given twice or a
	// missing realization.
	if code, _, errOut := run(t, append([]string{"calibrate", spec, "--out", whole}, common...)...); code != 0 {
		t.Errorf("second run into the same folder: exit %d: %s", code, errOut)
	}
	for _, c := range []struct {
		parts []string
		want  string
	}{
		{[]string{parts[0], parts[0]}, "merge each shard once"},
		{[]string{parts[1]}, "realization(s) 1, 3 missing"},
		{[]string{parts[0]}, "realization(s) 2 missing"},
		{[]string{whole, parts[1]}, "merge each shard once"},
		{[]string{single}, "not the folder of an ensemble calibration"},
	} {
		code, _, errOut := run(t, append(append([]string{"calibrate", "merge"}, c.parts...), "--out", filepath.Join(t.TempDir(), "m"), "-q")...)
		if code != 1 || !strings.Contains(errOut, c.want) {
			t.Errorf("merge %v: exit %d, %q; want 1 and %q", c.parts, code, errOut, c.want)
		}
	}
	noEnsemble := filepath.Join(filepath.Dir(spec), "spec_no_realizations.yaml")
	if err := os.WriteFile(noEnsemble, []byte("base: case.yaml\ncandidates:\n  infill: {type: producer, bhp: 500, spacing: [500, 300]}\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if code, _, errOut := run(t, "calibrate", noEnsemble, "--ensemble", "--out", t.TempDir(), "-q"); code != 1 || !strings.Contains(errOut, "needs a realizations") {
		t.Errorf("spec without realizations: exit %d, %q; want 1 and a message", code, errOut)
	}
	if code, _, _ := run(t, "calibrate", spec, "--out", t.TempDir(), "--shard", "1/2"); code != 2 {
		t.Errorf("--shard without --ensemble: exit %d, want 2", code)
	}
}

// dropLastColumn returns the CSV text without its last column.
func dropLastColumn(b []byte) string {
	var out []string
	for _, l := range strings.Split(strings.TrimSpace(string(b)), "\n") {
		if i := strings.LastIndexByte(l, ','); i >= 0 {
			l = l[:i]
		}
		out = append(out, l)
	}
	return strings.Join(out, "\n")
}

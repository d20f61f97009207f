package balance

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"floodtrace/reservoir"
)

func TestCaseRatesKeepTotal(t *testing.T) {
	r := &Result{Injectors: []Injector{{Name: "A", Adjustable: true, RateRecommended: 1588.944964}, {Name: "B", Adjustable: true, RateRecommended: 611.0550356}, {Name: "C", RateRecommended: 77}}}
	q := r.caseRates()
	if len(q) != 2 {
		t.Fatalf("rates %v: only adjustable injectors", q)
	}
	// The sum of the written rates is the recommended total (definition).
	if d := q["A"] + q["B"] - (1588.944964 + 611.0550356); math.Abs(d) > 5e-4 {
		t.Errorf("written rates %v sum to the recommended total %+g", q, d)
	}
	if q["B"] != 611.055 {
		t.Errorf("B written as %v, want 611.055 (three decimals)", q["B"])
	}
}

func TestBalancedCaseEditsOnlyRatesAndPaths(t *testing.T) {
	dir := t.TempDir()
	caseDir, outDir := filepath.Join(dir, "case"), filepath.Join(dir, "out")
	for _, d := range []string{filepath.Join(caseDir, "maps"), outDir} {
		if err := os.MkdirAll(d, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	row := strings.TrimSpace(strings.Repeat("120 ", 6))
	if err := os.WriteFile(filepath.Join(caseDir, "maps", "perm.txt"), []byte(strings.Repeat(row+"\n", 4)), 0o644); err != nil {
		t.Fatal(err)
	}
	src := `# a comment the copy keeps
title: edit test
units: field
grid: {nx: 6, ny: 4, dx: 100, dy: 100}
rock:
  perm: "maps/perm.txt"   # quoted path
  porosity: 0.2
  thickness: 20
fluids: {water_viscosity: 0.5, oil_viscosity: 2, initial_water_saturation: 0.2}
relperm:
  corey: {swc: 0.2, sor: 0.2, krw_max: 0.3, kro_max: 0.9, nw: 2, no: 2}
wells:
  - {name: I-1, type: injector, x: 50, y: 50, rate: 100, min_rate: 10}
  - name: I-2
    type: injector
    x: 50
    y: 350
    rate: 1.0e2   # scientific form
  - {name: P-1, type: producer, x: 550, y: 200, bhp: 800}
run: {end: 100}
`
	casePath := filepath.Join(caseDir, "case.yaml")
	if err := os.WriteFile(casePath, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := BalancedCase([]byte(src), casePath, outDir, map[string]float64{"I-1": 150.5, "I-2": 49.5})
	if err != nil {
		t.Fatal(err)
	}
	a, b := strings.Split(src, "\n"), strings.Split(string(out), "\n")
	if len(a) != len(b) {
		t.Fatalf("line count %d, was %d:\n%s", len(b), len(a), out)
	}
	want := map[int]string{
		5:  `  perm: "../case/maps/perm.txt"   # quoted path`,
		12: `  - {name: I-1, type: injector, x: 50, y: 50, rate: 150.5, min_rate: 10}`,
		17: `    rate: 49.5   # scientific form`,
	}
	for i := range a {
		w, ok := want[i]
		if !ok {
			w = a[i]
		}
		if b[i] != w {
			t.Errorf("line %d: %q, want %q", i+1, b[i], w)
		}
	}
	path := filepath.Join(outDir, "case_balanced.yaml")
	if err := os.WriteFile(path, out, 0o644); err != nil {
		t.Fatal(err)
	}
	m, err := reservoir.Load(path)
	if err != nil {
		t.Fatalf("the balanced case does not load: %v", err)
	}
	if m.Wells[0].Rate != 150.5 || m.Wells[1].Rate != 49.5 || m.Wells[0].MinRate != 10 || m.PermEast[0] != 120 {
		t.Errorf("loaded rates %g, %g, min_rate %g, perm %g", m.Wells[0].Rate, m.Wells[1].Rate, m.Wells[0].MinRate, m.PermEast[0])
	}
}

// TestCaseWithRock: the named rock keys get the new text, the other paths
// (the history file's included) are rewritten relative to the output
// folder, comments and layout stay.
func TestCaseWithRock(t *testing.T) {
	src := []byte("# a comment\nrock:\n  perm: maps/k.asc   # md\n  perm_y: \"maps/ky.asc\"\n  porosity: maps/phi.asc\nhistory: {file: hist/h.csv, drive: rates}\n")
	out, err := CaseWithRock(src, "/data/case/case.yaml", "/data/case/runs/cal", map[string]string{"perm": "perm_calibrated.asc", "perm_y": "perm_y_calibrated.asc"})
	if err != nil {
		t.Fatal(err)
	}
	want := "# a comment\nrock:\n  perm: perm_calibrated.asc   # md\n  perm_y: \"perm_y_calibrated.asc\"\n  porosity: ../../maps/phi.asc\nhistory: {file: ../../hist/h.csv, drive: rates}\n"
	if string(out) != want {
		t.Errorf("got\n%s\nwant\n%s", out, want)
	}
	if _, err := CaseWithRock([]byte("rock:\n  perm: {file: k.asc}\n"), "c.yaml", "out", map[string]string{"perm": "x.asc"}); err == nil {
		t.Error("a rock.perm that is not a single value was edited")
	}
}

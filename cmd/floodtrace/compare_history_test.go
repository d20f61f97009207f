package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"floodtrace/flood"
	"floodtrace/runfolder"
)

// TestCompareSharedHistory: two runs of one history (the same file
// contents, different porosity) get the observed breakthrough table and
// the observed dots on the chart; runs whose histories differ in one value do not.
func TestCompareSharedHistory(t *testing.T) {
	tmp := t.TempDir()
	hist := func(name string, extra float64) {
		var b strings.Builder
		b.WriteString("well,day,oil,water,injected,bhp\n")
		for k := 1; k <= 24; k++ {
			w := 0.0
			if k > 6 {
				w = float64(k-6) * 300
			}
			if k == 24 {
				w += extra
			}
			fmt.Fprintf(&b, "P-1,%d,%g,%g,,\nI-1,%d,,,%g,\n", 30*k, 6000-w, w, 30*k, 6000.0)
		}
		if err := os.WriteFile(filepath.Join(tmp, name), []byte(b.String()), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	hist("h1.csv", 0)
	hist("h2.csv", 1)
	runCase := func(dir, poro, file string) {
		text := `title: Compare history test
units: field
start_date: 2021-01-01
grid: {nx: 16, ny: 8, dx: 50, dy: 50, origin: [0, 0]}
rock: {perm: 150, porosity: ` + poro + `, thickness: 25}
fluids: {water_viscosity: 0.5, oil_viscosity: 3, initial_water_saturation: 0.2}
relperm:
  corey: {swc: 0.2, sor: 0.25, krw_max: 0.4, kro_max: 0.9, nw: 2, no: 2}
wells:
  - {name: I-1, type: injector, x: 75, y: 75, rate: 200, max_bhp: 9000}
  - {name: P-1, type: producer, x: 725, y: 325, rate: 200, min_bhp: 50}
history: {file: ` + file + `}
run: {end: 900, report_every: 30, streamlines: 100}
`
		p := filepath.Join(tmp, filepath.Base(dir)+".yaml")
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		if code, _, e := run(t, "run", p, "--out", dir, "--pictures", "none", "-q"); code != 0 {
			t.Fatalf("run %s: code %d: %s", dir, code, e)
		}
	}
	a, b, c := filepath.Join(tmp, "a"), filepath.Join(tmp, "b"), filepath.Join(tmp, "c")
	runCase(a, "0.2", "h1.csv")
	runCase(b, "0.25", "h1.csv")
	runCase(c, "0.2", "h2.csv")
	code, out, e := run(t, "compare", a, b, "--out", filepath.Join(tmp, "ab.png"), "--size", "800x500")
	if code != 0 {
		t.Fatalf("compare a b: code %d: %s", code, e)
	}
	// Observed breakthrough: the first period whose water cut exceeds
	// 0.02, the 7th month (300/6000), ending on day 210.
	if !strings.Contains(out, "both runs have the same history (48 rows") || !strings.Contains(out, "\nP-1                  210 ") {
		t.Errorf("compare of one history lacks the history table:\n%s", out)
	}
	if ch := comparisonChart(mustCompare(t, a, b), true); ch.StartDate != "2021-01-01" || ch.XLabel != "Date" {
		t.Errorf("chart of two runs from 2021-01-01: start date %q, x label %q", ch.StartDate, ch.XLabel)
	}
	code, out, e = run(t, "compare", a, c, "--out", filepath.Join(tmp, "ac.png"), "--size", "800x500")
	if code != 0 {
		t.Fatalf("compare a c: code %d: %s", code, e)
	}
	if strings.Contains(out, "same history") {
		t.Errorf("histories differing in one value compared as the same:\n%s", out)
	}
}

func mustCompare(t *testing.T, a, b string) *flood.Comparison {
	t.Helper()
	ra, err := runfolder.ReadRunCurves(a)
	if err != nil {
		t.Fatal(err)
	}
	rb, err := runfolder.ReadRunCurves(b)
	if err != nil {
		t.Fatal(err)
	}
	return flood.Compare(ra, rb)
}

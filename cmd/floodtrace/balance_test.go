package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"floodtrace/reservoir"
	"floodtrace/runfolder"
)

// thiefCase is a small case with a high-permeability streak from I-1 to
// P-1 along the south row (a perm map), the other injector sweeping the
// matrix.
func thiefCase(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	var b strings.Builder
	for j := 7; j >= 0; j-- { // map rows north first
		for i := range 16 {
			v := "100"
			if j == 1 && i > 0 && i < 15 {
				v = "2000"
			}
			if i > 0 {
				b.WriteByte(' ')
			}
			b.WriteString(v)
		}
		b.WriteByte('\n')
	}
	if err := os.WriteFile(filepath.Join(dir, "perm.txt"), []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	src := `# thief streak test case
title: thief
units: field
grid: {nx: 16, ny: 8, dx: 40, dy: 40}
rock: {perm: perm.txt, porosity: 0.2, thickness: 10}
fluids: {water_viscosity: 0.5, oil_viscosity: 1, initial_water_saturation: 0.2}
relperm:
  corey: {swc: 0.2, sor: 0.2, krw_max: 0.3, kro_max: 0.9, nw: 2, no: 2}
wells:
  - {name: I-1, type: injector, x: 60, y: 60, rate: 100, min_rate: 20, max_rate: 180}
  - {name: I-2, type: injector, x: 60, y: 260, rate: 100, min_rate: 20, max_rate: 180}
  - {name: P-1, type: producer, x: 580, y: 60, bhp: 1000}
  - {name: P-2, type: producer, x: 580, y: 260, bhp: 1000}
run: {end: 800, report_every: 50, streamlines: 400}
`
	p := filepath.Join(dir, "case.yaml")
	if err := os.WriteFile(p, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func TestBalanceCommand(t *testing.T) {
	cs := thiefCase(t)
	out := filepath.Join(t.TempDir(), "bal")
	code, _, e := run(t, "balance", cs, "--out", out, "-q")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, e)
	}
	for _, f := range []string{runfolder.BalanceFile, runfolder.BalanceJSONFile, runfolder.BalanceForecastFile, runfolder.BalancedCaseFile,
		"report.html", "charts/balance_efficiency.png", "charts/balance_oil_rate.png", "charts/balance_water_cut.png", "maps/balance_pairs_now.png", "maps/balance_pairs_recommended.png"} {
		if st, err := os.Stat(filepath.Join(out, f)); err != nil || st.Size() == 0 {
			t.Errorf("%s missing or empty (%v)", f, err)
		}
	}
	csv, _ := os.ReadFile(filepath.Join(out, runfolder.BalanceFile))
	if !strings.HasPrefix(string(csv), runfolder.Header(runfolder.BalanceColumns)) {
		t.Errorf("balance.csv header: %q", strings.SplitN(string(csv), "\n", 2)[0])
	}
	var js map[string]any
	b, _ := os.ReadFile(filepath.Join(out, runfolder.BalanceJSONFile))
	if err := json.Unmarshal(b, &js); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"objective", "horizon_days", "total_injection", "active_limits", "method", "flagged_producers"} {
		if _, ok := js[k]; !ok {
			t.Errorf("balance.json has no %q", k)
		}
	}
	// The balanced case runs as written, with the streak injector cut.
	m, err := reservoir.Load(filepath.Join(out, runfolder.BalancedCaseFile))
	if err != nil {
		t.Fatalf("case_balanced.yaml: %v", err)
	}
	if !(m.Wells[0].Rate < 100 && m.Wells[1].Rate > 100) {
		t.Errorf("balanced rates I-1 %g, I-2 %g: water should move away from the streak", m.Wells[0].Rate, m.Wells[1].Rate)
	}
	code, _, e = run(t, "run", filepath.Join(out, runfolder.BalancedCaseFile), "--out", filepath.Join(out, "run"), "-q", "--pictures", "none")
	if code != 0 {
		t.Errorf("running case_balanced.yaml: exit %d: %s", code, e)
	}
}

func TestBalanceRefusals(t *testing.T) {
	cs := thiefCase(t)
	for _, c := range []struct {
		args []string
		code int
		want string
	}{
		{[]string{"--objective", "value"}, exitInput, "value block"},
		{[]string{"--objective", "money"}, exitUsage, "--objective"},
		{[]string{"--total", "all"}, exitUsage, "--total"},
		{[]string{"--horizon", "-3"}, exitUsage, "--horizon"},
	} {
		args := append([]string{"balance", cs, "--out", filepath.Join(t.TempDir(), "o"), "-q"}, c.args...)
		code, _, e := run(t, args...)
		if code != c.code || !strings.Contains(e, c.want) {
			t.Errorf("%v: exit %d (want %d), stderr %q (want %q)", c.args, code, c.code, e, c.want)
		}
	}
}

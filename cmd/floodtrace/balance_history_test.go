package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"floodtrace/reservoir"
	"floodtrace/runfolder"
)

// thiefHistoryCase is thiefCase with a 200-day history (two periods) in
// which I-1 injected 150 and I-2 50 a day.
func thiefHistoryCase(t *testing.T) string {
	t.Helper()
	cs := thiefCase(t)
	var b strings.Builder
	b.WriteString("well,day,oil,water,injected,bhp\n")
	for _, d := range []int{100, 200} {
		fmt.Fprintf(&b, "I-1,%d,,,15000,\nI-2,%d,,,5000,\nP-1,%d,8000,2000,,\nP-2,%d,9000,1000,,\n", d, d, d, d)
	}
	if err := os.WriteFile(filepath.Join(filepath.Dir(cs), "history.csv"), []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	src, _ := os.ReadFile(cs)
	if err := os.WriteFile(cs, append(src, []byte("history: {file: history.csv}\n")...), 0o644); err != nil {
		t.Fatal(err)
	}
	return cs
}

func TestBalanceWithHistory(t *testing.T) {
	cs := thiefHistoryCase(t)
	out := filepath.Join(t.TempDir(), "bal")
	code, o, e := run(t, "balance", cs, "--out", out, "--pictures", "none")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, e)
	}
	if !strings.Contains(o, "oil from the end of the history (day 200) to day 800") {
		t.Errorf("printout does not name the forecast period:\n%s", o)
	}
	m, err := reservoir.Load(filepath.Join(out, runfolder.BalancedCaseFile))
	if err != nil {
		t.Fatal(err)
	}
	if m.History == nil || !(m.Wells[0].Rate < 100) {
		t.Errorf("case_balanced.yaml: history %v, I-1 rate %g (want the history kept and I-1 cut)", m.History != nil, m.Wells[0].Rate)
	}
	// A horizon at or before the end of the history is refused (exit 1).
	for _, h := range []string{"150", "200"} {
		code, _, e = run(t, "balance", cs, "--out", filepath.Join(t.TempDir(), "o"), "-q", "--horizon", h)
		if code != exitInput || !strings.Contains(e, "is not after the end of the history, day 200") || !strings.Contains(e, "case.yaml:") {
			t.Errorf("--horizon %s: exit %d, %q", h, code, e)
		}
	}
}

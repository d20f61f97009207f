package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"floodtrace/runfolder"
)

// TestBalanceValueObjective: a case with a value block balances for its
// discounted value; balance.json names the objective and the printout
// says what was measured.
func TestBalanceValueObjective(t *testing.T) {
	cs := thiefCase(t)
	src, _ := os.ReadFile(cs)
	if err := os.WriteFile(cs, append(src, []byte("value: {oil_price: 60, water_cost: 2, injection_cost: 0.5, discount_rate: 0.1}\n")...), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(t.TempDir(), "bal")
	code, o, e := run(t, "balance", cs, "--out", out, "--objective", "value", "--pictures", "none")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, e)
	}
	if !strings.Contains(o, "value at day 800, discounted to day 0") {
		t.Errorf("printout does not say the objective:\n%s", o)
	}
	var js struct {
		Objective struct {
			Name        string  `json:"name"`
			Now         float64 `json:"now"`
			Recommended float64 `json:"recommended"`
		} `json:"objective"`
	}
	b, _ := os.ReadFile(filepath.Join(out, runfolder.BalanceJSONFile))
	if err := json.Unmarshal(b, &js); err != nil {
		t.Fatal(err)
	}
	if js.Objective.Name != "value" || !(js.Objective.Recommended >= js.Objective.Now) {
		t.Errorf("balance.json objective %+v", js.Objective)
	}
	// The balanced case keeps the value block and loads.
	code, _, e = run(t, "check", filepath.Join(out, runfolder.BalancedCaseFile))
	if code != 0 {
		t.Errorf("check case_balanced.yaml: exit %d: %s", code, e)
	}
}

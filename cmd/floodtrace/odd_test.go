package main

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"floodtrace/flood"
)

// TestOddCases runs every case of testdata/odd, inputs that are not
// errors but used to give physically impossible results (an injector whose
// max_bhp is below the producer's BHP produced, pore volumes injected came
// out negative; a rate producer without min_bhp drew its cell below zero).
// In every engine each must run (exit 0), warn with the text of its
// expect.txt, and report no negative pore volumes injected, cumulative
// injection or bottom-hole pressure (a well never flows against its type:
// common practice for wells with check valves).
func TestOddCases(t *testing.T) {
	dirs, err := filepath.Glob("../../testdata/odd/*")
	if err != nil || len(dirs) < 3 {
		t.Fatalf("odd cases %v, %v", dirs, err)
	}
	engines := [][]string{{}, {"--updates", "3"}, {"--engine", "grid"}}
	for _, d := range dirs {
		want, err := os.ReadFile(filepath.Join(d, "expect.txt"))
		if err != nil {
			t.Fatal(err)
		}
		for ei, eng := range engines {
			t.Run(filepath.Base(d)+"/"+strings.Join(eng, "="), func(t *testing.T) {
				out := t.TempDir()
				args := append([]string{"run", filepath.Join(d, "case.yaml"), "--out", out, "--size", "320x180"}, eng...)
				if ei > 0 {
					args = append(args, "--no-pictures")
				}
				code, _, e := run(t, args...)
				if code != 0 {
					t.Fatalf("exit %d: %s", code, e)
				}
				if w := strings.TrimSpace(string(want)); !strings.Contains(e, w) {
					t.Errorf("stderr lacks %q:\n%s", w, e)
				}
				var s struct {
					Field struct {
						FinalPVI float64 `json:"final_pvi"`
					} `json:"field"`
					Injectors []struct {
						Name     string  `json:"name"`
						CumWater float64 `json:"cum_water"`
					} `json:"injectors"`
					Warnings []string `json:"warnings"`
				}
				b, err := os.ReadFile(filepath.Join(out, "summary.json"))
				if err != nil {
					t.Fatal(err)
				}
				if err := json.Unmarshal(b, &s); err != nil {
					t.Fatal(err)
				}
				if s.Field.FinalPVI < 0 {
					t.Errorf("final PVI %g", s.Field.FinalPVI)
				}
				for _, in := range s.Injectors {
					if in.CumWater < 0 {
						t.Errorf("injector %s: cumulative injection %g", in.Name, in.CumWater)
					}
				}
				if w := strings.TrimSpace(string(want)); !strings.Contains(strings.Join(s.Warnings, "\n"), w) {
					t.Errorf("summary warnings lack %q: %q", w, s.Warnings)
				}
				nonNegative(t, filepath.Join(out, "field.csv"), "pvi")
				nonNegative(t, filepath.Join(out, "wells.csv"), "bhp")
			})
		}
	}
}

// nonNegative checks that every value of column col of a CSV file is >= 0.
func nonNegative(t *testing.T, path, col string) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil || len(rows) < 2 {
		t.Fatalf("%s: %d rows, %v", path, len(rows), err)
	}
	c := -1
	for i, h := range rows[0] {
		if h == col {
			c = i
		}
	}
	if c < 0 {
		t.Fatalf("%s: no column %q in %v", path, col, rows[0])
	}
	for _, r := range rows[1:] {
		if v, err := strconv.ParseFloat(r[c], 64); err != nil || v < 0 {
			t.Errorf("%s: %s = %q", path, col, r[c])
		}
	}
}

// TestUnphysicalIsInternal: a run that fails its physical check
// (flood.UnphysicalError) exits with the internal-error code 3, not 1.
func TestUnphysicalIsInternal(t *testing.T) {
	register(&command{Name: "zz-unphysical", Usage: "zz-unphysical", Short: "test", Long: "Example: none", Run: func([]string) error {
		return fmt.Errorf("run: %w", &flood.UnphysicalError{Engine: "grid", Msg: "injector I: cumulative injection -1"})
	}})
	defer delete(commands, "zz-unphysical")
	code, _, e := run(t, "zz-unphysical")
	if code != exitInternal || !strings.Contains(e, "internal error") || !strings.Contains(e, "cumulative injection -1") {
		t.Errorf("code %d, stderr:\n%s", code, e)
	}
}

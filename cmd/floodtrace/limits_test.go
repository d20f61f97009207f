package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"floodtrace/runfolder"
)

// limitCaseYAML is a small invented case whose producer P-1, near the
// injector, reaches its water-cut limit long before P-2; with
// field_max_water_cut the run ends early too.
const limitCaseYAML = `title: Harrow Bank limit check (invented)
units: field
grid: {nx: 16, ny: 16, dx: 25, dy: 25, origin: [0, 0]}
rock: {perm: 120, porosity: 0.2, thickness: 10}
fluids: {water_viscosity: 0.5, oil_viscosity: 2, initial_water_saturation: 0.2}
relperm:
  corey: {swc: 0.2, sor: 0.2, krw_max: 0.4, kro_max: 0.9, nw: 2, no: 2}
wells:
  - {name: I-1, type: injector, x: 110, y: 110, rate: 60}
  - {name: P-1, type: producer, x: 10, y: 10, bhp: 1000, max_water_cut: 0.8}
  - {name: P-2, type: producer, x: 390, y: 390, bhp: 1000}
run: {end: 900, report_every: 10, streamlines: 200%s}
`

// TestLimitOutputs: a producer shut at its limit shows in the terminal
// table, in wells.csv (control shut_limit) and in summary.json (limit,
// limit_days); a field limit ends the run, and the terminal and
// summary.json say so.
func TestLimitOutputs(t *testing.T) {
	for _, c := range []struct {
		name, extra string
		field       bool
	}{{"well limit", "", false}, {"field limit", ", field_max_water_cut: 0.7", true}} {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			path := filepath.Join(dir, "case.yaml")
			if err := os.WriteFile(path, []byte(strings.Replace(limitCaseYAML, "%s", c.extra, 1)), 0o644); err != nil {
				t.Fatal(err)
			}
			out := filepath.Join(dir, "out")
			code, stdout, stderr := run(t, "run", path, "--out", out, "--no-pictures")
			if code != 0 {
				t.Fatalf("exit %d: %s", code, stderr)
			}
			sum, err := runfolder.ReadSummary(out)
			if err != nil {
				t.Fatal(err)
			}
			p1 := sum.Producers[0]
			if p1.Name != "P-1" || p1.Limit != "max_water_cut" || p1.LimitDays == nil {
				t.Fatalf("summary.json P-1: limit %q, day %v", p1.Limit, p1.LimitDays)
			}
			if sum.Producers[1].Limit != "" || sum.Producers[1].LimitDays != nil {
				t.Fatalf("summary.json P-2 has a limit: %+v", sum.Producers[1])
			}
			if !strings.Contains(stdout, "shut at limit") || !strings.Contains(stdout, "(max_water_cut)") {
				t.Errorf("terminal table has no shut-at-limit column:\n%s", stdout)
			}
			wells, err := os.ReadFile(filepath.Join(out, runfolder.WellsFile))
			if err != nil {
				t.Fatal(err)
			}
			if !strings.Contains(string(wells), ",P-1,producer,shut_limit,0,") {
				t.Errorf("wells.csv has no shut_limit row for P-1:\n%s", wells)
			}
			switch {
			case c.field && (sum.FieldLimitDays == nil || float64(sum.EndDays) != *sum.FieldLimitDays || !(*sum.FieldLimitDays < 900)):
				t.Errorf("field limit: field_limit_days %v, end_days %v; want an early end", sum.FieldLimitDays, sum.EndDays)
			case c.field && !strings.Contains(stdout, "the run ended on day"):
				t.Errorf("terminal does not say the run ended early:\n%s", stdout)
			case !c.field && sum.FieldLimitDays != nil:
				t.Errorf("field_limit_days %v without a field limit", *sum.FieldLimitDays)
			}
			t.Logf("P-1 shut on day %g; run end day %g", *p1.LimitDays, float64(sum.EndDays))
		})
	}
}

// TestUnreachedLimitsChangeNothing: the demo with economic limits it never
// reaches (its producers end below a water cut of 0.96) writes the same
// files, byte for byte, as the demo without them: the limit keys cost
// nothing until a limit is reached. summary.json is compared without its
// case_file line (the two cases live in two folders).
func TestUnreachedLimitsChangeNothing(t *testing.T) {
	src := "../../examples/vardel"
	ents, err := os.ReadDir(src)
	if err != nil {
		t.Fatal(err)
	}
	outs := map[string]string{}
	for name, extra := range map[string]string{"plain": "", "limits": ", max_water_cut: 0.999, min_oil_rate: 1, field_max_water_cut: 0.999"} {
		dir := filepath.Join(t.TempDir(), name)
		if err := os.MkdirAll(dir, 0o755); err != nil {
			t.Fatal(err)
		}
		for _, e := range ents {
			if e.IsDir() {
				continue
			}
			b, err := os.ReadFile(filepath.Join(src, e.Name()))
			if err != nil {
				t.Fatal(err)
			}
			if e.Name() == "case.yaml" {
				s := string(b)
				i := strings.Index(s, "\nrun: {")
				j := i + strings.Index(s[i:], "}\n")
				if i < 0 || j < i {
					t.Fatal("the demo case has no one-line run block")
				}
				b = []byte(s[:j] + extra + s[j:])
			}
			if err := os.WriteFile(filepath.Join(dir, e.Name()), b, 0o644); err != nil {
				t.Fatal(err)
			}
		}
		out := filepath.Join(dir, "out")
		if code, _, stderr := run(t, "run", filepath.Join(dir, "case.yaml"), "--out", out, "--no-pictures", "-q"); code != 0 {
			t.Fatalf("%s: exit %d: %s", name, code, stderr)
		}
		outs[name] = out
	}
	files, err := os.ReadDir(outs["plain"])
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	for _, f := range files {
		if f.IsDir() {
			continue
		}
		a, errA := os.ReadFile(filepath.Join(outs["plain"], f.Name()))
		b, errB := os.ReadFile(filepath.Join(outs["limits"], f.Name()))
		if errA != nil || errB != nil {
			t.Fatalf("%s: %v %v", f.Name(), errA, errB)
		}
		if f.Name() == runfolder.SummaryFile {
			a, b = dropLine(a, `"case_file"`), dropLine(b, `"case_file"`)
		}
		if string(a) != string(b) {
			t.Errorf("%s differs with limits that are never reached", f.Name())
		}
		n++
	}
	if n < 10 {
		t.Fatalf("only %d files compared", n)
	}
}

func dropLine(b []byte, key string) []byte {
	var keep []string
	for _, l := range strings.Split(string(b), "\n") {
		if !strings.Contains(l, key) {
			keep = append(keep, l)
		}
	}
	return []byte(strings.Join(keep, "\n"))
}

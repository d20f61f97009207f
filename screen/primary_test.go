package screen

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"floodtrace/internal/outdir"
	"floodtrace/pressure"
	"floodtrace/reservoir"
)

// TestBaseWithoutInjectors: a field on primary production (producers
// only) is a valid screening base when the candidates supply the
// injectors; a candidate that leaves the field without an injector is
// skipped and counted with its reason.
func TestBaseWithoutInjectors(t *testing.T) {
	dir := t.TempDir()
	caseText := `title: Tarrow Bench primary (invented)
units: field
grid: {nx: 12, ny: 10, dx: 100, dy: 100}
rock: {perm: 150, porosity: 0.2, thickness: 20}
fluids: {water_viscosity: 0.5, oil_viscosity: 1.0, initial_water_saturation: 0.2}
relperm:
  corey: {swc: 0.2, sor: 0.2, krw_max: 0.4, kro_max: 0.9, nw: 2, no: 2}
wells:
  - {name: P-1, type: producer, x: 1050, y: 850, bhp: 500}
  - {name: P-2, type: producer, x: 150, y: 850, bhp: 500}
run: {end: 600, report_every: 50, streamlines: 100}
`
	if err := os.WriteFile(filepath.Join(dir, "case.yaml"), []byte(caseText), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name       string
		infill     string
		candidates int
		skipped    map[string]int
		wantErr    string
	}{
		{"first injectors", "{type: injector, rate: 300, spacing: [400, 400], min_distance: 150}", 6, nil, ""},
		{"producers only", "{type: producer, bhp: 500, spacing: [400, 400], min_distance: 150}", 0, map[string]int{"no injector": 6}, "every infill node, layout and pattern was skipped"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			spec := "base: case.yaml\nhorizon: 600\nstreamlines: 100\ncandidates:\n  infill: " + tc.infill + "\n"
			s, err := ParseSpec(filepath.Join(dir, "spec.yaml"), []byte(spec))
			if err != nil {
				t.Fatalf("a base case without injectors is refused: %v", err)
			}
			p, err := NewPlan(s)
			if tc.wantErr != "" {
				if err == nil || !strings.Contains(err.Error(), tc.wantErr) {
					t.Fatalf("error %v, want one containing %q", err, tc.wantErr)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if p.BaseSkipped != "no injector" || countKind(p, KindBase) != 0 {
				t.Errorf("base skipped %q with %d base candidate(s); want not run for no injector", p.BaseSkipped, countKind(p, KindBase))
			}
			if tc.name == "first injectors" {
				checkNoBaseRow(t, p)
			}
			if len(p.Candidates) != tc.candidates {
				t.Errorf("%d candidates, want %d", len(p.Candidates), tc.candidates)
			}
			got := map[string]int{}
			for _, sk := range p.Skipped {
				if sk.Reason != "too close" && sk.Reason != "inactive" {
					got[sk.Reason]++
				}
			}
			if len(got) != len(tc.skipped) {
				t.Errorf("skipped %v, want %v", got, tc.skipped)
			}
			// Every candidate runs: the new injector makes it a waterflood.
			res, err := p.RunCandidate(0, -1, pressure.Settings{})
			if err != nil {
				t.Fatal(err)
			}
			if len(res.Injectors) != 1 || !(res.Injectors[0].CumWater > 0) {
				t.Errorf("candidate %s: injectors %+v", p.Candidates[0].Name, res.Injectors)
			}
		})
	}
}

// TestOneYAMLRule: a value written the same way means the same in a case
// file and in a spec (one reader, internal/yamldoc): quoted numbers are
// numbers, a key with no value is refused as having none.
func TestOneYAMLRule(t *testing.T) {
	dir := t.TempDir()
	caseHead := `title: t
units: field
grid: {nx: 12, ny: 10, dx: 100, dy: 100}
rock: {perm: 150, porosity: 0.2, thickness: 20}
fluids: {water_viscosity: 0.5, oil_viscosity: 1.0}
relperm:
  corey: {swc: 0.2, sor: 0.2, krw_max: 0.4, kro_max: 0.9, nw: 2, no: 2}
run: {end: 600}
wells:
  - {name: P-1, type: producer, x: 1050, y: 850, bhp: 500}
`
	if err := os.WriteFile(filepath.Join(dir, "case.yaml"), []byte(caseHead), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name, rate string
		bad        string // "" = accepted
	}{
		{"plain", "300", ""},
		{"quoted", `"300"`, ""},
		{"no value", "", "rate"},
		{"word", "lots", "must be a number"},
		{"infinite", ".inf", "not a finite number"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			caseText := caseHead + "  - name: I-1\n    type: injector\n    x: 150\n    y: 150\n    rate: " + tc.rate + "\n"
			_, caseErr := reservoir.Parse(filepath.Join(dir, "c2.yaml"), []byte(caseText))
			spec := "base: case.yaml\ncandidates:\n  infill:\n    type: injector\n    spacing: [400, 400]\n    rate: " + tc.rate + "\n"
			_, specErr := ParseSpec(filepath.Join(dir, "spec.yaml"), []byte(spec))
			for what, err := range map[string]error{"case": caseErr, "spec": specErr} {
				switch {
				case tc.bad == "" && err != nil:
					t.Errorf("%s refuses rate %q: %v", what, tc.rate, err)
				case tc.bad != "" && (err == nil || !strings.Contains(err.Error(), tc.bad)):
					t.Errorf("%s: rate %q gives %v, want an error containing %q", what, tc.rate, err, tc.bad)
				}
			}
		})
	}
}

// TestWarningKinds: run warnings that differ only in numbers or well
// names count as one kind, with the candidates that raised them.
func TestWarningKinds(t *testing.T) {
	res := &Results{Records: []Record{
		{Candidate: "node-1-1", Runs: []RunOutcome{{Warnings: []string{"injector node-1-1 reached its max_bhp 4200", "a fault crosses cell (3, 4)"}}}},
		{Candidate: "node-2-1", Runs: []RunOutcome{{Warnings: []string{"injector node-2-1 reached its max_bhp 4200"}}, {Warnings: []string{"injector node-2-1 reached its max_bhp 4200"}}}},
		{Candidate: "pair", Runs: []RunOutcome{{}}},
	}}
	got := warningKinds(res)
	if len(got) != 2 {
		t.Fatalf("kinds %+v", got)
	}
	if w := got[0]; w.Runs != 3 || w.Message != "injector node-1-1 reached its max_bhp 4200" || strings.Join(w.Candidates, ",") != "node-1-1,node-2-1" {
		t.Errorf("first kind %+v", w)
	}
	if w := got[1]; w.Runs != 1 || strings.Join(w.Candidates, ",") != "node-1-1" {
		t.Errorf("second kind %+v", w)
	}
}

// checkNoBaseRow screens a plan whose base case is not run and checks that
// ranking.csv has no base row and blank increments, and that screen.json
// says why.
func checkNoBaseRow(t *testing.T, p *Plan) {
	t.Helper()
	dir := t.TempDir()
	res, err := Execute(context.Background(), p, dir, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	d, err := outdir.Open(dir, true)
	if err != nil {
		t.Fatal(err)
	}
	rk, err := WriteOutputs(d, p, res, OutputSettings{NoPictures: true})
	if err != nil {
		t.Fatal(err)
	}
	if err := d.Close(); err != nil {
		t.Fatal(err)
	}
	if rk.Base != nil || len(rk.Rows) != len(p.Candidates) {
		t.Errorf("base row %+v, %d rows for %d candidates", rk.Base, len(rk.Rows), len(p.Candidates))
	}
	csv, err := os.ReadFile(filepath.Join(dir, "ranking.csv"))
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(csv)), "\n")
	for _, l := range lines[1:] {
		f := strings.Split(l, ",")
		if f[11] == string(KindBase) || f[12] != "" || f[13] != "" || f[14] != "" {
			t.Errorf("ranking.csv row %q: want no base row and blank increments", l)
		}
	}
	sum, err := ReadSummary(dir)
	if err != nil {
		t.Fatal(err)
	}
	if sum.Base.Ranked || !strings.Contains(sum.Base.Reason, "no injector") {
		t.Errorf("screen.json base %+v, want the reason (no injector)", sum.Base)
	}
}

package screen

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"floodtrace/reservoir"
)

func readTestSpec(t *testing.T) []byte {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("testdata", "spec.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	return b
}

func TestLoadSpec(t *testing.T) {
	s, err := LoadSpec(filepath.Join("testdata", "spec.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	if s.Horizon != 1200 || s.Objective != Oil || s.Streamlines != 150 {
		t.Errorf("horizon %g objective %q streamlines %d", s.Horizon, s.Objective, s.Streamlines)
	}
	if s.Infill == nil || s.Infill.Type != reservoir.Injector || s.Infill.Control != reservoir.RateControl ||
		s.Infill.Rate != 300 || s.Infill.Spacing != [2]float64{300, 300} || s.Infill.MinDistance != 250 {
		t.Errorf("infill %+v", s.Infill)
	}
	if len(s.Layouts) != 1 || s.Layouts[0].Name != "pair-east" || len(s.Layouts[0].Wells) != 2 {
		t.Fatalf("layouts %+v", s.Layouts)
	}
	b := s.Layouts[0].Wells[1]
	if b.Name != "B" || b.Type != reservoir.Producer || b.Control != reservoir.BHPControl || b.BHP != 400 || b.I != 10 || b.J != 5 || b.Cell != 5*12+10 {
		t.Errorf("well B %+v", b)
	}
	if len(s.Patterns) != 1 || s.Patterns[0].Kind != FiveSpot || s.Patterns[0].Offset != [2]float64{100, 100} {
		t.Errorf("patterns %+v", s.Patterns)
	}
	if len(s.Realizations) != 2 || s.Realizations[0].Name != "perm_1.asc" || s.Realizations[1].Name != "perm_2.asc" {
		t.Fatalf("realizations %+v", s.Realizations)
	}
	// perm_1 cell (i=0, j=0) = 150*exp(0.8*sin(0)) = 150.
	if v := s.Realizations[0].Perm[0]; v != 150 {
		t.Errorf("perm_1 at (0,0) = %g, want 150", v)
	}
	if e := s.Economics; e.OilPrice != 60 || e.WellCost != 2e6 || e.DiscountRate != 0.08 {
		t.Errorf("economics %+v", e)
	}
	p, err := NewPlan(s)
	if err != nil {
		t.Fatal(err)
	}
	// 4 x 4 lattice at 150, 450, 750, 1050 (x) and 150, 450, 750 (y: the
	// grid is 1000 high); (150,150) holds I-1 and (1050,750) is 141 from
	// P-1, so both are skipped as too close.
	if n := countKind(p, KindInfill); n != 10 || len(p.Skipped) != 2 {
		t.Errorf("%d infill candidates and %d skipped, want 10 and 2", n, len(p.Skipped))
	}
	// The base case first, then 10 nodes and 2 layouts/patterns.
	if len(p.Candidates) != 13 {
		t.Errorf("%d candidates, want 13", len(p.Candidates))
	}
	if c := p.Candidates[0]; c.Kind != KindBase || c.Name != BaseName || c.NewWells != 0 || len(c.Wells) != len(s.Base.Wells) || p.BaseSkipped != "" {
		t.Errorf("candidate 0 %s %s with %d new and %d wells (base %d), skipped %q; want the base case", c.Kind, c.Name, c.NewWells, len(c.Wells), len(s.Base.Wells), p.BaseSkipped)
	}
}

func countKind(p *Plan, k Kind) int {
	n := 0
	for _, c := range p.Candidates {
		if c.Kind == k {
			n++
		}
	}
	return n
}

// TestSpecErrors checks that each bad spec is refused with the line of the
// problem and, for an unknown key, the nearest valid key.
func TestSpecErrors(t *testing.T) {
	good := string(readTestSpec(t))
	cases := []struct {
		name       string
		from, to   string // replace in the good spec
		line       int
		wantInText []string
	}{
		{"unknown top key", "horizon: 1200", "horizn: 1200", 2, []string{`unknown key "horizn"`, `did you mean "horizon"`}},
		{"unknown infill key", "spacing: [300, 300]", "spacng: [300, 300]", 6, []string{`"spacng"`, `did you mean "spacing"`}},
		// The infill block takes well keys too (min_bhp); an abbreviation
		// of its own key is suggested, not the nearest well key.
		{"abbreviated infill key", "min_distance: 250", "min_dist: 250", 6, []string{`"min_dist"`, `did you mean "min_distance"`}},
		{"unknown well key", "{name: A, type: injector", "{nmae: A, type: injector", 10, []string{`"nmae"`, `did you mean "name"`}},
		{"unknown pattern key", "injector_rate: 200", "injecter_rate: 200", 13, []string{`did you mean "injector_rate"`}},
		{"unknown value key", "oil_price: 60", "oilprice: 60", 15, []string{`did you mean "oil_price"`}},
		{"bad horizon", "horizon: 1200", "horizon: -5", 2, []string{"horizon", "(0, 100000]"}},
		{"horizon text", "horizon: 1200", "horizon: soon", 2, []string{"must be a number", `"soon"`}},
		{"bad objective", "objective: oil", "objective: oill", 3, []string{`did you mean "oil"`}},
		{"bad type", "type: injector, rate: 300", "type: injektor, rate: 300", 6, []string{`did you mean "injector"`}},
		{"rate and bhp", "rate: 300, spacing", "rate: 300, bhp: 900, spacing", 6, []string{"not both"}},
		{"bad spacing", "spacing: [300, 300]", "spacing: [300, -1]", 6, []string{"spacing[2]", "positive"}},
		{"fine spacing", "spacing: [300, 300]", "spacing: [30, 300]", 6, []string{"finer than the cells"}},
		{"bad pattern kind", "kind: five-spot", "kind: five-spt", 13, []string{`did you mean "five-spot"`}},
		{"well outside grid", "{name: B, type: producer, x: 1050", "{name: B, type: producer, x: 5050", 11, []string{"outside the grid"}},
		{"no glob match", "maps/perm_*.asc", "maps/none_*.asc", 14, []string{"no file matches"}},
		{"value without price", "value: {oil_price: 60, ", "value: {", 15, []string{"oil_price"}},
		{"negative price", "oil_price: 60", "oil_price: -60", 15, []string{"oil_price", "negative"}},
		{"bad discount", "discount_rate: 0.08", "discount_rate: 12", 15, []string{"discount_rate"}},
		{"streamlines fraction", "streamlines: 150", "streamlines: 150.5", 4, []string{"whole number"}},
		{"missing base", "base: case.yaml", "base: nothere.yaml", 1, []string{"base case not found"}},
		{"layout named base", "name: pair-east", "name: base", 8, []string{`"base" is kept for the base case`}},
		{"duplicate layout well", "{name: B, type: producer", "{name: A, type: producer", 11, []string{"used twice"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			text := strings.Replace(good, c.from, c.to, 1)
			if text == good {
				t.Fatalf("replacement %q not found", c.from)
			}
			if c.name == "value without price" {
				text = strings.Replace(text, "objective: oil", "objective: value", 1)
			}
			_, err := ParseSpec(filepath.Join("testdata", "spec.yaml"), []byte(text))
			if err == nil {
				t.Fatal("no error")
			}
			var se *SpecError
			if !errors.As(err, &se) {
				t.Fatalf("error %T %v is not a *SpecError", err, err)
			}
			if se.Line != c.line {
				t.Errorf("line %d, want %d: %v", se.Line, c.line, err)
			}
			if !strings.HasPrefix(err.Error(), filepath.Join("testdata", "spec.yaml")+":") {
				t.Errorf("error does not name the file and line: %v", err)
			}
			for _, w := range c.wantInText {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q lacks %q", err, w)
				}
			}
		})
	}
}

func TestSpecYAMLSyntaxLine(t *testing.T) {
	text := "base: case.yaml\ncandidates:\n  infill: {type: injector\n"
	_, err := ParseSpec("testdata/x.yaml", []byte(text))
	var se *SpecError
	if !errors.As(err, &se) || se.Line == 0 {
		t.Fatalf("want a SpecError with a line, got %v", err)
	}
	for _, bad := range []string{"", "   \n", "- a\n- b\n", "base: [1, 2]\ncandidates: {infill: 3}\n", "\x00\x01"} {
		if _, err := ParseSpec("testdata/x.yaml", []byte(bad)); err == nil {
			t.Errorf("spec %q accepted", bad)
		}
	}
}

func TestNearest(t *testing.T) {
	if got := nearest("min_distnce", infillKeys); got != "min_distance" {
		t.Errorf("nearest = %q", got)
	}
}

func TestNaturalOrder(t *testing.T) {
	names := []string{"perm_10.asc", "perm_2.asc", "perm_1.asc", "perm_02b.asc"}
	want := []string{"perm_1.asc", "perm_2.asc", "perm_02b.asc", "perm_10.asc"}
	got := append([]string(nil), names...)
	for i := range got {
		for j := i + 1; j < len(got); j++ {
			if naturalLess(got[j], got[i]) {
				got[i], got[j] = got[j], got[i]
			}
		}
	}
	if strings.Join(got, " ") != strings.Join(want, " ") {
		t.Errorf("natural order %v, want %v", got, want)
	}
}

func TestRealizationChecks(t *testing.T) {
	dir := t.TempDir()
	caseText, _ := os.ReadFile(filepath.Join("testdata", "case.yaml"))
	os.WriteFile(filepath.Join(dir, "case.yaml"), caseText, 0o644)
	hdr := "ncols 12\nnrows 10\nxllcorner 0\nyllcorner 0\ncellsize 100\nNODATA_value -9999\n"
	row := strings.Repeat("100 ", 12) + "\n"
	bad := hdr + strings.Repeat(row, 4) + "100 100 -9999" + strings.Repeat(" 100", 9) + "\n" + strings.Repeat(row, 5)
	os.WriteFile(filepath.Join(dir, "r_1.asc"), []byte(bad), 0o644)
	wrongGrid := strings.Replace(hdr, "ncols 12", "ncols 11", 1) + strings.Repeat(strings.Repeat("100 ", 11)+"\n", 10)
	os.WriteFile(filepath.Join(dir, "g_1.asc"), []byte(wrongGrid), 0o644)
	spec := "base: case.yaml\ncandidates:\n  infill: {type: injector, rate: 100, spacing: [300, 300]}\nrealizations: [%s]\n"
	_, err := ParseSpec(filepath.Join(dir, "s.yaml"), []byte(strings.Replace(spec, "%s", "r_*.asc", 1)))
	if err == nil || !strings.Contains(err.Error(), "NODATA") || !strings.Contains(err.Error(), "cell (i=2, j=5)") {
		t.Errorf("NODATA in an active cell: %v", err)
	}
	_, err = ParseSpec(filepath.Join(dir, "s.yaml"), []byte(strings.Replace(spec, "%s", "g_*.asc", 1)))
	if err == nil || !strings.Contains(err.Error(), "ncols 11") {
		t.Errorf("raster on another grid: %v", err)
	}
}

func TestModelForARun(t *testing.T) {
	s, err := LoadSpec(filepath.Join("testdata", "spec.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	p, err := NewPlan(s)
	if err != nil {
		t.Fatal(err)
	}
	m := p.Model(1, 1) // the first infill node (candidate 0 is the base case)
	if m.Run.End != 1200 || len(m.Run.Snapshots) != 1 || m.Run.Snapshots[0] != 1200 {
		t.Errorf("run %+v", m.Run)
	}
	// report_every 50 of a 1500-day run, scaled to a 1200-day horizon: 40.
	if math.Abs(m.Run.ReportEvery-40) > 1e-12 {
		t.Errorf("report_every %g, want 40", m.Run.ReportEvery)
	}
	if &m.PermEast[0] != &s.Realizations[1].Perm[0] || m.PermNorth[7] != s.Realizations[1].Perm[7] {
		t.Error("the realization does not replace the permeability")
	}
	if len(m.Wells) != 3 || len(s.Base.Wells) != 2 {
		t.Errorf("candidate has %d wells, base %d", len(m.Wells), len(s.Base.Wells))
	}
	if s.Base.Run.End != 1500 {
		t.Error("the base case was changed")
	}
}

// FuzzParseSpec checks that no spec text makes the parser panic.
func FuzzParseSpec(f *testing.F) {
	good, err := os.ReadFile(filepath.Join("testdata", "spec.yaml"))
	if err != nil {
		f.Fatal(err)
	}
	f.Add(good)
	f.Add([]byte("base: case.yaml\ncandidates: {patterns: [{kind: five-spot, spacing: 1e-300, injector_rate: 1, producer_bhp: 1}]}\n"))
	f.Add([]byte("base: case.yaml\ncandidates: {infill: {type: producer, bhp: 5, spacing: [100, 1e9]}}\nrealizations: '['\n"))
	f.Add([]byte("a: &x [*x]\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := ParseSpec(filepath.Join("testdata", "spec.yaml"), data)
		if err != nil {
			return
		}
		NewPlan(s) // must not panic either
	})
}

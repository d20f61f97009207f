package flood

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"floodtrace/internal/outdir"
	"floodtrace/reservoir"
	"floodtrace/runfolder"
)

// TestWarnAtOnce: a warning raised at several pressure solves, with other
// numbers each time, is given once with its count and first and last day;
// warnings of different wells (PRD-1, PRD-2) stay apart.
func TestWarnAtOnce(t *testing.T) {
	b := book{r: &Result{}, seen: map[string]bool{}, rep: map[string]*repeatedWarning{}, m: &reservoir.Model{}}
	b.warnAt(0, "well PRD-1: floor reached, rate now 154.4")
	b.warnAt(0, "well PRD-2: floor reached, rate now 90")
	b.warnAt(73, "well PRD-1: floor reached, rate now 150.1")
	b.warnAt(146, "well PRD-1: floor reached, rate now 149")
	b.warnAt(146, "no well flows from day 146")
	b.finish()
	want := []string{
		"well PRD-1: floor reached, rate now 154.4 (at 3 pressure solves, from day 0 to day 146; the first is shown)",
		"well PRD-2: floor reached, rate now 90",
		"no well flows from day 146",
	}
	if len(b.r.Warnings) != len(want) {
		t.Fatalf("warnings %q", b.r.Warnings)
	}
	for i, w := range want {
		if b.r.Warnings[i] != w {
			t.Errorf("warning %d: %q, want %q", i, b.r.Warnings[i], w)
		}
	}
}

// TestRepeatedWarningPrintedOnce: a rate producer held at its floor in
// every one of 5 pressure solves is reported once, with the count.
func TestRepeatedWarningPrintedOnce(t *testing.T) {
	m, err := reservoir.Load("../testdata/odd/rate_producer_no_floor/case.yaml")
	if err != nil {
		t.Fatal(err)
	}
	m.Run.PressureUpdates = 5
	r, err := Run(m, Settings{Frames: -1})
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	for _, w := range r.Warnings {
		if strings.Contains(w, "default BHP floor") {
			n++
			if !strings.Contains(w, "at 5 pressure solves") {
				t.Errorf("warning without its count: %q", w)
			}
		}
	}
	if n != 1 {
		t.Errorf("the floor warning is given %d times: %q", n, r.Warnings)
	}
}

// TestDiagnosticFiles: the F-Phi curve and the sweep curve, of different
// lengths, are written to two files with a header each and no blank cells.
func TestDiagnosticFiles(t *testing.T) {
	m := heteroCase(t, 16, 2, 0.4, 0.5, 0.9, 5)
	r, err := Run(m, Settings{Frames: -1})
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	d, err := outdir.Open(dir, false)
	if err != nil {
		t.Fatal(err)
	}
	if err := r.WriteData(d); err != nil {
		t.Fatal(err)
	}
	for _, f := range []struct {
		name, header string
		rows         int
	}{{runfolder.FPhiFile, "phi,F", len(r.Phi)}, {runfolder.SweepFile, "tD,sweep", len(r.TD)}} {
		b, err := os.ReadFile(filepath.Join(dir, f.name))
		if err != nil {
			t.Fatal(err)
		}
		lines := strings.Split(strings.TrimSpace(string(b)), "\n")
		if lines[0] != f.header || len(lines) != f.rows+1 || f.rows < 2 {
			t.Errorf("%s: header %q, %d rows; want %q and %d", f.name, lines[0], len(lines)-1, f.header, f.rows)
		}
		for i, l := range lines[1:] {
			if c := strings.Split(l, ","); len(c) != 2 || c[0] == "" || c[1] == "" {
				t.Errorf("%s row %d: %q", f.name, i+1, l)
				break
			}
		}
	}
}

// TestWellRates: each row of wells.csv splits the liquid rate into oil and
// water (they add up), and the end-of-run rows carry the last report's
// producer rates.
func TestWellRates(t *testing.T) {
	m := heteroCase(t, 16, 2, 0.4, 0.5, 0.9, 5)
	r, err := Run(m, Settings{Frames: -1})
	if err != nil {
		t.Fatal(err)
	}
	rows := r.WellRates()
	nEnd := 0
	for _, x := range rows {
		if math.Abs(x.Oil+x.Water-x.Rate) > 1e-9*math.Max(1, x.Rate) || x.Oil < 0 || x.Water < 0 {
			t.Errorf("%s at %g: oil %g + water %g != liquid %g", x.Well, x.Time, x.Oil, x.Water, x.Rate)
		}
		if !x.End {
			continue
		}
		nEnd++
		if x.Time != r.Times[len(r.Times)-1] {
			t.Errorf("%s: end row at %g", x.Well, x.Time)
		}
		for _, p := range r.Producers {
			if p.Name == x.Well && (x.Oil != p.OilRate[len(p.OilRate)-1] || x.Water != p.WaterRate[len(p.WaterRate)-1]) {
				t.Errorf("%s: end rates %g, %g; last report %g, %g", x.Well, x.Oil, x.Water, p.OilRate[len(p.OilRate)-1], p.WaterRate[len(p.WaterRate)-1])
			}
		}
	}
	if nEnd != len(m.Wells) {
		t.Errorf("%d end rows for %d wells", nEnd, len(m.Wells))
	}
}

// TestAllocationPerSolve: with pressure updates, the allocation has one
// block per traced solve, at the solve's day, each block's pair pore
// volumes no more than the field's.
func TestAllocationPerSolve(t *testing.T) {
	m := heteroCase(t, 16, 2, 0.4, 0.5, 0.9, 5)
	m.Run.PressureUpdates = 3
	r, err := Run(m, Settings{Frames: -1})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Allocation) != 3 || r.Allocation[0].Time != 0 {
		t.Fatalf("%d allocation blocks (first at %v), want 3 from day 0", len(r.Allocation), r.Allocation)
	}
	total := m.TotalPoreVolume()
	for k, b := range r.Allocation {
		if k > 0 && !(b.Time > r.Allocation[k-1].Time) {
			t.Errorf("block %d at day %g is not after the one before", k, b.Time)
		}
		sum := 0.0
		for _, v := range b.PoreVolumes {
			sum += v
		}
		if len(b.Pairs) == 0 || sum > total*(1+1e-9) {
			t.Errorf("block %d: %d pairs, pore volume %g of %g", k, len(b.Pairs), sum, total)
		}
	}
	if fixed, err := Run(heteroCase(t, 16, 2, 0.4, 0.5, 0.9, 5), Settings{Frames: -1}); err != nil || len(fixed.Allocation) != 1 {
		t.Errorf("fixed streamlines: %v, %d blocks, want 1", err, len(fixed.Allocation))
	}
}

package flood

import (
	"fmt"
	"math"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// TestPressureDatum: under drive: rates every well of the history case is
// rate-controlled, so its pressures are fixed only up to a constant (an
// incompressible pressure equation with rate conditions alone: Aziz and
// Settari 1979, from memory). history.pressure_datum sets that constant:
// the pore-volume-weighted average pressure of the first solve equals
// the datum, every well gets a model BHP in match.csv and a bhp_rms, the
// BHP differences between wells and the water cuts are those of the run
// without a datum (the constant moves no flow), a datum low enough
// to put the producer below its min_bhp reports limit periods, and one so
// low that the producer would need a negative BHP is refused.
func TestPressureDatum(t *testing.T) {
	dir := t.TempDir()
	base := historyCase(t, dir, "start_date: 2020-01-01\n")
	a, err := Run(base, Settings{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	historyFromRun(t, a, filepath.Join(dir, "history.csv"), 24, true)
	run := func(datum string) *Result {
		t.Helper()
		spec := "history: {file: history.csv}\n"
		if datum != "" {
			spec = "history: {file: history.csv, pressure_datum: " + datum + "}\n"
		}
		m := historyCase(t, dir, "start_date: 2020-01-01\n"+spec)
		for i := range m.History.Rows {
			m.History.Rows[i].BHP = 1000 // an invented observed BHP
		}
		r, err := Run(m, Settings{Workers: 1})
		if err != nil {
			t.Fatal(err)
		}
		return r
	}
	rel := run("")
	for _, mr := range rel.History.Match {
		if !math.IsNaN(mr.ModBHP) {
			t.Fatalf("without a datum, model BHP %g on day %g (pressures are relative)", mr.ModBHP, mr.End)
		}
	}
	bhpAt := func(r *Result) map[string]float64 {
		out := map[string]float64{}
		for _, x := range r.WellLog {
			out[fmt.Sprintf("%s@%g", x.Well, x.Time)] = x.BHP
		}
		return out
	}
	relBHP := bhpAt(rel)
	for _, c := range []struct {
		datum   float64
		limited bool // the producer below its min_bhp of 50 psi
	}{{3000, false}, {640, true}} {
		r := run(fmt.Sprint(c.datum))
		m := r.Model
		sum, pv := 0.0, 0.0
		for k, p := range r.Pressure.P {
			if m.Active[k] && !math.IsNaN(p) {
				sum += m.PoreVolume(k) * p
				pv += m.PoreVolume(k)
			}
		}
		if mean := sum / pv; math.Abs(mean-c.datum) > 1e-9*c.datum {
			t.Errorf("datum %g: average pressure of the first solve %g", c.datum, mean)
		}
		// One shift per solve, the same for both wells.
		got := bhpAt(r)
		for _, x := range r.WellLog {
			if x.Relative {
				t.Errorf("datum %g: %s day %g still relative", c.datum, x.Well, x.Time)
			}
			other := "P-1"
			if x.Well == "P-1" {
				other = "I-1"
			}
			k, o := fmt.Sprintf("%s@%g", x.Well, x.Time), fmt.Sprintf("%s@%g", other, x.Time)
			if d, d0 := got[k]-got[o], relBHP[k]-relBHP[o]; math.Abs(d-d0) > 1e-6*math.Max(1, math.Abs(d0)) {
				t.Errorf("datum %g day %g: BHP difference %s - %s %g, without datum %g", c.datum, x.Time, x.Well, other, d, d0)
			}
		}
		if !slices.Equal(r.Producers[0].WaterCut, rel.Producers[0].WaterCut) {
			t.Errorf("datum %g: the water cuts changed", c.datum)
		}
		sq, n := 0.0, 0
		for _, mr := range r.History.Match {
			if math.IsNaN(mr.ModBHP) {
				t.Fatalf("datum %g: %s day %g has no model BHP", c.datum, mr.Well, mr.End)
			}
			sq += (mr.ObsBHP - mr.ModBHP) * (mr.ObsBHP - mr.ModBHP)
			n++
		}
		if want := math.Sqrt(sq / float64(n)); math.Abs(r.History.Field.BHPRMS-want) > 1e-9*want {
			t.Errorf("datum %g: field bhp_rms %g, want %g", c.datum, r.History.Field.BHPRMS, want)
		}
		var prod HistoryWell
		for _, w := range r.History.Wells {
			if w.Name == "P-1" {
				prod = w
			}
		}
		if got := len(prod.LimitPeriods) > 0; got != c.limited {
			t.Errorf("datum %g: producer limit periods %v, want some: %v", c.datum, prod.LimitPeriods, c.limited)
		}
		warned := false
		for _, w := range r.Warnings {
			warned = warned || strings.Contains(w, "P-1 was at or past its BHP limit")
			if strings.Contains(w, "are relative") {
				t.Errorf("datum %g: warning %q", c.datum, w)
			}
		}
		if warned != c.limited {
			t.Errorf("datum %g: limit warning %v, want %v: %q", c.datum, warned, c.limited, r.Warnings)
		}
		t.Logf("datum %g: producer BHP on day 0 %.1f, bhp_rms %.1f, %d limit periods", c.datum, got["P-1@0"], r.History.Field.BHPRMS, len(prod.LimitPeriods))
	}
	// A datum of 40 psi would put the producer at -350 psi on day 0 (and
	// -564 psi on day 366, measured above as 640 - 604): the observed rates
	// cannot be made at that average pressure. The level is raised until
	// the lowest pressure is atmospheric (14.7 psi, common practice), with
	// a warning naming the well; the BHP differences and the water cuts
	// stay those of the run without a datum, and no pressure is negative.
	low := run("40")
	atm := low.Model.Units.Atmospheric()
	lowBHP := bhpAt(low)
	minBHP := math.Inf(1)
	for _, x := range low.WellLog {
		minBHP = math.Min(minBHP, x.BHP)
		other := "P-1"
		if x.Well == "P-1" {
			other = "I-1"
		}
		k, o := fmt.Sprintf("%s@%g", x.Well, x.Time), fmt.Sprintf("%s@%g", other, x.Time)
		if d, d0 := lowBHP[k]-lowBHP[o], relBHP[k]-relBHP[o]; math.Abs(d-d0) > 1e-6*math.Max(1, math.Abs(d0)) {
			t.Errorf("datum 40 day %g: BHP difference %s - %s %g, without datum %g", x.Time, x.Well, other, d, d0)
		}
	}
	if math.Abs(minBHP-atm) > 1e-6 {
		t.Errorf("datum 40: lowest BHP %g, want atmospheric %g", minBHP, atm)
	}
	for k, p := range low.Pressure.P {
		if low.Model.Active[k] && p < atm-1e-6 {
			t.Errorf("datum 40: cell %d pressure %g below atmospheric", k, p)
		}
	}
	raised := false
	for _, w := range low.Warnings {
		raised = raised || strings.Contains(w, "pressure_datum of 40 psi, well P-1 would be at -") && strings.Contains(w, "raised by")
	}
	if !raised {
		t.Errorf("datum 40: no warning that the level was raised for P-1: %q", low.Warnings)
	}
	if !slices.Equal(low.Producers[0].WaterCut, rel.Producers[0].WaterCut) {
		t.Error("datum 40: the water cuts changed")
	}
}

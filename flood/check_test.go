package flood

import (
	"errors"
	"math"
	"strings"
	"testing"

	"floodtrace/pressure"
	"floodtrace/reservoir"
)

// TestCheckSolve: a pressure solution in which a well flows against its
// type, or a BHP is negative where pressures are absolute, is an internal
// error naming the well; relative (gauged) pressures may be negative.
func TestCheckSolve(t *testing.T) {
	inj := pressure.WellResult{Name: "I", Type: reservoir.Injector, Q: 100, BHP: 3000}
	prd := pressure.WellResult{Name: "P", Type: reservoir.Producer, Q: -100, BHP: 500}
	cases := []struct {
		name string
		edit func(i, p *pressure.WellResult)
		want string // "" = no error
	}{
		{"good", func(i, p *pressure.WellResult) {}, ""},
		{"injector produces", func(i, p *pressure.WellResult) { i.Q = -1 }, "well I at day 7: the injector produces 1"},
		{"producer injects", func(i, p *pressure.WellResult) { p.Q = 2 }, "well P at day 7: the producer injects 2"},
		{"negative BHP", func(i, p *pressure.WellResult) { p.BHP = -3 }, "well P at day 7: negative bottom-hole pressure -3"},
		{"relative BHP", func(i, p *pressure.WellResult) { p.BHP, p.Relative = -3, true }, ""},
		{"shut for backflow", func(i, p *pressure.WellResult) { i.Q, i.Backflow = 0, true }, ""},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			i, p := inj, prd
			tc.edit(&i, &p)
			err := checkSolve(EngineGrid, &pressure.Solution{Wells: []pressure.WellResult{i, p}}, 7)
			var ue *UnphysicalError
			switch {
			case tc.want == "" && err != nil:
				t.Errorf("unexpected %v", err)
			case tc.want != "" && (!errors.As(err, &ue) || !strings.Contains(err.Error(), tc.want) || ue.Engine != "grid"):
				t.Errorf("error %v, want an UnphysicalError with %q", err, tc.want)
			}
		})
	}
}

// TestCheckResult: negative pore volumes injected, cumulative injection or
// cumulative production fail the run's final check.
func TestCheckResult(t *testing.T) {
	base := func() *Result {
		return &Result{Engine: EngineStreamline, PoreVolume: 1e6, Times: []float64{10, 20}, PVI: []float64{0.1, 0.2},
			Injectors: []Injector{{Name: "I", Rate: 100, CumWater: 2000}},
			Producers: []Producer{{Name: "P", Rate: 100, CumOil: []float64{500, 900}, CumWater: []float64{0, 100}}}}
	}
	cases := []struct {
		name string
		edit func(r *Result)
		want string
	}{
		{"good", func(r *Result) {}, ""},
		{"round-off", func(r *Result) { r.Producers[0].CumWater[0] = -1e-6 }, ""},
		{"negative PVI", func(r *Result) { r.PVI[1] = -2.039 }, "pore volumes injected -2.039 at day 20"},
		{"NaN PVI", func(r *Result) { r.PVI[0] = math.NaN() }, "pore volumes injected NaN"},
		{"injector produced", func(r *Result) { r.Injectors[0].CumWater = -397.9 }, "injector I: cumulative injection -397.9"},
		{"producer injects", func(r *Result) { r.Producers[0].Rate = -5 }, "producer P: rate -5"},
		{"negative oil", func(r *Result) { r.Producers[0].CumOil[1] = -10 }, "producer P at day 20: cumulative oil -10"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			r := base()
			tc.edit(r)
			err := checkResult(r)
			if (tc.want == "") != (err == nil) || (err != nil && !strings.Contains(err.Error(), tc.want)) {
				t.Errorf("error %v, want %q", err, tc.want)
			}
		})
	}
}

// TestRunLimitBelowProducer: end to end in every engine, an injector whose
// max_bhp (4000) is below the producer's bhp (5000) injects nothing: the
// run succeeds, no pore volume is injected (none negative), the injector
// is flagged at its limit and the warnings name it and the 5000 psi it
// would need (uniform pressure without flow, Darcy 1856).
func TestRunLimitBelowProducer(t *testing.T) {
	for _, s := range []Settings{{}, {Engine: EngineGrid}} {
		for _, updates := range []int{1, 3} {
			if s.Engine == EngineGrid && updates > 1 {
				continue
			}
			m := reservoir.NewUniform(21, 3, 100, 100, 100, 0.2, 20)
			m.Fluids = reservoir.Fluids{WaterViscosity: 0.5, OilViscosity: 2, InitialSw: 0.2}
			m.Run = reservoir.RunSettings{End: 365, ReportEvery: 30, Streamlines: 50, PressureUpdates: updates}
			if err := m.PlaceWell("INJ", reservoir.Injector, 50, 150, reservoir.RateControl, 500); err != nil {
				t.Fatal(err)
			}
			m.Wells[0].MaxBHP = 4000
			if err := m.PlaceWell("PRD", reservoir.Producer, 2050, 150, reservoir.BHPControl, 5000); err != nil {
				t.Fatal(err)
			}
			s.Frames = -1
			r, err := Run(m, s)
			if err != nil {
				t.Fatalf("%s, %d updates: %v", s.Engine, updates, err)
			}
			for k, v := range r.PVI {
				if v != 0 {
					t.Errorf("%s, %d updates: PVI[%d] = %g, want 0", s.Engine, updates, k, v)
				}
			}
			if in := r.Injectors[0]; in.CumWater != 0 || in.Rate != 0 || !in.MaxBHPReached {
				t.Errorf("%s, %d updates: injector %+v", s.Engine, updates, in)
			}
			if p := r.Producers[0]; p.CumOil[len(p.CumOil)-1] != 0 {
				t.Errorf("%s, %d updates: producer made %g oil", s.Engine, updates, p.CumOil[len(p.CumOil)-1])
			}
			if w := strings.Join(r.Warnings, "\n"); !strings.Contains(w, "well INJ: injects nothing: it would need more than 5000 psi") {
				t.Errorf("%s, %d updates: warnings %q", s.Engine, updates, r.Warnings)
			}
		}
	}
}

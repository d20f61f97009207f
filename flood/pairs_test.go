package flood

import (
	"math"
	"testing"

	"floodtrace/reservoir"
)

// diagonalPattern returns a square with injectors in the south-west and
// north-east corners and producers in the other two, equal rates: the
// pattern is symmetric about both diagonals, so each injector sends half
// its water to each producer and each producer takes half its inflow from
// each injector (symmetry of the pattern, common practice).
func diagonalPattern(t *testing.T, n int, engine Engine) (*reservoir.Model, Settings) {
	t.Helper()
	dx := 20.0
	m := reservoir.NewUniform(n, n, dx, dx, 100, 0.2, 10)
	m.Fluids = reservoir.Fluids{WaterViscosity: 0.5, OilViscosity: 2, InitialSw: 0.2}
	m.RelPerm = reservoir.Corey{Swc: 0.2, Sor: 0.2, KrwMax: 0.4, KroMax: 0.9, Nw: 2, No: 2}
	L := float64(n) * dx
	c := dx / 2
	for _, w := range []struct {
		name string
		typ  reservoir.WellType
		x, y float64
	}{{"I-1", reservoir.Injector, c, c}, {"I-2", reservoir.Injector, L - c, L - c}, {"P-1", reservoir.Producer, L - c, c}, {"P-2", reservoir.Producer, c, L - c}} {
		ctl, v := reservoir.RateControl, 100.0
		if w.typ == reservoir.Producer {
			ctl, v = reservoir.BHPControl, 1000
		}
		if err := m.PlaceWell(w.name, w.typ, w.x, w.y, ctl, v); err != nil {
			t.Fatal(err)
		}
	}
	m.Run = reservoir.RunSettings{End: 2000, ReportEvery: 100, Streamlines: 2000}
	return m, Settings{Frames: -1, Engine: engine}
}

func TestPairEfficiencySymmetricPattern(t *testing.T) {
	for _, eng := range []Engine{EngineStreamline, EngineGrid} {
		m, s := diagonalPattern(t, 21, eng)
		r, err := Run(m, s)
		if err != nil {
			t.Fatal(err)
		}
		e := r.Efficiencies(r.RunWindow())
		if len(e.Pairs) != 4 {
			t.Fatalf("%v: %d pairs, want 4: %+v", eng, len(e.Pairs), e.Pairs)
		}
		inj := map[string]float64{}
		oil := map[string]float64{}
		for _, p := range e.Pairs {
			// Symmetry (common practice): every pair carries half of an
			// injector's 100 units a day (measured error 1e-9: the seeding
			// is symmetric too).
			if math.Abs(p.WaterRate-50) > 1e-6 {
				t.Errorf("%v: pair %s-%s water rate %g, want 50 by symmetry", eng, p.Injector, p.Producer, p.WaterRate)
			}
			inj[p.Injector] += p.WaterRate
			oil[p.Producer] += p.AttributedOil
			if math.Abs(p.Efficiency-p.AttributedOil/p.WaterRate) > 1e-12 {
				t.Errorf("%v: efficiency %g is not attributed oil over water %g", eng, p.Efficiency, p.AttributedOil/p.WaterRate)
			}
		}
		for _, in := range e.Injectors {
			// Conservation (definition): the pairs of an injector carry its rate.
			if math.Abs(inj[in.Name]-in.Rate) > 1e-6*in.Rate || math.Abs(in.Rate-100) > 1e-6 {
				t.Errorf("%v: pairs of %s carry %g, injector rate %g (want 100)", eng, in.Name, inj[in.Name], in.Rate)
			}
		}
		for k, p := range r.Producers {
			// Definition of the attribution: a producer's pairs share its oil rate.
			if math.Abs(oil[p.Name]-e.ProducerOil[k]) > 1e-9*math.Max(1, e.ProducerOil[k]) {
				t.Errorf("%v: attributed oil of %s's pairs %g, its oil rate %g", eng, p.Name, oil[p.Name], e.ProducerOil[k])
			}
			if !(e.ProducerOil[k] > 0) {
				t.Errorf("%v: producer %s oil rate %g over the window", eng, p.Name, e.ProducerOil[k])
			}
		}
		// Symmetry: the two injectors are equally efficient.
		if d := math.Abs(e.Injectors[0].Efficiency - e.Injectors[1].Efficiency); d > 0.01*e.Injectors[0].Efficiency {
			t.Errorf("%v: injector efficiencies %g and %g differ on a symmetric pattern", eng, e.Injectors[0].Efficiency, e.Injectors[1].Efficiency)
		}
	}
}

func TestRunWindowIsLastReportInterval(t *testing.T) {
	r := &Result{Times: []float64{100, 200, 250}}
	if a, b := r.RunWindow(); a != 200 || b != 250 {
		t.Errorf("window %g..%g, want 200..250", a, b)
	}
	r = &Result{Times: []float64{250}}
	if a, b := r.RunWindow(); a != 0 || b != 250 {
		t.Errorf("window %g..%g, want 0..250", a, b)
	}
}

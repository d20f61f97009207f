package flood

import (
	"math"
	"slices"
	"testing"

	"floodtrace/reservoir"
)

// limitCase is a homogeneous 20 x 20 case with a rate injector near the
// south-west producer P-1, which waters out early, and the north-east
// producer P-2 far from it; report every 10 days over 600 days.
func limitCase(t *testing.T, updates int) *reservoir.Model {
	t.Helper()
	m := reservoir.NewUniform(20, 20, 20, 20, 100, 0.2, 10)
	m.RelPerm = reservoir.Corey{Swc: 0.2, Sor: 0.2, KrwMax: 0.4, KroMax: 0.9, Nw: 2, No: 2}
	m.Fluids = reservoir.Fluids{WaterViscosity: 0.5, OilViscosity: 2, InitialSw: 0.2}
	add := func(name string, typ reservoir.WellType, x, y float64, c reservoir.Control, v float64) {
		if err := m.PlaceWell(name, typ, x, y, c, v); err != nil {
			t.Fatal(err)
		}
	}
	add("I-1", reservoir.Injector, 130, 130, reservoir.RateControl, 100)
	add("P-1", reservoir.Producer, 10, 10, reservoir.BHPControl, 1000)
	add("P-2", reservoir.Producer, 390, 390, reservoir.BHPControl, 1000)
	m.Run = reservoir.RunSettings{End: 600, ReportEvery: 10, Streamlines: 300, PressureUpdates: updates, Snapshots: []float64{300, 600}}
	return m
}

// limitEngines are the engines the limit tests run: fixed streamlines,
// pressure updates and the grid.
var limitEngines = []struct {
	name    string
	engine  Engine
	updates int
}{
	{"fixed", EngineStreamline, 1},
	{"updates", EngineStreamline, 8},
	{"grid", EngineGrid, 1},
}

// sameLimitRun fails unless a and b have identical report series, well
// logs, snapshots and mass balance (exact equality: the two runs must make
// the same arithmetic).
func sameLimitRun(t *testing.T, a, b *Result) {
	t.Helper()
	if !slices.Equal(a.Times, b.Times) || !slices.Equal(a.PVI, b.PVI) {
		t.Fatalf("report times or PVI differ:\n%v\n%v", a.Times, b.Times)
	}
	for p := range a.Producers {
		pa, pb := a.Producers[p], b.Producers[p]
		for _, s := range []struct {
			name string
			x, y []float64
		}{{"water cut", pa.WaterCut, pb.WaterCut}, {"oil rate", pa.OilRate, pb.OilRate}, {"water rate", pa.WaterRate, pb.WaterRate},
			{"cum oil", pa.CumOil, pb.CumOil}, {"cum water", pa.CumWater, pb.CumWater}, {"avg sw", pa.AvgSw, pb.AvgSw}} {
			for k := range s.x {
				if s.x[k] != s.y[k] && !(math.IsNaN(s.x[k]) && math.IsNaN(s.y[k])) {
					t.Fatalf("producer %s %s at day %g: %v with the limit, %v with the schedule event", pa.Name, s.name, a.Times[k], s.x[k], s.y[k])
				}
			}
		}
	}
	if len(a.WellLog) != len(b.WellLog) {
		t.Fatalf("well log: %d rows with the limit, %d with the event", len(a.WellLog), len(b.WellLog))
	}
	for i := range a.WellLog {
		if a.WellLog[i] != b.WellLog[i] {
			t.Fatalf("well log row %d: %+v with the limit, %+v with the event", i, a.WellLog[i], b.WellLog[i])
		}
	}
	if len(a.Snapshots) != len(b.Snapshots) {
		t.Fatalf("%d snapshots with the limit, %d with the event", len(a.Snapshots), len(b.Snapshots))
	}
	for i := range a.Snapshots {
		if !slices.EqualFunc(a.Snapshots[i].Sw, b.Snapshots[i].Sw, func(x, y float64) bool { return x == y || math.IsNaN(x) && math.IsNaN(y) }) {
			t.Fatalf("saturation map at day %g differs", a.Snapshots[i].Time)
		}
	}
	if a.MassBalanceError != b.MassBalanceError {
		t.Fatalf("mass balance %g with the limit, %g with the event", a.MassBalanceError, b.MassBalanceError)
	}
}

// TestLimitEqualsScheduledShutIn: a producer shut in at its water-cut
// limit gives the same run as the case with that producer shut in by a
// schedule event on the same day, in every engine; the remaining producer
// then takes the whole injection (rates balance, common practice of
// incompressible models).
func TestLimitEqualsScheduledShutIn(t *testing.T) {
	const maxWC = 0.8
	for _, e := range limitEngines {
		t.Run(e.name, func(t *testing.T) {
			m := limitCase(t, e.updates)
			m.Wells[m.WellIndex("P-1")].MaxWaterCut = maxWC
			lim, err := Run(m, Settings{Engine: e.engine, Frames: -1})
			if err != nil {
				t.Fatal(err)
			}
			p1 := producer(t, lim, "P-1")
			if p1.Limit != LimitWaterCut || !(p1.LimitDay > 0 && p1.LimitDay < m.Run.End) {
				t.Fatalf("P-1 limit %q on day %g; want max_water_cut within the run", p1.Limit, p1.LimitDay)
			}
			T := p1.LimitDay
			k := slices.Index(lim.Times, T)
			if k < 1 || !(p1.WaterCut[k] >= maxWC) || !(p1.WaterCut[k-1] < maxWC) {
				t.Fatalf("day %g is not the first report at the limit: water cut %v", T, p1.WaterCut[max(k-1, 0):k+1])
			}
			if q := p1.OilRate[k+1] + p1.WaterRate[k+1]; q != 0 {
				t.Fatalf("P-1 rate %g after its shut-in on day %g", q, T)
			}
			if producer(t, lim, "P-2").Limit != "" {
				t.Fatal("P-2 has no limit but was shut")
			}
			ev := *m
			ev.Wells = slices.Clone(m.Wells)
			ev.Wells[m.WellIndex("P-1")].MaxWaterCut = 0
			ev.Schedule = []reservoir.Event{{Time: T, Well: "P-1", Shut: true, Rate: nan(), BHP: nan()}}
			sch, err := Run(&ev, Settings{Engine: e.engine, Frames: -1})
			if err != nil {
				t.Fatal(err)
			}
			sameLimitRun(t, lim, sch)
			p2 := producer(t, lim, "P-2")
			inj := lim.Injectors[0].Rate
			if q := p2.OilRate[len(lim.Times)-1] + p2.WaterRate[len(lim.Times)-1]; math.Abs(q-inj) > 1e-6*inj {
				t.Fatalf("P-2 rate %g after the shut-in; the injector's %g", q, inj)
			}
			t.Logf("%s: P-1 shut on day %g (water cut %.4f, before %.4f), %d solves", e.name, T, p1.WaterCut[k], p1.WaterCut[k-1], lim.Solves)
		})
	}
}

// TestFieldLimitEndsRun: run.field_max_water_cut ends the run at the first
// report time at which the field water cut reaches it, and the run up to
// then is that of the case without the limit (the later run cannot change
// the past).
func TestFieldLimitEndsRun(t *testing.T) {
	const fieldWC = 0.6
	for _, e := range limitEngines {
		t.Run(e.name, func(t *testing.T) {
			m := limitCase(t, e.updates)
			full, err := Run(m, Settings{Engine: e.engine, Frames: -1})
			if err != nil {
				t.Fatal(err)
			}
			want := slices.IndexFunc(full.FieldWaterCut, func(wc float64) bool { return wc >= fieldWC })
			if want < 0 || want == len(full.Times)-1 {
				t.Fatalf("the field water cut does not reach %g before the end: %v", fieldWC, full.FieldWaterCut)
			}
			lm := *m
			lm.Run.FieldMaxWaterCut = fieldWC
			r, err := Run(&lm, Settings{Engine: e.engine, Frames: -1})
			if err != nil {
				t.Fatal(err)
			}
			end := full.Times[want]
			if r.FieldLimitDay != end || r.Times[len(r.Times)-1] != end || len(r.Times) != want+1 {
				t.Fatalf("run ends on day %g (field limit day %g); want %g", r.Times[len(r.Times)-1], r.FieldLimitDay, end)
			}
			if !slices.Equal(r.FieldWaterCut, full.FieldWaterCut[:want+1]) || !slices.Equal(r.FieldCumOil, full.FieldCumOil[:want+1]) {
				t.Fatal("the run before the field limit differs from the run without it")
			}
			last := r.Snapshots[len(r.Snapshots)-1]
			if last.Time != end {
				t.Fatalf("last saturation map at day %g; want %g", last.Time, end)
			}
			for _, P := range r.Producers {
				if P.Breakthrough > end {
					t.Fatalf("producer %s: water breakthrough on day %g, after the run's end on day %g", P.Name, P.Breakthrough, end)
				}
			}
			if math.Abs(r.MassBalanceError) > 1e-6 {
				t.Fatalf("mass balance %g at the early end", r.MassBalanceError)
			}
			t.Logf("%s: field water cut %.4f on day %g (before %.4f)", e.name, r.FieldWaterCut[want], end, r.FieldWaterCut[want-1])
		})
	}
}

// TestLimitCrossed: the rule of the two producer limits.
func TestLimitCrossed(t *testing.T) {
	for _, c := range []struct {
		wc, oil, maxWC, minOil float64
		want                   string
	}{
		{0.5, 10, 0, 0, ""},
		{0.98, 10, 0.98, 0, LimitWaterCut},
		{0.97, 10, 0.98, 0, ""},
		{0.5, 4.9, 0, 5, LimitOilRate},
		{0.5, 5, 0, 5, ""},
		{0.99, 1, 0.98, 5, LimitWaterCut},
	} {
		if got := limitCrossed(c.wc, c.oil, c.maxWC, c.minOil); got != c.want {
			t.Errorf("limitCrossed(%g, %g, %g, %g) = %q; want %q", c.wc, c.oil, c.maxWC, c.minOil, got, c.want)
		}
	}
}

// TestAllProducersShutEndsRun: when the limits shut in every producer, the
// run ends there (a rate injector without an outlet has no incompressible
// solution) instead of failing, in every engine.
func TestAllProducersShutEndsRun(t *testing.T) {
	for _, e := range limitEngines {
		t.Run(e.name, func(t *testing.T) {
			m := limitCase(t, e.updates)
			m.Run.MaxWaterCut = 0.5
			r, err := Run(m, Settings{Engine: e.engine, Frames: -1})
			if err != nil {
				t.Fatal(err)
			}
			last := r.Times[len(r.Times)-1]
			if !(r.FieldLimitDay > 0) || r.FieldLimitDay != last || last >= m.Run.End {
				t.Fatalf("run ends on day %g, limit end day %g; want an early end", last, r.FieldLimitDay)
			}
			for _, P := range r.Producers {
				if P.Limit != LimitWaterCut || P.LimitDay > last {
					t.Fatalf("producer %s: limit %q on day %g", P.Name, P.Limit, P.LimitDay)
				}
			}
		})
	}
}

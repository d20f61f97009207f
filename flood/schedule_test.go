package flood

import (
	"math"
	"slices"
	"strings"
	"testing"

	"floodtrace/reservoir"
)

func nan() float64 { return math.NaN() }

// scheduleCase is a homogeneous 20 x 20 case (pore volume about 57,000
// bbl) with a rate injector in the centre and BHP producers in three
// corners; report every 10 days over 600 days.
func scheduleCase(t *testing.T) *reservoir.Model {
	t.Helper()
	m := reservoir.NewUniform(20, 20, 20, 20, 100, 0.2, 10)
	m.RelPerm = reservoir.Corey{Swc: 0.2, Sor: 0.2, KrwMax: 0.4, KroMax: 0.9, Nw: 2, No: 2}
	m.Fluids = reservoir.Fluids{WaterViscosity: 0.5, OilViscosity: 2, InitialSw: 0.2}
	add := func(name string, typ reservoir.WellType, x, y float64, c reservoir.Control, v float64) {
		if err := m.PlaceWell(name, typ, x, y, c, v); err != nil {
			t.Fatal(err)
		}
	}
	add("I-1", reservoir.Injector, 200, 200, reservoir.RateControl, 100)
	add("P-1", reservoir.Producer, 10, 10, reservoir.BHPControl, 1000)
	add("P-2", reservoir.Producer, 390, 390, reservoir.BHPControl, 1000)
	add("P-3", reservoir.Producer, 10, 390, reservoir.BHPControl, 1000)
	m.Run = reservoir.RunSettings{End: 600, ReportEvery: 10, Streamlines: 300, PressureUpdates: 1, Snapshots: []float64{600}}
	return m
}

func producer(t *testing.T, r *Result, name string) *Producer {
	t.Helper()
	for i := range r.Producers {
		if r.Producers[i].Name == name {
			return &r.Producers[i]
		}
	}
	t.Fatalf("no producer %s", name)
	return nil
}

func bothEngines(t *testing.T, m *reservoir.Model, check func(t *testing.T, r *Result)) {
	for _, engine := range []Engine{EngineStreamline, EngineGrid} {
		t.Run(engine.String(), func(t *testing.T) {
			r, err := Run(m, Settings{Engine: engine, Frames: -1})
			if err != nil {
				t.Fatal(err)
			}
			if r.Engine != engine {
				t.Fatalf("engine %q", r.Engine)
			}
			check(t, r)
		})
	}
}

// TestScheduleShutIn: a producer shut in at day 200 has zero rate after
// the event; with incompressible flow the remaining producers then take
// the injection (rates balance, common practice of incompressible models).
func TestScheduleShutIn(t *testing.T) {
	m := scheduleCase(t)
	m.Schedule = []reservoir.Event{{Time: 200, Well: "P-2", Shut: true, Rate: nan(), BHP: nan()}}
	bothEngines(t, m, func(t *testing.T, r *Result) {
		if r.Solves < 2 {
			t.Fatalf("%d solves: the event did not force a pressure update", r.Solves)
		}
		p2 := producer(t, r, "P-2")
		var before float64
		for k, tk := range r.Times {
			q := p2.OilRate[k] + p2.WaterRate[k]
			switch {
			case tk <= 200 && !(q > 0):
				t.Fatalf("day %g: P-2 rate %g before the shut-in", tk, q)
			case tk > 200 && q != 0:
				t.Fatalf("day %g: P-2 rate %g after the shut-in", tk, q)
			case tk == 200:
				before = p2.CumOil[k] + p2.CumWater[k]
			case tk > 200 && p2.CumOil[k]+p2.CumWater[k] != before:
				t.Fatalf("day %g: P-2 cumulative changed after the shut-in", tk)
			}
		}
		for _, w := range r.WellLog {
			if w.Well == "P-2" && w.Time >= 200 && w.Rate != 0 {
				t.Errorf("well log day %g: P-2 rate %g", w.Time, w.Rate)
			}
		}
		last := len(r.Times) - 1
		total := r.FieldOilRate[last] + r.FieldWaterRate[last]
		if math.Abs(total-100) > 1e-6 {
			t.Errorf("producers take %g after the shut-in, the injector gives 100", total)
		}
		// Measured 1.1e-10 (streamline), 7.9e-16 (grid).
		checkMassBalance(t, r.Engine.String(), r.MassBalanceError, map[Engine]float64{EngineStreamline: 5e-10, EngineGrid: 1e-14}[r.Engine])
	})
}

// TestScheduleConvert: a producer converted to an injector at day 200
// injects its rate from then on.
func TestScheduleConvert(t *testing.T) {
	m := scheduleCase(t)
	m.Schedule = []reservoir.Event{{Time: 200, Well: "P-2", Convert: reservoir.Injector, Rate: 60, BHP: nan()}}
	bothEngines(t, m, func(t *testing.T, r *Result) {
		var in *Injector
		for i := range r.Injectors {
			if r.Injectors[i].Name == "P-2" {
				in = &r.Injectors[i]
			}
		}
		if in == nil {
			t.Fatal("P-2 is not listed among the injectors")
		}
		if want := 60.0 * (600 - 200); math.Abs(in.CumWater-want) > 1e-9*want {
			t.Errorf("P-2 injected %g, want %g", in.CumWater, want)
		}
		injected := 0.0
		for _, x := range r.WellLog {
			if x.Well == "P-2" && x.Time >= 200 {
				if x.Type != reservoir.Injector || x.Rate != 60 {
					t.Errorf("well log day %g: P-2 is a %s at rate %g", x.Time, x.Type, x.Rate)
				}
			}
		}
		for _, x := range r.Injectors {
			injected += x.CumWater
		}
		if want := 100*600 + 60*400.0; math.Abs(injected-want) > 1e-9*want {
			t.Errorf("injected %g, want %g", injected, want)
		}
		p2 := producer(t, r, "P-2")
		for k, tk := range r.Times {
			if tk > 200 && p2.OilRate[k]+p2.WaterRate[k] != 0 {
				t.Fatalf("day %g: the converted well still produces", tk)
			}
		}
		last := len(r.Times) - 1
		if got := r.FieldOilRate[last] + r.FieldWaterRate[last]; math.Abs(got-160) > 1e-6 {
			t.Errorf("producers take %g, the injectors give 160", got)
		}
		// Measured 4e-11 (streamline), 1.4e-15 (grid).
		checkMassBalance(t, r.Engine.String(), r.MassBalanceError, map[Engine]float64{EngineStreamline: 2e-10, EngineGrid: 1e-14}[r.Engine])
	})
}

// TestScheduleLateWell: a well drilled on day 150 has no rate before its
// opening day; Run sends such a case to the pressure-update mode and says
// so.
func TestScheduleLateWell(t *testing.T) {
	m := scheduleCase(t)
	m.Wells[3].Open = 150
	bothEngines(t, m, func(t *testing.T, r *Result) {
		p3 := producer(t, r, "P-3")
		for k, tk := range r.Times {
			q := p3.OilRate[k] + p3.WaterRate[k]
			if tk <= 150 && q != 0 {
				t.Fatalf("day %g: P-3 produces %g before it is drilled", tk, q)
			}
			if tk > 150 && !(q > 0) {
				t.Fatalf("day %g: P-3 does not produce after opening", tk)
			}
		}
		for _, x := range r.WellLog {
			if x.Well == "P-3" && x.Time < 150 && x.Rate != 0 {
				t.Errorf("well log day %g: P-3 rate %g", x.Time, x.Rate)
			}
		}
		if r.Engine == EngineStreamline {
			if r.Solves != 2 {
				t.Errorf("%d solves, want 2 (day 0 and the opening)", r.Solves)
			}
			found := false
			for _, w := range r.Warnings {
				found = found || strings.Contains(w, "pressure updates")
			}
			if !found {
				t.Errorf("no warning about the switch to pressure updates: %q", r.Warnings)
			}
		}
	})
}

func TestWellScheduleAt(t *testing.T) {
	m := scheduleCase(t)
	m.Wells[3].Open = 100
	m.Schedule = []reservoir.Event{
		{Time: 50, Well: "P-1", Rate: 40, BHP: nan()},
		{Time: 80, Well: "P-2", Shut: true, Rate: nan(), BHP: nan()},
		{Time: 120, Well: "P-2", Reopen: true, Rate: nan(), BHP: nan()},
		{Time: 120, Well: "P-1", BHP: 900, Rate: nan()},
		{Time: 300, Well: "P-3", Convert: reservoir.Injector, Rate: 30, BHP: nan()},
	}
	s, err := newWellSchedule(m)
	if err != nil {
		t.Fatal(err)
	}
	type state struct {
		typ  reservoir.WellType
		ctl  reservoir.Control
		v    float64
		shut bool
	}
	get := func(w reservoir.Well) state {
		v := w.Rate
		if w.Control == reservoir.BHPControl {
			v = w.BHP
		}
		return state{w.Type, w.Control, v, w.Shut}
	}
	for _, c := range []struct {
		t    float64
		well int
		want state
	}{
		{0, 1, state{reservoir.Producer, reservoir.BHPControl, 1000, false}},
		{50, 1, state{reservoir.Producer, reservoir.RateControl, 40, false}},
		{119, 1, state{reservoir.Producer, reservoir.RateControl, 40, false}},
		{120, 1, state{reservoir.Producer, reservoir.BHPControl, 900, false}},
		{79, 2, state{reservoir.Producer, reservoir.BHPControl, 1000, false}},
		{80, 2, state{reservoir.Producer, reservoir.BHPControl, 1000, true}},
		{120, 2, state{reservoir.Producer, reservoir.BHPControl, 1000, false}},
		{99, 3, state{reservoir.Producer, reservoir.BHPControl, 1000, true}},
		{100, 3, state{reservoir.Producer, reservoir.BHPControl, 1000, false}},
		{300, 3, state{reservoir.Injector, reservoir.RateControl, 30, false}},
	} {
		if got := get(s.At(c.t)[c.well]); got != c.want {
			t.Errorf("day %g well %s: %+v, want %+v", c.t, m.Wells[c.well].Name, got, c.want)
		}
	}
	if got := s.Changes(1000); len(got) != 5 || got[0] != 50 || got[4] != 300 {
		t.Errorf("changes %v", got)
	}
	if !s.EverType(3, reservoir.Injector, 600) || s.EverType(3, reservoir.Injector, 200) {
		t.Error("EverType does not see the conversion at day 300")
	}
	m.Schedule = append(m.Schedule, reservoir.Event{Time: 10, Well: "X", Shut: true})
	if _, err := newWellSchedule(m); err == nil {
		t.Error("unknown well accepted")
	}
}

// TestScheduleAfterTheEnd: a schedule event on or after the last day of
// the run, or a well that opens on or after it, cannot change the run; it
// is ignored with a warning naming the well and the day, and it must not
// send a fixed-streamline case to pressure updates (it once moved the
// breakthrough). Each case is compared with the same case without the
// event or the well, in each engine: the numbers are identical and the
// warnings differ by the one about what was ignored.
func TestScheduleAfterTheEnd(t *testing.T) {
	ev := func(day float64, well string) reservoir.Event {
		return reservoir.Event{Time: day, Well: well, Rate: 200, BHP: nan(), Line: 42}
	}
	for _, c := range []struct {
		name  string
		late  func(m *reservoir.Model) // adds what falls after the end
		ref   func(m *reservoir.Model) // the equivalent case without it
		warns []string                 // text the extra warning must contain
	}{
		{"rate change after the end", func(m *reservoir.Model) {
			m.Schedule = append(m.Schedule, ev(700, "I-1"))
		}, nil, []string{"I-1", "day 700", "rate 200", "(day 600)", "ignored"}},
		{"shut-in on the last day", func(m *reservoir.Model) {
			m.Schedule = append(m.Schedule, reservoir.Event{Time: 600, Well: "P-2", Shut: true, Rate: nan(), BHP: nan()})
		}, nil, []string{"P-2", "day 600", "shut-in"}},
		{"well opening after the end", func(m *reservoir.Model) {
			m.Wells[3].Open = 900
		}, func(m *reservoir.Model) {
			m.Wells = m.Wells[:3]
		}, []string{"P-3", "day 900", "never flows"}},
		{"late well with an event before its opening", func(m *reservoir.Model) {
			m.Wells[3].Open = 900
			m.Schedule = append(m.Schedule, reservoir.Event{Time: 300, Well: "P-3", Convert: reservoir.Injector, Rate: 30, BHP: nan()})
		}, func(m *reservoir.Model) {
			m.Wells = m.Wells[:3]
		}, []string{"P-3", "day 900", "1 schedule event"}},
	} {
		for _, mode := range []struct {
			name    string
			engine  Engine
			updates int
		}{{"fixed", EngineStreamline, 1}, {"updates", EngineStreamline, 4}, {"grid", EngineGrid, 1}} {
			t.Run(c.name+"/"+mode.name, func(t *testing.T) {
				run := func(m *reservoir.Model) *Result {
					m.Run.PressureUpdates = mode.updates
					r, err := Run(m, Settings{Engine: mode.engine, Frames: 3})
					if err != nil {
						t.Fatal(err)
					}
					return r
				}
				ref := scheduleCase(t)
				if c.ref != nil {
					c.ref(ref)
				}
				want := run(ref)
				m := scheduleCase(t)
				c.late(m)
				got := run(m)
				if len(got.Producers) != len(want.Producers) || len(got.Injectors) != len(want.Injectors) {
					t.Fatalf("%d producers, %d injectors; without the late item %d, %d",
						len(got.Producers), len(got.Injectors), len(want.Producers), len(want.Injectors))
				}
				sameResults(t, got, want)
				if got.Engine != want.Engine || got.Solves != want.Solves || len(got.WellLog) != len(want.WellLog) {
					t.Errorf("engine %s, %d solves, %d well-log rows; without the late item %s, %d, %d",
						got.Engine, got.Solves, len(got.WellLog), want.Engine, want.Solves, len(want.WellLog))
				}
				if len(got.Warnings) != len(want.Warnings)+1 {
					t.Fatalf("warnings %q; without the late item %q", got.Warnings, want.Warnings)
				}
				w := got.Warnings[0]
				for _, s := range c.warns {
					if !strings.Contains(w, s) {
						t.Errorf("warning %q does not say %q", w, s)
					}
				}
				if !slices.Equal(got.Warnings[1:], want.Warnings) {
					t.Errorf("other warnings %q, want %q", got.Warnings[1:], want.Warnings)
				}
			})
		}
	}
}

// TestWithinRun: what withinRun keeps and drops, and that it leaves the
// model it is given alone.
func TestWithinRun(t *testing.T) {
	m := scheduleCase(t)
	m.Path = "case.yaml"
	m.Wells[2].Open, m.Wells[2].Line = 800, 9  // P-2: late, reopened on day 100, kept
	m.Wells[3].Open, m.Wells[3].Line = 600, 10 // P-3: opens on the last day, dropped
	m.Schedule = []reservoir.Event{
		{Time: 100, Well: "P-2", Reopen: true, Rate: nan(), BHP: nan(), Line: 20},
		{Time: 200, Well: "P-3", BHP: 900, Rate: nan(), Line: 21},
		{Time: 599, Well: "P-1", Rate: 50, BHP: nan(), Line: 22},
		{Time: 650, Well: "P-1", Convert: reservoir.Injector, Rate: 80, BHP: nan(), Line: 23},
		{Time: 700, Well: "NOPE", Shut: true, Rate: nan(), BHP: nan(), Line: 24},
	}
	before := slices.Clone(m.Schedule)
	got, warns := withinRun(m)
	var names []string
	for _, w := range got.Wells {
		names = append(names, w.Name)
	}
	if !slices.Equal(names, []string{"I-1", "P-1", "P-2"}) {
		t.Errorf("wells %v, want I-1 P-1 P-2", names)
	}
	var lines []int
	for _, e := range got.Schedule {
		lines = append(lines, e.Line)
	}
	// The unknown well's event stays, for NewWellSchedule to refuse.
	if !slices.Equal(lines, []int{20, 22, 24}) {
		t.Errorf("events of lines %v, want 20 22 24", lines)
	}
	wantWarns := []string{
		"case.yaml:10: well P-3 opens on day 600, not before the end of the run (day 600): it never flows and is left out of the run, with its 1 schedule event(s) before that day",
		"case.yaml:23: schedule event for well P-1 on day 650 (conversion to injector, rate 80) is not before the end of the run (day 600): ignored",
	}
	if !slices.Equal(warns, wantWarns) {
		t.Errorf("warnings\n%q\nwant\n%q", warns, wantWarns)
	}
	if len(m.Wells) != 4 || !slices.EqualFunc(m.Schedule, before, func(a, b reservoir.Event) bool { return a.Line == b.Line }) {
		t.Error("withinRun changed the model it was given")
	}
	if _, err := newWellSchedule(got); err == nil || !strings.Contains(err.Error(), "NOPE") {
		t.Errorf("unknown well after the end: error %v", err)
	}
	// Nothing late: the model itself, no warning.
	m2 := scheduleCase(t)
	if got, warns := withinRun(m2); got != m2 || warns != nil {
		t.Errorf("a case with nothing late was copied or warned: %q", warns)
	}
}

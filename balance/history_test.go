package balance

import (
	"errors"
	"math"
	"strings"
	"testing"

	"floodtrace/flood"
	"floodtrace/reservoir"
)

// withHistory gives the thief case a 300-day history in three periods of
// 100 days in which I-1 injected 150 and I-2 50 a day (not the case's
// 100 and 100), the producers making 100 a day each, oil and water.
func withHistory(t *testing.T, drive reservoir.HistoryDrive) *reservoir.Model {
	t.Helper()
	m := thief(t)
	h := &reservoir.History{File: "history.csv", Drive: drive, Line: 7}
	for k := range 3 {
		a, b := float64(100*k), float64(100*(k+1))
		h.Rows = append(h.Rows,
			reservoir.HistoryRow{Well: "I-1", Start: a, End: b, Oil: math.NaN(), Water: math.NaN(), Injected: 150 * 100, BHP: math.NaN()},
			reservoir.HistoryRow{Well: "I-2", Start: a, End: b, Oil: math.NaN(), Water: math.NaN(), Injected: 50 * 100, BHP: math.NaN()},
			reservoir.HistoryRow{Well: "P-1", Start: a, End: b, Oil: 80 * 100, Water: 20 * 100, Injected: math.NaN(), BHP: math.NaN()},
			reservoir.HistoryRow{Well: "P-2", Start: a, End: b, Oil: 90 * 100, Water: 10 * 100, Injected: math.NaN(), BHP: math.NaN()})
	}
	m.History = h
	return m
}

// rateAt returns the rate of well name in the well log at the last record
// at or before day t.
func rateAt(r *flood.Result, name string, t float64) float64 {
	q := math.NaN()
	for _, w := range r.WellLog {
		if w.Well == name && w.Time <= t {
			q = w.Rate
		}
	}
	return q
}

// TestBalanceAfterHistory: with a history, every forecast runs the
// history as a run does and sets the rates from its end on: the current
// rates' forecast is the run of the case, the history period is the same
// in every forecast, the objective is the oil after the end of the
// history, and water still moves away from the thief.
func TestBalanceAfterHistory(t *testing.T) {
	for _, drive := range []reservoir.HistoryDrive{reservoir.DriveRates, reservoir.DriveControls} {
		t.Run(string(drive), func(t *testing.T) {
			m := withHistory(t, drive)
			res, err := Balance(m, Settings{})
			if err != nil {
				t.Fatal(err)
			}
			if res.HistoryEnd != 300 {
				t.Errorf("history end %g, want 300", res.HistoryEnd)
			}
			now, rec := res.Now.Run, res.Recommended.Run
			// The current rates' forecast is the case's own run (the
			// history drives the wells as in floodtrace run).
			// With drive: controls the forecasts re-solve the pressure at
			// the end of the history, where the rates are set (measured:
			// 0.3 % more oil than the run of the case without that
			// solve), so the run compared gets the same solve.
			pm := *m
			if drive == reservoir.DriveControls {
				pm.Schedule = []reservoir.Event{{Time: 300, Well: "I-1", Rate: 100, BHP: math.NaN()}, {Time: 300, Well: "I-2", Rate: 100, BHP: math.NaN()}}
			}
			plain, err := flood.Run(&pm, flood.Settings{Frames: -1})
			if err != nil {
				t.Fatal(err)
			}
			n := len(plain.Times)
			if len(now.Times) != n || math.Abs(now.FieldCumOil[n-1]-plain.FieldCumOil[n-1]) > 1e-9*plain.FieldCumOil[n-1] {
				t.Errorf("forecast at the current rates: cum oil %g, the run of the case %g", now.FieldCumOil[len(now.FieldCumOil)-1], plain.FieldCumOil[n-1])
			}
			// Over the history (rates drive) the injectors take the
			// observed rates in every forecast; after it the rates set.
			for _, f := range []*Forecast{res.Now, res.Recommended} {
				for j, name := range []string{"I-1", "I-2"} {
					if drive == reservoir.DriveRates {
						if got, want := rateAt(f.Run, name, 150), []float64{150, 50}[j]; math.Abs(got-want) > 1e-6*want {
							t.Errorf("%s at day 150: rate %g, the history's %g", name, got, want)
						}
					} else if got := rateAt(f.Run, name, 150); math.Abs(got-100) > 1e-6 {
						t.Errorf("%s at day 150 (drive controls): rate %g, the case's 100", name, got)
					}
					if got := rateAt(f.Run, name, 300); math.Abs(got-f.Rates[j]) > 1e-6*f.Rates[j] {
						t.Errorf("%s at day 300: rate %g, set %g", name, got, f.Rates[j])
					}
				}
			}
			// Up to the end of the history the forecasts are the same.
			if a, b := at(now.Times, now.FieldCumOil, 300), at(rec.Times, rec.FieldCumOil, 300); math.Abs(a-b) > 1e-9*a {
				t.Errorf("cum oil at the end of the history: %g now, %g recommended", a, b)
			}
			if want := now.FieldCumOil[len(now.Times)-1] - at(now.Times, now.FieldCumOil, 300); math.Abs(res.Now.Objective-want) > 1e-9*want {
				t.Errorf("objective %g, want the oil after day 300, %g", res.Now.Objective, want)
			}
			i1, i2 := res.Injectors[0], res.Injectors[1]
			t.Logf("I-1 %g -> %g, I-2 %g -> %g, oil after history %.0f -> %.0f", i1.RateNow, i1.RateRecommended, i2.RateNow, i2.RateRecommended, res.Now.Objective, res.Recommended.Objective)
			if !res.Improved || !(i1.RateRecommended < i1.RateNow) {
				t.Errorf("after the history, balance did not cut the thief I-1: %g -> %g", i1.RateNow, i1.RateRecommended)
			}
		})
	}
}

func TestHorizonBeforeHistoryEnd(t *testing.T) {
	m := withHistory(t, reservoir.DriveRates)
	m.Path = "thief.yaml"
	for _, h := range []float64{200, 300} {
		_, err := Balance(m, Settings{Horizon: h})
		var ie *reservoir.InputError
		if !errors.As(err, &ie) || !strings.Contains(err.Error(), "not after the end of the history, day 300") || ie.Line != 7 {
			t.Errorf("horizon %g: %v", h, err)
		}
	}
}

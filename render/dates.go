package render

import (
	"fmt"
	"math"
	"time"

	"gonum.org/v1/plot"
)

// dateTicker marks calendar dates on an axis of days from a start date
// (day 0 is the start of that date): the first days of years when the
// axis spans more than about three years (every 1, 2, 5, 10... years, to
// keep at most about eight labels), else the first days of months
// (every 1, 2, 3 or 6 months). Year ticks read "2021", month ticks
// "2020-03". Calendar arithmetic is the Gregorian calendar in UTC
// (common practice), so 2020 has 366 days. max, when > 0, replaces the
// eight labels (a narrow panel).
type dateTicker struct {
	start time.Time
	max   int
}

func newDateTicker(start string) (dateTicker, error) {
	t, err := time.Parse(time.DateOnly, start)
	if err != nil {
		return dateTicker{}, fmt.Errorf("start date %q is not YYYY-MM-DD", start)
	}
	return dateTicker{start: t}, nil
}

// day returns the day number of date t.
func (d dateTicker) day(t time.Time) float64 { return t.Sub(d.start).Hours() / 24 }

// Ticks implements plot.Ticker.
func (d dateTicker) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) || math.IsInf(lo, 0) || math.IsInf(hi, 0) || hi-lo > 1e6 {
		return niceTicker{n: 7}.Ticks(lo, hi)
	}
	n := 8.0
	if d.max > 0 {
		n = float64(d.max)
	}
	from := d.start.Add(time.Duration(math.Floor(lo)) * 24 * time.Hour)
	var out []plot.Tick
	span := (hi - lo) / 365.25
	if span > 3*n/8 {
		step := 1
		for _, s := range []int{1, 2, 5, 10, 20, 50, 100} {
			step = s
			if span/float64(s) <= n {
				break
			}
		}
		y := from.Year()
		y -= ((y % step) + step) % step
		for ; ; y += step {
			t := time.Date(y, 1, 1, 0, 0, 0, 0, time.UTC)
			v := d.day(t)
			if v > hi+1e-9 {
				break
			}
			if v >= lo-1e-9 {
				out = append(out, plot.Tick{Value: v, Label: fmt.Sprint(y)})
			}
		}
		return out
	}
	months := (hi - lo) / 30.44
	step := 12
	for _, s := range []int{1, 2, 3, 6, 12} {
		if months/float64(s) <= n {
			step = s
			break
		}
	}
	m := time.Date(from.Year(), from.Month(), 1, 0, 0, 0, 0, time.UTC)
	for int(m.Month()-1)%step != 0 {
		m = m.AddDate(0, -1, 0)
	}
	for ; ; m = m.AddDate(0, step, 0) {
		v := d.day(m)
		if v > hi+1e-9 {
			break
		}
		if v >= lo-1e-9 {
			out = append(out, plot.Tick{Value: v, Label: m.Format("2006-01")})
		}
	}
	return out
}

// dateOf returns the calendar date of day t from start (YYYY-MM-DD), or
// "" when start is not a date: the date of the day on which t falls.
func dateOf(start string, t float64) string {
	s, err := time.Parse(time.DateOnly, start)
	if err != nil || math.IsNaN(t) || math.IsInf(t, 0) || math.Abs(t) > 1e7 {
		return ""
	}
	return s.AddDate(0, 0, int(math.Floor(t+1e-9))).Format(time.DateOnly)
}

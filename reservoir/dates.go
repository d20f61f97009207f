package reservoir

import (
	"fmt"
	"math"
	"regexp"
	"strings"
	"time"

	"gopkg.in/yaml.v3"

	"floodtrace/internal/yamldoc"
)

// DateLayout is the calendar date form of case and history files (ISO
// 8601, a day): 2019-01-31.
const DateLayout = "2006-01-02"

// dateRE matches a text that is meant as a calendar date.
var dateRE = regexp.MustCompile(`^\d{4}-\d{1,2}-\d{1,2}$`)

// LooksLikeDate reports whether s is written as a calendar date
// (YYYY-MM-DD), valid or not.
func LooksLikeDate(s string) bool { return dateRE.MatchString(strings.TrimSpace(s)) }

// DayOf returns the day number of the date text s counted from start (day
// 0): whole days, so leap years and month ends count as the calendar
// does. An empty start (the case gives no start_date), an invalid date and
// a date before start are errors, with a phrase to follow the value's name.
func DayOf(start time.Time, s string) (float64, error) {
	s = strings.TrimSpace(s)
	t, err := time.Parse(DateLayout, s)
	if err != nil {
		return 0, fmt.Errorf("%q is not a valid date (YYYY-MM-DD)", s)
	}
	if start.IsZero() {
		return 0, fmt.Errorf("is a date (%s) but the case has no start_date: give start_date (day 0) or a day number", s)
	}
	if t.Before(start) {
		return 0, fmt.Errorf("%s is before start_date %s", s, start.Format(DateLayout))
	}
	return math.Round(t.Sub(start).Hours() / 24), nil
}

// Date returns the calendar date of day t of the run (the day on which t
// falls), or "" when the case gives no start_date.
func (m *Model) Date(t float64) string {
	if m == nil || m.StartDate.IsZero() || math.IsNaN(t) || math.IsInf(t, 0) {
		return ""
	}
	return m.StartDate.AddDate(0, 0, int(math.Floor(t+1e-9))).Format(DateLayout)
}

// PeriodEndDate returns the date of a history period that ends at day t:
// the day before t, since a history date is the end of its day (a period
// ending 2019-01-31 ends at the start of 2019-02-01). "" without
// start_date.
func (m *Model) PeriodEndDate(t float64) string {
	if math.IsNaN(t) {
		return ""
	}
	return m.Date(t - 1)
}

// readStartDate reads start_date at the top level.
func (d *decoder) readStartDate(m *Model, top *section) {
	if !top.has("start_date") {
		return
	}
	n := top.vals["start_date"]
	v := d.str(top, "start_date")
	if v == "" {
		return
	}
	t, err := time.Parse(DateLayout, strings.TrimSpace(v))
	if err != nil {
		d.fail(top, n, "start_date %q is not a valid date (YYYY-MM-DD, for example 2019-01-01)", v)
		return
	}
	m.StartDate = t
	d.start = t
}

// dateAt converts a date-valued node to a day number: handled is false
// when n is not written as a date (the caller reads it as a number).
// Problems are recorded; ok is false then.
func (d *decoder) dateAt(s *section, n *yaml.Node, label string) (v float64, handled, ok bool) {
	if n == nil || n.Kind != yaml.ScalarNode || !LooksLikeDate(n.Value) {
		return 0, false, false
	}
	day, err := DayOf(d.start, n.Value)
	if err != nil {
		msg := err.Error()
		if strings.HasPrefix(msg, "is ") {
			d.fail(s, n, "%s %s", label, msg)
		} else {
			d.fail(s, n, "%s: %s", label, msg)
		}
		return 0, true, false
	}
	return day, true, true
}

// when reads the time at key: a day number (checked against Limits[lim])
// or, when the case gives start_date, a date.
func (d *decoder) when(s *section, key string, def float64, lim int) float64 {
	if s.has(key) {
		if v, handled, ok := d.dateAt(s, s.vals[key], s.label(key)); handled {
			if !ok {
				return def
			}
			return v
		}
	}
	return d.limited(s, key, def, lim, nil)
}

// times reads a list of times at key, each a day number or a date.
func (d *decoder) times(s *section, key string) ([]float64, []*yaml.Node) {
	items := d.list(s, key)
	out := make([]float64, 0, len(items))
	nodes := make([]*yaml.Node, 0, len(items))
	for i, it := range items {
		if v, handled, ok := d.dateAt(s, it, fmt.Sprintf("%s item %d", s.label(key), i+1)); handled {
			if ok {
				out = append(out, v)
				nodes = append(nodes, it)
			}
			continue
		}
		v, msg := yamldoc.Number(it)
		if msg != "" {
			d.fail(s, it, "%s item %d %s", s.label(key), i+1, msg)
			continue
		}
		out = append(out, v)
		nodes = append(nodes, it)
	}
	return out, nodes
}

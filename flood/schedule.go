package flood

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"floodtrace/reservoir"
)

// WellSchedule gives the state of every well at any time of a run, from
// the wells of the case (Model.Wells, with Well.Open for a well drilled
// later) and its schedule events (Model.Schedule: rate, BHP, shut-in,
// reopening, conversion between injector and producer).
//
// States are piecewise constant in time: an event at day T applies from T
// on, so the state on [T, next change) is the state after every event up to
// and including T, in the order of the case file. A well with Open = d is
// shut before day d and opens at d. A conversion keeps the well's control
// and target unless the event also gives a rate or a BHP. The zero value
// has no wells; use NewWellSchedule.
type WellSchedule struct {
	wells   []reservoir.Well
	events  []reservoir.Event // sorted by time (stable)
	changes []float64         // times in (0, inf) where some state changes
}

// newWellSchedule checks the schedule of m against its wells and returns
// the schedule. Events naming unknown wells, or with times that are not
// finite and non-negative, are errors.
func newWellSchedule(m *reservoir.Model) (*WellSchedule, error) {
	if m == nil {
		return nil, fmt.Errorf("flood: schedule of a nil model")
	}
	s := &WellSchedule{wells: m.Wells, events: slices.Clone(m.Schedule)}
	for i, e := range s.events {
		if m.WellIndex(e.Well) < 0 {
			return nil, fmt.Errorf("flood: schedule event %d (day %g) names unknown well %q", i+1, e.Time, e.Well)
		}
		if !(e.Time >= 0) || math.IsInf(e.Time, 0) {
			return nil, fmt.Errorf("flood: schedule event %d for well %s has time %g", i+1, e.Well, e.Time)
		}
		if e.Convert != "" && e.Convert != reservoir.Injector && e.Convert != reservoir.Producer {
			return nil, fmt.Errorf("flood: schedule event %d for well %s converts to unknown type %q", i+1, e.Well, e.Convert)
		}
	}
	reservoir.SortEvents(s.events)
	for _, w := range m.Wells {
		if !(w.Open >= 0) || math.IsInf(w.Open, 0) {
			return nil, fmt.Errorf("flood: well %s opens at day %g", w.Name, w.Open)
		}
		if w.Open > 0 {
			s.changes = append(s.changes, w.Open)
		}
	}
	for _, e := range s.events {
		if e.Time > 0 {
			s.changes = append(s.changes, e.Time)
		}
	}
	slices.Sort(s.changes)
	s.changes = slices.Compact(s.changes)
	return s, nil
}

// Changes returns the times after day 0 at which some well changes state
// (openings and events), in increasing order, up to and including end.
func (s *WellSchedule) Changes(end float64) []float64 {
	var out []float64
	for _, t := range s.changes {
		if t <= end {
			out = append(out, t)
		}
	}
	return out
}

// HasChanges reports whether any well changes state after day 0 and up to
// day end: the case then needs pressure updates.
func (s *WellSchedule) HasChanges(end float64) bool {
	return len(s.changes) > 0 && s.changes[0] <= end || s.hasDayZeroEvents()
}

func (s *WellSchedule) hasDayZeroEvents() bool {
	return len(s.events) > 0 && s.events[0].Time == 0
}

// At returns the wells in force at day t (see WellSchedule), in the order
// of Model.Wells: a fresh slice the caller may keep. Wells not yet open or
// shut in have Shut set.
func (s *WellSchedule) At(t float64) []reservoir.Well {
	ws := make([]reservoir.Well, len(s.wells))
	s.AtInto(ws, t)
	return ws
}

// AtInto is At writing into ws, which must have one element per well.
func (s *WellSchedule) AtInto(ws []reservoir.Well, t float64) {
	copy(ws, s.wells)
	// reopened[i] records an explicit reopening, which also opens a well
	// whose drilling day has not come (the case checker treats it so).
	reopened := make([]bool, len(ws))
	for _, e := range s.events {
		if e.Time > t {
			break
		}
		i := s.index(e.Well)
		w := &ws[i]
		switch {
		case e.Shut:
			w.Shut = true
			reopened[i] = false
		case e.Reopen:
			w.Shut = false
			reopened[i] = true
		}
		if e.Convert != "" {
			w.Type = e.Convert
		}
		if !math.IsNaN(e.Rate) {
			w.Control, w.Rate = reservoir.RateControl, e.Rate
		}
		if !math.IsNaN(e.BHP) {
			w.Control, w.BHP = reservoir.BHPControl, e.BHP
		}
		if e.SetLimit {
			if w.Type == reservoir.Injector {
				w.MaxBHP, w.MinBHP = e.Limit, 0
			} else {
				w.MinBHP, w.MaxBHP = e.Limit, 0
			}
		}
	}
	for i := range ws {
		if ws[i].Open > t && !reopened[i] {
			ws[i].Shut = true
		}
	}
}

// shutAt shuts well name in from day t on, as a schedule event listed
// after every event up to t would: the economic limits' dynamic shut-in.
func (s *WellSchedule) shutAt(name string, t float64) {
	k, _ := slices.BinarySearchFunc(s.events, t, func(e reservoir.Event, t float64) int {
		if e.Time <= t {
			return -1
		}
		return 1
	})
	s.events = slices.Insert(s.events, k, reservoir.Event{Time: t, Well: name, Shut: true, Rate: math.NaN(), BHP: math.NaN()})
	if t > 0 {
		s.changes = append(s.changes, t)
		slices.Sort(s.changes)
		s.changes = slices.Compact(s.changes)
	}
}

func (s *WellSchedule) index(name string) int {
	for i := range s.wells {
		if s.wells[i].Name == name {
			return i
		}
	}
	return -1
}

// EverType reports whether well i is of type typ at some time in [0, end]:
// a converted well is both an injector and a producer over the run.
func (s *WellSchedule) EverType(i int, typ reservoir.WellType, end float64) bool {
	if s.wells[i].Type == typ {
		return true
	}
	for _, e := range s.events {
		if e.Time <= end && e.Well == s.wells[i].Name && e.Convert == typ {
			return true
		}
	}
	return false
}

// withinRun returns m without what cannot change its run: the schedule
// events on or after the end of the run, and the wells that open on or
// after it (with all their events), unless an event before the end reopens
// them. Such an event or well must not send the case to pressure updates
// or show in the outputs, so the run is that of the case without them. It
// returns one warning for each, naming the well, the day and the case
// line. m is not changed; when nothing is dropped it is returned itself.
// Events naming unknown wells and non-finite days are kept, for
// newWellSchedule to refuse.
func withinRun(m *reservoir.Model) (*reservoir.Model, []string) {
	end := m.Run.End
	late := func(t float64) bool { return t >= end && !math.IsInf(t, 0) }
	reopened := map[string]bool{}
	for _, e := range m.Schedule {
		if e.Reopen && !late(e.Time) {
			reopened[e.Well] = true
		}
	}
	var warns []string
	dropWell := map[string]bool{}
	for _, w := range m.Wells {
		if late(w.Open) && !reopened[w.Name] {
			dropWell[w.Name] = true
		}
	}
	if len(dropWell) == 0 && !slices.ContainsFunc(m.Schedule, func(e reservoir.Event) bool {
		return late(e.Time) && m.WellIndex(e.Well) >= 0
	}) {
		return m, nil
	}
	mm := *m
	mm.Wells = nil
	for _, w := range m.Wells {
		if !dropWell[w.Name] {
			mm.Wells = append(mm.Wells, w)
			continue
		}
		n := 0
		for _, e := range m.Schedule {
			if e.Well == w.Name && !late(e.Time) {
				n++
			}
		}
		msg := fmt.Sprintf("%swell %s opens on day %g, not before the end of the run (day %g): it never flows and is left out of the run",
			caseLine(m, w.Line), w.Name, w.Open, end)
		if n > 0 {
			msg += fmt.Sprintf(", with its %d schedule event(s) before that day", n)
		}
		warns = append(warns, msg)
	}
	mm.Schedule = nil
	for _, e := range m.Schedule {
		switch {
		case late(e.Time) && m.WellIndex(e.Well) >= 0:
			warns = append(warns, fmt.Sprintf("%sschedule event for well %s on day %g (%s) is not before the end of the run (day %g): ignored",
				caseLine(m, e.Line), e.Well, e.Time, eventAction(e), end))
		case dropWell[e.Well]:
		default:
			mm.Schedule = append(mm.Schedule, e)
		}
	}
	return &mm, warns
}

// caseLine returns "path:line: " for a message about a line of the case
// file, or "" when the model was not read from a file.
func caseLine(m *reservoir.Model, line int) string {
	switch {
	case m.Path != "" && line > 0:
		return fmt.Sprintf("%s:%d: ", m.Path, line)
	case m.Path != "":
		return m.Path + ": "
	}
	return ""
}

// eventAction describes what a schedule event does, for messages.
func eventAction(e reservoir.Event) string {
	var parts []string
	switch {
	case e.Shut:
		parts = append(parts, "shut-in")
	case e.Reopen:
		parts = append(parts, "reopening")
	}
	if e.Convert != "" {
		parts = append(parts, "conversion to "+string(e.Convert))
	}
	if !math.IsNaN(e.Rate) {
		parts = append(parts, fmt.Sprintf("rate %g", e.Rate))
	}
	if !math.IsNaN(e.BHP) {
		parts = append(parts, fmt.Sprintf("BHP %g", e.BHP))
	}
	if len(parts) == 0 {
		return "no change"
	}
	return strings.Join(parts, ", ")
}

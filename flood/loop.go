package flood

import (
	"fmt"
	"slices"

	"floodtrace/reservoir"
	"floodtrace/transport"
)

// timeline holds the stop times of a run, the one place they are made:
// the report times, the snapshot and frame times, and the pressure-solve
// times (the first at day 0; pressure updates, schedule events and well
// openings after it).
type timeline struct {
	end     float64
	reports []float64 // reportTimes
	snaps   []float64 // snapshotTimes
	frames  []float64 // report times kept as animation frames
	solves  []float64 // pressure-solve times, increasing, in [0, end)
	stops   []float64 // reports, snaps and frames, sorted, without duplicates
}

// newTimeline returns the stop times of the case for a frame count
// (frameIndices) and the pressure-solve times solves (0 is added; times at
// or after the end are dropped).
func newTimeline(m *reservoir.Model, frames int, solves []float64) *timeline {
	end := m.Run.End
	tl := &timeline{end: end, reports: reportTimes(end, m.Run.ReportEvery), snaps: snapshotTimes(m)}
	for _, k := range frameIndices(len(tl.reports), frames) {
		tl.frames = append(tl.frames, tl.reports[k])
	}
	tl.stops = append(append(slices.Clone(tl.reports), tl.snaps...), tl.frames...)
	tl.stops = append(tl.stops, historyTimes(m)...)
	slices.Sort(tl.stops)
	tl.stops = slices.Compact(tl.stops)
	tl.solves = []float64{0}
	for _, t := range solves {
		if t > 0 && t < end {
			tl.solves = append(tl.solves, t)
		}
	}
	slices.Sort(tl.solves)
	tl.solves = slices.Compact(tl.solves)
	return tl
}

// nextStop returns the first stop after t, or t1 when there is none
// before t1.
func (tl *timeline) nextStop(t, t1 float64) float64 {
	k, found := slices.BinarySearch(tl.stops, t)
	if found {
		k++
	}
	if k < len(tl.stops) && tl.stops[k] < t1 {
		return tl.stops[k]
	}
	return t1
}

// stepper is an engine that moves the saturations in time: the pressure
// updates and grid engines. It holds its state in memory and writes no
// files, so a caller can build and run it many times.
type stepper interface {
	// solveAt puts the wells in force at day t and solves the pressure
	// (and traces streamlines, for an engine that has them) on the
	// current saturations. An engine may defer the solve to its next
	// advance.
	solveAt(t float64) error
	// advance moves the saturations from day t to day t1, between which
	// there is no stop, adding the volumes it moves to the book.
	advance(t, t1 float64) error
	// ledger returns the engine's book, which records at every stop.
	ledger() *book
}

// drive runs an engine through the timeline: a solve at each solve time,
// and between solves an advance from stop to stop, recording in the book
// at the end of each.
//
// Economic limits are dynamic events of the same loop: a producer that
// reaches its limit at a report time is shut in from that time (book.
// checkLimits adds the shut-in to the schedule), and the time becomes a
// solve time, so the run goes on exactly as if the case had scheduled the
// shut-in there. A field limit ends the run at the report time it is
// reached.
func drive(e stepper, tl *timeline) error {
	b := e.ledger()
	for i := 0; i < len(tl.solves); i++ {
		t0 := tl.solves[i]
		t1 := tl.end
		if i+1 < len(tl.solves) {
			t1 = tl.solves[i+1]
		}
		if err := e.solveAt(t0); err != nil {
			return err
		}
		for t := t0; t < t1; {
			next := tl.nextStop(t, t1)
			if err := e.advance(t, next); err != nil {
				return err
			}
			t = next
			b.atStop(t, tl.reports, tl.snaps, tl.frames)
			if b.ended {
				b.endEarly(t)
				return nil
			}
			if b.limitShut {
				b.limitShut = false
				if t < t1 {
					tl.solves = slices.Insert(tl.solves, i+1, t)
					break
				}
			}
		}
	}
	return nil
}

// stepperInputs sets up what both stepping engines (pressure updates and
// the grid) take from a case: the case without the events and wells after
// its end (and the warnings saying so), the fractional flow and its flux
// table, the well schedule and the residual oil saturation.
func stepperInputs(m *reservoir.Model) (_ *reservoir.Model, late []string, ff *transport.FracFlow, fl *transport.Flux, sched *WellSchedule, sor float64, err error) {
	m, hwarn, err := historyModel(m)
	if err != nil {
		return nil, nil, nil, nil, nil, 0, err
	}
	m, late = withinRun(m)
	late = append(hwarn, late...)
	ff = transport.NewFracFlow(m.RelPerm, m.Fluids.WaterViscosity, m.Fluids.OilViscosity)
	if err := ff.Validate(); err != nil {
		return nil, nil, nil, nil, nil, 0, fmt.Errorf("fractional flow: %w", err)
	}
	if fl, err = transport.NewFlux(ff); err != nil {
		return nil, nil, nil, nil, nil, 0, fmt.Errorf("fractional flow: %w", err)
	}
	if sched, err = newWellSchedule(m); err != nil {
		return nil, nil, nil, nil, nil, 0, err
	}
	_, sor = ff.Endpoints()
	return m, late, ff, fl, sched, sor, nil
}

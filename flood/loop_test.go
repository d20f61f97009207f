package flood

import (
	"slices"
	"testing"
)

// fakeStepper records the calls of the time loop.
type fakeStepper struct {
	b      book
	solves []float64
	spans  [][2]float64
}

func (f *fakeStepper) solveAt(t float64) error { f.solves = append(f.solves, t); return nil }
func (f *fakeStepper) advance(t, t1 float64) error {
	f.spans = append(f.spans, [2]float64{t, t1})
	return nil
}
func (f *fakeStepper) ledger() *book { return &f.b }

// TestDriveStops checks the one time loop on invented stop times: a solve
// at day 0 and at each solve time inside the run (times outside are
// dropped), advances that tile [0, end] and end at every report,
// snapshot, frame and solve time and nowhere else, and the book recording
// every report and snapshot once.
func TestDriveStops(t *testing.T) {
	m := blChannel(t, 10)
	m.Run.End, m.Run.ReportEvery = 100, 25
	m.Run.Snapshots = []float64{10, 50}
	sched, err := newWellSchedule(m)
	if err != nil {
		t.Fatal(err)
	}
	tl := newTimeline(m, 2, []float64{60, 30, 100, -1, 30})
	if want := []float64{0, 30, 60}; !slices.Equal(tl.solves, want) {
		t.Fatalf("solve times %v, want %v", tl.solves, want)
	}
	if want := []float64{50, 100}; !slices.Equal(tl.frames, want) {
		t.Fatalf("frames %v, want %v", tl.frames, want)
	}
	f := &fakeStepper{b: newBook(m, sched, EngineStreamline)}
	f.b.r.Times = tl.reports
	f.b.r.PVI = make([]float64, len(tl.reports))
	f.b.setupWells(len(tl.reports))
	if err := drive(f, tl); err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(f.solves, tl.solves) {
		t.Errorf("solves at %v, want %v", f.solves, tl.solves)
	}
	var ends []float64
	prev := 0.0
	for _, s := range f.spans {
		if s[0] != prev || !(s[1] > s[0]) {
			t.Fatalf("advances %v do not tile the run", f.spans)
		}
		prev = s[1]
		ends = append(ends, s[1])
	}
	if want := []float64{10, 25, 30, 50, 60, 75, 100}; !slices.Equal(ends, want) {
		t.Errorf("advances end at %v, want %v", ends, want)
	}
	if f.b.nextReport != len(tl.reports) || len(f.b.r.Snapshots) != 2 || len(f.b.r.Frames) != 2 {
		t.Errorf("recorded %d reports, %d snapshots, %d frames; want %d, 2, 2",
			f.b.nextReport, len(f.b.r.Snapshots), len(f.b.r.Frames), len(tl.reports))
	}
}

package streamline

import (
	"errors"
	"fmt"
	"math"
	"runtime"
)

// Launch tells how a streamline was started.
type Launch uint8

// The ways a streamline is started.
const (
	// FromInjector: on an outflow face of an injector cell, traced forward.
	FromInjector Launch = iota
	// FromProducer: on an inflow face of a producer cell that no line from
	// an injector reached, traced backward.
	FromProducer
	// FromCell: at the centre of a flowing cell that no other line
	// crossed, traced both ways and joined.
	FromCell
)

// String names the launch.
func (l Launch) String() string {
	switch l {
	case FromInjector:
		return "injector"
	case FromProducer:
		return "producer"
	case FromCell:
		return "cell"
	}
	return fmt.Sprintf("Launch(%d)", uint8(l))
}

// Line is one streamline, from its upstream end to its downstream end.
type Line struct {
	// Injector and Producer index Field.Wells; -1 when the line does not
	// start (end) at a well.
	Injector, Producer int
	// Flux is the volumetric flux the line carries, reservoir volume per
	// day: the flux of the stream tube it stands for.
	Flux float64
	// Cells lists the cells crossed, upstream first, and Tau the time of
	// flight spent in each, days. Well cells are charged their mean
	// residence time, pore volume over throughput.
	Cells []int32
	Tau   []float64
	// TotalTau is the sum of Tau: injector-to-producer time of flight when
	// both ends are wells.
	TotalTau float64
	// Path is the polyline in map coordinates (only with KeepPaths).
	Path [][2]float64
	// Start and End tell why the line ends where it does upstream and
	// downstream.
	Start, End EndReason
	Launch     Launch
}

// Pair is the allocation between one injector and one producer.
type Pair struct {
	Injector, Producer int // indices into Field.Wells
	// Rate is the flux from the injector to the producer (sum of the line
	// fluxes), reservoir volume per day.
	Rate float64
	// FractionOfInjector and FractionOfProducer are Rate over the rates of
	// the two wells.
	FractionOfInjector, FractionOfProducer float64
	// PoreVolume is the pore volume of the region the pair sweeps: the sum
	// of flux*TotalTau over its lines.
	PoreVolume float64
}

// Result is the outcome of Trace.
type Result struct {
	Lines []Line
	// TOF is the time of flight from the injectors to each cell and BackTOF
	// the time from each cell to the producers, days: flux*tau weighted
	// averages over the lines crossing the cell of the time at the middle
	// of the crossing. Travel is the weighted average of the lines' total
	// injector-to-producer time. NaN where no line with flux reaches.
	TOF, BackTOF, Travel []float64
	// Volume is the traced pore volume of each cell, the sum over lines of
	// flux*tau in the cell. Its total approaches the pore volume of the
	// flowing region as the lines get denser (error about proportional to
	// the line spacing); cell by cell it scatters more, most near
	// stagnation points, where a line that passes close by spends a long
	// time in few cells. Users that map volumes between lines and cells
	// can rescale tau cell by cell with it.
	Volume []float64
	// InjectorPartition and ProducerPartition give for each cell the well
	// (index into Field.Wells) whose lines carry the largest share of the
	// cell's traced volume, or -1.
	InjectorPartition, ProducerPartition []int
	// Stagnant marks active cells that no line with flux crosses or whose
	// throughput would take more than 1e7 times the field's pore-volume
	// turnover time to renew their pore volume.
	Stagnant []bool
	// Pairs lists the injector-producer pairs that exchange flux, by
	// injector then producer.
	Pairs    []Pair
	Warnings []string

	// flat holds the lines' cells and times of flight, of which their
	// Cells and Tau are views; nil once released.
	flat     *flatLines
	released bool
}

// Breakthrough returns the smallest time of flight, days, of the lines
// with flux that end at well w (the tracer breakthrough of a producer), or
// NaN when none does.
func (r *Result) Breakthrough(w int) float64 {
	best := math.NaN()
	for i := range r.Lines {
		l := &r.Lines[i]
		if l.Producer == w && l.Injector >= 0 && l.Flux > 0 && !(l.TotalTau >= best) {
			best = l.TotalTau
		}
	}
	return best
}

// lineMeta is where a line meets its wells: anchor keys cell*4+face of the
// well cell face it crosses and the position along that face.
type lineMeta struct {
	injKey, prodKey int
	injS, prodS     float64
}

type seed struct {
	launch Launch
	cell   int
	face   int
	s      float64
}

// Trace traces streamlines through the field with Pollock's (1988)
// semi-analytical method and returns them with cell maps of time of flight,
// well partitions and well-pair allocation.
//
// Lines are launched from the outflow faces of every injector cell, evenly
// spaced along each face, in numbers proportional to the face fluxes; then
// backward from producers no line reached; then from the centre of every
// flowing cell that no line crossed, both ways. The flux of each line is
// the flux of the stream tube it stands for: the face flux of its
// injector-cell face times the share of the face nearer to it than to the
// other lines crossing that face (a tube from a cell-centre line takes its
// share from its neighbours, so the face totals do not change). The fluxes
// are then balanced by iterative proportional fitting (Deming and Stephan
// 1940) so that the lines of every injector face carry the face flux and
// the lines of every producer carry its rate. The sum of flux*tau over all
// lines then approaches the pore volume of the flowing region.
//
// Inside a well cell, where Pollock's linear field cannot represent the
// point well, a line is charged the cell's mean residence time, pore
// volume over throughput (common practice). A producer that also passes
// flow on (a weak sink) keeps the lines that enter the middle of its faces,
// in proportion to its share of the cell's inflow; the others go on.
// Lines whose downstream end is not at a producer (stagnation point, step
// cap, grid edge) carry no flux; lines that reach a producer but trace back
// to no injector take their flux from their share of the producer face.
// Ends away from wells are counted in Result.Warnings.
func Trace(f *Field, s Settings) (*Result, error) {
	if f == nil {
		return nil, errors.New("streamline: nil field")
	}
	if err := f.check(); err != nil {
		return nil, err
	}
	if s.Count < 0 || s.MaxSteps < 0 || s.Workers < 0 {
		return nil, fmt.Errorf("streamline: negative settings (count %d, max steps %d, workers %d)", s.Count, s.MaxSteps, s.Workers)
	}
	if s.Count == 0 {
		s.Count = 2000
	}
	if s.MaxSteps == 0 {
		s.MaxSteps = 20 * (f.Grid.NX + f.Grid.NY)
	}
	if s.Workers == 0 {
		s.Workers = runtime.GOMAXPROCS(0)
	}
	t := newTracer(f, s)
	b := newBuilder(t, f, s.Workers)
	b.volumesOnly = s.VolumesOnly
	var warn []string
	b.trace(injectorSeeds(t, f, s.Count))
	b.trace(producerSeeds(t, f, s.Count, b.lines))
	lowFlow := t.lowFlow(f)
	b.fill(lowFlow)
	warn = append(warn, b.assignFluxes()...)
	r := b.maps(lowFlow)
	b.finish(r)
	r.Pairs = pairs(f, r.Lines)
	r.Warnings = append(warn, b.endWarnings(s.MaxSteps)...)
	r.Warnings = append(r.Warnings, t.balanceWarnings(f)...)
	return r, nil
}

// line traces one seed: its upstream half against the flux and its
// downstream half with it, joined: the line's cells and times of flight
// are appended to the worker's block buffers.
func (t *tracer) line(sd seed, wk *worker, w int) traced {
	up, down := &wk.up, &wk.down
	up.reset()
	down.reset()
	l := Line{Injector: -1, Producer: -1, Launch: sd.launch}
	m := lineMeta{injKey: -1, prodKey: -1}
	switch sd.launch {
	case FromInjector:
		t.launch(down, sd.cell, sd.face, sd.s, 1)
		up.end, up.well, up.face, up.s = AtWell, int(t.wellAt[sd.cell]), sd.face, sd.s
	case FromProducer:
		t.launch(up, sd.cell, sd.face, sd.s, -1)
		down.end, down.well, down.face, down.s = AtWell, int(t.wellAt[sd.cell]), sd.face, sd.s
	default:
		t.point(up, sd.cell, 0.5, 0.5)
		t.run(up, sd.cell, 0.5, 0.5, -1, -1, 0)
		t.run(down, sd.cell, 0.5, 0.5, 1, -1, 0)
	}
	l.Start, l.End = up.end, down.end
	if up.end == AtWell && up.well >= 0 {
		l.Injector = up.well
		if up.face >= 0 {
			m.injKey, m.injS = int(t.wellCell(up.well))*4+up.face, up.s
		}
	}
	if down.end == AtWell && down.well >= 0 {
		l.Producer = down.well
		if down.face >= 0 {
			m.prodKey, m.prodS = int(t.wellCell(down.well))*4+down.face, down.s
		}
	}

	// Join: the upstream half reversed, then the downstream half; a
	// cell-centre line has its start cell at the head of both halves.
	nu, nd := len(up.cells), len(down.cells)
	merge := sd.launch == FromCell && nu > 0 && nd > 0 && up.cells[0] == down.cells[0]
	off := len(wk.cells)
	for i := nu - 1; i >= 0; i-- {
		wk.cells = append(wk.cells, up.cells[i])
		wk.taus = append(wk.taus, up.tau[i])
	}
	if merge {
		wk.taus[len(wk.taus)-1] += down.tau[0]
		wk.cells = append(wk.cells, down.cells[1:]...)
		wk.taus = append(wk.taus, down.tau[1:]...)
	} else {
		wk.cells = append(wk.cells, down.cells...)
		wk.taus = append(wk.taus, down.tau...)
	}
	tr := traced{w: w, off: off, n: len(wk.cells) - off, lo: math.MaxInt32, hi: -1}
	for _, v := range wk.taus[off:] {
		l.TotalTau += v
	}
	for _, c := range wk.cells[off:] {
		tr.lo, tr.hi = min(tr.lo, c), max(tr.hi, c)
	}
	if t.paths {
		l.Path = joinThin(up.path, down.path, t.maxPath)
	}
	tr.line, tr.meta = l, m
	return tr
}

// wellCell returns the cell of well w.
func (t *tracer) wellCell(w int) int32 { return t.cellOf[w] }

// joinThin returns the polyline reverse(up) + down thinned to at most n
// points, evenly spaced in index with both ends kept (n <= 1 keeps all), as
// a fresh slice sized to fit, without building the joined polyline first.
func joinThin(up, down [][2]float64, n int) [][2]float64 {
	m := len(up) + len(down)
	at := func(k int) [2]float64 {
		if k < len(up) {
			return up[len(up)-1-k]
		}
		return down[k-len(up)]
	}
	if n <= 1 || m <= n {
		n = m
	}
	out := make([][2]float64, n)
	if n == m {
		for k := range out {
			out[k] = at(k)
		}
		return out
	}
	last := m - 1
	for i := range out {
		out[i] = at((i * last) / (n - 1))
	}
	return out
}

package flood

import (
	"errors"
	"fmt"
	"math"
	"runtime"
	"slices"

	"floodtrace/internal/parallel"
	"floodtrace/pressure"
	"floodtrace/reservoir"
	"floodtrace/streamline"
	"floodtrace/transport"
)

// UpdateOptions tunes the pressure-update mode (RunUpdates). Run takes
// them from Settings.Updates; the zero value is the default.
type UpdateOptions struct {
	// Scheme is the 1D transport scheme along the streamlines; the zero
	// value is first-order upwind (see transport.Advance).
	Scheme transport.Scheme
	// CFL is the Courant number of the 1D sub-steps; 0 = the transport
	// package's default for the scheme.
	CFL float64
	// Threshold is the produced water fraction that marks a producer's
	// water breakthrough; 0 = 1e-3.
	Threshold float64
	// GlobalSteps gives every node of a line the line's one count of
	// upwind sub-steps, set by its shortest node and fastest speed,
	// instead of each node its own (local time stepping, the default:
	// transport.Settings.Local). It changes the numerical diffusion, not
	// the conservation; kept to compare the two.
	GlobalSteps bool
}

// BreakthroughThreshold is the default water fraction of a producer's
// rate that marks its water breakthrough in the numerical engines
// (pressure updates and grid).
const BreakthroughThreshold = 1e-3

// breakthroughProbes is the number of equal parts of a report interval in
// which a breakthrough is located (see RunUpdates).
const breakthroughProbes = 32

// RunUpdates runs the case with streamlines updated in time: at each
// update time the total mobility of every cell is computed from its water
// saturation, the pressure is solved with the wells in force at that time
// (through one pressure.Sequence per run: warm start, set-up reuse),
// streamlines are traced anew, the cell saturations are mapped onto them
// (each segment takes the saturation of its cell), the 1D transport
// equation dS/dt + dfw/dtau = 0 is solved numerically along each line over
// the interval (Buckley and Leverett 1942; transport.Advance, each line
// with its own stable sub-steps), and the line saturations are mapped
// back to the cells by flux*tau weighting. This is the
// IMPES-like sequence of streamline simulation (Batycky, Blunt and Thiele
// 1997; Thiele, Batycky and Blunt 1996, from memory). With the upwind
// scheme the 1D transport steps locally (transport.Settings.Local: each
// zone of a line its own sub-steps) unless UpdateOptions.GlobalSteps; the
// cells are mapped from the lines only when they are read (a solve, a
// snapshot or frame, the end) unless a gravity step or a producer that no
// line reaches needs them at every report.
//
// Gravity (a case with depth): the pressure solve takes each cell's
// mobility-weighted density; along each line the fractional flow carries
// its gravity term, fw + G lw lo / lt with G from the depth gradient along
// the line's direction in each cell (gravityFaces.alongLine; Buckley and
// Leverett 1942 include the term), solved by first-order upwind
// (transport.AdvanceGravity, whatever Scheme says); and after each step a
// gravity step on the grid moves the counter-current flux of the part of
// gravity across the lines, by operator splitting (Bratvedt, Gimse and
// Tegnander 1996; updateRun.gravityStep).
//
// Update times are the N = run.pressure_updates times evenly spaced over
// the run (0, end/N, 2*end/N, ...) or 0 and the listed run.update_times,
// together with every schedule event and well opening (WellSchedule).
//
// Conservation. The time of flight of the lines crossing a cell is
// rescaled so that their flux*tau adds up to the cell's pore volume; the
// saturation of a line segment is its cell's, and the cell's is the
// flux*tau weighted mean of its segments, so both mappings conserve water
// exactly. Along a line, the time of flight is re-partitioned into nodes of
// comparable length (segments split or merged, transport.Remap, which is
// conservative) so that a line clipping a cell corner does not dictate the
// sub-step. Cells that no line crosses keep their saturation. The water
// balance (injected - produced - change of water in place) / injected is
// reported in Result.MassBalanceError.
//
// Producers. A producer's water cut over a report interval is the
// flux-weighted mean water fraction leaving its lines, its rates those of
// the pressure solves in force (report values are averages over the report
// interval, so they integrate to the cumulative volumes). A producer that no
// line reaches produces at the water fraction of its cell. Breakthrough is
// the first time the produced water fraction exceeds Threshold: the
// producer's outlet water over the report interval in which it happens is
// split into 32 equal parts and the crossing interpolated, so it is
// located to 1/32 of the report interval (and within the resolution of the
// 1D scheme). With local time stepping (upwind, no gravity) the parts are
// averages of each line's outlet flux history over the interval itself;
// otherwise the interval is advanced again in 32 parts. AvgSw is the
// pore-volume weighted saturation of the cells of the producer's
// partition (with the deferred cell map, from the line nodes: the same
// sum).
//
// Lines are advanced in parallel over Settings.Workers goroutines; every
// reduction runs in line order, so results do not depend on the count.
func RunUpdates(m *reservoir.Model, s Settings, o UpdateOptions) (*Result, error) {
	u, err := newUpdateRun(m, s, o)
	if err != nil {
		return nil, err
	}
	if err := u.run(); err != nil {
		return nil, err
	}
	if err := checkResult(u.r); err != nil {
		return nil, err
	}
	return u.r, nil
}

// needsUpdates reports whether the case asks for pressure updates or has a
// schedule that the fixed-streamline path cannot honour.
func needsUpdates(m *reservoir.Model) bool {
	if m.Run.PressureUpdates > 1 || len(m.Run.UpdateTimes) > 0 {
		return true
	}
	if len(m.Schedule) > 0 {
		return true
	}
	for _, w := range m.Wells {
		if w.Open > 0 {
			return true
		}
	}
	return false
}

// UpdateTimes returns the pressure-update times of a run: evenly spaced
// (run.pressure_updates) or 0 and run.update_times, merged with the
// schedule's change times, sorted, without duplicates, all in [0, end).
func UpdateTimes(m *reservoir.Model, sched *WellSchedule) []float64 {
	end := m.Run.End
	ts := []float64{0}
	if len(m.Run.UpdateTimes) > 0 {
		ts = append(ts, m.Run.UpdateTimes...)
	} else if n := m.Run.PressureUpdates; n > 1 {
		for k := 1; k < n; k++ {
			ts = append(ts, end*float64(k)/float64(n))
		}
	}
	if sched != nil {
		ts = append(ts, sched.Changes(end)...)
	}
	slices.Sort(ts)
	out := ts[:0]
	for _, t := range ts {
		if !(t >= 0 && t < end*(1-1e-12)) {
			continue
		}
		if len(out) > 0 && t-out[len(out)-1] <= 1e-9*end {
			continue
		}
		out = append(out, t)
	}
	return out
}

// updateRun is the state of one pressure-update run.
type updateRun struct {
	book
	s       Settings
	o       UpdateOptions
	ff      *transport.FracFlow
	fl      *transport.Flux
	set     transport.Settings
	workers int
	logf    func(string, ...any)

	sInj      float64
	sLine     float64 // inlet state of lines from injectors (fw exactly 1)
	threshold float64
	wells     []reservoir.Well // state in force
	mob       []float64
	sol       *pressure.Solution // the solve in force
	seq       *pressure.Sequence // the run's pressure solves (warm start, set-up reuse)

	// Gravity (cases with depth): the faces (across the streamlines),
	// the along-line coefficient per cell and per node, the densities of
	// the pressure solve, and scratch of the gravity step.
	grav         *gravityFaces
	rho          []float64
	gcell, gg    []float64
	swPre, delta []float64

	// Well bookkeeping beyond the book's.
	unsourced      float64 // water entering lines that start at no injector
	broken         []bool  // per producer: breakthrough found
	firstTraceDone bool

	// Streamline transport buffers, reused across updates.
	ls       *lineSet
	act      []bool    // line is transported
	lprod    []int     // producer index of each line, -1 none, -2 other sink
	sIn      []float64 // inlet saturation of each line
	injWater []bool    // the inlet injects water (inlet state fixed)
	gstart   []int     // node offsets (reserved spans)
	gn       []int     // node count of each line
	gs, gd   []float64 // node saturations and node time of flight
	backup   []float64 // node saturations at the start of a chunk
	// Breakthrough from the outlet histories of the local steps: per line
	// its mean outlet fraction over each breakthroughProbes part of the
	// chunk and at its start (fromHistory: the chunk filled them).
	parts, first []float64
	fromHistory  bool
	segS         []float64 // segment saturations
	segW         []float64 // segment flux*tau*saturation (mapToCells)
	out          []float64 // mean outlet fw of each line over a chunk
	lerr         []error
	scratch      []lineScratch
	acc, vol     []float64 // cell accumulators
	// Per producer, over a chunk: water and total flux of its lines, and
	// the instantaneous outlet water at the chunk end.
	water, flux, inst []float64

	// Deferred cell map (lazy): when no report value needs the cells (no
	// gravity step, every flowing producer reached by lines, no producer
	// taking fluid in), the lines are mapped to the cells only when the
	// cells are read (dirty after an advance: a solve, a snapshot or frame,
	// the end), and the partition saturations of the reports come from the
	// nodes through pieces: per line, node pNode's share pW of the
	// pore-volume weighted saturation of producer pSlot's partition
	// (spans pstart, counts pn); den and num0 hold each partition's pore
	// volume and the saturation volume of its cells that no line crosses.
	lazy, dirty  bool
	avgDone      bool // avg holds the partition saturations of the nodes
	pstart, pn   []int
	pNode, pSlot []int32
	pW           []float64
	den, num0    []float64
	avg          []float64
	psum         []float64 // per line and producer: its pieces' sum
	// Runs of pieces on consecutive nodes of one partition (spans
	// pstart, counts rn): partition, first node, first piece, length.
	rSlot, rNode, rK, rLen []int32
	rn                     []int
}

type lineScratch struct {
	ws         transport.Workspace
	src, srcd  []float64
	srcg       []float64 // gravity coefficients of the positive segments
	dst, dstd  []float64
	probe      []float64
	probeNodes []float64
}

func newUpdateRun(m *reservoir.Model, s Settings, o UpdateOptions) (*updateRun, error) {
	if m == nil {
		return nil, errors.New("flood: nil model")
	}
	if !(m.Run.End > 0) || math.IsInf(m.Run.End, 0) {
		return nil, errors.New("run.end must be positive")
	}
	if s.Workers < 0 {
		return nil, fmt.Errorf("flood: negative worker count %d", s.Workers)
	}
	m, late, ff, fl, sched, sor, err := stepperInputs(m)
	if err != nil {
		return nil, err
	}
	u := &updateRun{book: newBook(m, sched, EngineStreamline), s: s, o: o, ff: ff, fl: fl,
		set:  transport.Settings{Scheme: o.Scheme, CFL: o.CFL, Local: o.Scheme == transport.Upwind && !o.GlobalSteps},
		sInj: 1 - sor,
		logf: s.Log,
	}
	if u.logf == nil {
		u.logf = func(string, ...any) {}
	}
	for _, w := range late {
		u.warn(w)
	}
	// Injectors inject water only. The flux table interpolates fw between
	// its nodes, so at a kink of the curve at 1-sor its value there may
	// differ from 1 in the last digits; any state in [1-sor, 1] has true
	// fw = 1, and the table is exact at its end node 1.
	u.sLine = u.sInj
	if fl.Fw(1) == 1 {
		u.sLine = 1
	}
	if !(u.swi >= 0 && u.swi <= 1) {
		return nil, fmt.Errorf("flood: initial water saturation %g outside [0, 1]", u.swi)
	}
	u.threshold = o.Threshold
	if !(u.threshold > 0) {
		u.threshold = BreakthroughThreshold
	}
	u.workers = s.Workers
	if u.workers == 0 {
		u.workers = runtime.GOMAXPROCS(0)
	}
	u.grav = newGravityFaces(m)
	if u.grav != nil && !dipping(m, u.grav) {
		u.grav = nil // a uniform depth moves no water: the run without depth
	}
	return u, nil
}

// dipping reports whether gravity moves water in a case with depth: a
// depth difference across some face or a depth gradient in some cell.
func dipping(m *reservoir.Model, g *gravityFaces) bool {
	for _, c := range g.cx {
		if c != 0 {
			return true
		}
	}
	for _, c := range g.cy {
		if c != 0 {
			return true
		}
	}
	for k, a := range m.Active {
		if gx, gy := m.DepthGradient(k); a && (gx != 0 || gy != 0) {
			return true
		}
	}
	return false
}

// setupWells builds the well lists (book.setupWells) and the update
// engine's own per-producer state.
func (u *updateRun) setupWells(nt int) {
	u.book.setupWells(nt)
	u.broken = make([]bool, len(u.r.Producers))
}

func (u *updateRun) run() error {
	m, r := u.m, u.r
	end := m.Run.End
	n := m.Grid.N()
	u.pv = m.PoreVolumes()
	u.sw = make([]float64, n)
	for c := range u.sw {
		u.sw[c] = u.swi
	}
	u.mob = make([]float64, n)
	u.acc, u.vol = make([]float64, n), make([]float64, n)
	if m.HasGravity() {
		u.rho = make([]float64, n)
	}
	if u.grav != nil {
		u.gcell, u.swPre, u.delta = make([]float64, n), make([]float64, n), make([]float64, n)
	}
	u.wells = make([]reservoir.Well, len(m.Wells))

	updates := UpdateTimes(m, u.sched)
	tl := newTimeline(m, u.s.Frames, updates)
	r.Times = tl.reports
	nt := len(tl.reports)
	r.PVI = make([]float64, nt)
	u.setupWells(nt)
	u.cells, u.avgSw = u.syncCells, u.partitionSw

	if u.sched.HasChanges(end) && m.History == nil {
		opening := 0
		for _, w := range m.Wells {
			if w.Open > 0 && w.Open <= end {
				opening++
			}
		}
		u.warn(fmt.Sprintf("the case has %d schedule event(s) and %d well(s) opening after day 0: the run uses pressure updates (%d pressure solves) to honour them",
			len(m.Schedule), opening, len(updates)))
	}
	if mr := u.ff.EndpointMobilityRatio(); mr > 2 && len(updates) < 5 {
		u.warn(fmt.Sprintf("end-point mobility ratio is %.2g (above 2) and the run has only %d pressure solve(s): use more pressure updates (run.pressure_updates) for a better estimate", mr, len(updates)))
	}
	u.logf("pressure updates: %d solves over %g days", len(updates), end)
	if err := drive(u, tl); err != nil {
		return err
	}
	u.finish()
	return nil
}

// ledger returns the run's book (stepper).
func (u *updateRun) ledger() *book { return &u.book }

// solve computes the total mobility from the cell saturations and solves
// the pressure with the wells in force at t.
func (u *updateRun) solve(t float64) (*pressure.Solution, error) {
	m := u.m
	u.sched.AtInto(u.wells, t)
	for c := range u.mob {
		if m.Active[c] {
			u.mob[c] = u.ff.Mobility(u.sw[c])
		} else {
			u.mob[c] = 0
		}
	}
	in := pressure.Input{Model: m, Mobility: u.mob, Wells: u.wells}
	if u.rho != nil {
		densities(m, u.sw, u.rho)
		in.Density = u.rho
	}
	if u.seq == nil {
		u.seq = pressure.NewSequence(u.s.Pressure)
	}
	sol, err := u.seq.Solve(in)
	if err != nil {
		return nil, fmt.Errorf("pressure solve at day %g: %w", t, err)
	}
	r := u.r
	r.Solves++
	r.Iterations += sol.Iterations
	r.RelResidual = math.Max(r.RelResidual, sol.RelResidual)
	datum, limit, notes := applyDatum(m, sol, u.wells, t)
	for _, n := range notes {
		u.warnAt(t, n)
	}
	for _, w := range sol.Warnings {
		if datum != nil && datumWarning(w) {
			continue // answered by the pressure datum
		}
		u.warnAt(t, w)
	}
	if datum != nil {
		u.warnAt(t, datumNote(m))
	}
	if err := checkSolve(EngineStreamline, sol, t); err != nil {
		return nil, err
	}
	for wi, w := range sol.Wells {
		rate := math.Abs(w.Q)
		if w.Shut {
			rate = 0
		}
		rec := WellRecord{Time: t, Well: w.Name, Type: w.Type, Control: w.Control, Rate: rate, BHP: w.BHP, Limit: w.LimitReached, Relative: w.Relative}
		if datum != nil && datum[wi] {
			rec.Relative, rec.Limit = false, limit[wi]
		}
		r.WellLog = append(r.WellLog, rec)
	}
	return sol, nil
}

// solveAt solves the pressure with the wells in force at t0, traces the
// streamlines and sets up their transport (stepper).
func (u *updateRun) solveAt(t0 float64) error {
	m, r := u.m, u.r
	u.syncCells()
	u.lazy = false
	u.logf("update %d at day %g: pressure", r.Solves+1, t0)
	sol, err := u.solve(t0)
	if err != nil {
		return err
	}
	u.sol = sol
	if r.Pressure == nil {
		r.Pressure = sol
	}
	// Well rates of the interval.
	flowing := false
	for p := range u.rate {
		u.rate[p] = 0
	}
	for wi, w := range sol.Wells {
		u.limitFlag(wi, w)
		if w.Shut || w.Q == 0 {
			continue
		}
		flowing = true
		if w.Q < 0 && u.prodOf[wi] >= 0 {
			u.rate[u.prodOf[wi]] = -w.Q
		}
	}
	for k := range r.Injectors {
		in := &r.Injectors[k]
		in.Rate = 0
		if w := sol.Wells[in.Well]; !w.Shut && w.Type == reservoir.Injector {
			in.Rate = math.Max(w.Q, 0)
		}
	}
	for p := range r.Producers {
		r.Producers[p].Rate = u.rate[p]
	}

	var tr *streamline.Result
	if flowing {
		count := m.Run.Streamlines
		if u.s.Streamlines > 0 {
			count = u.s.Streamlines
		}
		keep := !u.firstTraceDone
		// Retraces feed only the transport: no polylines, no time-of-flight maps.
		tr, err = streamline.Trace(Field(m, sol), streamline.Settings{Count: count, Workers: u.workers, KeepPaths: keep, VolumesOnly: !keep})
		if err != nil {
			return fmt.Errorf("streamlines at day %g: %w", t0, err)
		}
		for _, w := range tr.Warnings {
			u.warnAt(t0, w)
		}
		if !u.firstTraceDone {
			u.firstTraceDone = true
			r.Trace = tr
			r.StreamlineCount = len(tr.Lines)
			r.setDiagnostics(tr, u.pv)
		}
		u.partition = tr.ProducerPartition
		if u.ls, err = newLineSet(tr, u.pv); err != nil {
			return fmt.Errorf("streamlines at day %g: %w", t0, err)
		}
		r.Allocation = append(r.Allocation, AllocationBlock{Time: t0, Pairs: tr.Pairs, PoreVolumes: tr.PairVolumes(u.ls.seg)})
		if u.grav != nil {
			u.grav.alongLine(sol, u.gcell)
		}
		if err := u.setupLines(sol, t0); err != nil {
			return err
		}
	} else {
		u.warnAt(t0, fmt.Sprintf("no well flows from day %g: saturations stay as they are", t0))
		u.ls = nil
	}

	return nil
}

// advance moves the water along the streamlines from t to t1 and maps the
// saturations to the cells (stepper).
func (u *updateRun) advance(t, t1 float64) error {
	if err := u.chunk(u.sol, t, t1); err != nil {
		return err
	}
	u.avgDone = false
	if u.lazy {
		u.dirty = true
		return nil
	}
	u.mapToCells()
	if u.grav != nil {
		return u.gravityStep(t1 - t)
	}
	return nil
}

// setupLines prepares the transport of the current streamlines: which
// lines move water, their producers and inlets, their nodes, and the
// initial node saturations from the cells.
func (u *updateRun) setupLines(sol *pressure.Solution, t0 float64) error {
	ls, r := u.ls, u.r
	nl := len(ls.q)
	u.act = growBool(u.act, nl)
	u.lprod = growInt(u.lprod, nl)
	u.sIn = growF(u.sIn, nl)
	u.injWater = growBool(u.injWater, nl)
	u.out = growF(u.out, nl)
	u.gstart = growInt(u.gstart, nl+1)
	u.gn = growInt(u.gn, nl)
	if cap(u.lerr) < nl {
		u.lerr = make([]error, nl)
	}
	u.lerr = u.lerr[:nl]
	clear(u.lerr)
	nseg := len(ls.cell)
	u.segS = growF(u.segS, nseg)
	u.segW = growF(u.segW, nseg)
	// Per line in parallel: the segment saturations from the cells and
	// the count of positive segments (in gn until the nodes are made).
	u.parallel(nl, func(_, i int) {
		npos := 0
		for s := ls.start[i]; s < ls.start[i+1]; s++ {
			u.segS[s] = u.sw[ls.cell[s]]
			if ls.b[s] > ls.a[s] {
				npos++
			}
		}
		u.gn[i] = npos
	})
	// Node spans, serially: at most twice the positive segments.
	u.gstart[0] = 0
	np := len(r.Producers)
	lineFlux := make([]float64, np)
	minTau := make([]float64, np)
	for p := range minTau {
		minTau[p] = math.Inf(1)
	}
	for i := range nl {
		u.act[i] = false
		u.lprod[i] = -1
		npos := u.gn[i]
		if ls.q[i] > 0 && ls.prod[i] >= 0 && ls.total[i] > 0 && npos > 0 {
			u.act[i] = true
			w := ls.prod[i]
			if sol.Wells[w].Type == reservoir.Producer && u.prodOf[w] >= 0 {
				p := u.prodOf[w]
				u.lprod[i] = p
				lineFlux[p] += ls.q[i]
				if ls.inj[i] >= 0 {
					minTau[p] = math.Min(minTau[p], ls.total[i])
				}
			} else {
				u.lprod[i] = -2
			}
			inj := ls.inj[i]
			u.injWater[i] = inj >= 0 && sol.Wells[inj].Type == reservoir.Injector
		}
		nn := 0
		if u.act[i] {
			nn = 2 * npos
		} else {
			u.gn[i] = 0
		}
		u.gstart[i+1] = u.gstart[i] + nn
	}
	for p := range r.Producers {
		P := &r.Producers[p]
		// Tracer breakthrough: the smallest time of flight of the first
		// solve in which a line from an injector reaches the producer.
		if math.IsNaN(P.TracerBreakthrough) && !math.IsInf(minTau[p], 1) {
			P.TracerBreakthrough = t0 + minTau[p]
		}
		if u.rate[p] > 0 && lineFlux[p] == 0 {
			u.warnAt(t0, fmt.Sprintf("producer %s: no streamline reaches it from day %g; it produces at the water fraction of its cell", P.Name, t0))
		}
		P.DrainedVolume = 0
	}
	for i := range nl {
		if p := u.lprod[i]; p >= 0 {
			r.Producers[p].DrainedVolume += ls.q[i] * ls.total[i]
		}
	}
	total := u.gstart[nl]
	u.gs = growF(u.gs, total)
	u.gd = growF(u.gd, total)
	if u.grav != nil {
		u.gg = growF(u.gg, total)
	}
	u.backup = growF(u.backup, total)
	if len(u.scratch) < u.workers {
		u.scratch = make([]lineScratch, u.workers)
	}
	u.parallel(nl, func(w, i int) {
		if !u.act[i] {
			return
		}
		sc := &u.scratch[w]
		n := u.nodes(i, sc)
		if n > u.gstart[i+1]-u.gstart[i] {
			u.lerr[i] = fmt.Errorf("%d nodes exceed the %d reserved", n, u.gstart[i+1]-u.gstart[i])
			return
		}
		u.gn[i] = n
		gs, gd := u.lineNodes(i)
		copy(gd, sc.dstd[:n])
		// The engine's own partitions (positive segments, nodes made of
		// them): Remap's checks are not needed.
		transport.RemapTrusted(gs, gd, sc.src, sc.srcd)
		if u.grav != nil {
			sc.srcg = sc.srcg[:0]
			for s := u.ls.start[i]; s < u.ls.start[i+1]; s++ {
				if u.ls.b[s] > u.ls.a[s] {
					sc.srcg = append(sc.srcg, u.gcell[u.ls.cell[s]])
				}
			}
			u.lerr[i] = transport.Remap(u.lineGravity(i), gd, sc.srcg, sc.srcd)
		}
		if !u.injWater[i] {
			u.sIn[i] = gs[0]
		} else {
			u.sIn[i] = u.sLine
		}
	})
	if err := u.firstError("mapping cells onto streamlines"); err != nil {
		return err
	}
	// The line volume of each cell (flux*tau of the active lines), in
	// line order, for the maps to the cells.
	clear(u.vol)
	for i := range nl {
		if !u.act[i] {
			continue
		}
		q := ls.q[i]
		for s := ls.start[i]; s < ls.start[i+1]; s++ {
			if d := ls.b[s] - ls.a[s]; d > 0 {
				u.vol[ls.cell[s]] += q * d
			}
		}
	}
	starved := false
	for p := range r.Producers {
		starved = starved || u.rate[p] > 0 && lineFlux[p] == 0
	}
	takesIn := false
	for _, w := range sol.Wells {
		takesIn = takesIn || !w.Shut && w.Q > 0 && w.Type != reservoir.Injector
	}
	u.lazy = u.grav == nil && !starved && !takesIn && !eagerCells
	if u.lazy {
		u.setupPieces()
	}
	return nil
}

// eagerCells maps the lines to the cells at every stop, as when the
// reports need the cells; a test compares the two.
var eagerCells = false

// setupPieces prepares the partition saturations of the deferred cell map
// (updateRun.lazy): each partition's pore volume and the saturation volume of its cells no
// line crosses, and per line the pieces: the overlap of each node with
// the segments of each partition's cells, weighted by the line's flux and
// the cell's pore volume over its line volume, so that the pieces times
// the node saturations add up to sum pv*sw over the partition's crossed
// cells as mapToCells would leave them.
func (u *updateRun) setupPieces() {
	ls, r := u.ls, u.r
	nl := len(ls.q)
	np := len(r.Producers)
	u.den, u.num0, u.avg = growF(u.den, np), growF(u.num0, np), growF(u.avg, np)
	clear(u.den)
	clear(u.num0)
	slot := func(c int) int32 {
		if w := u.partition[c]; w >= 0 && u.prodOf[w] >= 0 {
			return int32(u.prodOf[w])
		}
		return -1
	}
	for c := range u.vol {
		if p := slot(c); p >= 0 {
			u.den[p] += u.pv[c]
			if !(u.vol[c] > 0) {
				u.num0[p] += u.pv[c] * u.sw[c]
			}
		}
	}
	u.pstart = growInt(u.pstart, nl+1)
	u.pn = growInt(u.pn, nl)
	u.pstart[0] = 0
	for i := range nl {
		k := 0
		if u.act[i] {
			k = u.gn[i] + ls.start[i+1] - ls.start[i]
		}
		u.pstart[i+1] = u.pstart[i] + k
	}
	total := u.pstart[nl]
	if cap(u.pNode) < total {
		c := total + total/4 // room for the next update's lines
		u.pNode, u.pSlot = make([]int32, c), make([]int32, c)
		u.rSlot, u.rNode, u.rK, u.rLen = make([]int32, c), make([]int32, c), make([]int32, c), make([]int32, c)
	}
	u.pNode, u.pSlot = u.pNode[:total], u.pSlot[:total]
	u.rSlot, u.rNode, u.rK, u.rLen = u.rSlot[:total], u.rNode[:total], u.rK[:total], u.rLen[:total]
	u.rn = growInt(u.rn, nl)
	u.pW = growF(u.pW, total)
	// Per cell, pore volume over line volume (u.acc is free until the
	// next map to the cells).
	fac := u.acc
	for c, v := range u.vol {
		fac[c] = 0
		if v > 0 {
			fac[c] = u.pv[c] / v
		}
	}
	u.psum = growF(u.psum, nl*np)
	u.parallel(nl, func(_, i int) {
		u.pn[i], u.rn[i] = 0, 0
		if !u.act[i] {
			return
		}
		_, gd := u.lineNodes(i)
		n := len(gd)
		last := -1
		for s := ls.start[i]; s < ls.start[i+1]; s++ {
			if ls.b[s] > ls.a[s] {
				last = s
			}
		}
		base, cnt := u.pstart[i], 0
		q := ls.q[i]
		inf := math.Inf(1)
		j, nodeCum := 0, gd[0]
		nodeEnd := nodeCum
		if n == 1 {
			nodeEnd = inf
		}
		pos, segCum := 0.0, 0.0
		for s := ls.start[i]; s <= last; s++ {
			d := ls.b[s] - ls.a[s]
			if !(d > 0) {
				continue
			}
			segCum += d
			segEnd := segCum
			if s == last {
				segEnd = inf
			}
			c := ls.cell[s]
			p := slot(int(c))
			f := q * fac[c]
			for {
				end := min(nodeEnd, segEnd)
				if math.IsInf(end, 1) {
					end = max(nodeCum, segCum)
				}
				if ov := end - pos; ov > 0 && p >= 0 {
					if k := base + cnt - 1; cnt > 0 && u.pNode[k] == int32(j) && u.pSlot[k] == p {
						u.pW[k] += ov * f
					} else {
						u.pNode[base+cnt], u.pSlot[base+cnt], u.pW[base+cnt] = int32(j), p, ov*f
						cnt++
					}
				}
				pos = end
				advNode := nodeEnd <= segEnd && j < n-1
				advSeg := segEnd <= nodeEnd
				if advNode {
					j++
					nodeCum += gd[j]
					nodeEnd = nodeCum
					if j == n-1 {
						nodeEnd = inf
					}
				}
				if advSeg {
					break
				}
			}
		}
		u.pn[i] = cnt
		// Runs of pieces on consecutive nodes of one partition.
		runs := 0
		for k := base; k < base+cnt; k++ {
			if r := base + runs - 1; runs > 0 && u.pSlot[k] == u.rSlot[r] && u.pNode[k] == u.rNode[r]+u.rLen[r] {
				u.rLen[r]++
				continue
			}
			u.rSlot[base+runs], u.rNode[base+runs], u.rK[base+runs], u.rLen[base+runs] = u.pSlot[k], u.pNode[k], int32(k), 1
			runs++
		}
		u.rn[i] = runs
	})
}

// syncCells maps the lines to the cells if an advance has moved them
// since the last map (book.cells).
func (u *updateRun) syncCells() {
	if u.dirty {
		u.dirty = false
		u.mapToCells()
	}
}

// partitionSw returns the pore-volume weighted water saturation of the
// cells of a producer's partition (book.avgSw): from the cells, or with
// the deferred cell map from the node saturations and the pieces (the
// same sum, in another order).
func (u *updateRun) partitionSw(well int) float64 {
	if !u.lazy {
		return partitionSw(u.partition, u.pv, u.sw, well)
	}
	if !u.avgDone {
		u.avgDone = true
		// Per line in parallel, then the lines in order.
		np := len(u.avg)
		u.parallel(len(u.ls.q), func(_, i int) {
			sum := u.psum[i*np : (i+1)*np]
			clear(sum)
			gs := u.gs[u.gstart[i]:]
			for r := u.pstart[i]; r < u.pstart[i]+u.rn[i]; r++ {
				k, n := int(u.rK[r]), int(u.rLen[r])
				w, g := u.pW[k:k+n], gs[u.rNode[r]:int(u.rNode[r])+n]
				acc := 0.0
				for t, v := range w {
					acc += v * g[t]
				}
				sum[u.rSlot[r]] += acc
			}
		})
		copy(u.avg, u.num0)
		for i := range u.ls.q {
			if u.pn[i] == 0 {
				continue
			}
			for p, v := range u.psum[i*np : (i+1)*np] {
				u.avg[p] += v
			}
		}
		for p, v := range u.den {
			if v > 0 {
				u.avg[p] /= v
			} else {
				u.avg[p] = math.NaN()
			}
		}
	}
	if p := u.prodOf[well]; p >= 0 {
		return u.avg[p]
	}
	return math.NaN()
}

// nodes builds the node partition of line i's time of flight in
// sc.dstd and the positive segments (saturations and times) in sc.src and
// sc.srcd, and returns the node count. With h = total/segments, segments
// longer than h are split into pieces of length in [h, 2h) and runs of
// shorter ones merged into nodes of at least h/2.
func (u *updateRun) nodes(i int, sc *lineScratch) int {
	ls := u.ls
	sc.src, sc.srcd = sc.src[:0], sc.srcd[:0]
	for s := ls.start[i]; s < ls.start[i+1]; s++ {
		if d := ls.b[s] - ls.a[s]; d > 0 {
			sc.src = append(sc.src, u.segS[s])
			sc.srcd = append(sc.srcd, d)
		}
	}
	T := 0.0
	for _, d := range sc.srcd {
		T += d
	}
	h := T / float64(len(sc.srcd))
	sc.dstd = sc.dstd[:0]
	pending := 0.0
	for _, d := range sc.srcd {
		if d >= h {
			k := max(int(d/h), 1)
			piece := d / float64(k)
			for j := range k {
				v := piece
				if j == 0 {
					v += pending
				}
				sc.dstd = append(sc.dstd, v)
			}
			pending = 0
			continue
		}
		pending += d
		if pending >= 0.5*h {
			sc.dstd = append(sc.dstd, pending)
			pending = 0
		}
	}
	if pending > 0 {
		if n := len(sc.dstd); n > 0 {
			sc.dstd[n-1] += pending
		} else {
			sc.dstd = append(sc.dstd, pending)
		}
	}
	return len(sc.dstd)
}

// lineGravity returns the gravity coefficients of line i's nodes.
func (u *updateRun) lineGravity(i int) []float64 {
	a := u.gstart[i]
	return u.gg[a : a+u.gn[i]]
}

// advanceLine advances line i's node saturations s (times of flight gd)
// by dt with inlet state sIn: transport.Advance, or with gravity
// transport.AdvanceGravity with the line's node coefficients.
func (u *updateRun) advanceLine(sc *lineScratch, i int, s, gd []float64, sIn, dt float64) (float64, error) {
	if u.grav != nil {
		out, _, err := sc.ws.AdvanceGravity(s, gd, u.lineGravity(i), sIn, dt, u.fl, u.grav.gr, transport.Settings{CFL: u.set.CFL})
		return out, err
	}
	out, _, err := sc.ws.Advance(s, gd, sIn, dt, u.fl, u.set)
	return out, err
}

// gravityStep is the second half of the operator splitting of gravity
// (Bratvedt, Gimse and Tegnander 1996): after the streamline step of dt,
// the counter-current gravity flux across the streamlines moves water on
// the grid (gravityFaces.step), and each cell's change goes back to the
// segments of the lines crossing it (in proportion to the room each
// segment has, so they stay in [0, 1] and their flux*tau weighted mean
// moves by exactly the cell's change) and from them to the line nodes
// (transport.Remap). Both moves conserve water.
func (u *updateRun) gravityStep(dt float64) error {
	copy(u.swPre, u.sw)
	if u.grav.step(u.sw, u.pv, u.delta, dt, 0.9) == 0 || u.ls == nil {
		return nil
	}
	ls := u.ls
	u.parallel(len(ls.q), func(w, i int) {
		if !u.act[i] {
			return
		}
		sc := &u.scratch[w]
		sc.src, sc.srcd = sc.src[:0], sc.srcd[:0]
		for s := ls.start[i]; s < ls.start[i+1]; s++ {
			d := ls.b[s] - ls.a[s]
			if !(d > 0) {
				continue
			}
			c := ls.cell[s]
			v, s0, s1 := u.segS[s], u.swPre[c], u.sw[c]
			switch {
			case s1 > s0:
				v += (s1 - s0) * (1 - v) / (1 - s0)
			case s1 < s0:
				v -= (s0 - s1) * v / s0
			}
			u.segS[s] = v
			sc.src = append(sc.src, v)
			sc.srcd = append(sc.srcd, d)
		}
		gs, gd := u.lineNodes(i)
		u.lerr[i] = transport.Remap(gs, gd, sc.src, sc.srcd)
	})
	return u.firstError("gravity step")
}

func (u *updateRun) lineNodes(i int) (gs, gd []float64) {
	a := u.gstart[i]
	return u.gs[a : a+u.gn[i]], u.gd[a : a+u.gn[i]]
}

func (u *updateRun) firstError(what string) error {
	for i, e := range u.lerr {
		if e != nil {
			return fmt.Errorf("%s: streamline %d: %w", what, i, e)
		}
	}
	return nil
}

// parallel runs fn for i in [0, n) on the workers, in runs of 8 lines
// (internal/parallel.Each). fn must write only to per-i slots or to
// per-worker scratch that it resets for each i.
func (u *updateRun) parallel(n int, fn func(worker, i int)) {
	parallel.Each(n, u.workers, 8, fn)
}

// chunk advances every line from t to t1 and books the production.
func (u *updateRun) chunk(sol *pressure.Solution, t, t1 float64) error {
	dt := t1 - t
	if !(dt > 0) {
		return nil
	}
	r := u.r
	// Injection.
	inj := 0.0
	for wi, w := range sol.Wells {
		if w.Shut || !(w.Q > 0) {
			continue
		}
		if w.Type == reservoir.Injector {
			inj += w.Q * dt
			if k := u.injOf[wi]; k >= 0 {
				r.Injectors[k].CumWater += w.Q * dt
			}
		} else {
			// A producer that takes fluid in under BHP control: it
			// returns water at its cell's water fraction.
			inj += w.Q * dt * u.fl.Fw(u.sw[w.Cell])
		}
	}
	u.cumInj += inj
	np := len(r.Producers)
	u.water = growF(u.water, np)
	u.flux = growF(u.flux, np)
	u.inst = growF(u.inst, np)
	water, flux, inst := u.water, u.flux, u.inst // inst: outlet water at t1
	clear(water)
	clear(flux)
	clear(inst)
	watchBT := false
	if u.ls != nil {
		for p := range np {
			if !u.broken[p] && u.rate[p] > 0 {
				watchBT = true
			}
		}
		// With local time stepping the outlet history of each line gives
		// the breakthrough parts (u.parts) of the lines of the producers
		// still watched; otherwise locate advances them again from backup.
		u.fromHistory = watchBT && u.grav == nil && u.set.Local
		if watchBT && !u.fromHistory {
			copy(u.backup, u.gs)
		}
		if u.fromHistory {
			u.parts = growF(u.parts, len(u.ls.q)*breakthroughProbes)
			u.first = growF(u.first, len(u.ls.q))
		}
		u.parallel(len(u.ls.q), func(w, i int) {
			if !u.act[i] {
				return
			}
			gs, gd := u.lineNodes(i)
			sIn := u.sIn[i]
			if !u.injWater[i] {
				sIn = gs[0]
			}
			u.sIn[i] = sIn
			p := u.lprod[i]
			watched := u.fromHistory && p >= 0 && !u.broken[p] && u.rate[p] > 0
			if watched {
				u.first[i] = u.fl.Fw(gs[len(gs)-1])
			}
			sc := &u.scratch[w]
			u.out[i], u.lerr[i] = u.advanceLine(sc, i, gs, gd, sIn, dt)
			if watched && u.lerr[i] == nil && !sc.ws.OutflowParts(u.parts[i*breakthroughProbes:(i+1)*breakthroughProbes]) {
				u.lerr[i] = errors.New("no outlet history of the local steps")
			}
		})
		if err := u.firstError(fmt.Sprintf("transport from day %g to %g", t, t1)); err != nil {
			return err
		}
		for i := range u.ls.q {
			if !u.act[i] {
				continue
			}
			q := u.ls.q[i]
			if !u.injWater[i] {
				u.unsourced += q * dt * u.fl.Fw(u.sIn[i])
			}
			switch p := u.lprod[i]; {
			case p >= 0:
				water[p] += q * u.out[i]
				flux[p] += q
				gs, _ := u.lineNodes(i)
				inst[p] += q * u.fl.Fw(gs[len(gs)-1])
			case p == -2:
				u.otherProduced += q * u.out[i] * dt
			}
		}
	}
	for p := range np {
		P := &r.Producers[p]
		if u.rate[p] <= 0 {
			continue
		}
		var fw float64
		if flux[p] > 0 {
			fw = water[p] / flux[p]
		} else {
			fw = u.fl.Fw(u.sw[u.m.Wells[P.Well].Cell])
		}
		// No clamp here: the flux table returns fw in [0, 1], the lines
		// transported that same water, and a clamp of this copy alone
		// would book water the lines never delivered.
		u.perW[p] += u.rate[p] * fw * dt
		u.perL[p] += u.rate[p] * dt
		if !u.broken[p] && (fw > u.threshold || flux[p] > 0 && inst[p] > u.threshold*flux[p]) {
			u.broken[p] = true
			P.Breakthrough = u.locate(p, t, dt, flux[p] > 0)
		}
	}
	return nil
}

// locate finds the breakthrough time of producer p within the chunk that
// starts at t and lasts dt: the mean water fraction of its lines over each
// of breakthroughProbes equal parts of the chunk (from the outlet
// histories of the local steps, or by advancing the chunk again from its
// saved state in that many parts), taken at the part midpoints, is
// interpolated to the threshold.
func (u *updateRun) locate(p int, t, dt float64, hasLines bool) float64 {
	if !hasLines {
		return t + dt
	}
	const K = breakthroughProbes
	ls := u.ls
	// Per line, the outlet water fraction of each part, in line order.
	var lines []int
	for i := range ls.q {
		if u.act[i] && u.lprod[i] == p {
			lines = append(lines, i)
		}
	}
	if u.fromHistory {
		return u.crossing(lines, t, dt, func(j, k int) float64 { return u.parts[lines[j]*K+k] },
			func(i int) float64 { return u.first[i] })
	}
	probes := make([]float64, len(lines)*K)
	errs := make([]error, len(lines))
	u.parallel(len(lines), func(w, j int) {
		i := lines[j]
		sc := &u.scratch[w]
		a, b := u.gstart[i], u.gstart[i]+u.gn[i]
		sc.probeNodes = append(sc.probeNodes[:0], u.backup[a:b]...)
		gd := u.gd[a:b]
		sIn := u.sIn[i]
		for k := range K {
			if !u.injWater[i] {
				sIn = sc.probeNodes[0]
			}
			out, err := u.advanceLine(sc, i, sc.probeNodes, gd, sIn, dt/K)
			if err != nil {
				errs[j] = err
				return
			}
			probes[j*K+k] = out
		}
	})
	for _, e := range errs {
		if e != nil {
			return t + dt
		}
	}
	return u.crossing(lines, t, dt, func(j, k int) float64 { return probes[j*K+k] },
		func(i int) float64 { return u.fl.Fw(u.backup[u.gstart[i]+u.gn[i]-1]) })
}

// crossing interpolates the time at which the flux-weighted water
// fraction of the lines crosses the threshold within the chunk from t to
// t+dt, from each line's outlet fraction at the start (first) and its mean
// over each of the breakthroughProbes parts (part), taken at the part
// midpoints.
func (u *updateRun) crossing(lines []int, t, dt float64, part func(j, k int) float64, first func(i int) float64) float64 {
	const K = breakthroughProbes
	ls := u.ls
	frac := make([]float64, K)
	flux := 0.0
	for j, i := range lines {
		q := ls.q[i]
		flux += q
		for k := range K {
			frac[k] += q * part(j, k)
		}
	}
	prevT, prevV := t, 0.0
	// Water fraction at the start of the chunk: the outlet nodes' state.
	for _, i := range lines {
		prevV += ls.q[i] * first(i)
	}
	prevV /= flux
	if prevV > u.threshold {
		return t
	}
	for k := range K {
		v := frac[k] / flux
		tk := t + (float64(k)+0.5)*dt/K
		if v > u.threshold {
			return prevT + (tk-prevT)*(u.threshold-prevV)/(v-prevV)
		}
		prevT, prevV = tk, v
	}
	return t + dt
}

// mapToCells maps the node saturations back to the segments and the cells
// (flux*tau weighting); cells no line crosses keep their saturation.
func (u *updateRun) mapToCells() {
	if u.ls == nil {
		return
	}
	ls := u.ls
	nl := len(ls.q)
	u.parallel(nl, func(w, i int) {
		if !u.act[i] {
			return
		}
		sc := &u.scratch[w]
		sc.dstd = sc.dstd[:0]
		for s := ls.start[i]; s < ls.start[i+1]; s++ {
			if d := ls.b[s] - ls.a[s]; d > 0 {
				sc.dstd = append(sc.dstd, d)
			}
		}
		sc.dst = growF(sc.dst, len(sc.dstd))
		gs, gd := u.lineNodes(i)
		transport.RemapTrusted(sc.dst, sc.dstd, gs, gd)
		j := 0
		q := ls.q[i]
		for s := ls.start[i]; s < ls.start[i+1]; s++ {
			u.segW[s] = 0
			if d := ls.b[s] - ls.a[s]; d > 0 {
				u.segS[s] = sc.dst[j]
				u.segW[s] = q * d * u.segS[s]
				j++
			}
		}
	})
	// The cell sums in line order (u.vol: setupLines).
	clear(u.acc)
	for i := range nl {
		if !u.act[i] {
			continue
		}
		for s := ls.start[i]; s < ls.start[i+1]; s++ {
			u.acc[ls.cell[s]] += u.segW[s]
		}
	}
	for c, v := range u.vol {
		if v > 0 {
			u.sw[c] = u.acc[c] / v
		}
	}
}

// finish fills the field series and the mass balance.
func (u *updateRun) finish() {
	r := u.r
	u.book.finish()
	if u.unsourced > 1e-6*u.cumInj && u.cumInj > 0 {
		u.warn(fmt.Sprintf("%.2g of the injected volume entered streamlines that start at no injector (at the water fraction of their first cell); it shows in the mass balance", u.unsourced/u.cumInj))
	}
	for p := range r.Producers {
		P := &r.Producers[p]
		if P.Breakthrough > u.m.Run.End {
			P.Breakthrough = math.NaN()
		}
	}
}

// fillField sums the producers into the field series.
func fillField(r *Result) {
	nt := len(r.Times)
	r.FieldWaterCut = make([]float64, nt)
	r.FieldOilRate = make([]float64, nt)
	r.FieldWaterRate = make([]float64, nt)
	r.FieldCumOil = make([]float64, nt)
	r.FieldCumWater = make([]float64, nt)
	r.RecoveryFactor = make([]float64, nt)
	for k := range nt {
		for p := range r.Producers {
			P := &r.Producers[p]
			r.FieldOilRate[k] += P.OilRate[k]
			r.FieldWaterRate[k] += P.WaterRate[k]
			r.FieldCumOil[k] += P.CumOil[k]
			r.FieldCumWater[k] += P.CumWater[k]
		}
		if q := r.FieldOilRate[k] + r.FieldWaterRate[k]; q > 0 {
			r.FieldWaterCut[k] = r.FieldWaterRate[k] / q
		}
		if r.OOIP > 0 {
			r.RecoveryFactor[k] = r.FieldCumOil[k] / r.OOIP
		}
	}
}

func growF(b []float64, n int) []float64 {
	if cap(b) < n {
		return make([]float64, n, n+n/4) // room for the next update's lines
	}
	return b[:n]
}

func growInt(b []int, n int) []int {
	if cap(b) < n {
		return make([]int, n, n+n/4) // room for the next update's lines
	}
	return b[:n]
}

func growBool(b []bool, n int) []bool {
	if cap(b) < n {
		return make([]bool, n, n+n/4) // room for the next update's lines
	}
	return b[:n]
}

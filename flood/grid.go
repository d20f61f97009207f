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

// GridOptions tunes the grid engine (RunGrid). Run takes them from
// Settings.Grid when Settings.Engine is EngineGrid; the zero value is the
// default.
type GridOptions struct {
	// CFL is the Courant number of the explicit saturation step; 0 = 0.9.
	// It must not exceed 1.
	CFL float64
	// ResolveEvery re-solves the pressure at least every this many steps;
	// 1 = every step, 0 = only by MaxChange (and at schedule changes).
	ResolveEvery int
	// MaxChange re-solves the pressure as soon as the pore-volume weighted
	// mean of |S - S at the last solve| exceeds it; 0 = 0.002.
	MaxChange float64
	// Threshold is the produced water fraction that marks breakthrough;
	// 0 = BreakthroughThreshold.
	Threshold float64
	// MaxSteps bounds the number of saturation steps; 0 = 20 million.
	MaxSteps int
}

func (o GridOptions) resolved() (GridOptions, error) {
	if o.CFL == 0 {
		o.CFL = 0.9
	}
	if !(o.CFL > 0 && o.CFL <= 1) {
		return o, fmt.Errorf("flood: grid CFL number %g outside (0, 1]", o.CFL)
	}
	if o.ResolveEvery < 0 || o.MaxSteps < 0 || o.MaxChange < 0 || math.IsNaN(o.MaxChange) {
		return o, fmt.Errorf("flood: negative grid options (resolve every %d, max steps %d, max change %g)", o.ResolveEvery, o.MaxSteps, o.MaxChange)
	}
	if o.MaxChange == 0 {
		o.MaxChange = 0.002
	}
	if !(o.Threshold > 0) {
		o.Threshold = BreakthroughThreshold
	}
	if o.MaxSteps == 0 {
		o.MaxSteps = 20_000_000
	}
	return o, nil
}

// RunGrid runs the case with a conventional cell-based engine on the same
// grid, wells and fluids: IMPES, implicit pressure and explicit saturation
// (Sheldon, Harris and Bavly 1959; Stone and Garder 1961; Aziz and Settari
// 1979, chapter 5, from memory). The pressure is solved through one
// pressure.Sequence per run (each solve warm-started from the last), the
// total mobility of each cell taken from its saturation. The saturation step is the single-point upstream finite
// volume scheme: the water crossing a face is fw(upstream saturation)
// times the face's total flux; injectors inject water (fraction 1),
// producers produce the water fraction of their cell. The time step is
// the largest with max over cells of |dfw/dS| * (flux into the cell) *
// dt / pore volume <= CFL, the speed bounded over the saturations of the
// cell and its upstream neighbours (which keeps the scheme monotone, so
// saturations stay within the initial and injected values). The step
// stops exactly at report, snapshot and schedule times.
//
// Gravity (a case with depth): the pressure solve takes each cell's
// mobility-weighted density, and each face carries, besides fw times its
// total flux, the counter-current gravity flux lw lo / lt times the
// geometric transmissibility, the density difference and the depth
// difference, each mobility upwinded in its own phase's direction
// (gravityFaces.flux); the stable step bounds both.
//
// The pressure is re-solved at schedule changes, every ResolveEvery steps
// when set, and whenever the pore-volume weighted mean absolute change of
// saturation since the last solve exceeds MaxChange (0.002 by default,
// about 500 solves per unit change of the mean saturation). Water is
// conserved to round-off; the balance is reported in MassBalanceError.
//
// Producers' report values are averages over the report interval.
// Breakthrough is the first time a producer's water fraction exceeds the
// threshold, interpolated linearly within the saturation step in which it
// happens. For the maps and the allocation, streamlines are traced once on
// the first pressure solution (and again at schedule changes, for the
// producer partitions that define AvgSw).
func RunGrid(m *reservoir.Model, s Settings, o GridOptions) (*Result, error) {
	g, err := newGridRun(m, s, o)
	if err != nil {
		return nil, err
	}
	if err := g.run(); err != nil {
		return nil, err
	}
	if err := checkResult(g.r); err != nil {
		return nil, err
	}
	return g.r, nil
}

type gridRun struct {
	book
	s    Settings
	o    GridOptions
	ff   *transport.FracFlow
	fl   *transport.Flux
	logf func(string, ...any)

	workers int
	sInj    float64
	sw0     []float64 // saturation at the last pressure solve
	fw      []float64 // fw of each cell at the step start
	delta   []float64 // water volume change of each cell over a step
	src     []float64 // well rate per cell (positive injection)
	srcW    []float64 // water fraction of the injected fluid per cell
	mob     []float64
	rho     []float64     // mobility-weighted density per cell (cases with depth)
	grav    *gravityFaces // gravity across faces; nil without depth
	wells   []reservoir.Well
	rowDt   []float64 // per row: largest stable step
	rowSum  []float64 // per row: partial sums
	sol     *pressure.Solution
	seq     *pressure.Sequence // the run's pressure solves (warm start, set-up reuse)

	prevFw []float64 // producer water fraction at the previous step start
	prevT  float64

	needSolve, retrace bool // a pressure solve (and a new trace) is due
	steps, stepsSince  int  // saturation steps in all and since the last solve
}

func newGridRun(m *reservoir.Model, s Settings, o GridOptions) (*gridRun, error) {
	if m == nil {
		return nil, errors.New("flood: nil model")
	}
	if !(m.Run.End > 0) || math.IsInf(m.Run.End, 0) {
		return nil, errors.New("run.end must be positive")
	}
	if s.Workers < 0 {
		return nil, fmt.Errorf("flood: negative worker count %d", s.Workers)
	}
	o, err := o.resolved()
	if err != nil {
		return nil, err
	}
	m, late, ff, fl, sched, sor, err := stepperInputs(m)
	if err != nil {
		return nil, err
	}
	g := &gridRun{book: newBook(m, sched, EngineGrid), s: s, o: o, ff: ff, fl: fl, logf: s.Log, sInj: 1 - sor}
	if g.logf == nil {
		g.logf = func(string, ...any) {}
	}
	for _, w := range late {
		g.warn(w)
	}
	if !(g.swi >= 0 && g.swi <= 1) {
		return nil, fmt.Errorf("flood: initial water saturation %g outside [0, 1]", g.swi)
	}
	g.workers = s.Workers
	if g.workers == 0 {
		g.workers = runtime.GOMAXPROCS(0)
	}
	g.grav = newGravityFaces(m)
	return g, nil
}

// rows runs fn over the grid rows on the workers (internal/parallel.Each);
// fn must write only to its rows' cells and slots.
func (g *gridRun) rows(fn func(j int)) {
	parallel.Each(g.m.Grid.NY, g.workers, 1, func(_, j int) { fn(j) })
}

func (g *gridRun) run() error {
	m, r := g.m, g.r
	end := m.Run.End
	n := m.Grid.N()
	g.pv = m.PoreVolumes()
	g.sw = make([]float64, n)
	for c := range g.sw {
		g.sw[c] = g.swi
	}
	g.sw0 = slices.Clone(g.sw)
	g.fw = make([]float64, n)
	g.delta = make([]float64, n)
	g.src = make([]float64, n)
	g.srcW = make([]float64, n)
	g.mob = make([]float64, n)
	if m.HasGravity() {
		g.rho = make([]float64, n)
	}
	g.wells = make([]reservoir.Well, len(m.Wells))
	g.rowDt = make([]float64, m.Grid.NY)
	g.rowSum = make([]float64, m.Grid.NY)

	changes := g.sched.Changes(end)
	tl := newTimeline(m, g.s.Frames, changes)
	r.Times = tl.reports
	nt := len(tl.reports)
	r.PVI = make([]float64, nt)
	g.setupWells(nt)
	if g.sched.HasChanges(end) && m.History == nil {
		g.warn(fmt.Sprintf("the case has %d schedule event(s) and well opening(s): the grid engine re-solves the pressure at each", len(changes)))
	}

	if err := drive(g, tl); err != nil {
		return err
	}
	g.logf("grid engine: %d saturation steps, %d pressure solves", g.steps, r.Solves)
	g.finish()
	return nil
}

// ledger returns the run's book (stepper).
func (g *gridRun) ledger() *book { return &g.book }

// solveAt asks for a pressure solve and a new trace at t, with the wells
// in force then (stepper); the solve runs at the start of the next
// advance, as do the re-solves the saturation changes call for.
func (g *gridRun) solveAt(float64) error {
	g.needSolve, g.retrace = true, true
	return nil
}

// advance moves the saturations from t to t1 in explicit steps of the
// largest stable size, re-solving the pressure every ResolveEvery steps
// or when the saturations have changed by MaxChange (stepper).
func (g *gridRun) advance(t, t1 float64) error {
	end := g.m.Run.End
	for t < t1 {
		if g.needSolve {
			if err := g.solve(t, g.retrace); err != nil {
				return err
			}
			g.needSolve, g.retrace, g.stepsSince = false, false, 0
		}
		dt := g.stableStep()
		if !(dt < t1-t) {
			dt = t1 - t
		}
		g.step(t, dt)
		g.steps++
		g.stepsSince++
		if g.steps > g.o.MaxSteps {
			return fmt.Errorf("grid engine: more than %d saturation steps by day %g (the CFL step is %g days); use the streamline engine or a coarser grid", g.o.MaxSteps, t, dt)
		}
		if t1-(t+dt) <= 1e-12*end {
			t = t1
		} else {
			t += dt
		}
		if g.o.ResolveEvery > 0 && g.stepsSince >= g.o.ResolveEvery || g.meanChange() > g.o.MaxChange {
			g.needSolve = true
		}
	}
	return nil
}

// setupWells builds the well lists (book.setupWells) and the grid
// engine's own per-producer state.
func (g *gridRun) setupWells(nt int) {
	g.book.setupWells(nt)
	g.prevFw = make([]float64, len(g.r.Producers))
}

// solve solves the pressure at t with the mobility of the current
// saturations; with retrace, streamlines are traced for the maps and the
// producer partitions.
func (g *gridRun) solve(t float64, retrace bool) error {
	m, r := g.m, g.r
	g.sched.AtInto(g.wells, t)
	for c := range g.mob {
		g.mob[c] = 0
		if m.Active[c] {
			g.mob[c] = g.ff.Mobility(g.sw[c])
		}
	}
	in := pressure.Input{Model: m, Mobility: g.mob, Wells: g.wells}
	if g.rho != nil {
		densities(m, g.sw, g.rho)
		in.Density = g.rho
	}
	if g.seq == nil {
		g.seq = pressure.NewSequence(g.s.Pressure)
	}
	sol, err := g.seq.Solve(in)
	if err != nil {
		return fmt.Errorf("pressure solve at day %g: %w", t, err)
	}
	g.sol = sol
	copy(g.sw0, g.sw)
	r.Solves++
	r.Iterations += sol.Iterations
	r.RelResidual = math.Max(r.RelResidual, sol.RelResidual)
	datum, limit, notes := applyDatum(m, sol, g.wells, t)
	for _, n := range notes {
		g.warnAt(t, n)
	}
	for _, w := range sol.Warnings {
		if datum != nil && datumWarning(w) {
			continue // answered by the pressure datum
		}
		g.warnAt(t, w)
	}
	if datum != nil {
		g.warnAt(t, datumNote(m))
	}
	if err := checkSolve(EngineGrid, sol, t); err != nil {
		return err
	}
	clear(g.src)
	clear(g.srcW)
	clear(g.rate)
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
		g.limitFlag(wi, w)
		if w.Shut || w.Q == 0 {
			continue
		}
		g.src[w.Cell] += w.Q
		if w.Q > 0 {
			if w.Type == reservoir.Injector {
				g.srcW[w.Cell] = 1
			} else {
				g.srcW[w.Cell] = -1 // the cell's own water fraction
			}
		} else if p := g.prodOf[wi]; p >= 0 && w.Type == reservoir.Producer {
			g.rate[p] = -w.Q
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
		r.Producers[p].Rate = g.rate[p]
	}
	if r.Pressure == nil {
		r.Pressure = sol
	}
	if !retrace {
		return nil
	}
	flowing := false
	for _, w := range sol.Wells {
		if !w.Shut && w.Q != 0 {
			flowing = true
		}
	}
	if !flowing {
		return nil
	}
	count := m.Run.Streamlines
	if g.s.Streamlines > 0 {
		count = g.s.Streamlines
	}
	first := r.Trace == nil
	tr, err := streamline.Trace(Field(m, sol), streamline.Settings{Count: count, Workers: g.workers, KeepPaths: first})
	if err != nil {
		return fmt.Errorf("streamlines at day %g: %w", t, err)
	}
	g.partition = tr.ProducerPartition
	// Tracer breakthrough and drained volume with the time of flight
	// rescaled to the cell pore volumes, as in the streamline modes.
	ls, err := newLineSet(tr, g.pv)
	if err != nil {
		return fmt.Errorf("streamlines at day %g: %w", t, err)
	}
	r.Allocation = append(r.Allocation, AllocationBlock{Time: t, Pairs: tr.Pairs, PoreVolumes: tr.PairVolumes(ls.seg)})
	for p := range r.Producers {
		P := &r.Producers[p]
		P.DrainedVolume = 0
		minTau := math.Inf(1)
		for i := range ls.q {
			if ls.prod[i] == P.Well && ls.q[i] > 0 {
				P.DrainedVolume += ls.q[i] * ls.total[i]
				if ls.inj[i] >= 0 {
					minTau = math.Min(minTau, ls.total[i])
				}
			}
		}
		if math.IsNaN(P.TracerBreakthrough) && !math.IsInf(minTau, 1) {
			P.TracerBreakthrough = t + minTau
		}
	}
	if first {
		for _, w := range tr.Warnings {
			g.warn(w)
		}
		r.Trace = tr
		r.Pressure = sol
		r.StreamlineCount = len(tr.Lines)
		r.setDiagnostics(tr, g.pv)
	}
	return nil
}

// stableStep returns the largest stable step (infinite without flow) and
// fills g.fw.
func (g *gridRun) stableStep() float64 {
	m, sol := g.m, g.sol
	gr := m.Grid
	nx := gr.NX
	fx, fy := sol.FluxX, sol.FluxY
	cfl := g.o.CFL
	g.rows(func(j int) {
		best := math.Inf(1)
		for i := range nx {
			c := j*nx + i
			// In [0, 1] (the flux table clamps); every transfer below
			// uses these values, so water stays conserved.
			g.fw[c] = g.fl.Fw(g.sw[c])
		}
		for i := range nx {
			c := j*nx + i
			if !m.Active[c] || !(g.pv[c] > 0) {
				continue
			}
			s := g.sw[c]
			lo, hi := s, s
			in := 0.0
			up := func(q, su float64) {
				in += q
				lo, hi = math.Min(lo, su), math.Max(hi, su)
			}
			if q := fx[gr.XFace(i, j)]; q > 0 {
				up(q, g.sw[c-1])
			}
			if q := fx[gr.XFace(i+1, j)]; q < 0 {
				up(-q, g.sw[c+1])
			}
			if q := fy[gr.YFace(i, j)]; q > 0 {
				up(q, g.sw[c-nx])
			}
			if q := fy[gr.YFace(i, j+1)]; q < 0 {
				up(-q, g.sw[c+nx])
			}
			if q := g.src[c]; q > 0 {
				su := s
				if g.srcW[c] > 0 {
					su = g.sInj
				}
				up(q, su)
			}
			gs := 0.0
			if g.grav != nil {
				gs = g.grav.sum[c] * g.grav.lip
			}
			if in == 0 && gs == 0 {
				continue
			}
			v := 0.0
			if in > 0 {
				v = g.fl.MaxSpeed(lo, hi)
			}
			if den := in*v + gs; den > 0 {
				best = math.Min(best, cfl*g.pv[c]/den)
			}
		}
		g.rowDt[j] = best
	})
	dt := math.Inf(1)
	for _, v := range g.rowDt {
		dt = math.Min(dt, v)
	}
	return dt
}

// step advances the saturations by dt from t (g.fw holds fw at t) and
// books the production.
func (g *gridRun) step(t, dt float64) {
	m, sol, r := g.m, g.sol, g.r
	gr := m.Grid
	nx := gr.NX
	fx, fy := sol.FluxX, sol.FluxY
	// Producer water fraction at the step start; breakthrough.
	for wi, w := range sol.Wells {
		p := g.prodOf[wi]
		if p < 0 || g.rate[p] <= 0 {
			continue
		}
		f := g.fw[w.Cell]
		g.perW[p] += g.rate[p] * f * dt
		g.perL[p] += g.rate[p] * dt
		P := &r.Producers[p]
		if math.IsNaN(P.Breakthrough) && f > g.o.Threshold {
			f0 := g.prevFw[p]
			if t > g.prevT && f0 <= g.o.Threshold && f > f0 {
				P.Breakthrough = g.prevT + (t-g.prevT)*(g.o.Threshold-f0)/(f-f0)
			} else {
				P.Breakthrough = t
			}
		}
		g.prevFw[p] = f
	}
	g.prevT = t
	for wi, w := range sol.Wells {
		if k := g.injOf[wi]; k >= 0 && !w.Shut && w.Q > 0 && w.Type == reservoir.Injector {
			r.Injectors[k].CumWater += w.Q * dt
			g.cumInj += w.Q * dt
		} else if !w.Shut && w.Q > 0 {
			g.cumInj += w.Q * dt * g.fw[w.Cell]
		} else if !w.Shut && w.Q < 0 && !(g.prodOf[wi] >= 0 && w.Type == reservoir.Producer) {
			g.otherProduced -= w.Q * dt * g.fw[w.Cell]
		}
	}
	g.rows(func(j int) {
		for i := range nx {
			c := j*nx + i
			if !m.Active[c] || !(g.pv[c] > 0) {
				continue
			}
			// d is the water volume rate into the cell: through each face
			// the upstream cell's fw times the face flux.
			d := 0.0
			if q := fx[gr.XFace(i, j)]; q > 0 {
				d += q * g.fw[c-1]
			} else if q < 0 {
				d += q * g.fw[c]
			}
			if q := fx[gr.XFace(i+1, j)]; q < 0 {
				d -= q * g.fw[c+1]
			} else if q > 0 {
				d -= q * g.fw[c]
			}
			if q := fy[gr.YFace(i, j)]; q > 0 {
				d += q * g.fw[c-nx]
			} else if q < 0 {
				d += q * g.fw[c]
			}
			if q := fy[gr.YFace(i, j+1)]; q < 0 {
				d -= q * g.fw[c+nx]
			} else if q > 0 {
				d -= q * g.fw[c]
			}
			if q := g.src[c]; q > 0 {
				if g.srcW[c] > 0 {
					d += q
				} else {
					d += q * g.fw[c]
				}
			} else if q < 0 {
				d += q * g.fw[c]
			}
			if gf := g.grav; gf != nil {
				// Counter-current gravity flux, the same value for the
				// two cells of a face, so water stays conserved.
				sc := g.sw[c]
				if i > 0 {
					d += gf.flux(gf.cx[gr.XFace(i, j)], g.sw[c-1], sc)
				}
				if i+1 < nx {
					d -= gf.flux(gf.cx[gr.XFace(i+1, j)], sc, g.sw[c+1])
				}
				if j > 0 {
					d += gf.flux(gf.cy[gr.YFace(i, j)], g.sw[c-nx], sc)
				}
				if j+1 < gr.NY {
					d -= gf.flux(gf.cy[gr.YFace(i, j+1)], sc, g.sw[c+nx])
				}
			}
			g.delta[c] = d * dt
		}
	})
	for c, d := range g.delta {
		if d != 0 {
			g.sw[c] += d / g.pv[c]
		}
	}
	clear(g.delta)
}

// meanChange returns the pore-volume weighted mean |S - S0| since the last
// solve (row sums added in row order).
func (g *gridRun) meanChange() float64 {
	nx := g.m.Grid.NX
	g.rows(func(j int) {
		s := 0.0
		for c := j * nx; c < (j+1)*nx; c++ {
			s += g.pv[c] * math.Abs(g.sw[c]-g.sw0[c])
		}
		g.rowSum[j] = s
	})
	tot := 0.0
	for _, v := range g.rowSum {
		tot += v
	}
	return tot / g.r.PoreVolume
}

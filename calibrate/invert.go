package calibrate

import (
	"fmt"
	"math"
	"slices"
	"time"

	"floodtrace/flood"
	"floodtrace/reservoir"
)

// Options control Calibrate beyond the case's calibration: block.
type Options struct {
	// Iterations overrides Settings.Iterations when positive.
	Iterations int
	// Workers and Streamlines are passed to every forward run (0: the
	// defaults).
	Workers, Streamlines int
	// Log, if not nil, receives progress lines.
	Log func(format string, args ...any)
}

// Iteration is one row of calibration.csv: iteration 0 is the prior map.
type Iteration struct {
	Iteration int
	// TravelTimeMisfit is the root mean square of the producers' time
	// shifts, days; WaterCutRMS the root mean square difference of
	// observed and model water cut over the matched periods.
	TravelTimeMisfit, WaterCutRMS float64
	// Objective is the regularised objective: the sum of squared shifts
	// plus damping² |x|² plus smoothness² |L x|², x the log multipliers.
	Objective float64
	// ChangeRMS is the root mean square log multiplier over the cells
	// the data constrain.
	ChangeRMS float64
	// ForwardRuns counts the runs made so far, Seconds the time so far.
	ForwardRuns int
	Seconds     float64
}

// ProducerMatch is one producer's match before and after calibration.
type ProducerMatch struct {
	Name string
	// Shift is the time shift of the model water-cut curve that best
	// matches the observed one, days (positive: the model's water comes
	// too early).
	ShiftBefore, ShiftAfter float64
	// BreakthroughError is model minus observed breakthrough, days (NaN
	// when either has none within the history).
	BreakthroughErrorBefore, BreakthroughErrorAfter float64
	WaterCutRMSBefore, WaterCutRMSAfter             float64
}

// Result is a finished calibration.
type Result struct {
	Settings reservoir.Calibration
	// Calibrated is the case with the calibrated maps.
	Calibrated *reservoir.Model
	// LogMultiplier is ln(calibrated / prior permeability) per cell.
	LogMultiplier []float64
	// Constrained marks the cells crossed by streamlines that reach the
	// producers matched, in the prior or any accepted model; Kept the
	// cells held at the prior around keep_near_wells.
	Constrained, Kept []bool
	Iterations        []Iteration
	Producers         []ProducerMatch
	// PriorRun and FinalRun are the forward runs of the prior and the
	// calibrated map.
	PriorRun, FinalRun *flood.Result
	// ForwardRuns counts every forward run made, rejected steps included.
	ForwardRuns int
	Warnings    []string
}

// state is one forward evaluation.
type state struct {
	x      []float64
	run    *flood.Result
	shifts []float64 // per matched producer
	wcRMS  float64
	lines  *Lines
}

// calib is a calibration in progress.
type calib struct {
	m        *reservoir.Model
	set      reservoir.Calibration
	opt      Options
	wells    []int // matched producers (indices in m.Wells)
	window   float64
	runs     int
	started  time.Time
	warnings []string
}

// Calibrate adjusts the permeability of m (perm and perm_y together, one
// multiplier per cell, in log space) to its production history by the
// generalized travel-time inversion (He, Datta-Gupta and Yoon 2002; Vasco,
// Yoon and Datta-Gupta 1999). Each iteration: a forward run; for each
// producer the shift of its model water-cut curve that best matches the
// observed one (generalizedShift); the shifts' sensitivities from the
// streamlines (Lines.ShiftRow); the Gauss-Newton update of
//
//	Σ_p (shift_p - J_p δ)² + damping² |x + δ|² + smoothness² |L (x + δ)|²
//
// over the free cells (crossed by the matched producers' streamlines, not
// kept), L the five-point Laplacian, solved by LSQR; the multipliers are
// clipped to their bounds, and the step is halved until the travel-time
// misfit does not rise (at most three halvings, each iteration starting
// from the step length the last one accepted; the calibration stops when
// none helps or the misfit stops falling).
func Calibrate(m *reservoir.Model, o Options) (*Result, error) {
	if m.History == nil {
		return nil, &reservoir.InputError{Path: m.Path, Msg: "calibrate needs a production history (history: {file: ...}) in the case"}
	}
	set := reservoir.DefaultCalibration()
	if m.Calibration != nil {
		set = *m.Calibration
	}
	if o.Iterations > 0 {
		set.Iterations = o.Iterations
	}
	c := &calib{m: m, set: set, opt: o, window: m.History.End(), started: time.Now()}
	for _, name := range set.KeepNearWells {
		if m.WellIndex(name) < 0 {
			return nil, &reservoir.InputError{Path: m.Path, Msg: fmt.Sprintf("calibration.keep_near_wells: no well %q in the case", name)}
		}
	}
	if err := c.chooseWells(); err != nil {
		return nil, err
	}
	n := m.Grid.N()
	lo, hi := math.Log(set.MinMultiplier), math.Log(set.MaxMultiplier)
	kept := c.keptCells()

	cur, err := c.eval(make([]float64, n))
	if err != nil {
		return nil, err
	}
	prior := cur
	res := &Result{Settings: set, Kept: kept}
	constrained := c.crossed(cur.lines)
	res.Iterations = append(res.Iterations, c.row(0, cur, constrained))
	factor := 1.0
	for it := 1; it <= set.Iterations; it++ {
		for k, v := range c.crossed(cur.lines) {
			constrained[k] = constrained[k] || v
		}
		free := make([]int, 0, n)
		for k := 0; k < n; k++ {
			if constrained[k] && !kept[k] && m.Active[k] {
				free = append(free, k)
			}
		}
		if len(free) == 0 {
			c.warn("no cell is crossed by the streamlines of the producers matched (or all are kept): nothing to change")
			break
		}
		delta, err := c.step(cur, free)
		if err != nil {
			return nil, err
		}
		accepted := false
		for half := 0; half < 4; half++ {
			f := factor * math.Pow(0.5, float64(half))
			x := slices.Clone(cur.x)
			for i, k := range free {
				x[k] = math.Min(hi, math.Max(lo, x[k]+f*delta[i]))
			}
			next, err := c.eval(x)
			if err != nil {
				return nil, err
			}
			if misfit(next) <= misfit(cur) {
				cur, accepted = next, true
				// The next iteration starts from the step that worked,
				// doubled after a full step (at most 1): a trust region of
				// step lengths (Nocedal and Wright 2006, chapter 4).
				if half == 0 {
					factor = math.Min(1, 2*f)
				} else {
					factor = f
				}
				break
			}
			c.logf("iteration %d: step %g raises the misfit (%.4g days from %.4g); halving", it, f, misfit(next), misfit(cur))
		}
		if !accepted {
			c.warn(fmt.Sprintf("iteration %d: no step along the update lowers the travel-time misfit; stopped", it))
			break
		}
		res.Iterations = append(res.Iterations, c.row(it, cur, constrained))
		c.logf("iteration %d: travel-time misfit %.4g days, water-cut RMS %.4g", it, misfit(cur), cur.wcRMS)
		prev := res.Iterations[len(res.Iterations)-2].TravelTimeMisfit
		if prev-misfit(cur) <= 1e-3*prev {
			break // the misfit stopped falling
		}
	}
	res.LogMultiplier = cur.x
	res.Constrained = constrained
	res.Calibrated = withMultipliers(m, cur.x)
	res.PriorRun, res.FinalRun = prior.run, cur.run
	for i, w := range c.wells {
		name := m.Wells[w].Name
		pm := ProducerMatch{Name: name, ShiftBefore: prior.shifts[i], ShiftAfter: cur.shifts[i]}
		pm.BreakthroughErrorBefore, pm.WaterCutRMSBefore = wellMatch(prior.run, name)
		pm.BreakthroughErrorAfter, pm.WaterCutRMSAfter = wellMatch(cur.run, name)
		res.Producers = append(res.Producers, pm)
	}
	res.Warnings = c.warnings
	res.ForwardRuns = c.runs
	return res, nil
}

func (c *calib) logf(format string, a ...any) {
	if c.opt.Log != nil {
		c.opt.Log(format, a...)
	}
}

func (c *calib) warn(s string) {
	c.warnings = append(c.warnings, s)
	c.logf("warning: %s", s)
}

// misfit is the root mean square shift, days.
func misfit(s *state) float64 {
	sq := 0.0
	for _, d := range s.shifts {
		sq += d * d
	}
	return math.Sqrt(sq / float64(len(s.shifts)))
}

// chooseWells picks the producers matched: calibration.wells, or every
// producer with history rows, keeping those whose observed water cut ever
// exceeds reservoir.CalibrationWaterCut or that the model waters.
func (c *calib) chooseWells() error {
	m := c.m
	use := map[string]bool{}
	for _, n := range c.set.Wells {
		use[n] = true
	}
	rows := map[string]bool{}
	for _, r := range m.History.Rows {
		rows[r.Well] = true
	}
	for i, w := range m.Wells {
		if w.Type != reservoir.Producer || !rows[w.Name] || len(use) > 0 && !use[w.Name] {
			continue
		}
		c.wells = append(c.wells, i)
	}
	if len(c.wells) == 0 {
		return &reservoir.InputError{Path: m.History.File, Msg: "no producer of the calibration has history rows: nothing to match"}
	}
	wet := false
	for _, r := range m.History.Rows {
		if i := m.WellIndex(r.Well); i >= 0 && slices.Contains(c.wells, i) {
			if s := nz(r.Oil) + nz(r.Water); s > 0 && nz(r.Water)/s > reservoir.CalibrationWaterCut {
				wet = true
			}
		}
	}
	if !wet {
		return &reservoir.InputError{Path: m.History.File, Msg: fmt.Sprintf("no producer matched ever shows water in the history (water cut above %g %%): there is no water arrival to match, nothing to calibrate", 100*reservoir.CalibrationWaterCut)}
	}
	return nil
}

func nz(v float64) float64 {
	if math.IsNaN(v) {
		return 0
	}
	return v
}

// keptCells marks the cells within the radius of keep_near_wells.
func (c *calib) keptCells() []bool {
	m := c.m
	g := m.Grid
	kept := make([]bool, g.N())
	r := c.set.Radius
	if r == 0 {
		r = math.Max(g.DX, g.DY)
	}
	for _, name := range c.set.KeepNearWells {
		w := m.Wells[m.WellIndex(name)]
		kept[w.Cell] = true
		for k := range kept {
			x, y := g.Center(k)
			if math.Hypot(x-w.X, y-w.Y) <= r {
				kept[k] = true
			}
		}
	}
	return kept
}

// crossed marks the cells crossed by the matched producers' lines.
func (c *calib) crossed(ls *Lines) []bool {
	use := map[int]bool{}
	for _, w := range c.wells {
		use[w] = true
	}
	return ls.Crossed(c.m.Grid.N(), use)
}

// withMultipliers returns a copy of m with both permeabilities times e^x.
func withMultipliers(m *reservoir.Model, x []float64) *reservoir.Model {
	cm := *m
	cm.PermEast = make([]float64, len(m.PermEast))
	cm.PermNorth = make([]float64, len(m.PermNorth))
	for k := range x {
		f := math.Exp(x[k])
		cm.PermEast[k] = m.PermEast[k] * f
		cm.PermNorth[k] = m.PermNorth[k] * f
	}
	return &cm
}

// eval makes a forward run with log multipliers x and measures it.
func (c *calib) eval(x []float64) (*state, error) {
	mm := withMultipliers(c.m, x)
	r, err := flood.Run(mm, flood.Settings{Workers: c.opt.Workers, Streamlines: c.opt.Streamlines})
	if err != nil {
		return nil, err
	}
	c.runs++
	var ls *Lines
	if r.Trace != nil && len(r.Trace.Lines) > 0 && r.Trace.Lines[0].Cells != nil {
		ls, err = linesOf(mm, r.Trace)
	} else {
		ls, err = TraceModel(mm, c.opt.Streamlines)
	}
	if err != nil {
		return nil, err
	}
	s := &state{x: x, run: r, lines: ls}
	sq, nwc := 0.0, 0
	for _, w := range c.wells {
		name := c.m.Wells[w].Name
		obsT, obsW := observed(r, name)
		p := producer(r, name)
		if p == nil {
			return nil, fmt.Errorf("calibrate: the run has no producer %s", name)
		}
		sh := generalizedShift(obsT, obsW, r.Times, p.WaterCut, c.window)
		if math.IsNaN(sh) {
			// The model curve is flat over the window: fall back on the
			// first arrivals, the streamline model's against the observed.
			arr, _ := ls.Arrival(w)
			bt := firstAbove(obsT, obsW, reservoir.CalibrationWaterCut)
			sh = 0
			if !math.IsNaN(arr) && !math.IsNaN(bt) {
				sh = bt - arr
			}
		}
		s.shifts = append(s.shifts, sh)
		for _, mr := range r.History.Match {
			if mr.Well == name && !math.IsNaN(mr.ObsWaterCut) && !math.IsNaN(mr.ModWaterCut) {
				d := mr.ObsWaterCut - mr.ModWaterCut
				sq += d * d
				nwc++
			}
		}
	}
	s.wcRMS = math.NaN()
	if nwc > 0 {
		s.wcRMS = math.Sqrt(sq / float64(nwc))
	}
	return s, nil
}

func producer(r *flood.Result, name string) *flood.Producer {
	for i := range r.Producers {
		if r.Producers[i].Name == name {
			return &r.Producers[i]
		}
	}
	return nil
}

// observed returns the mid-period times and observed water cuts of a
// producer, from the run's match rows.
func observed(r *flood.Result, name string) (t, wc []float64) {
	for _, mr := range r.History.Match {
		if mr.Well == name && !math.IsNaN(mr.ObsWaterCut) {
			t = append(t, (mr.Start+mr.End)/2)
			wc = append(wc, mr.ObsWaterCut)
		}
	}
	return t, wc
}

func firstAbove(t, v []float64, lim float64) float64 {
	for k := range t {
		if v[k] > lim {
			return t[k]
		}
	}
	return math.NaN()
}

// wellMatch returns the breakthrough error and water-cut RMS of a well in
// the run's history match.
func wellMatch(r *flood.Result, name string) (bt, wc float64) {
	for _, w := range r.History.Wells {
		if w.Name == name {
			return w.BreakthroughError, w.WaterCutRMS
		}
	}
	return math.NaN(), math.NaN()
}

// row is the calibration.csv row of state s.
func (c *calib) row(it int, s *state, constrained []bool) Iteration {
	sq, n := 0.0, 0
	for k, v := range constrained {
		if v {
			sq += s.x[k] * s.x[k]
			n++
		}
	}
	ch := 0.0
	if n > 0 {
		ch = math.Sqrt(sq / float64(n))
	}
	return Iteration{Iteration: it, TravelTimeMisfit: misfit(s), WaterCutRMS: s.wcRMS, Objective: c.objective(s),
		ChangeRMS: ch, ForwardRuns: c.runs, Seconds: time.Since(c.started).Seconds()}
}

// objective is the regularised objective of s.
func (c *calib) objective(s *state) float64 {
	o := 0.0
	for _, d := range s.shifts {
		o += d * d
	}
	g := c.m.Grid
	lx := laplacian(g, c.m.Active, s.x)
	for k, v := range s.x {
		o += c.set.Damping * c.set.Damping * v * v
		o += c.set.Smoothness * c.set.Smoothness * lx[k] * lx[k]
	}
	return o
}

// laplacian returns the five-point Laplacian of x over the active cells
// (Σ over active neighbours of x_k - x_j; zero-flux at the edges).
func laplacian(g reservoir.Grid, active []bool, x []float64) []float64 {
	out := make([]float64, len(x))
	for k := range x {
		if !active[k] {
			continue
		}
		i, j := g.IJ(k)
		for _, d := range [4][2]int{{-1, 0}, {1, 0}, {0, -1}, {0, 1}} {
			ii, jj := i+d[0], j+d[1]
			if ii < 0 || jj < 0 || ii >= g.NX || jj >= g.NY {
				continue
			}
			if nb := g.Index(ii, jj); active[nb] {
				out[k] += x[k] - x[nb]
			}
		}
	}
	return out
}

// step solves the regularised Gauss-Newton update over the free cells.
func (c *calib) step(s *state, free []int) ([]float64, error) {
	m := c.m
	g := m.Grid
	col := make(map[int]int, len(free))
	for i, k := range free {
		col[k] = i
	}
	nf := len(free)
	var es []Entry
	rhs := []float64{}
	for p, w := range c.wells {
		row := s.lines.ShiftRow(w, c.window)
		if c.rateHeld(w) {
			row = s.lines.RateShiftRow(w)
		}
		keys := make([]int, 0, len(row))
		for k := range row {
			keys = append(keys, k)
		}
		slices.Sort(keys)
		for _, k := range keys {
			if j, ok := col[k]; ok {
				es = append(es, Entry{Row: p, Col: j, Val: row[k]})
			}
		}
		rhs = append(rhs, s.shifts[p])
	}
	sens, err := NewCSR(len(c.wells), nf, es)
	if err != nil {
		return nil, err
	}
	blocks := []*CSR{sens}
	weights := []float64{1}
	if c.set.Damping > 0 {
		es = es[:0]
		for i := range free {
			es = append(es, Entry{Row: i, Col: i, Val: 1})
			rhs = append(rhs, -c.set.Damping*s.x[free[i]])
		}
		id, _ := NewCSR(nf, nf, es)
		blocks, weights = append(blocks, id), append(weights, c.set.Damping)
	}
	if c.set.Smoothness > 0 {
		es = es[:0]
		lx := laplacian(g, m.Active, s.x)
		for i, k := range free {
			ci, cj := g.IJ(k)
			for _, d := range [4][2]int{{-1, 0}, {1, 0}, {0, -1}, {0, 1}} {
				ii, jj := ci+d[0], cj+d[1]
				if ii < 0 || jj < 0 || ii >= g.NX || jj >= g.NY {
					continue
				}
				nb := g.Index(ii, jj)
				if !m.Active[nb] {
					continue
				}
				es = append(es, Entry{Row: i, Col: i, Val: 1})
				if j, ok := col[nb]; ok {
					es = append(es, Entry{Row: i, Col: j, Val: -1})
				}
			}
			rhs = append(rhs, -c.set.Smoothness*lx[k])
		}
		lap, err := NewCSR(nf, nf, es)
		if err != nil {
			return nil, err
		}
		blocks, weights = append(blocks, lap), append(weights, c.set.Smoothness)
	}
	x, _, err := LSQR(Stack{Blocks: blocks, Weights: weights}, rhs, LSQRSettings{ATol: 1e-8, BTol: 1e-8, MaxIter: 500})
	return x, err
}

// rateHeld reports whether producer w is held at a rate over the
// history: driven by its observed rates (history drive: rates), or on
// rate control in the case.
func (c *calib) rateHeld(w int) bool {
	if c.m.History.Drive == reservoir.DriveRates {
		return true
	}
	return c.m.Wells[w].Control == reservoir.RateControl
}

package flood

import (
	"fmt"
	"math"
	"runtime"
	"slices"
	"sort"

	"floodtrace/internal/parallel"
	"floodtrace/pressure"
	"floodtrace/reservoir"
	"floodtrace/streamline"
)

// lineSet is the streamline-to-cell bookkeeping in flat arrays, on the
// tracer's segments with the time of flight rescaled cell by cell so that
// the streamlines crossing a cell hold exactly its pore volume
// (streamline.Result.Rescale); volumes mapped between streamlines and
// cells are then conserved to round-off.
type lineSet struct {
	seg       *streamline.Segments
	start     []int     // segment offsets, one per line plus one
	cell      []int32   // cell of each segment
	a, b      []float64 // rescaled time of flight at entry and exit of each segment (days); a is nil in the fixed engine
	q         []float64 // flux of each line
	total     []float64 // rescaled total time of flight of each line
	inj, prod []int     // well index or -1
	uncovered int       // flowing cells crossed by no streamline
	pv        []float64
	vol       []float64 // sum of flux*tau per cell (the cell pore volume after rescaling)
	bounds    []int32   // cell ranges of cellSaturation (see cellBounds)
}

// newLineSet returns the bookkeeping of the lines of tr, which keeps them
// (Result.Rescale), with the entry time of flight of every segment (a),
// which the pressure-update and grid engines read.
func newLineSet(tr *streamline.Result, pv []float64) (*lineSet, error) {
	sg, err := tr.Rescale(pv)
	if err != nil {
		return nil, err
	}
	ls := lineSetOf(tr, sg, pv)
	ls.a = make([]float64, len(sg.Exit))
	for i := range tr.Lines {
		for s := sg.Start[i] + 1; s < sg.Start[i+1]; s++ {
			ls.a[s] = sg.Exit[s-1]
		}
	}
	return ls, nil
}

// newFixedLineSet returns the bookkeeping of the fixed-streamline engine,
// made in the storage of the lines of tr (Result.TakeSegments: their
// Cells and Tau are released) and without entry times (a is nil): the
// engine reads only the exits.
func newFixedLineSet(tr *streamline.Result, pv []float64) (*lineSet, error) {
	sg, err := tr.TakeSegments(pv)
	if err != nil {
		return nil, err
	}
	return lineSetOf(tr, sg, pv), nil
}

func lineSetOf(tr *streamline.Result, sg *streamline.Segments, pv []float64) *lineSet {
	n := len(tr.Lines)
	ls := &lineSet{seg: sg, start: sg.Start, cell: sg.Cell, b: sg.Exit, total: sg.Total,
		uncovered: sg.Uncovered, q: make([]float64, n), inj: make([]int, n), prod: make([]int, n), pv: pv}
	for i := range tr.Lines {
		l := &tr.Lines[i]
		ls.q[i], ls.inj[i], ls.prod[i] = l.Flux, l.Injector, l.Producer
	}
	return ls
}

// cellSaturation maps the streamline solution at time t to cells by the
// flux*tau weighted average of the streamlines in each cell. Cells no
// streamline crosses keep swi; inactive cells are NaN.
//
// Ahead of the leading front a line holds its initial saturation, which
// is swi, so a cell's saturation is swi plus the flux-weighted excess
// q*(integral of S - swi*tau) of the segments the front has reached: only
// those are evaluated (a binary search per line finds them, time of flight
// growing along a line). The cells are cut into contiguous ranges, one per
// worker, with about as many segments each; every range takes the lines in
// line order and adds the excess of its own segments, so every cell's sum
// is made in the same order, and gives the same result, whatever the
// number of workers.
func (ls *lineSet) cellSaturation(m *reservoir.Model, rs *blTable, t, swi float64, workers int) []float64 {
	n := len(ls.pv)
	nl := len(ls.q)
	reach := math.Inf(1) // time of flight the front has reached at t
	if rs.front > 0 && t > 0 {
		reach = rs.front * t
	}
	sInit := rs.sInit
	bounds := ls.cellBounds(workers)
	// The first map also sums each cell's volume (flux times time of
	// flight), in the same pass over the segments: every segment, in line
	// and segment order within each cell range, as a pass of its own did.
	withVol := ls.vol == nil
	if withVol {
		ls.vol = make([]float64, n)
	}
	sw := make([]float64, n)
	forRanges(bounds, func(lo, hi int32) {
		for i := 0; i < nl; i++ {
			q := ls.q[i]
			s0, s1 := ls.start[i], ls.start[i+1]
			// Segments [s0, end) start behind the front (all of them, once
			// the front has passed the line's last entry). The entry of
			// segment s > s0 is the exit of segment s-1 (a[s] == b[s-1]
			// exactly): reading b alone cuts the memory traffic by a third.
			end := s1
			if s1-s0 > 1 && ls.b[s1-2] > reach {
				end = s0 + 1 + sort.Search(s1-s0-1, func(k int) bool { return ls.b[s0+k] > reach })
			}
			stop := end
			if withVol {
				stop = s1
			}
			prev, last := 0.0, s0-1 // integral of S over [0, a] at entry of segment last+1
			for s := s0; s < stop; s++ {
				c := ls.cell[s]
				if c < lo || c >= hi {
					continue
				}
				a, b := 0.0, ls.b[s]
				if s > s0 {
					a = ls.b[s-1]
				}
				if withVol {
					ls.vol[c] += q * (b - a)
					if s >= end {
						continue
					}
				}
				if last != s-1 {
					// Entering the range: a is the exit of the segment before,
					// so this is the value that segment would have passed on.
					prev = rs.cumSat(a, t)
				}
				cur := rs.cumSat(b, t)
				sw[c] += q * ((cur - prev) - (b-a)*sInit)
				prev, last = cur, s
			}
		}
		for c := int(lo); c < int(hi); c++ {
			switch {
			case !m.Active[c]:
				sw[c] = math.NaN()
			case ls.vol[c] > 0:
				sw[c] = sInit + sw[c]/ls.vol[c]
			default:
				sw[c] = swi
			}
		}
	})
	return sw
}

// cellBounds cuts the cells into contiguous ranges, one per worker (0 =
// GOMAXPROCS), holding about as many segments each. The cut only balances
// the work: sums over a range's cells do not depend on it.
func (ls *lineSet) cellBounds(workers int) []int32 {
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	n := len(ls.pv)
	workers = max(1, min(workers, n/4096))
	if len(ls.bounds) == workers+1 {
		return ls.bounds
	}
	// Segments per block of 64 cells: the cuts fall between blocks (a
	// histogram of n/64 counts instead of n).
	const block = 64
	cnt := make([]int32, (n+block-1)/block)
	for _, c := range ls.cell {
		cnt[c/block]++
	}
	b := make([]int32, workers+1)
	b[workers] = int32(n)
	total, acc, r := len(ls.cell), 0, 1
	for k := 0; k < len(cnt) && r < workers; k++ {
		acc += int(cnt[k])
		for r < workers && acc >= r*total/workers {
			b[r] = int32(min(n, (k+1)*block))
			r++
		}
	}
	for ; r < workers; r++ {
		b[r] = int32(n)
	}
	ls.bounds = b
	return b
}

// forRanges calls fn(bounds[r], bounds[r+1]) for every range r, in
// parallel.
func forRanges(bounds []int32, fn func(lo, hi int32)) {
	parallel.Each(len(bounds)-1, len(bounds)-1, 1, func(_, r int) { fn(bounds[r], bounds[r+1]) })
}

func (r *Result) fixedTransport(m *reservoir.Model, sol *pressure.Solution, ls *lineSet, rs *blTable, s Settings) {
	swi := m.Fluids.InitialSw
	// One pressure solve at day 0; the stops are those of every engine.
	tl := newTimeline(m, frameCount(s.Frames, len(ls.cell), len(ls.pv)), nil)
	times := tl.reports
	r.Times = times
	nt := len(times)

	injRate := 0.0
	for wi, w := range sol.Wells {
		if w.Type == reservoir.Injector && !w.Shut {
			injRate += w.Q
			r.Injectors = append(r.Injectors, Injector{Name: w.Name, Well: wi, Rate: w.Q,
				CumWater: w.Q * m.Run.End, MaxBHPReached: w.LimitReached && w.Control == reservoir.BHPControl})
		} else if w.Type == reservoir.Injector {
			r.Injectors = append(r.Injectors, Injector{Name: w.Name, Well: wi})
		}
	}
	r.PVI = make([]float64, nt)
	for k, t := range times {
		r.PVI[k] = injRate * t / r.PoreVolume
	}

	// Producers and their streamlines.
	prodOf := make([]int, len(sol.Wells))
	for wi := range prodOf {
		prodOf[wi] = -1
	}
	for wi, w := range sol.Wells {
		if w.Type != reservoir.Producer {
			continue
		}
		prodOf[wi] = len(r.Producers)
		r.Producers = append(r.Producers, Producer{Name: w.Name, Well: wi, Rate: -w.Q,
			WaterCut: make([]float64, nt), OilRate: make([]float64, nt), WaterRate: make([]float64, nt),
			CumOil: make([]float64, nt), CumWater: make([]float64, nt), AvgSw: make([]float64, nt),
			TracerBreakthrough: math.Inf(1), Breakthrough: math.Inf(1)})
	}
	np := len(r.Producers)
	lineFlux := make([]float64, np)
	for i := range ls.q {
		if p := ls.prod[i]; p >= 0 && prodOf[p] >= 0 {
			pi := prodOf[p]
			P := &r.Producers[pi]
			lineFlux[pi] += ls.q[i]
			P.DrainedVolume += ls.q[i] * ls.total[i]
			P.TracerBreakthrough = math.Min(P.TracerBreakthrough, ls.total[i])
			P.Breakthrough = math.Min(P.Breakthrough, rs.breakthrough(ls.total[i]))
		}
	}
	for pi := range r.Producers {
		P := &r.Producers[pi]
		if lineFlux[pi] == 0 && P.Rate > 0 {
			r.Warnings = append(r.Warnings, fmt.Sprintf("producer %s: no streamline reaches it; its rate is not accounted in the curves", P.Name))
		}
		if math.IsInf(P.TracerBreakthrough, 1) {
			P.TracerBreakthrough = math.NaN()
		}
		if math.IsInf(P.Breakthrough, 1) || P.Breakthrough > m.Run.End {
			P.Breakthrough = math.NaN()
		}
	}

	// Per report time: outlet water cut and exact cumulative volumes per
	// streamline (Welge 1952: water in place from the average saturation).
	// The report times are independent: they are summed in parallel, each
	// over the lines in line order, so the sums do not depend on the
	// number of cores.
	sums := make([]float64, 3*np*nt)
	parallel.Each(nt, s.Workers, 4, func(_, k int) {
		t := times[k]
		wcSum := sums[3*np*k : 3*np*k+np]
		wSum := sums[3*np*k+np : 3*np*k+2*np]  // sum q*tau*(Savg-swi): oil produced
		vSum := sums[3*np*k+2*np : 3*np*(k+1)] // sum q*tau*Savg
		for i := range ls.q {
			p := ls.prod[i]
			if p < 0 || prodOf[p] < 0 {
				continue
			}
			pi := prodOf[p]
			q, T := ls.q[i], ls.total[i]
			fw, cs := rs.outlet(T, t)
			wcSum[pi] += q * fw
			wSum[pi] += q * (cs - T*swi)
			vSum[pi] += q * cs
		}
	})
	for k, t := range times {
		wcSum := sums[3*np*k : 3*np*k+np]
		wSum := sums[3*np*k+np : 3*np*k+2*np]
		vSum := sums[3*np*k+2*np : 3*np*(k+1)]
		for pi := range r.Producers {
			P := &r.Producers[pi]
			if lineFlux[pi] == 0 {
				P.AvgSw[k] = swi
				continue
			}
			scale := P.Rate / lineFlux[pi]
			P.WaterCut[k] = wcSum[pi] / lineFlux[pi]
			P.WaterRate[k] = P.Rate * P.WaterCut[k]
			P.OilRate[k] = P.Rate - P.WaterRate[k]
			P.CumOil[k] = scale * wSum[pi]
			P.CumWater[k] = P.Rate*t - P.CumOil[k]
			if P.CumWater[k] < 0 {
				P.CumWater[k] = 0
			}
			P.AvgSw[k] = vSum[pi] / (P.DrainedVolume)
		}
	}
	fillField(r)
	// A field limit ends the run at the first report time it is reached:
	// the solution is exact at any time, so the run is that of the case
	// with its end there.
	runEnd := m.Run.End
	if k := fieldLimitIndex(m, r); k >= 0 {
		runEnd = times[k]
		r.FieldLimitDay = runEnd
		if k < nt-1 {
			r.Warnings = append(r.Warnings, fmt.Sprintf("the field reaches its water-cut limit on day %g (water cut %.4g >= field_max_water_cut %g): the run ends on that day",
				runEnd, r.FieldWaterCut[k], m.Run.FieldMaxWaterCut))
			nt = k + 1
			r.truncate(nt)
			times = r.Times
			var snaps, frames []float64
			for _, t := range tl.snaps {
				if t <= runEnd {
					snaps = append(snaps, t)
				}
			}
			if !slices.Contains(snaps, runEnd) {
				snaps = append(snaps, runEnd)
			}
			for _, t := range tl.frames {
				if t <= runEnd {
					frames = append(frames, t)
				}
			}
			tl.snaps, tl.frames = snaps, frames
			for k := range r.Injectors {
				r.Injectors[k].CumWater = r.Injectors[k].Rate * runEnd
			}
			for p := range r.Producers {
				if P := &r.Producers[p]; P.Breakthrough > runEnd {
					P.Breakthrough = math.NaN()
				}
			}
		}
	}

	// Saturation maps; a map at the same time is computed once.
	maps := map[float64][]float64{}
	satAt := func(t float64) []float64 {
		if sw, ok := maps[t]; ok {
			return sw
		}
		sw := ls.cellSaturation(m, rs, t, swi, s.Workers)
		maps[t] = sw
		return sw
	}
	// The solution is exact at any time: no stepping between the stops.
	for _, t := range tl.snaps {
		r.Snapshots = append(r.Snapshots, Snapshot{Time: t, PVI: injRate * t / r.PoreVolume, Sw: satAt(t)})
	}
	for _, t := range tl.frames {
		r.Frames = append(r.Frames, Snapshot{Time: t, PVI: injRate * t / r.PoreVolume, Sw: satAt(t)})
	}

	// Mass balance at the end of the run, with the water in place taken
	// from the saturation map.
	end := satAt(runEnd)
	r.MassBalanceError = massBalance(m.Active, ls.pv, end, swi, injRate*runEnd, r.FieldCumWater[nt-1])
}

func snapshotTimes(m *reservoir.Model) []float64 {
	var ts []float64
	for _, t := range m.Run.Snapshots {
		if t > 0 && t <= m.Run.End {
			ts = append(ts, t)
		}
	}
	if len(ts) == 0 {
		ts = []float64{m.Run.End}
	}
	return ts
}

// frameBudget caps the work of the animation maps: frames times
// streamline segments, and frameCellBudget frames times cells (each frame
// is also a raster to write). A million-cell case gets 8 frames, the
// least a case gets.
const (
	frameBudget     = 2e8
	frameCellBudget = 8e6
)

// frameCount returns the number of animation frames for a request n (0 =
// up to 40, negative = none), nseg streamline segments and ncells cells.
func frameCount(n, nseg, ncells int) int {
	if n < 0 {
		return n
	}
	if n == 0 {
		n = 40
		if nseg > 0 {
			n = min(n, max(8, int(frameBudget/float64(nseg))))
		}
		if ncells > 0 {
			n = min(n, max(8, int(frameCellBudget/float64(ncells))))
		}
	}
	return n
}

// frameIndices picks up to n report steps evenly (0 = 40, negative = none).
func frameIndices(nt, n int) []int {
	if n < 0 || nt == 0 {
		return nil
	}
	if n == 0 {
		n = 40
	}
	if n >= nt {
		idx := make([]int, nt)
		for i := range idx {
			idx[i] = i
		}
		return idx
	}
	idx := make([]int, 0, n)
	for i := 0; i < n; i++ {
		k := int(math.Round(float64(i+1) * float64(nt) / float64(n)))
		idx = append(idx, min(max(k-1, 0), nt-1))
	}
	return idx
}

package streamline

import (
	"math"
)

// injectorSeeds returns the launch points on the outflow faces of the
// injector cells.
func injectorSeeds(t *tracer, f *Field, count int) []seed {
	return wellSeeds(t, f, count, 1, nil)
}

// producerSeeds returns backward launch points on the inflow faces of the
// producers that none of the given lines reached.
func producerSeeds(t *tracer, f *Field, count int, lines []Line) []seed {
	missed := make([]bool, len(f.Wells))
	any := false
	for w, wl := range f.Wells {
		missed[w] = wl.Q < 0
		any = any || missed[w]
	}
	if !any {
		return nil
	}
	for i := range lines {
		if p := lines[i].Producer; p >= 0 {
			missed[p] = false
		}
	}
	return wellSeeds(t, f, count, -1, missed)
}

// wellSeeds spreads launch points over the wells that are sources in
// direction sign (injectors forward, producers backward), restricted to
// wells marked in only when it is not nil. Each well receives a share of
// count proportional to its rate, at least MinPerWell; each face a share of
// the well's lines proportional to its outflux, at least one; the points
// are evenly spaced along the face.
func wellSeeds(t *tracer, f *Field, count int, sign float64, only []bool) []seed {
	launch := FromInjector
	if sign < 0 {
		launch = FromProducer
	}
	total := 0.0
	for _, wl := range f.Wells {
		if sign*wl.Q > 0 {
			total += sign * wl.Q
		}
	}
	var seeds []seed
	for w, wl := range f.Wells {
		if !(sign*wl.Q > 0) || (only != nil && !only[w]) {
			continue
		}
		k := wl.Cell
		qout := t.effOut(k, sign)
		if !(qout > 0) {
			continue
		}
		n := max(MinPerWell, int(math.Round(float64(count)*sign*wl.Q/total)))
		var fq [4]float64
		for face := west; face <= north; face++ {
			if q := sign * t.outward(k, face); q > 1e-12*qout {
				fq[face] = q
			}
		}
		for face, c := range apportion(n, fq) {
			for m := 0; m < c; m++ {
				seeds = append(seeds, seed{launch: launch, cell: k, face: face, s: (float64(m) + 0.5) / float64(c)})
			}
		}
	}
	return seeds
}

// apportion splits n among the positive weights in proportion, at least one
// each, by the largest-remainder rule (ties to the lower index).
func apportion(n int, wts [4]float64) [4]int {
	var c [4]int
	var ideal [4]float64
	sum := 0.0
	for _, v := range wts {
		sum += v
	}
	if !(sum > 0) {
		return c
	}
	used := 0
	for i, v := range wts {
		if v > 0 {
			ideal[i] = float64(n) * v / sum
			c[i] = max(1, int(math.Floor(ideal[i])))
			used += c[i]
		}
	}
	for ; used < n; used++ {
		best, gap := -1, math.Inf(-1)
		for i, v := range wts {
			if v > 0 && ideal[i]-float64(c[i]) > gap {
				best, gap = i, ideal[i]-float64(c[i])
			}
		}
		c[best]++
	}
	return c
}

// Stagnation threshold: a cell is stagnant when renewing its pore volume
// at its throughput would take more than lowFlowRatio times the field's
// pore-volume turnover time.
const lowFlowRatio = 1e7

// lowFlow marks the active cells whose throughput is negligible.
func (t *tracer) lowFlow(f *Field) []bool {
	n := t.g.N()
	low := make([]bool, n)
	qref, pvref := 0.0, 0.0
	for _, wl := range f.Wells {
		if wl.Q > 0 {
			qref += wl.Q
		}
	}
	for k := 0; k < n; k++ {
		if t.isActive(k) {
			pvref += f.PoreVolume[k]
		}
	}
	for k := 0; k < n; k++ {
		if !t.isActive(k) {
			continue
		}
		thr := math.Max(t.in[k], t.out[k])
		if w := t.wellAt[k]; w >= 0 {
			thr = math.Max(thr, math.Abs(t.q[w]))
		}
		low[k] = !(thr*lowFlowRatio*pvref > qref*f.PoreVolume[k]) || thr == 0
	}
	return low
}

// Fill-line batches: fillBatch seeds are traced together (in parallel),
// chosen at least fillSpacing cells apart (Chebyshev distance) among the
// next fillScan candidates. Both are constants, so the lines do not depend
// on the number of workers.
const (
	fillBatch   = 32
	fillSpacing = 24
	fillScan    = 4096
)

// fill launches lines from the centres of the flowing cells that no line
// crosses yet. The uncovered cells are taken in cell order, in batches of
// seeds spaced apart (so that one batch does not trace many lines through
// one gap); a batch is traced in parallel and its lines are kept in seed
// order, each only if no line kept before it crossed its seed cell: a
// batch then keeps the lines a one-at-a-time fill would keep. The choice
// depends only on the field, never on the number of workers.
func (b *builder) fill(lowFlow []bool) {
	t := b.t
	n := t.g.N()
	nx := t.g.NX
	covered := make([]bool, n)
	for _, c := range b.cells {
		covered[c] = true
	}
	var cand []int32
	for k := 0; k < n; k++ {
		if t.isActive(k) && b.f.PoreVolume[k] > 0 && t.wellAt[k] < 0 && !lowFlow[k] && !covered[k] {
			cand = append(cand, int32(k))
		}
	}
	done := make([]bool, n) // seeds already traced
	isCand := make([]bool, n)
	for _, k := range cand {
		isCand[k] = true
	}
	resolved := 0 // candidates covered or traced, for the expected storage
	fill0 := len(b.cells)
	batch := make([]seed, 0, fillBatch)
	far := func(k int) bool {
		i, j := k%nx, k/nx
		for _, sd := range batch {
			di, dj := sd.cell%nx-i, sd.cell/nx-j
			if max(di, -di) < fillSpacing && max(dj, -dj) < fillSpacing {
				return false
			}
		}
		return true
	}
	for ptr := 0; ; {
		for ptr < len(cand) && (covered[cand[ptr]] || done[cand[ptr]]) {
			ptr++
		}
		if ptr == len(cand) {
			b.flush()
			return
		}
		batch = batch[:0]
		for q := ptr; q < min(len(cand), ptr+fillScan) && len(batch) < fillBatch; q++ {
			if k := int(cand[q]); !covered[k] && !done[k] && far(k) {
				batch = append(batch, seed{launch: FromCell, cell: k})
				done[k] = true
				resolved++
			}
		}
		out := b.traceBlock(batch)
		for i, sd := range batch {
			if covered[sd.cell] {
				continue // an earlier line of the batch crossed the seed
			}
			for _, c := range b.cellsOf(&out[i]) {
				if isCand[c] && !covered[c] && !done[c] {
					resolved++
				}
				covered[c] = true
			}
			// Expected size of the flat storage: as many segments per
			// candidate cell resolved (covered or traced) for the others,
			// once a tenth are resolved, and 10% over.
			if fr := float64(resolved) / float64(len(cand)); fr >= 0.1 {
				b.expect = fill0 + int(float64(len(b.cells)+out[i].n-fill0)/fr*1.1)
			} else {
				b.expect = 0
			}
			b.commit(&out[i])
		}
	}
}

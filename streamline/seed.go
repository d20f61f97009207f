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

// fill launches lines from the centres of the flowing cells that no line
// crosses yet, in rounds: each round takes, in cell order, uncovered cells
// at least three cells apart from the others of the round (so that one
// round does not trace many lines through one gap), traces them in
// parallel and updates the coverage. The choice depends only on the field,
// never on the number of workers.
func (b *builder) fill(lowFlow []bool) {
	t := b.t
	n := t.g.N()
	nx, ny := t.g.NX, t.g.NY
	covered := make([]bool, n)
	mark := func(from int) {
		for i := from; i < len(b.lines); i++ {
			for _, c := range b.lines[i].Cells {
				covered[c] = true
			}
		}
	}
	mark(0)
	var cand []int
	for k := 0; k < n; k++ {
		if t.isActive(k) && b.f.PoreVolume[k] > 0 && t.wellAt[k] < 0 && !lowFlow[k] && !covered[k] {
			cand = append(cand, k)
		}
	}
	const radius, batchMax = 2, 512
	reserved := make([]bool, n)
	var batch []seed
	var held []int
	for len(cand) > 0 {
		batch, held = batch[:0], held[:0]
		rest := cand[:0]
		for _, k := range cand {
			switch {
			case covered[k]:
				// crossed by an earlier round: done
			case reserved[k] || len(batch) == batchMax:
				rest = append(rest, k)
			default:
				batch = append(batch, seed{launch: FromCell, cell: k})
				i, j := k%nx, k/nx
				for jj := max(0, j-radius); jj <= min(ny-1, j+radius); jj++ {
					for ii := max(0, i-radius); ii <= min(nx-1, i+radius); ii++ {
						if kk := jj*nx + ii; !reserved[kk] {
							reserved[kk] = true
							held = append(held, kk)
						}
					}
				}
			}
		}
		cand = rest
		for _, kk := range held {
			reserved[kk] = false
		}
		from := len(b.lines)
		b.trace(batch)
		mark(from)
	}
}

package streamline

import (
	"fmt"
	"math"

	"floodtrace/internal/parallel"
	"floodtrace/reservoir"
)

// maps accumulates the cell maps from the lines, in line order.
//
// The cells are cut into contiguous ranges, one per worker; each range
// takes the lines in line order (skipping those whose cells all lie
// outside it), so every cell's sum is made in the same order whatever the
// number of ranges. The partitions are made range by range too, as tasks
// of their own beside the maps.
func (b *builder) maps(lowFlow []bool) *Result {
	t := b.t
	n := t.g.N()
	r := &Result{
		Lines:             b.lines,
		Volume:            make([]float64, n),
		ProducerPartition: make([]int, n),
		Stagnant:          make([]bool, n),
	}
	only := b.volumesOnly // Settings.VolumesOnly: no time-of-flight maps, no injector partition
	if !only {
		r.TOF, r.BackTOF, r.Travel = make([]float64, n), make([]float64, n), make([]float64, n)
		r.InjectorPartition = make([]int, n)
	}
	// Weights: wF of the lines from an injector, wB of the lines to a
	// producer, wT of the lines with both. The lines with flux all end at
	// a producer (assignFluxes gives the others none), so wB is the traced
	// volume and wT is wF: the same terms in the same order. Only when
	// that does not hold are they summed apart.
	var wF, wB, wT []float64
	apart := false
	if !only {
		wF = make([]float64, n)
		wB, wT = r.Volume, wF
		for i := range b.lines {
			if b.lines[i].Flux > 0 && b.lines[i].Producer < 0 {
				wB, wT = make([]float64, n), make([]float64, n)
				apart = true
				break
			}
		}
	}
	nan := math.NaN()
	injOrder := b.byWell(func(l *Line) int { return l.Injector })
	prodOrder := b.byWell(func(l *Line) int { return l.Producer })
	ranges := max(1, b.workers)
	bound := func(rg int) (int32, int32) { return int32(rg * n / ranges), int32((rg + 1) * n / ranges) }
	cells, taus, start := b.cells, b.taus, b.start
	parallel.Each(2*ranges, b.workers, 1, func(_, task int) {
		if task >= ranges {
			lo, hi := bound(task - ranges)
			best := make([]float64, hi-lo)
			acc := make([]float64, hi-lo)
			if !only {
				b.partition(r.InjectorPartition, injOrder, lo, hi, best, acc)
				clear(best)
			}
			b.partition(r.ProducerPartition, prodOrder, lo, hi, best, acc)
			return
		}
		lo, hi := bound(task)
		for i := range b.lines {
			l := &b.lines[i]
			if !(l.Flux > 0) || b.hi[i] < lo || b.lo[i] >= hi {
				continue
			}
			q, total := l.Flux, l.TotalTau
			cum := 0.0
			seg := cells[start[i]:start[i+1]]
			tau := taus[start[i]:start[i+1]]
			tau = tau[:len(seg)]
			switch {
			case only:
				for m, c := range seg {
					if c >= lo && c < hi {
						r.Volume[c] += q * tau[m]
					}
				}
			case !apart && l.Injector >= 0:
				for m, c := range seg {
					tm := tau[m]
					if c >= lo && c < hi {
						v := q * tm
						mid := cum + 0.5*tm
						r.Volume[c] += v
						wF[c] += v
						r.TOF[c] += v * mid
						r.BackTOF[c] += v * (total - mid)
						r.Travel[c] += v * total
					}
					cum += tm
				}
			case !apart:
				for m, c := range seg {
					tm := tau[m]
					if c >= lo && c < hi {
						v := q * tm
						mid := cum + 0.5*tm
						r.Volume[c] += v
						r.BackTOF[c] += v * (total - mid)
					}
					cum += tm
				}
			default:
				for m, c := range seg {
					tm := tau[m]
					if c >= lo && c < hi {
						v := q * tm
						mid := cum + 0.5*tm
						r.Volume[c] += v
						if l.Injector >= 0 {
							wF[c] += v
							r.TOF[c] += v * mid
						}
						if l.Producer >= 0 {
							wB[c] += v
							r.BackTOF[c] += v * (total - mid)
						}
						if l.Injector >= 0 && l.Producer >= 0 {
							wT[c] += v
							r.Travel[c] += v * total
						}
					}
					cum += tm
				}
			}
		}
		for k := int(lo); k < int(hi); k++ {
			if !only {
				r.TOF[k] = ratio(r.TOF[k], wF[k], nan)
				r.BackTOF[k] = ratio(r.BackTOF[k], wB[k], nan)
				r.Travel[k] = ratio(r.Travel[k], wT[k], nan)
			}
			r.Stagnant[k] = t.isActive(k) && (lowFlow[k] || !(r.Volume[k] > 0))
		}
	})
	return r
}

func ratio(num, den, none float64) float64 {
	if den > 0 {
		return num / den
	}
	return none
}

// wellOrder lists the lines with flux by well: the lines of well w, in
// line order, are line[start[w]:start[w+1]].
type wellOrder struct {
	start []int
	line  []int
}

// byWell orders the lines with flux by the well that well(line) names (a
// counting sort, stable), leaving out lines with no well (-1).
func (b *builder) byWell(well func(*Line) int) wellOrder {
	nw := len(b.t.q)
	start := make([]int, nw+1)
	for i := range b.lines {
		if w := well(&b.lines[i]); w >= 0 && b.lines[i].Flux > 0 {
			start[w+1]++
		}
	}
	for w := 0; w < nw; w++ {
		start[w+1] += start[w]
	}
	order := make([]int, start[nw])
	next := append([]int(nil), start[:nw]...)
	for i := range b.lines {
		if w := well(&b.lines[i]); w >= 0 && b.lines[i].Flux > 0 {
			order[next[w]] = i
			next[w]++
		}
	}
	return wellOrder{start: start, line: order}
}

// partition sets part[k], for the cells k of [lo, hi), to the well whose
// lines carry the largest traced volume through cell k (ties to the lower
// well index), or -1. Lines are visited well by well, each well's lines in
// line order, so each cell's sums do not depend on the range. best and acc
// are zero scratch of hi-lo values; acc is left zero.
func (b *builder) partition(part []int, ord wellOrder, lo, hi int32, best, acc []float64) {
	var touched []int32 // cells of the range whose acc was 0 before an addition
	for k := lo; k < hi; k++ {
		part[k] = -1
	}
	cells, taus, start := b.cells, b.taus, b.start
	for w := 0; w+1 < len(ord.start); w++ {
		touched = touched[:0]
		for _, i := range ord.line[ord.start[w]:ord.start[w+1]] {
			if b.hi[i] < lo || b.lo[i] >= hi {
				continue
			}
			q := b.lines[i].Flux
			seg := cells[start[i]:start[i+1]]
			tau := taus[start[i]:start[i+1]]
			tau = tau[:len(seg)]
			for s, c := range seg {
				if c >= lo && c < hi {
					c -= lo
					if acc[c] == 0 {
						touched = append(touched, c)
					}
					acc[c] += q * tau[s]
				}
			}
		}
		// A cell listed twice has acc 0 at its second visit, which never
		// beats best (>= 0).
		for _, c := range touched {
			if acc[c] > best[c] {
				best[c], part[lo+c] = acc[c], w
			}
			acc[c] = 0
		}
	}
}

// pairs sums the line fluxes and volumes of each injector-producer pair.
func pairs(f *Field, lines []Line) []Pair {
	nw := len(f.Wells)
	idx := make([]int, nw*nw) // pair position + 1, 0 if none yet
	var out []Pair
	for i := range lines {
		l := &lines[i]
		if l.Injector < 0 || l.Producer < 0 || !(l.Flux > 0) {
			continue
		}
		p := l.Injector*nw + l.Producer
		if idx[p] == 0 {
			out = append(out, Pair{Injector: l.Injector, Producer: l.Producer})
			idx[p] = len(out)
		}
		pr := &out[idx[p]-1]
		pr.Rate += l.Flux
		pr.PoreVolume += l.Flux * l.TotalTau
	}
	// Order by injector, then producer.
	sorted := make([]Pair, 0, len(out))
	for _, at := range idx {
		if at > 0 {
			pr := out[at-1]
			pr.FractionOfInjector = pr.Rate / f.Wells[pr.Injector].Q
			pr.FractionOfProducer = pr.Rate / -f.Wells[pr.Producer].Q
			sorted = append(sorted, pr)
		}
	}
	return sorted
}

// endWarnings counts the lines that end away from wells.
func (b *builder) endWarnings(maxSteps int) []string {
	var cnt [4]int
	for i := range b.lines {
		l := &b.lines[i]
		if l.Start != AtWell {
			cnt[l.Start]++
		}
		if l.End != AtWell {
			cnt[l.End]++
		}
	}
	var w []string
	if cnt[Stagnation] > 0 {
		w = append(w, fmt.Sprintf("%d streamline ends stop at a stagnation point", cnt[Stagnation]))
	}
	if cnt[Boundary] > 0 {
		w = append(w, fmt.Sprintf("%d streamline ends run into the grid edge or an inactive cell through a face that carries flux", cnt[Boundary]))
	}
	if cnt[StepCap] > 0 {
		w = append(w, fmt.Sprintf("%d streamline ends stopped after %d cells (step cap)", cnt[StepCap], maxSteps))
	}
	return w
}

// balanceWarnings reports cells whose face fluxes and well rate do not
// balance (relative to the cell's throughput, and not merely at the level
// of a linear solver's residual): time of flight is only approximate there.
func (t *tracer) balanceWarnings(f *Field) []string {
	bad, worst, at := 0, 0.0, -1
	qref := 0.0
	for _, q := range t.q {
		qref += math.Abs(q)
	}
	for k := 0; k < t.g.N(); k++ {
		if !t.isActive(k) {
			continue
		}
		src := 0.0
		if w := t.wellAt[k]; w >= 0 {
			src = t.q[w]
		}
		scale := math.Max(math.Max(t.in[k], t.out[k]), math.Abs(src))
		if scale == 0 {
			continue
		}
		imb := math.Abs(t.out[k] - t.in[k] - src)
		if e := imb / scale; e > 1e-6 && imb > 1e-9*qref {
			bad++
			if e > worst {
				worst, at = e, k
			}
		}
	}
	if bad == 0 {
		return nil
	}
	i, j := t.g.IJ(at)
	return []string{fmt.Sprintf("%d cells do not conserve flux (worst relative imbalance %.2g in %s); time of flight there is approximate", bad, worst, reservoir.CellLabel(i, j))}
}

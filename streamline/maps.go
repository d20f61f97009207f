package streamline

import (
	"fmt"
	"math"
	"sync"

	"floodtrace/internal/parallel"
	"floodtrace/reservoir"
)

// maps accumulates the cell maps from the lines, in line order.
func (b *builder) maps(lowFlow []bool) *Result {
	t := b.t
	n := t.g.N()
	r := &Result{
		Lines:             b.lines,
		TOF:               make([]float64, n),
		BackTOF:           make([]float64, n),
		Travel:            make([]float64, n),
		Volume:            make([]float64, n),
		InjectorPartition: make([]int, n),
		ProducerPartition: make([]int, n),
		Stagnant:          make([]bool, n),
	}
	wF := make([]float64, n) // weights of lines from an injector
	wB := make([]float64, n) // weights of lines to a producer
	wT := make([]float64, n) // weights of lines with both
	nan := math.NaN()
	var wg sync.WaitGroup
	// The partitions read only the lines; they run beside the maps.
	wg.Go(func() { b.partition(r.InjectorPartition, func(l *Line) int { return l.Injector }) })
	wg.Go(func() { b.partition(r.ProducerPartition, func(l *Line) int { return l.Producer }) })
	// The cells are cut into one contiguous range per worker; each range
	// takes the lines in line order, so every sum is made in the same order
	// whatever the number of ranges.
	ranges := max(1, b.workers)
	parallel.Each(ranges, b.workers, 0, func(_, rg int) {
		lo, hi := int32(rg*n/ranges), int32((rg+1)*n/ranges)
		for i := range b.lines {
			l := &b.lines[i]
			if !(l.Flux > 0) {
				continue
			}
			cum := 0.0
			tau := l.Tau[:len(l.Cells)]
			for m, c := range l.Cells {
				tm := tau[m]
				if c >= lo && c < hi {
					v := l.Flux * tm
					mid := cum + 0.5*tm
					r.Volume[c] += v
					if l.Injector >= 0 {
						wF[c] += v
						r.TOF[c] += v * mid
					}
					if l.Producer >= 0 {
						wB[c] += v
						r.BackTOF[c] += v * (l.TotalTau - mid)
					}
					if l.Injector >= 0 && l.Producer >= 0 {
						wT[c] += v
						r.Travel[c] += v * l.TotalTau
					}
				}
				cum += tm
			}
		}
		for k := int(lo); k < int(hi); k++ {
			r.TOF[k] = ratio(r.TOF[k], wF[k], nan)
			r.BackTOF[k] = ratio(r.BackTOF[k], wB[k], nan)
			r.Travel[k] = ratio(r.Travel[k], wT[k], nan)
			r.Stagnant[k] = t.isActive(k) && (lowFlow[k] || !(r.Volume[k] > 0))
		}
	})
	wg.Wait()
	return r
}

func ratio(num, den, none float64) float64 {
	if den > 0 {
		return num / den
	}
	return none
}

// partition sets part[k] to the well whose lines carry the largest traced
// volume through cell k (ties to the lower well index), or -1. Lines are
// visited well by well, each well's lines in line order.
func (b *builder) partition(part []int, well func(*Line) int) {
	nw := len(b.t.q)
	// Order the lines by well with a counting sort (stable).
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
	best := make([]float64, len(part))
	acc := make([]float64, len(part))
	for k := range part {
		part[k] = -1
	}
	for w := 0; w < nw; w++ {
		group := order[start[w]:start[w+1]]
		for _, i := range group {
			l := &b.lines[i]
			for m, c := range l.Cells {
				acc[c] += l.Flux * l.Tau[m]
			}
		}
		for _, i := range group {
			for _, c := range b.lines[i].Cells {
				if acc[c] > best[c] {
					best[c], part[c] = acc[c], w
				}
				acc[c] = 0
			}
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

package streamline

import (
	"fmt"
	"math"
	"slices"
)

// anchor is a line's crossing of a well-cell face.
type anchor struct {
	key  int // cell*4 + face
	s    float64
	line int
}

// tubeShares sets, for each group of anchors on one face, the share of the
// face each line stands for: the part of the face nearer to its crossing
// than to any other (the flux through a face is uniform along it in
// Pollock's field, so this is a split of the face flux into stream tubes).
// It calls set(line, key, share) in a fixed order.
func tubeShares(a []anchor, set func(line, key int, share float64)) {
	slices.SortFunc(a, func(x, y anchor) int {
		switch {
		case x.key != y.key:
			return x.key - y.key
		case x.s < y.s:
			return -1
		case x.s > y.s:
			return 1
		}
		return x.line - y.line
	})
	for i := 0; i < len(a); {
		j := i
		for j < len(a) && a[j].key == a[i].key {
			j++
		}
		for m := i; m < j; m++ {
			lo, hi := 0.0, 1.0
			if m > i {
				lo = 0.5 * (a[m-1].s + a[m].s)
			}
			if m < j-1 {
				hi = 0.5 * (a[m].s + a[m+1].s)
			}
			set(a[m].line, a[i].key, hi-lo)
		}
		i = j
	}
}

// assignFluxes gives every line the flux of its stream tube (see Trace) and
// returns warnings.
func (b *builder) assignFluxes() []string {
	t := b.t
	lines, meta := b.lines, b.meta
	var warn []string

	// Flux a well face launches: the face flux, less the part that passes
	// through a well cell that also receives flow.
	faceFlux := func(key int, sign float64) float64 {
		k, face := key/4, key%4
		q := sign * t.outward(k, face)
		if !(q > 0) {
			return 0
		}
		w := t.wellAt[k]
		if w < 0 {
			return 0
		}
		return q * math.Min(1, math.Abs(t.q[w])/t.effOut(k, sign))
	}

	// Injector side: tube shares on the injector faces.
	var anchors []anchor
	for i := range lines {
		if meta[i].injKey >= 0 {
			anchors = append(anchors, anchor{meta[i].injKey, meta[i].injS, i})
		}
	}
	injGroup := make([]int, len(lines)) // index into injTarget, -1 if none
	for i := range injGroup {
		injGroup[i] = -1
	}
	var injTarget []float64
	lastKey := -1
	tubeShares(anchors, func(line, key int, share float64) {
		if key != lastKey {
			injTarget = append(injTarget, faceFlux(key, 1))
			lastKey = key
		}
		g := len(injTarget) - 1
		injGroup[line] = g
		lines[line].Flux = injTarget[g] * share
	})

	// Lines that reach a producer but no injector take their share of the
	// producer face instead.
	anchors = anchors[:0]
	for i := range lines {
		if meta[i].prodKey >= 0 {
			anchors = append(anchors, anchor{meta[i].prodKey, meta[i].prodS, i})
		}
	}
	tubeShares(anchors, func(line, key int, share float64) {
		if injGroup[line] < 0 {
			lines[line].Flux = faceFlux(key, -1) * share
		}
	})

	// A line from an injector that never reaches a producer (it stops at a
	// stagnation point, say) stands for flux that the field delivers to
	// some producer all the same: it gets no flux, and the other lines of
	// its face take over its share through the face totals below.
	for i := range lines {
		if lines[i].Producer < 0 {
			lines[i].Flux = 0
		}
	}

	// Iterative proportional fitting (Deming and Stephan 1940): alternately
	// scale the lines of each producer to its rate and the lines of each
	// injector face to its launch flux, ending on the producers.
	// The passes run over compact copies of each line's producer, group
	// and flux (the Line structs are large), in line order. Each pass
	// scales the lines by one set of totals and sums them into the other:
	// a line's new flux depends only on the totals of the pass before, so
	// this is the alternation written as two loops per iteration instead of
	// four, with the same sums in the same order. A line without producer
	// or injector face points at a last slot whose factor stays 1 (x*1 is
	// x) and whose sum is never read.
	np := len(t.q)
	sumP := make([]float64, np+1)
	facP := make([]float64, np+1)
	sumI := make([]float64, len(injTarget)+1)
	facI := make([]float64, len(injTarget)+1)
	facP[np], facI[len(injTarget)] = 1, 1
	prod := make([]int32, len(lines))
	group := make([]int32, len(lines))
	flux := make([]float64, len(lines))
	for i := range lines {
		prod[i], group[i], flux[i] = int32(np), int32(len(injTarget)), lines[i].Flux
		if p := lines[i].Producer; p >= 0 {
			prod[i] = int32(p)
		}
		if g := injGroup[i]; g >= 0 {
			group[i] = int32(g)
		}
		sumP[prod[i]] += flux[i]
	}
	for it := 0; ; it++ {
		for p := range np {
			facP[p] = 1
			if sumP[p] > 0 {
				facP[p] = -t.q[p] / sumP[p]
			}
		}
		clear(sumI)
		sumOver(sumI, group, flux, facP, prod)
		dev := 0.0
		for g, v := range sumI[:len(injTarget)] {
			if injTarget[g] > 0 && v > 0 {
				dev = math.Max(dev, math.Abs(v/injTarget[g]-1))
			}
		}
		// The two sets of totals can be met together only when every face
		// has lines to every producer its flux reaches, and only as far as
		// the wells balance; when a thin tube has no line the injector side
		// stays off by about what that tube carries.
		if dev < 1e-10 {
			break
		}
		if it == 100 {
			if dev > 1e-3 {
				warn = append(warn, fmt.Sprintf("streamline fluxes: injector face totals balanced only to %.2g", dev))
			}
			break
		}
		for g, v := range sumI[:len(injTarget)] {
			facI[g] = 1
			if v > 0 {
				facI[g] = injTarget[g] / v
			}
		}
		clear(sumP)
		sumOver(sumP, prod, flux, facI, group)
	}
	for i := range lines {
		lines[i].Flux = flux[i]
	}
	for p, v := range sumP[:np] {
		if t.q[p] < 0 && !(v > 0) {
			warn = append(warn, fmt.Sprintf("no streamline with flux reaches producer %q", b.f.Wells[p].Name))
		}
	}
	return warn
}

// sumOver scales each flux[i] by fac[by[i]] and adds it to sum[into[i]],
// in line order. The running sum of a slot is kept in a register while
// consecutive lines add to the same slot (the lines of one face follow one
// another), which is the same additions in the same order as adding to
// the slot in memory each time, without waiting for each store to be
// read back.
func sumOver(sum []float64, into []int32, flux, fac []float64, by []int32) {
	if len(into) == 0 {
		return
	}
	cur := into[0]
	acc := sum[cur]
	for i, g := range into {
		if g != cur {
			sum[cur] = acc
			cur, acc = g, sum[g]
		}
		flux[i] *= fac[by[i]]
		acc += flux[i]
	}
	sum[cur] = acc
}

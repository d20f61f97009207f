package streamline

import (
	"fmt"

	"floodtrace/internal/parallel"
)

// Segments holds the cell crossings of every line in flat arrays, with the
// time of flight rescaled cell by cell so that the lines crossing a cell
// hold exactly its pore volume (the sum over its segments of flux times
// rescaled time of flight is the cell's pore volume). Volumes mapped
// between lines and cells are then conserved to round-off, which the raw
// time of flight does not give: near stagnation points a line that passes
// close by can hold many times the pore volume of the cells it crosses.
type Segments struct {
	// Start holds the offset of each line's first segment, one per line
	// plus one: line i has the segments Start[i] to Start[i+1]-1.
	Start []int
	// Cell is the cell of each segment.
	Cell []int32
	// Entry and Exit are the rescaled time of flight along the line at the
	// entry and the exit of each segment, days; a segment's Entry is the
	// Exit of the segment before it on its line, exactly.
	Entry, Exit []float64
	// Total is each line's rescaled time of flight from end to end.
	Total []float64
	// Uncovered counts the cells with pore volume that carry flow (not
	// stagnant) but that no line crosses.
	Uncovered int
}

// Rescale returns the lines' segments with their time of flight rescaled
// to the pore volumes pv (one per cell of the traced field): in every cell
// crossed by lines the time of flight of each crossing is multiplied by
// pv over the traced volume of the cell (the sum of flux times time of
// flight of its crossings). The result does not depend on the number of
// cores: every cell's sum is taken over the lines in line order.
//
// It needs the lines' Cells and Tau; see ReleaseCells.
func (r *Result) Rescale(pv []float64) (*Segments, error) {
	if r.TOF != nil && len(pv) != len(r.TOF) {
		return nil, fmt.Errorf("streamline: %d pore volumes for %d cells", len(pv), len(r.TOF))
	}
	n := len(r.Lines)
	sg := &Segments{Start: make([]int, n+1), Total: make([]float64, n)}
	for i := range r.Lines {
		l := &r.Lines[i]
		if len(l.Tau) < len(l.Cells) {
			return nil, fmt.Errorf("streamline: line %d has %d cells but %d times of flight (cells released?)", i, len(l.Cells), len(l.Tau))
		}
		for _, c := range l.Cells {
			if c < 0 || int(c) >= len(pv) {
				return nil, fmt.Errorf("streamline: line %d crosses cell %d, outside the %d pore volumes", i, c, len(pv))
			}
		}
		sg.Start[i+1] = sg.Start[i] + len(l.Cells)
	}
	nseg := sg.Start[n]
	// scale[c]: first the traced volume of cell c, then pv/volume. One
	// pass in line order: the sums are those of any split of the cells
	// into ranges (each cell's terms come in the same order), and a split
	// over cores would have every core read every segment, twice the
	// memory traffic for no gain on a memory-bound loop.
	scale := make([]float64, len(pv))
	for i := range r.Lines {
		l := &r.Lines[i]
		q := l.Flux
		tau := l.Tau[:len(l.Cells)]
		for s, c := range l.Cells {
			scale[c] += q * tau[s]
		}
	}
	for c, raw := range scale {
		if raw > 0 {
			scale[c] = pv[c] / raw
		} else if pv[c] > 0 && r.TOF != nil && !r.Stagnant[c] {
			sg.Uncovered++
		}
	}
	sg.Cell = make([]int32, nseg)
	sg.Entry = make([]float64, nseg)
	sg.Exit = make([]float64, nseg)
	parallel.Pieces(n, lineBlocks, 0, func(_, lo, hi int) {
		for i := lo; i < hi; i++ {
			l := &r.Lines[i]
			off := sg.Start[i]
			cell := sg.Cell[off : off+len(l.Cells)]
			a, b := sg.Entry[off:off+len(cell)], sg.Exit[off:off+len(cell)]
			tau := l.Tau[:len(cell)]
			copy(cell, l.Cells)
			t := 0.0
			for s, c := range cell {
				a[s] = t
				t += tau[s] * scale[c]
				b[s] = t
			}
			sg.Total[i] = t
		}
	})
	return sg, nil
}

// lineBlocks is the fixed number of blocks the lines are cut into for
// parallel work; it does not depend on the number of cores.
const lineBlocks = 64

// ReleaseCells drops the lines' Cells and Tau (a million-cell case holds
// hundreds of megabytes of them), for a caller that keeps its Segments
// instead. Paths, fluxes, wells, the cell maps and the allocation remain;
// Rescale fails afterwards.
func (r *Result) ReleaseCells() {
	for i := range r.Lines {
		r.Lines[i].Cells, r.Lines[i].Tau = nil, nil
	}
}

// PairVolumes returns the pore volume of each injector-producer pair of
// r.Pairs (same order) from the rescaled time of flight of its lines, the
// sum of flux times Total, so the pair volumes add up to the pore volume
// the lines hold. Pair.PoreVolume, from the raw time of flight, can exceed
// it near stagnation points.
func (r *Result) PairVolumes(sg *Segments) []float64 {
	idx := make(map[[2]int]int, len(r.Pairs))
	for k, p := range r.Pairs {
		idx[[2]int{p.Injector, p.Producer}] = k
	}
	out := make([]float64, len(r.Pairs))
	for i := range r.Lines {
		if i >= len(sg.Total) {
			break
		}
		l := &r.Lines[i]
		if k, ok := idx[[2]int{l.Injector, l.Producer}]; ok {
			out[k] += l.Flux * sg.Total[i]
		}
	}
	return out
}

package streamline

import (
	"errors"
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
	// Exit is the rescaled time of flight along the line at the exit of
	// each segment, days. The time at a segment's entry is the Exit of
	// the segment before it on its line, or 0 for a line's first segment
	// (Entry); the time spent in segment s is their difference.
	Exit []float64
	// Total is each line's rescaled time of flight from end to end.
	Total []float64
	// Uncovered counts the cells with pore volume that carry flow (not
	// stagnant) but that no line crosses.
	Uncovered int
}

// Entry returns the rescaled time of flight at the entry of segment s of
// line i (Start[i] <= s < Start[i+1]): the Exit of the segment before it,
// or 0 for the line's first segment.
func (sg *Segments) Entry(i, s int) float64 {
	if s == sg.Start[i] {
		return 0
	}
	return sg.Exit[s-1]
}

// Rescale returns the lines' segments with their time of flight rescaled
// to the pore volumes pv (one per cell of the traced field): in every cell
// crossed by lines the time of flight of each crossing is multiplied by
// pv over the traced volume of the cell (Result.Volume for the lines of
// Trace: the sum of flux times time of flight of its crossings, over the
// lines in line order). The result does not depend on the number of cores.
// The segments' Cell shares the lines' cell storage (neither is to be
// modified); see TakeSegments for a result that needs the lines no more.
//
// It needs the lines' Cells and Tau; see ReleaseCells.
func (r *Result) Rescale(pv []float64) (*Segments, error) {
	return r.rescale(pv, false)
}

// TakeSegments is Rescale for a caller that keeps the segments instead of
// the lines' Cells and Tau: the segments are made in the lines' storage,
// their Exit over the times of flight, without a copy (a million-cell case
// holds hundreds of megabytes of them), and the lines' Cells and Tau are
// released (ReleaseCells). The segments are those of Rescale, bit for bit.
func (r *Result) TakeSegments(pv []float64) (*Segments, error) {
	sg, err := r.rescale(pv, true)
	if err != nil {
		return nil, err
	}
	r.ReleaseCells()
	return sg, nil
}

// rescale makes the segments; inPlace writes Exit over the flat times of
// flight of the lines of Trace.
func (r *Result) rescale(pv []float64, inPlace bool) (*Segments, error) {
	if r.Stagnant != nil && len(pv) != len(r.Stagnant) {
		return nil, fmt.Errorf("streamline: %d pore volumes for %d cells", len(pv), len(r.Stagnant))
	}
	if r.released {
		return nil, errors.New("streamline: the lines' cells were released")
	}
	n := len(r.Lines)
	sg := &Segments{Start: make([]int, n+1), Total: make([]float64, n)}
	fl := r.flat
	for i := range r.Lines {
		l := &r.Lines[i]
		if len(l.Tau) < len(l.Cells) {
			return nil, fmt.Errorf("streamline: line %d has %d cells but %d times of flight (cells released?)", i, len(l.Cells), len(l.Tau))
		}
		sg.Start[i+1] = sg.Start[i] + len(l.Cells)
		if fl != nil && (len(fl.start) != n+1 || fl.start[i+1] != sg.Start[i+1] ||
			len(l.Cells) > 0 && (&l.Cells[0] != &fl.cells[fl.start[i]] || &l.Tau[0] != &fl.taus[fl.start[i]])) {
			fl = nil // the lines are not (all) views of the flat storage
		}
	}
	nseg := sg.Start[n]
	if fl == nil {
		for i := range r.Lines {
			for _, c := range r.Lines[i].Cells {
				if c < 0 || int(c) >= len(pv) {
					return nil, fmt.Errorf("streamline: line %d crosses cell %d, outside the %d pore volumes", i, c, len(pv))
				}
			}
		}
	}
	// scale[c]: first the traced volume of cell c, then pv/volume. The
	// traced volume is the sum of flux times time of flight over the
	// cell's crossings in line order; for the lines of Trace that is
	// Result.Volume, summed so by the maps (lines without flux add +0).
	scale := make([]float64, len(pv))
	if fl != nil && len(r.Volume) == len(pv) {
		copy(scale, r.Volume)
	} else {
		for i := range r.Lines {
			l := &r.Lines[i]
			q := l.Flux
			tau := l.Tau[:len(l.Cells)]
			for s, c := range l.Cells {
				scale[c] += q * tau[s]
			}
		}
	}
	for c, raw := range scale {
		if raw > 0 {
			scale[c] = pv[c] / raw
		} else if pv[c] > 0 && r.Stagnant != nil && !r.Stagnant[c] {
			sg.Uncovered++
		}
	}
	switch {
	case fl != nil && inPlace:
		sg.Cell, sg.Exit = fl.cells[:nseg], fl.taus[:nseg]
	case fl != nil:
		sg.Cell, sg.Exit = fl.cells[:nseg], make([]float64, nseg)
	default:
		sg.Cell, sg.Exit = make([]int32, nseg), make([]float64, nseg)
	}
	parallel.Pieces(n, lineBlocks, 0, func(_, lo, hi int) {
		for i := lo; i < hi; i++ {
			l := &r.Lines[i]
			off := sg.Start[i]
			cell := sg.Cell[off : off+len(l.Cells)]
			b := sg.Exit[off : off+len(cell)]
			tau := l.Tau[:len(cell)]
			if fl == nil {
				copy(cell, l.Cells)
			}
			t := 0.0
			for s, c := range cell {
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
	r.flat, r.released = nil, true
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

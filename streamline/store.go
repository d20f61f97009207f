package streamline

import (
	"floodtrace/internal/parallel"
)

// builder collects the lines of one Trace.
type builder struct {
	t       *tracer
	f       *Field
	workers int
	lines   []Line
	meta    []lineMeta
	// cells and taus hold the lines' cells and times of flight one line
	// after the other, in line order: line i has [start[i], start[i+1]).
	// They become the Result's flat storage (the lines' Cells and Tau
	// are views of them) and, without a copy, its Segments (TakeSegments).
	cells []int32
	taus  []float64
	start []int
	// lo and hi are the smallest and largest cell of each line, for the
	// cell-range passes of the maps to skip the lines outside a range.
	lo, hi []int32
	work   []worker
	// out holds the lines of the block being traced.
	out []traced
	// expect is the expected number of segments when all lines are
	// traced (0 = not known), for the flat storage to grow to about its
	// final size rather than by a fixed factor (the slack of an array
	// grown by a factor, and the copies, cost memory).
	expect int
	// volumesOnly: Settings.VolumesOnly.
	volumesOnly bool
	// pending are the copies from the block buffers into the flat storage
	// that commit has reserved room for and flush makes, in parallel.
	pending []pendingCopy
}

// pendingCopy is one line's copy from worker w's block buffers, [src,
// src+n), to the flat storage at dst.
type pendingCopy struct{ w, src, dst, n int }

// worker is the scratch space of one goroutine: the two halves of the line
// it traces and the joined lines of the current block.
type worker struct {
	up, down half
	cells    []int32
	taus     []float64
}

// traced is a line traced into the block buffers of worker w: its cells
// and times of flight are [off, off+n) of the worker's buffers, lo and hi
// its smallest and largest cell.
type traced struct {
	line      Line
	meta      lineMeta
	w, off, n int
	lo, hi    int32
}

// blockSegments sets the number of lines traced in parallel before they
// are appended to the flat storage in order: as many as would hold
// blockSegments segments if each crossed NX+NY cells (lines cross about
// 0.4 of that on the benchmark pattern), at least 256. The block buffers,
// a few megabytes, are reused from block to block, so the lines are
// written once into memory touched before and once into the flat arrays;
// fewer, larger blocks on small grids wait less at the ends of blocks.
const blockSegments = 1 << 19

func newBuilder(t *tracer, f *Field, workers int) *builder {
	return &builder{t: t, f: f, workers: workers, start: []int{0}, work: make([]worker, workers)}
}

// trace traces the seeds and appends their lines in seed order. The
// first block gives the expected size of the flat storage: as many
// segments per line for the other seeds.
func (b *builder) trace(seeds []seed) {
	base := len(b.cells)
	per := max(256, blockSegments/(b.t.g.NX+b.t.g.NY))
	for lo := 0; lo < len(seeds); lo += per {
		block := seeds[lo:min(len(seeds), lo+per)]
		out := b.traceBlock(block)
		if lo == 0 {
			segs := 0
			for i := range out {
				segs += out[i].n
			}
			b.expect = base + int(float64(segs)*float64(len(seeds))/float64(len(block))*1.05)
		}
		for i := range out {
			b.commit(&out[i])
		}
	}
	b.flush()
}

// traceBlock traces the seeds in parallel into the workers' block buffers
// and returns the lines, in seed order. They stay valid until the next
// call.
func (b *builder) traceBlock(seeds []seed) []traced {
	b.flush() // the block buffers are about to be reused
	for w := range b.work {
		wk := &b.work[w]
		if wk.cells == nil {
			// Room for half a block's segments from the start: grown from
			// nothing by append, the buffers were copied and cleared many
			// times over (a sixth of a 100x100 trace).
			n := blockSegments / 2 / len(b.work)
			wk.cells, wk.taus = make([]int32, 0, n), make([]float64, 0, n)
		}
		wk.cells, wk.taus = wk.cells[:0], wk.taus[:0]
	}
	if cap(b.out) < len(seeds) {
		b.out = make([]traced, len(seeds))
	}
	out := b.out[:len(seeds)]
	// One line at a time: lines differ much in length, and the results do
	// not depend on which worker traces which line.
	parallel.Each(len(seeds), b.workers, 1, func(w, i int) {
		out[i] = b.t.line(seeds[i], &b.work[w], w)
	})
	return out
}

// cellsOf returns the cells of a traced line.
func (b *builder) cellsOf(tr *traced) []int32 {
	return b.work[tr.w].cells[tr.off : tr.off+tr.n]
}

// commit appends a traced line to the lines and reserves room for its
// cells and times of flight in the flat storage; flush copies them.
func (b *builder) commit(tr *traced) {
	if need := len(b.cells) + tr.n; need > cap(b.cells) {
		b.flush()
		// A fresh array of the expected final size, or half as large again
		// as the old one when the expectation falls short; the old one is
		// garbage.
		c := max(need, 1<<12, cap(b.cells)+cap(b.cells)/2)
		if b.expect >= need {
			c = max(need, 1<<12, b.expect)
		}
		cells := make([]int32, len(b.cells), c)
		taus := make([]float64, len(b.taus), c)
		copy(cells, b.cells)
		copy(taus, b.taus)
		b.cells, b.taus = cells, taus
	}
	dst := len(b.cells)
	b.cells, b.taus = b.cells[:dst+tr.n], b.taus[:dst+tr.n]
	b.pending = append(b.pending, pendingCopy{w: tr.w, src: tr.off, dst: dst, n: tr.n})
	b.start = append(b.start, len(b.cells))
	b.lines = append(b.lines, tr.line)
	b.meta = append(b.meta, tr.meta)
	b.lo = append(b.lo, tr.lo)
	b.hi = append(b.hi, tr.hi)
	tr.line = Line{}
}

// flush makes the pending copies into the flat storage, on the workers:
// at the end of a block they were the largest serial step of a trace.
func (b *builder) flush() {
	if len(b.pending) == 0 {
		return
	}
	workers := b.workers
	if segs := len(b.cells) - b.pending[0].dst; segs < 1<<15 {
		workers = 1 // a fill batch: not worth the goroutines
	}
	parallel.Each(len(b.pending), workers, 0, func(_, i int) {
		p := b.pending[i]
		wk := &b.work[p.w]
		copy(b.cells[p.dst:p.dst+p.n], wk.cells[p.src:p.src+p.n])
		copy(b.taus[p.dst:p.dst+p.n], wk.taus[p.src:p.src+p.n])
	})
	b.pending = b.pending[:0]
}

// finish hands the flat storage to the result and makes the lines' Cells
// and Tau views of it.
func (b *builder) finish(r *Result) {
	b.flush()
	r.flat = &flatLines{cells: b.cells, taus: b.taus, start: b.start}
	for i := range r.Lines {
		a, e := b.start[i], b.start[i+1]
		r.Lines[i].Cells = b.cells[a:e:e]
		r.Lines[i].Tau = b.taus[a:e:e]
	}
}

// flatLines is the flat storage of a Result's lines (see builder).
type flatLines struct {
	cells []int32
	taus  []float64
	start []int
}

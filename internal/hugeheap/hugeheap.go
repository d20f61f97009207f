package hugeheap

import (
	"os"
	"runtime/debug"
	"sync"
)

var (
	mu       sync.Mutex
	reserved int
)

// Reserve makes sure that at least n bytes of heap, in all, have been
// marked for huge pages: it grows the heap by what earlier calls have not
// reserved, when that is at least 32 MiB, marks the new block and frees
// it for later allocations. A command calls it once at its start with a
// small size and again, with a size from the case, once it knows the
// case: the heap's bookkeeping of a large reservation costs a few
// milliseconds that a small case should not pay.
func Reserve(n int) {
	if os.Getenv("FLOODTRACE_HUGEPAGES") == "off" {
		return
	}
	mu.Lock()
	defer mu.Unlock()
	if n-reserved < 32<<20 {
		return
	}
	reserve(n - reserved)
	reserved = n
}

// PerCell is the heap a run needs per grid cell, about: the peak of a
// run at a million cells with 5000 streamlines is 440 MB.
const PerCell = 480

// SmallCase is the heap, PerCell times the cells, below which ForCase
// lets the heap grow to five times its live size between collections:
// about 140 000 cells.
const SmallCase = 64 << 20

// SmallCaseGCPercent is the garbage collector's percent ForCase sets for
// a small case (the runtime's default is 100).
const SmallCaseGCPercent = 400

// ForCase prepares the heap for a command's case of the given number of
// cells, once it is known: it reserves 64 MiB and PerCell bytes per cell
// (Reserve), and for a small case (PerCell*cells at most SmallCase) sets
// the collector's percent to SmallCaseGCPercent, unless GOGC is set in
// the environment. A small case's live heap is a few tens of megabytes:
// at the default percent the collector ran six times in a 100x100 run
// with 5000 streamlines (besides the two cycles of the reservation), each
// taking one core of two for its marking, and at 400 it runs once: the
// run is about 7% faster, its peak 4 MB higher (54 MB; 300x300: 95 to
// 113 MB). Screening the demo's spec: 3.13-3.21 s to 2.90-2.98 s, peak
// 50 to 82 MB. A large case keeps the default, for its peak.
func ForCase(cells int) {
	Reserve(64<<20 + PerCell*cells)
	if _, set := os.LookupEnv("GOGC"); !set && PerCell*cells <= SmallCase {
		debug.SetGCPercent(SmallCaseGCPercent)
	}
}

package hugeheap

import (
	"os"
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

package hugeheap

import (
	"runtime"
	"runtime/debug"
	"syscall"
	"unsafe"
)

// hugePage is the size of a transparent huge page on the systems that
// matter (x86-64 and most arm64 kernels); on others madvise only aligns
// to a multiple of it.
const hugePage = 2 << 20

func reserve(n int) {
	b := make([]byte, n) // fresh from the system: not touched
	p := uintptr(unsafe.Pointer(unsafe.SliceData(b)))
	lo := (p + hugePage - 1) &^ (hugePage - 1)
	hi := (p + uintptr(n)) &^ (hugePage - 1)
	if hi > lo {
		// A refusal (no THP support) only leaves the pages small.
		_ = syscall.Madvise(b[lo-p:hi-p], syscall.MADV_HUGEPAGE)
	}
	runtime.KeepAlive(b)
	// Free the block now, so that the heap's goal is set by what the
	// command keeps, not by the block, and hand its pages back to the
	// system in a few large calls (the runtime's background scavenger
	// would release them in 64 KiB calls while the command runs). The
	// marks stay on the addresses.
	debug.FreeOSMemory()
}

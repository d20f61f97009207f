package hugeheap

import "os"

// Reserve grows the heap by n bytes, marked for huge pages where the
// system offers them, and frees them for later allocations. It is meant
// to be called once, at the start of a command, before the heap grows.
func Reserve(n int) {
	if n <= 0 || os.Getenv("FLOODTRACE_HUGEPAGES") == "off" {
		return
	}
	reserve(n)
}

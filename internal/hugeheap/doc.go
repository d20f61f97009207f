// Package hugeheap asks Linux to back the Go heap with transparent huge
// pages, for commands that fill hundreds of megabytes once.
//
// A page fault costs several microseconds on the virtual machines this
// tool is measured on (about 2.5 ms per megabyte touched for the first
// time, in 4 KiB pages), and a run at a million cells touches 400 MB:
// about 100 000 faults, a quarter of the run's CPU time. Where the
// system's transparent-huge-page mode is "madvise" (the usual default),
// the Go runtime does not ask for huge pages itself, so the heap is
// faulted in 4 KiB pages. Reserve grows the heap by one large block,
// marks it with madvise(MADV_HUGEPAGE), and frees it (returning it to the
// system at once, so that the runtime does not release it page by page
// later): later allocations reuse those addresses, and the kernel backs
// each 2 MiB of them with one fault. Nothing is touched by Reserve
// itself, so the resident memory does not grow; the peak of a run is
// unchanged within 1%.
//
// On other systems, or with FLOODTRACE_HUGEPAGES=off in the environment,
// Reserve does nothing. ForCase reserves for a case and, for a small one,
// lets the heap grow further between collections (GOGC in the
// environment overrides it). Results do not depend on either.
package hugeheap

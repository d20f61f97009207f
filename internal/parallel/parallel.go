package parallel

import (
	"runtime"
	"sync"
	"sync/atomic"
)

// Workers returns w, or GOMAXPROCS when w <= 0.
func Workers(w int) int {
	if w <= 0 {
		return runtime.GOMAXPROCS(0)
	}
	return w
}

// Each calls fn(worker, i) for every i in [0, n) on up to workers
// goroutines (0 = GOMAXPROCS). The goroutines take runs of chunk
// consecutive indices as they become free, which balances work of uneven
// size; chunk <= 0 picks a run length from n and the worker count (at
// most 16). worker, in [0, workers), names the goroutine, for scratch
// space. With one worker the indices run in order on the caller's
// goroutine.
func Each(n, workers, chunk int, fn func(worker, i int)) {
	workers = min(Workers(workers), n)
	if workers <= 1 {
		for i := range n {
			fn(0, i)
		}
		return
	}
	if chunk <= 0 {
		chunk = max(1, min(16, n/(8*workers)))
	}
	var next atomic.Int64
	var wg sync.WaitGroup
	for w := range workers {
		wg.Go(func() {
			for {
				start := int(next.Add(int64(chunk))) - chunk
				if start >= n {
					return
				}
				for i := start; i < min(start+chunk, n); i++ {
					fn(w, i)
				}
			}
		})
	}
	wg.Wait()
}

// Bounds cuts [0, n) into pieces contiguous ranges of near-equal length:
// piece p is [p*n/pieces, (p+1)*n/pieces). It returns the pieces+1
// boundaries.
func Bounds(n, pieces int) []int {
	pieces = max(1, pieces)
	b := make([]int, pieces+1)
	for p := range b {
		b[p] = p * n / pieces
	}
	return b
}

// Pieces cuts [0, n) into pieces contiguous ranges (see Bounds) and calls
// fn(piece, lo, hi) for each on up to workers goroutines (0 =
// GOMAXPROCS), which take pieces as they become free. The ranges depend
// only on n and pieces, never on workers.
func Pieces(n, pieces, workers int, fn func(piece, lo, hi int)) {
	if n <= 0 {
		return
	}
	pieces = max(1, min(pieces, n))
	Each(pieces, workers, 1, func(_, p int) {
		fn(p, p*n/pieces, (p+1)*n/pieces)
	})
}

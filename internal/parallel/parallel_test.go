package parallel

import (
	"bytes"
	"errors"
	"fmt"
	"slices"
	"strconv"
	"sync/atomic"
	"testing"
)

// TestEach: every index is visited exactly once, worker numbers stay in
// range, for any worker count and run length.
func TestEach(t *testing.T) {
	for _, n := range []int{0, 1, 7, 64, 1000} {
		for _, workers := range []int{0, 1, 2, 3, 8} {
			for _, chunk := range []int{0, 1, 5, 100} {
				seen := make([]int32, n)
				var bad atomic.Bool
				w := Workers(workers)
				Each(n, workers, chunk, func(worker, i int) {
					if worker < 0 || worker >= w {
						bad.Store(true)
					}
					atomic.AddInt32(&seen[i], 1)
				})
				for i, c := range seen {
					if c != 1 {
						t.Fatalf("n=%d workers=%d chunk=%d: index %d visited %d times", n, workers, chunk, i, c)
					}
				}
				if bad.Load() {
					t.Fatalf("n=%d workers=%d chunk=%d: worker out of range", n, workers, chunk)
				}
			}
		}
	}
}

// TestPieces: the ranges tile [0, n) and do not depend on the worker
// count.
func TestPieces(t *testing.T) {
	for _, n := range []int{1, 10, 4097} {
		for _, pieces := range []int{1, 3, 64, 10000} {
			var ref [][2]int
			for _, workers := range []int{1, 2, 5} {
				got := make([][2]int, min(max(1, pieces), n))
				Pieces(n, pieces, workers, func(p, lo, hi int) { got[p] = [2]int{lo, hi} })
				for p := range got {
					lo := 0
					if p > 0 {
						lo = got[p-1][1]
					}
					if got[p][0] != lo || got[p][1] < got[p][0] {
						t.Fatalf("n=%d pieces=%d: piece %d is %v", n, pieces, p, got[p])
					}
				}
				if got[len(got)-1][1] != n {
					t.Fatalf("n=%d pieces=%d: last piece ends at %d", n, pieces, got[len(got)-1][1])
				}
				if ref == nil {
					ref = got
				} else if !slices.Equal(ref, got) {
					t.Fatalf("n=%d pieces=%d: ranges differ with %d workers", n, pieces, workers)
				}
			}
		}
	}
	if b := Bounds(10, 3); !slices.Equal(b, []int{0, 3, 6, 10}) {
		t.Errorf("Bounds(10, 3) = %v", b)
	}
}

// TestBands: bands come out in order; the first error in band order is
// returned and nothing after it is written.
func TestBands(t *testing.T) {
	var buf bytes.Buffer
	var want bytes.Buffer
	for b := range 500 {
		fmt.Fprintf(&want, "%d\n", b)
	}
	err := Bands(&buf, 500, func(b int, out []byte) ([]byte, error) {
		return append(strconv.AppendInt(out, int64(b), 10), '\n'), nil
	})
	if err != nil || !bytes.Equal(buf.Bytes(), want.Bytes()) {
		t.Fatalf("bands out of order or error %v", err)
	}
	buf.Reset()
	e7 := errors.New("band 7")
	err = Bands(&buf, 50, func(b int, out []byte) ([]byte, error) {
		if b == 7 || b == 30 {
			return out, fmt.Errorf("band %d", b)
		}
		return append(strconv.AppendInt(out, int64(b), 10), ' '), nil
	})
	if err == nil || err.Error() != e7.Error() {
		t.Fatalf("error %v, want %v", err, e7)
	}
	if buf.String() != "0 1 2 3 4 5 6 " {
		t.Errorf("written before the error: %q", buf.String())
	}
}

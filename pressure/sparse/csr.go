package sparse

import (
	"fmt"
	"sort"

	"floodtrace/internal/parallel"
)

// CSR is a square matrix in compressed sparse row form. Column indices in
// each row are sorted ascending.
type CSR struct {
	N      int
	RowPtr []int // length N+1
	Col    []int
	Val    []float64
}

// Triplet is one entry while a matrix is being assembled.
type Triplet struct {
	Row, Col int
	Val      float64
}

// FromTriplets builds a CSR matrix of order n, summing duplicate entries.
func FromTriplets(n int, ts []Triplet) (*CSR, error) {
	count := make([]int, n+1)
	for _, t := range ts {
		if t.Row < 0 || t.Row >= n || t.Col < 0 || t.Col >= n {
			return nil, fmt.Errorf("sparse: entry (%d,%d) outside a matrix of order %d", t.Row, t.Col, n)
		}
		count[t.Row+1]++
	}
	for i := 0; i < n; i++ {
		count[i+1] += count[i]
	}
	col := make([]int, len(ts))
	val := make([]float64, len(ts))
	next := append([]int(nil), count[:n]...)
	for _, t := range ts {
		p := next[t.Row]
		col[p], val[p] = t.Col, t.Val
		next[t.Row]++
	}
	a := &CSR{N: n, RowPtr: make([]int, n+1)}
	for i := 0; i < n; i++ {
		lo, hi := count[i], count[i+1]
		idx := make([]int, hi-lo)
		for k := range idx {
			idx[k] = lo + k
		}
		sort.Slice(idx, func(x, y int) bool { return col[idx[x]] < col[idx[y]] })
		for _, p := range idx {
			m := len(a.Col)
			if m > a.RowPtr[i] && a.Col[m-1] == col[p] {
				a.Val[m-1] += val[p]
				continue
			}
			a.Col = append(a.Col, col[p])
			a.Val = append(a.Val, val[p])
		}
		a.RowPtr[i+1] = len(a.Col)
	}
	return a, nil
}

// mulVecPieces is the number of row ranges MulVec splits a large matrix
// into; every row is summed in the same order whatever the split.
const mulVecPieces = 32

// MulVec sets dst = A*x. Matrices of 1<<15 rows or more are multiplied in
// parallel over fixed row ranges (internal/parallel); each row is summed
// in column order, so the result is the same for any core count.
func (a *CSR) MulVec(dst, x []float64) {
	if a.N < 1<<15 {
		a.mulRows(dst, x, 0, a.N)
		return
	}
	parallel.Pieces(a.N, mulVecPieces, procs(), func(_, lo, hi int) { a.mulRows(dst, x, lo, hi) })
}

// mulRows sets rows [lo, hi) of dst = A*x.
func (a *CSR) mulRows(dst, x []float64, lo, hi int) {
	for i := lo; i < hi; i++ {
		s := 0.0
		for p := a.RowPtr[i]; p < a.RowPtr[i+1]; p++ {
			s += a.Val[p] * x[a.Col[p]]
		}
		dst[i] = s
	}
}

// At returns entry (i, j).
func (a *CSR) At(i, j int) float64 {
	lo, hi := a.RowPtr[i], a.RowPtr[i+1]
	p := lo + sort.SearchInts(a.Col[lo:hi], j)
	if p < hi && a.Col[p] == j {
		return a.Val[p]
	}
	return 0
}

// Diag returns the diagonal.
func (a *CSR) Diag() []float64 {
	d := make([]float64, a.N)
	for i := range d {
		d[i] = a.At(i, i)
	}
	return d
}

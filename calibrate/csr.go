package calibrate

import (
	"fmt"
	"sort"
)

// CSR is a rectangular sparse matrix in compressed sparse row form (the
// sensitivity matrix: a row per datum, a column per cell). The square
// pressure/sparse.CSR has no column count, hence this type. Columns in a
// row are sorted ascending and unique.
type CSR struct {
	Rows, Cols int
	RowPtr     []int
	Col        []int
	Val        []float64
}

// Entry is one matrix entry while a CSR is assembled.
type Entry struct {
	Row, Col int
	Val      float64
}

// NewCSR builds a rows x cols CSR matrix from entries, summing duplicates.
func NewCSR(rows, cols int, es []Entry) (*CSR, error) {
	for _, e := range es {
		if e.Row < 0 || e.Row >= rows || e.Col < 0 || e.Col >= cols {
			return nil, fmt.Errorf("calibrate: entry (%d,%d) outside a %dx%d matrix", e.Row, e.Col, rows, cols)
		}
	}
	s := append([]Entry(nil), es...)
	sort.SliceStable(s, func(i, j int) bool {
		if s[i].Row != s[j].Row {
			return s[i].Row < s[j].Row
		}
		return s[i].Col < s[j].Col
	})
	a := &CSR{Rows: rows, Cols: cols, RowPtr: make([]int, rows+1)}
	for k, e := range s {
		if k > 0 && s[k-1].Row == e.Row && s[k-1].Col == e.Col {
			a.Val[len(a.Val)-1] += e.Val
			continue
		}
		a.Col = append(a.Col, e.Col)
		a.Val = append(a.Val, e.Val)
		a.RowPtr[e.Row+1]++
	}
	for i := 0; i < rows; i++ {
		a.RowPtr[i+1] += a.RowPtr[i]
	}
	return a, nil
}

// Dims returns the numbers of rows and columns.
func (a *CSR) Dims() (int, int) { return a.Rows, a.Cols }

// MulVec sets y = A x.
func (a *CSR) MulVec(y, x []float64) {
	for i := 0; i < a.Rows; i++ {
		s := 0.0
		for p := a.RowPtr[i]; p < a.RowPtr[i+1]; p++ {
			s += a.Val[p] * x[a.Col[p]]
		}
		y[i] = s
	}
}

// MulTransVec sets x = Aᵀ y.
func (a *CSR) MulTransVec(x, y []float64) {
	clear(x)
	for i := 0; i < a.Rows; i++ {
		yi := y[i]
		for p := a.RowPtr[i]; p < a.RowPtr[i+1]; p++ {
			x[a.Col[p]] += a.Val[p] * yi
		}
	}
}

// Stack is the operator of matrices stacked one above the other, each
// block scaled by its weight: [w0 A0; w1 A1; ...], all with the same
// number of columns.
type Stack struct {
	Blocks  []*CSR
	Weights []float64
}

// Dims returns the total rows and the common columns.
func (s Stack) Dims() (int, int) {
	m := 0
	for _, b := range s.Blocks {
		m += b.Rows
	}
	return m, s.Blocks[0].Cols
}

// MulVec sets y = S x.
func (s Stack) MulVec(y, x []float64) {
	off := 0
	for k, b := range s.Blocks {
		seg := y[off : off+b.Rows]
		b.MulVec(seg, x)
		scale(seg, s.Weights[k])
		off += b.Rows
	}
}

// MulTransVec sets x = Sᵀ y.
func (s Stack) MulTransVec(x, y []float64) {
	clear(x)
	tmp := make([]float64, len(x))
	off := 0
	for k, b := range s.Blocks {
		b.MulTransVec(tmp, y[off:off+b.Rows])
		for j := range x {
			x[j] += s.Weights[k] * tmp[j]
		}
		off += b.Rows
	}
}

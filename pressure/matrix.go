package pressure

import (
	"floodtrace/internal/parallel"
	"floodtrace/pressure/sparse"
)

// matrixPieces is the fixed number of row ranges the matrix is filled in;
// rows are independent, so the result does not depend on it either.
const matrixPieces = 64

// matrix builds the two-point flux matrix over the unknowns of sys (no
// well terms) and returns it with the position of each row's diagonal
// entry. Rows are counted and filled in parallel over fixed row ranges
// (internal/parallel); each row writes only its own entries, so the
// matrix is the same for any core count. Columns come out sorted (south,
// west, self, east, north), since unknowns are numbered in cell order.
func (pb *problem) matrix(sys *System) (*sparse.CSR, []int) {
	nu := len(sys.Unknown)
	a := &sparse.CSR{N: nu, RowPtr: make([]int, nu+1)}
	pieces := matrixPieces
	if nu < 1<<14 {
		pieces = 1
	}
	parallel.Pieces(nu, pieces, 0, func(_, lo, hi int) {
		var nt [4]float64
		var nl [4]int
		for u := lo; u < hi; u++ {
			c := pb.neighbours(sys.Unknown[u], &nt, &nl)
			cnt := 1
			for q := 0; q < c; q++ {
				if sys.Index[nl[q]] >= 0 {
					cnt++
				}
			}
			a.RowPtr[u+1] = cnt
		}
	})
	for u := 0; u < nu; u++ {
		a.RowPtr[u+1] += a.RowPtr[u]
	}
	nnz := a.RowPtr[nu]
	a.Col = make([]int, nnz)
	a.Val = make([]float64, nnz)
	diagPos := make([]int, nu)
	parallel.Pieces(nu, pieces, 0, func(_, lo, hi int) {
		var nt [4]float64
		var nl [4]int
		for u := lo; u < hi; u++ {
			k := sys.Unknown[u]
			p := a.RowPtr[u]
			d := 0.0
			dp := -1
			c := pb.neighbours(k, &nt, &nl)
			for q := 0; q < c; q++ {
				t, l := nt[q], nl[q]
				d += t
				if l > k && dp < 0 {
					dp = p
					p++
				}
				if v := sys.Index[l]; v >= 0 {
					a.Col[p], a.Val[p] = v, -t
					p++
				}
			}
			if dp < 0 {
				dp = p
			}
			a.Col[dp], a.Val[dp] = u, d
			diagPos[u] = dp
		}
	})
	return a, diagPos
}

// stencil sets the five-point stencil of the two-point flux matrix (no
// well terms) of a system whose unknowns are every cell of the grid, in
// cell order: d the diagonal, w the coupling to the west neighbour, s to
// the south one, as sparse.NewSMGStencil takes them. The numbers are
// those of matrix's rows, summed in the same order.
func (pb *problem) stencil(d, w, s []float64) {
	n, nx := len(d), pb.g.NX
	pieces := matrixPieces
	if n < 1<<14 {
		pieces = 1
	}
	parallel.Pieces(n, pieces, 0, func(_, lo, hi int) {
		var nt [4]float64
		var nl [4]int
		for k := lo; k < hi; k++ {
			c := pb.neighbours(k, &nt, &nl)
			v := 0.0
			for q := 0; q < c; q++ {
				t := nt[q]
				v += t
				// South first: with one column the south neighbour is k-1.
				switch nl[q] {
				case k - nx:
					s[k] = -t
				case k - 1:
					w[k] = -t
				}
			}
			d[k] = v
		}
	})
}

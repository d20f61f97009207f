package sparse

import (
	"fmt"
	"math"
	"sort"
)

// IC0 is a zero fill-in incomplete Cholesky factorization A ~ L L^T, where
// L keeps the sparsity pattern of the lower triangle of A (Meijerink and
// van der Vorst 1977). For a symmetric M-matrix, such as a two-point flux
// pressure matrix, the factorization exists; for other symmetric positive
// definite matrices a pivot may turn non-positive, and the factorization is
// then repeated on A + alpha*diag(A) with a growing shift alpha
// (Manteuffel 1980).
//
// The modified form (MIC(0), Gustafsson 1978) adds the fill-in that IC(0)
// drops, times a relaxation factor omega, to the diagonal, so that with
// omega = 1 the row sums of L L^T equal those of A. On elliptic problems
// this lowers the condition number of the preconditioned matrix from
// O(h^-2) to O(h^-1).
type IC0 struct {
	n      int
	rowPtr []int // strictly lower part of L, by rows
	col    []int
	val    []float64
	inv    []float64 // 1 / L_ii
	// Shift is the relative diagonal shift alpha that the factorization
	// needed: 0 when it succeeded on A itself.
	Shift float64
	// Relax is the relaxation factor omega of the modified form; 0 for
	// plain IC(0).
	Relax float64
}

// NewIC0 returns the IC(0) preconditioner of the symmetric matrix a. Only
// the lower triangle of a is read. It returns an error if a diagonal entry
// is missing or not positive, or if no shift up to 1 gives positive
// pivots. See IC0 for the method and its references.
func NewIC0(a *CSR) (Preconditioner, error) {
	return FactorIC0(a, 0)
}

// NewMIC0 returns the modified incomplete Cholesky preconditioner MIC(0)
// of the symmetric matrix a with relaxation factor 0.99 (Gustafsson 1978;
// a relaxation slightly below 1 is common practice: it keeps the pivots
// away from zero on matrices with zero row sums). See IC0.
func NewMIC0(a *CSR) (Preconditioner, error) {
	return FactorIC0(a, 0.99)
}

// FactorIC0 computes the incomplete Cholesky factorization of the
// symmetric matrix a with zero fill-in; relax in [0, 1] is the fraction
// of the dropped fill-in added to the diagonal (0: IC(0), Meijerink and
// van der Vorst 1977; 1: MIC(0), Gustafsson 1978). Only the lower triangle
// of a is read.
func FactorIC0(a *CSR, relax float64) (*IC0, error) {
	if a == nil {
		return nil, fmt.Errorf("sparse: incomplete Cholesky of a nil matrix")
	}
	if !(relax >= 0 && relax <= 1) {
		return nil, fmt.Errorf("sparse: incomplete Cholesky relaxation %g outside [0, 1]", relax)
	}
	n := a.N
	if len(a.RowPtr) != n+1 || a.RowPtr[n] > len(a.Col) || a.RowPtr[n] > len(a.Val) {
		return nil, fmt.Errorf("sparse: malformed CSR matrix of order %d", n)
	}
	c := &IC0{n: n, rowPtr: make([]int, n+1), inv: make([]float64, n), Relax: relax}
	diag := make([]float64, n)
	nnz := 0
	for i := 0; i < n; i++ {
		for p := a.RowPtr[i]; p < a.RowPtr[i+1]; p++ {
			if a.Col[p] < i {
				nnz++
			}
		}
	}
	c.col = make([]int, 0, nnz)
	orig := make([]float64, 0, nnz)
	colCount := make([]int, n+1)
	for i := 0; i < n; i++ {
		hasDiag := false
		prev := -1
		for p := a.RowPtr[i]; p < a.RowPtr[i+1]; p++ {
			j := a.Col[p]
			if j <= prev || j >= n || j < 0 {
				return nil, fmt.Errorf("sparse: row %d of the matrix is not sorted or has a column outside [0, %d)", i, n)
			}
			prev = j
			switch {
			case j < i:
				c.col = append(c.col, j)
				orig = append(orig, a.Val[p])
				colCount[j+1]++
			case j == i:
				diag[i] = a.Val[p]
				hasDiag = true
			}
		}
		if !hasDiag || !(diag[i] > 0) || math.IsInf(diag[i], 0) {
			return nil, fmt.Errorf("sparse: incomplete Cholesky: diagonal entry %d is %g, not positive", i, diag[i])
		}
		c.rowPtr[i+1] = len(c.col)
	}
	// Column access to the strictly lower part: colPos lists, column by
	// column and in increasing row order, the positions in the row storage.
	for j := 0; j < n; j++ {
		colCount[j+1] += colCount[j]
	}
	colPos := make([]int, nnz)
	colRow := make([]int, nnz)
	next := append([]int(nil), colCount[:n]...)
	for i := 0; i < n; i++ {
		for p := c.rowPtr[i]; p < c.rowPtr[i+1]; p++ {
			j := c.col[p]
			colPos[next[j]], colRow[next[j]] = p, i
			next[j]++
		}
	}
	c.val = make([]float64, nnz)
	d := make([]float64, n)
	for alpha := 0.0; alpha <= 1; {
		if c.factor(orig, diag, d, colCount, colPos, colRow, alpha) {
			c.Shift = alpha
			return c, nil
		}
		if alpha == 0 {
			alpha = 1e-3
		} else {
			alpha *= 2
		}
	}
	return nil, fmt.Errorf("sparse: incomplete Cholesky broke down even with a diagonal shift of 1")
}

// factor computes L for A + alpha*diag(A) column by column (right-looking
// elimination restricted to the pattern): after the pivot of column k,
// every pair of entries (i, k), (j, k) updates a_ij if (i, j) is in the
// pattern, and otherwise, in the modified form, the diagonals of rows i
// and j. It reports false if a pivot is not positive.
func (c *IC0) factor(orig, diag, d []float64, colPtr, colPos, colRow []int, alpha float64) bool {
	copy(c.val, orig)
	for i := range d {
		d[i] = diag[i] * (1 + alpha)
	}
	for k := 0; k < c.n; k++ {
		// A pivot that loses almost all of the diagonal is as bad as a
		// negative one: it makes the preconditioner nearly singular.
		if !(d[k] > 1e-10*diag[k]) {
			return false
		}
		inv := 1 / math.Sqrt(d[k])
		c.inv[k] = inv
		lo, hi := colPtr[k], colPtr[k+1]
		for q := lo; q < hi; q++ {
			c.val[colPos[q]] *= inv
		}
		for q1 := lo; q1 < hi; q1++ {
			i := colRow[q1]
			li := c.val[colPos[q1]]
			d[i] -= li * li
			for q2 := lo; q2 < q1; q2++ {
				j := colRow[q2] // j < i
				u := li * c.val[colPos[q2]]
				rlo, rhi := c.rowPtr[i], c.rowPtr[i+1]
				p := rlo + sort.SearchInts(c.col[rlo:rhi], j)
				if p < rhi && c.col[p] == j {
					c.val[p] -= u
				} else if c.Relax != 0 {
					d[i] -= c.Relax * u
					d[j] -= c.Relax * u
				}
			}
		}
	}
	return true
}

// Apply sets dst = (L L^T)^-1 r by a forward and a backward substitution.
// dst and r may be the same slice.
func (c *IC0) Apply(dst, r []float64) {
	n := c.n
	for i := 0; i < n; i++ {
		s := r[i]
		for p := c.rowPtr[i]; p < c.rowPtr[i+1]; p++ {
			s -= c.val[p] * dst[c.col[p]]
		}
		dst[i] = s * c.inv[i]
	}
	for i := n - 1; i >= 0; i-- {
		xi := dst[i] * c.inv[i]
		dst[i] = xi
		for p := c.rowPtr[i]; p < c.rowPtr[i+1]; p++ {
			dst[c.col[p]] -= c.val[p] * xi
		}
	}
}

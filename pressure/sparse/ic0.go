package sparse

import (
	"fmt"
	"math"
)

// IC0 is a zero fill-in incomplete Cholesky factorization A ~ L L^T, where
// L keeps the sparsity pattern of the lower triangle of A (Meijerink and
// van der Vorst 1977). For a symmetric M-matrix, such as a two-point flux
// pressure matrix, the factorization exists; for other symmetric positive
// definite matrices a pivot may turn non-positive, and the factorization is
// then repeated on A + alpha*diag(A) with a growing shift alpha
// (Manteuffel 1980).
type IC0 struct {
	n      int
	rowPtr []int // strictly lower part of L, by rows
	col    []int
	val    []float64
	inv    []float64 // 1 / L_ii
	// Shift is the relative diagonal shift alpha that the factorization
	// needed: 0 when plain IC(0) succeeded.
	Shift float64
}

// NewIC0 returns the IC(0) preconditioner of the symmetric matrix a. Only
// the lower triangle of a is read. It returns an error if a diagonal entry
// is missing or not positive, or if no shift up to 1 gives positive
// pivots. See IC0 for the method and its references.
func NewIC0(a *CSR) (Preconditioner, error) {
	return newIC0(a)
}

func newIC0(a *CSR) (*IC0, error) {
	if a == nil {
		return nil, fmt.Errorf("sparse: IC(0) of a nil matrix")
	}
	n := a.N
	c := &IC0{n: n, rowPtr: make([]int, n+1), inv: make([]float64, n)}
	diag := make([]float64, n)
	// Copy the strictly lower pattern and the diagonal.
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
	for i := 0; i < n; i++ {
		hasDiag := false
		for p := a.RowPtr[i]; p < a.RowPtr[i+1]; p++ {
			switch j := a.Col[p]; {
			case j < i:
				c.col = append(c.col, j)
				orig = append(orig, a.Val[p])
			case j == i:
				diag[i] = a.Val[p]
				hasDiag = true
			}
		}
		if !hasDiag || !(diag[i] > 0) || math.IsInf(diag[i], 0) {
			return nil, fmt.Errorf("sparse: IC(0): diagonal entry %d is %g, not positive", i, diag[i])
		}
		c.rowPtr[i+1] = len(c.col)
	}
	c.val = make([]float64, len(orig))
	for alpha := 0.0; alpha <= 1; {
		if c.factor(orig, diag, alpha) {
			c.Shift = alpha
			return c, nil
		}
		if alpha == 0 {
			alpha = 1e-3
		} else {
			alpha *= 2
		}
	}
	return nil, fmt.Errorf("sparse: IC(0) broke down even with a diagonal shift of 1")
}

// factor computes L for A + alpha*diag(A), row by row (the "up-looking"
// form): for k < i in the pattern of row i,
//
//	L_ik = (a_ik - sum_{j<k} L_ij L_kj) / L_kk,  L_ii = sqrt(a_ii - sum_k L_ik^2).
//
// It reports false if a pivot is not positive.
func (c *IC0) factor(orig, diag []float64, alpha float64) bool {
	for i := 0; i < c.n; i++ {
		lo, hi := c.rowPtr[i], c.rowPtr[i+1]
		d := diag[i] * (1 + alpha)
		for p := lo; p < hi; p++ {
			k := c.col[p]
			s := orig[p]
			// Sparse dot of row i (entries before p) with row k (all of it,
			// strictly lower); both sorted by column.
			q, qe := c.rowPtr[k], c.rowPtr[k+1]
			for r := lo; r < p && q < qe; {
				switch cr, cq := c.col[r], c.col[q]; {
				case cr == cq:
					s -= c.val[r] * c.val[q]
					r++
					q++
				case cr < cq:
					r++
				default:
					q++
				}
			}
			v := s * c.inv[k]
			c.val[p] = v
			d -= v * v
		}
		// A pivot that loses almost all of the diagonal is as bad as a
		// negative one: it makes the preconditioner nearly singular.
		if !(d > 1e-12*diag[i]) {
			return false
		}
		c.inv[i] = 1 / math.Sqrt(d)
	}
	return true
}

// Apply sets dst = (L L^T)^-1 r by a forward and a backward substitution.
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

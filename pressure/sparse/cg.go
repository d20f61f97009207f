package sparse

import (
	"errors"
	"fmt"
	"math"

	"floodtrace/internal/parallel"
)

// Preconditioner applies an approximate inverse of a matrix: dst = M^-1 r.
// Implementations must be deterministic and may not keep dst or r.
type Preconditioner interface {
	Apply(dst, r []float64)
}

// Operator is a square matrix as conjugate gradients use it: *CSR, or a
// StencilOperator.
type Operator interface {
	// MulVec sets dst = A x.
	MulVec(dst, x []float64)
}

// PreconditionerFunc builds a preconditioner for a symmetric positive
// definite matrix.
type PreconditionerFunc func(a *CSR) (Preconditioner, error)

// Identity is the trivial preconditioner.
type Identity struct{}

// Apply copies r to dst.
func (Identity) Apply(dst, r []float64) { copy(dst, r) }

// Jacobi is the diagonal preconditioner.
type Jacobi struct{ inv []float64 }

// NewJacobi returns the Jacobi preconditioner of a.
func NewJacobi(a *CSR) (Preconditioner, error) {
	d := a.Diag()
	inv := make([]float64, len(d))
	for i, v := range d {
		if !(v > 0) {
			return nil, fmt.Errorf("sparse: diagonal entry %d is %g, not positive", i, v)
		}
		inv[i] = 1 / v
	}
	return &Jacobi{inv: inv}, nil
}

// Apply sets dst = D^-1 r.
func (j *Jacobi) Apply(dst, r []float64) {
	for i, v := range r {
		dst[i] = v * j.inv[i]
	}
}

// CGSettings controls conjugate gradients. The zero value asks for a
// relative residual of 1e-10 within 10*N+100 iterations.
type CGSettings struct {
	Tol     float64 // relative residual ||b-Ax||/||b||
	MaxIter int
}

// CGResult reports how a solve went.
type CGResult struct {
	Iterations       int
	RelativeResidual float64
}

// ErrNotConverged is returned when conjugate gradients stop before the
// tolerance is met.
var ErrNotConverged = errors.New("sparse: conjugate gradients did not converge")

// CG solves A x = b by preconditioned conjugate gradients (Hestenes and
// Stiefel 1952; Saad, Iterative Methods for Sparse Linear Systems, 2003,
// algorithm 9.1), starting from the x given. A must be symmetric positive
// definite (of the order of b and x) and m (nil for none) symmetric
// positive definite.
//
// Systems of 1<<15 unknowns or more run their vector operations in
// parallel over cgPieces fixed ranges; a dot product sums each range in
// order and then the ranges' sums in order, so the result is the same
// for any core count. Smaller systems sum in one range, in order.
func CG(a Operator, b, x []float64, m Preconditioner, s CGSettings) (CGResult, error) {
	n := len(b)
	if len(x) != n {
		return CGResult{}, fmt.Errorf("sparse: CG: %d unknowns for a right-hand side of %d", len(x), n)
	}
	if s.Tol <= 0 {
		s.Tol = 1e-10
	}
	if s.MaxIter <= 0 {
		s.MaxIter = 10*n + 100
	}
	if m == nil {
		m = Identity{}
	}
	v := newCGVectors(n)
	bn := math.Sqrt(v.dot(b, b))
	if bn == 0 {
		for i := range x {
			x[i] = 0
		}
		return CGResult{}, nil
	}
	r := make([]float64, n)
	z := make([]float64, n)
	p := make([]float64, n)
	q := make([]float64, n)
	a.MulVec(r, x)
	res := math.Sqrt(v.residual(r, b, r)) / bn
	if res <= s.Tol {
		return CGResult{RelativeResidual: res}, nil
	}
	m.Apply(z, r)
	copy(p, z)
	rz := v.dot(r, z)
	for it := 1; it <= s.MaxIter; it++ {
		a.MulVec(q, p)
		pq := v.dot(p, q)
		if !(pq > 0) {
			return CGResult{Iterations: it, RelativeResidual: res}, fmt.Errorf("sparse: matrix not positive definite (p'Ap = %g)", pq)
		}
		alpha := rz / pq
		res = math.Sqrt(v.step(x, r, p, q, alpha)) / bn
		if res <= s.Tol {
			// Confirm with the true residual to guard against drift.
			a.MulVec(q, x)
			res = math.Sqrt(v.residual(q, b, q)) / bn
			if res <= s.Tol*10 || it == s.MaxIter {
				return CGResult{Iterations: it, RelativeResidual: res}, nil
			}
			copy(r, q)
		}
		m.Apply(z, r)
		rzNew := v.dot(r, z)
		beta := rzNew / rz
		rz = rzNew
		v.direction(p, z, beta)
	}
	return CGResult{Iterations: s.MaxIter, RelativeResidual: res}, ErrNotConverged
}

// cgPieces is the number of fixed ranges the vector operations of a large
// system are split into.
const cgPieces = 32

// cgVectors runs CG's vector operations over fixed ranges: one range,
// on the caller's goroutine, below 1<<15 unknowns.
type cgVectors struct {
	n, pieces int
	part      []float64 // per-range partial sums
}

func newCGVectors(n int) *cgVectors {
	v := &cgVectors{n: n, pieces: 1}
	if n >= 1<<15 {
		v.pieces = cgPieces
	}
	v.part = make([]float64, v.pieces)
	return v
}

// each runs fn on every range and returns the sum of the ranges' results
// in range order.
func (v *cgVectors) each(fn func(lo, hi int) float64) float64 {
	if v.pieces == 1 {
		return fn(0, v.n)
	}
	parallel.Pieces(v.n, v.pieces, procs(), func(k, lo, hi int) { v.part[k] = fn(lo, hi) })
	s := 0.0
	for _, t := range v.part {
		s += t
	}
	return s
}

// dot returns a'b.
func (v *cgVectors) dot(a, b []float64) float64 {
	return v.each(func(lo, hi int) float64 { return dot(a[lo:hi], b[lo:hi]) })
}

// residual sets dst = b - ax (dst may be ax) and returns dst'dst.
func (v *cgVectors) residual(dst, b, ax []float64) float64 {
	return v.each(func(lo, hi int) float64 {
		s := 0.0
		for i := lo; i < hi; i++ {
			d := b[i] - ax[i]
			dst[i] = d
			s += d * d
		}
		return s
	})
}

// step sets x += alpha p and r -= alpha q and returns r'r.
func (v *cgVectors) step(x, r, p, q []float64, alpha float64) float64 {
	return v.each(func(lo, hi int) float64 {
		s := 0.0
		for i := lo; i < hi; i++ {
			x[i] += alpha * p[i]
			ri := r[i] - alpha*q[i]
			r[i] = ri
			s += ri * ri
		}
		return s
	})
}

// direction sets p = z + beta p.
func (v *cgVectors) direction(p, z []float64, beta float64) {
	v.each(func(lo, hi int) float64 {
		for i := lo; i < hi; i++ {
			p[i] = z[i] + beta*p[i]
		}
		return 0
	})
}

func dot(a, b []float64) float64 {
	s := 0.0
	for i, v := range a {
		s += v * b[i]
	}
	return s
}

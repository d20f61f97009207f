package sparse

import (
	"errors"
	"fmt"
	"math"
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
	bn := norm(b)
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
	for i := range r {
		r[i] = b[i] - r[i]
	}
	res := norm(r) / bn
	if res <= s.Tol {
		return CGResult{RelativeResidual: res}, nil
	}
	m.Apply(z, r)
	copy(p, z)
	rz := dot(r, z)
	for it := 1; it <= s.MaxIter; it++ {
		a.MulVec(q, p)
		pq := dot(p, q)
		if !(pq > 0) {
			return CGResult{Iterations: it, RelativeResidual: res}, fmt.Errorf("sparse: matrix not positive definite (p'Ap = %g)", pq)
		}
		alpha := rz / pq
		for i := range x {
			x[i] += alpha * p[i]
			r[i] -= alpha * q[i]
		}
		res = norm(r) / bn
		if res <= s.Tol {
			// Confirm with the true residual to guard against drift.
			a.MulVec(q, x)
			for i := range q {
				q[i] = b[i] - q[i]
			}
			res = norm(q) / bn
			if res <= s.Tol*10 || it == s.MaxIter {
				return CGResult{Iterations: it, RelativeResidual: res}, nil
			}
			copy(r, q)
		}
		m.Apply(z, r)
		rzNew := dot(r, z)
		beta := rzNew / rz
		rz = rzNew
		for i := range p {
			p[i] = z[i] + beta*p[i]
		}
	}
	return CGResult{Iterations: s.MaxIter, RelativeResidual: res}, ErrNotConverged
}

func dot(a, b []float64) float64 {
	s := 0.0
	for i, v := range a {
		s += v * b[i]
	}
	return s
}

func norm(a []float64) float64 { return math.Sqrt(dot(a, a)) }

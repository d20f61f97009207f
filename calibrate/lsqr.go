package calibrate

import (
	"fmt"
	"math"
)

// Operator is a linear map A of m rows and n columns given by its products
// with a vector: MulVec sets y = A x (len(x) = n, len(y) = m) and
// MulTransVec sets x = Aᵀ y. LSQR needs nothing else of A.
type Operator interface {
	Dims() (m, n int)
	MulVec(y, x []float64)
	MulTransVec(x, y []float64)
}

// LSQRSettings control LSQR.
type LSQRSettings struct {
	// Damp is λ of the damped problem min |A x - b|² + λ² |x|².
	Damp float64
	// ATol and BTol are the stopping tolerances of Paige and Saunders
	// (1982), section 6 (1e-10 each when zero); MaxIter bounds the
	// iterations (4n when zero).
	ATol, BTol float64
	MaxIter    int
}

// LSQRResult reports how LSQR stopped.
type LSQRResult struct {
	Iterations int
	// ResidualNorm estimates |[A; λI] x - [b; 0]|, NormalResidual
	// estimates |Aᵀ(b - A x) - λ² x|.
	ResidualNorm, NormalResidual float64
}

// LSQR solves min |A x - b|² + λ² |x|² by the bidiagonalisation method of
// Paige and Saunders (1982), "LSQR: an algorithm for sparse linear
// equations and sparse least squares", ACM TOMS 8(1), 43-71 (algorithm of
// section 4.1 with the damping of section 5 and the stopping rules S1 and
// S2 of section 6). For an under-determined consistent system without
// damping it converges to the minimum-norm solution (x starts at zero).
func LSQR(a Operator, b []float64, s LSQRSettings) ([]float64, LSQRResult, error) {
	m, n := a.Dims()
	if len(b) != m {
		return nil, LSQRResult{}, fmt.Errorf("lsqr: right-hand side of length %d for %d rows", len(b), m)
	}
	if s.Damp < 0 || math.IsNaN(s.Damp) {
		return nil, LSQRResult{}, fmt.Errorf("lsqr: damping %g is negative", s.Damp)
	}
	atol, btol := s.ATol, s.BTol
	if atol == 0 {
		atol = 1e-10
	}
	if btol == 0 {
		btol = 1e-10
	}
	maxIter := s.MaxIter
	if maxIter == 0 {
		maxIter = 4*max(m, n) + 20
	}
	x := make([]float64, n)
	u := append([]float64(nil), b...)
	v := make([]float64, n)
	w := make([]float64, n)
	tmpM := make([]float64, m)
	tmpN := make([]float64, n)
	beta := norm(u)
	bnorm := beta
	res := LSQRResult{}
	if beta == 0 {
		return x, res, nil
	}
	scale(u, 1/beta)
	a.MulTransVec(v, u)
	alpha := norm(v)
	if alpha == 0 {
		res.ResidualNorm = bnorm
		return x, res, nil
	}
	scale(v, 1/alpha)
	copy(w, v)
	phibar, rhobar := beta, alpha
	damp := s.Damp
	anorm, res2 := 0.0, 0.0
	for it := 1; it <= maxIter; it++ {
		res.Iterations = it
		// Bidiagonalisation: beta u = A v - alpha u, alpha v = Aᵀ u - beta v.
		a.MulVec(tmpM, v)
		for i := range u {
			u[i] = tmpM[i] - alpha*u[i]
		}
		beta = norm(u)
		anorm = math.Sqrt(anorm*anorm + alpha*alpha + beta*beta + damp*damp)
		if beta > 0 {
			scale(u, 1/beta)
			a.MulTransVec(tmpN, u)
			for j := range v {
				v[j] = tmpN[j] - beta*v[j]
			}
			alpha = norm(v)
			if alpha > 0 {
				scale(v, 1/alpha)
			}
		}
		// Eliminate the damping (section 5): rotation on (rhobar, damp).
		rhobar1 := math.Hypot(rhobar, damp)
		c1, s1 := rhobar/rhobar1, damp/rhobar1
		psi := s1 * phibar
		phibar = c1 * phibar
		res2 += psi * psi
		// Plane rotation on (rhobar1, beta).
		rho := math.Hypot(rhobar1, beta)
		c, sn := rhobar1/rho, beta/rho
		theta := sn * alpha
		rhobar = -c * alpha
		phi := c * phibar
		phibar = sn * phibar
		t1, t2 := phi/rho, -theta/rho
		for j := range x {
			x[j] += t1 * w[j]
			w[j] = v[j] + t2*w[j]
		}
		// Estimates (section 5.2).
		rnorm := math.Sqrt(phibar*phibar + res2)
		res.ResidualNorm = rnorm
		res.NormalResidual = math.Abs(phibar * alpha * c)
		xnorm := norm(x)
		if res.NormalResidual <= atol*anorm*rnorm+1e-300 {
			break // S2: the least-squares problem is solved
		}
		if rnorm <= btol*bnorm+atol*anorm*xnorm {
			break // S1: A x = b is solved
		}
		if alpha == 0 {
			break
		}
	}
	return x, res, nil
}

func norm(x []float64) float64 {
	s := 0.0
	for _, v := range x {
		s += v * v
	}
	return math.Sqrt(s)
}

func scale(x []float64, f float64) {
	for i := range x {
		x[i] *= f
	}
}

package calibrate

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// dense adapts a gonum matrix to Operator.
type dense struct{ a *mat.Dense }

func (d dense) Dims() (int, int) { return d.a.Dims() }
func (d dense) MulVec(y, x []float64) {
	mat.NewVecDense(len(y), y).MulVec(d.a, mat.NewVecDense(len(x), x))
}
func (d dense) MulTransVec(x, y []float64) {
	mat.NewVecDense(len(x), x).MulVec(d.a.T(), mat.NewVecDense(len(y), y))
}

// reference solves the damped least-squares problem with gonum's dense QR
// of the stacked matrix [A; λI] (and, for an under-determined system
// without damping, the minimum-norm solution through the QR of Aᵀ:
// x = Q R⁻ᵀ b). Golub and Van Loan (2013), sections 5.3 and 5.6.
func reference(t *testing.T, a *mat.Dense, b []float64, damp float64) []float64 {
	m, n := a.Dims()
	if m < n && damp == 0 {
		var qr mat.QR
		qr.Factorize(mat.DenseCopyOf(a.T()))
		var q, r mat.Dense
		qr.QTo(&q)
		qr.RTo(&r)
		rs := r.Slice(0, m, 0, m)
		var z mat.VecDense
		if err := z.SolveVec(rs.T(), mat.NewVecDense(m, b)); err != nil {
			t.Fatal(err)
		}
		var x mat.VecDense
		x.MulVec(q.Slice(0, n, 0, m), &z)
		return x.RawVector().Data
	}
	s := mat.NewDense(m+n, n, nil)
	s.Slice(0, m, 0, n).(*mat.Dense).Copy(a)
	for j := 0; j < n; j++ {
		s.Set(m+j, j, damp)
	}
	rhs := mat.NewDense(m+n, 1, nil)
	for i, v := range b {
		rhs.Set(i, 0, v)
	}
	var qr mat.QR
	qr.Factorize(s)
	var x mat.Dense
	if err := qr.SolveTo(&x, false, rhs); err != nil {
		t.Fatal(err)
	}
	return mat.Col(nil, 0, &x)
}

func TestLSQRAgainstQR(t *testing.T) {
	cases := []struct {
		name string
		m, n int
		damp float64
	}{
		{"over", 40, 15, 0},
		{"over damped", 40, 15, 0.7},
		{"square", 20, 20, 0},
		{"under", 12, 30, 0},
		{"under damped", 12, 30, 0.3},
	}
	rng := rand.New(rand.NewPCG(1, 2))
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			a := mat.NewDense(c.m, c.n, nil)
			for i := 0; i < c.m; i++ {
				for j := 0; j < c.n; j++ {
					a.Set(i, j, rng.NormFloat64())
				}
			}
			b := make([]float64, c.m)
			for i := range b {
				b[i] = rng.NormFloat64()
			}
			want := reference(t, a, b, c.damp)
			got, res, err := LSQR(dense{a}, b, LSQRSettings{Damp: c.damp, ATol: 1e-14, BTol: 1e-14})
			if err != nil {
				t.Fatal(err)
			}
			worst := 0.0
			for j := range want {
				worst = math.Max(worst, math.Abs(got[j]-want[j]))
			}
			// LSQR reaches the QR solution to round-off on these
			// well-conditioned systems (Paige and Saunders 1982, section 8);
			// measured differences are below 7e-14.
			t.Logf("max difference %.2g, %d iterations", worst, res.Iterations)
			if worst > 5e-13 {
				t.Errorf("max |x_lsqr - x_qr| = %.3g after %d iterations", worst, res.Iterations)
			}
		})
	}
}

func TestLSQRZeroRHSAndErrors(t *testing.T) {
	a := dense{mat.NewDense(3, 2, []float64{1, 0, 0, 1, 1, 1})}
	x, _, err := LSQR(a, []float64{0, 0, 0}, LSQRSettings{})
	if err != nil || x[0] != 0 || x[1] != 0 {
		t.Fatalf("zero rhs: x = %v, err %v", x, err)
	}
	if _, _, err := LSQR(a, []float64{1, 2}, LSQRSettings{}); err == nil {
		t.Error("a right-hand side of the wrong length was accepted")
	}
	if _, _, err := LSQR(a, []float64{1, 2, 3}, LSQRSettings{Damp: -1}); err == nil {
		t.Error("a negative damping was accepted")
	}
}

func TestCSRAgainstDense(t *testing.T) {
	es := []Entry{{0, 1, 2}, {2, 0, -1}, {0, 1, 3}, {1, 3, 4}, {2, 3, 0.5}}
	a, err := NewCSR(3, 4, es)
	if err != nil {
		t.Fatal(err)
	}
	d := mat.NewDense(3, 4, nil)
	for _, e := range es {
		d.Set(e.Row, e.Col, d.At(e.Row, e.Col)+e.Val)
	}
	x := []float64{1, -2, 3, 0.5}
	y := make([]float64, 3)
	a.MulVec(y, x)
	yd := make([]float64, 3)
	dense{d}.MulVec(yd, x)
	xt, xtd := make([]float64, 4), make([]float64, 4)
	a.MulTransVec(xt, []float64{1, 2, 3})
	dense{d}.MulTransVec(xtd, []float64{1, 2, 3})
	for i := range y {
		if y[i] != yd[i] {
			t.Errorf("A x [%d] = %g, dense %g", i, y[i], yd[i])
		}
	}
	for j := range xt {
		if xt[j] != xtd[j] {
			t.Errorf("Aᵀ y [%d] = %g, dense %g", j, xt[j], xtd[j])
		}
	}
	if _, err := NewCSR(2, 2, []Entry{{2, 0, 1}}); err == nil {
		t.Error("an entry outside the matrix was accepted")
	}
}

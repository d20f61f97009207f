package sparse

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// grid5 returns the five-point matrix of -div(k grad) on an nx x ny grid
// with log-normal face coefficients (sigma of ln k = s) and a positive
// term c on the diagonal of a few cells (wells), a symmetric M-matrix.
func grid5(nx, ny int, s float64, seed uint64) *CSR {
	r := rand.New(rand.NewPCG(seed, 1))
	n := nx * ny
	var ts []Triplet
	link := func(k, l int) {
		t := math.Exp(s * r.NormFloat64())
		ts = append(ts, Triplet{k, k, t}, Triplet{l, l, t}, Triplet{k, l, -t}, Triplet{l, k, -t})
	}
	for j := 0; j < ny; j++ {
		for i := 0; i < nx; i++ {
			k := j*nx + i
			if i+1 < nx {
				link(k, k+1)
			}
			if j+1 < ny {
				link(k, k+nx)
			}
		}
	}
	for w := 0; w < 3; w++ {
		k := r.IntN(n)
		ts = append(ts, Triplet{k, k, 0.5 + r.Float64()})
	}
	a, err := FromTriplets(n, ts)
	if err != nil {
		panic(err)
	}
	return a
}

func dense(a *CSR) *mat.Dense {
	d := mat.NewDense(a.N, a.N, nil)
	for i := 0; i < a.N; i++ {
		for p := a.RowPtr[i]; p < a.RowPtr[i+1]; p++ {
			d.Set(i, a.Col[p], a.Val[p])
		}
	}
	return d
}

// lower returns the dense factor L of an incomplete Cholesky preconditioner.
func (c *IC0) lower() *mat.Dense {
	l := mat.NewDense(c.n, c.n, nil)
	for i := 0; i < c.n; i++ {
		l.Set(i, i, 1/c.inv[i])
		for p := c.rowPtr[i]; p < c.rowPtr[i+1]; p++ {
			l.Set(i, c.col[p], c.val[p])
		}
	}
	return l
}

// TestIC0Pattern checks the defining property of IC(0) (Meijerink and van
// der Vorst 1977): (L L^T)_ij = a_ij on the sparsity pattern of A; and of
// MIC(0) with relaxation 1 (Gustafsson 1978): the same off-diagonal
// entries and the row sums of L L^T equal those of A.
func TestIC0Pattern(t *testing.T) {
	for _, tc := range []struct {
		nx, ny int
		s      float64
		relax  float64
	}{{6, 5, 0, 0}, {9, 7, 1.5, 0}, {6, 5, 0, 1}, {9, 7, 1.5, 1}, {8, 8, 1, 0.5}} {
		a := grid5(tc.nx, tc.ny, tc.s, 7)
		c, err := FactorIC0(a, tc.relax)
		if err != nil {
			t.Fatal(err)
		}
		if c.Shift != 0 {
			t.Errorf("M-matrix needed a shift %g", c.Shift)
		}
		l := c.lower()
		var llt mat.Dense
		llt.Mul(l, l.T())
		ad := dense(a)
		for i := 0; i < a.N; i++ {
			rowA, rowM := 0.0, 0.0
			for j := 0; j < a.N; j++ {
				rowA += ad.At(i, j)
				rowM += llt.At(i, j)
				if i == j && tc.relax != 0 || ad.At(i, j) == 0 {
					continue
				}
				if d := math.Abs(llt.At(i, j) - ad.At(i, j)); d > 1e-12*math.Abs(ad.At(i, i)) {
					t.Fatalf("%+v: (LL^T)(%d,%d) = %.15g, a = %.15g", tc, i, j, llt.At(i, j), ad.At(i, j))
				}
			}
			if tc.relax == 1 && math.Abs(rowA-rowM) > 1e-12*ad.At(i, i) {
				t.Fatalf("%+v: row %d sums to %.15g in LL^T and %.15g in A", tc, i, rowM, rowA)
			}
		}
	}
}

// TestIC0ExactWithoutFill: when the Cholesky factor of A has no fill-in
// (a tridiagonal matrix), IC(0) is the complete factorization and Apply
// solves A x = r exactly; compared with gonum's dense Cholesky solve.
func TestIC0ExactWithoutFill(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 3))
	for _, n := range []int{1, 2, 10, 57} {
		var ts []Triplet
		for i := 0; i < n; i++ {
			// Diagonally dominant, off-diagonals of either sign: SPD but
			// not always an M-matrix.
			ts = append(ts, Triplet{i, i, 2.5 + r.Float64()})
			if i+1 < n {
				v := 2*r.Float64() - 1
				ts = append(ts, Triplet{i, i + 1, v}, Triplet{i + 1, i, v})
			}
		}
		a, _ := FromTriplets(n, ts)
		p, err := NewIC0(a)
		if err != nil {
			t.Fatal(err)
		}
		b := make([]float64, n)
		for i := range b {
			b[i] = r.NormFloat64()
		}
		x := make([]float64, n)
		p.Apply(x, b)
		want := denseSolve(t, a, b)
		for i := range x {
			if math.Abs(x[i]-want[i]) > 1e-12*(1+math.Abs(want[i])) {
				t.Fatalf("n=%d: x[%d] = %.15g, dense Cholesky %.15g", n, i, x[i], want[i])
			}
		}
		// In place.
		copy(x, b)
		p.Apply(x, x)
		for i := range x {
			if math.Abs(x[i]-want[i]) > 1e-12*(1+math.Abs(want[i])) {
				t.Fatalf("n=%d in place: x[%d] = %.15g, want %.15g", n, i, x[i], want[i])
			}
		}
	}
}

func denseSolve(t *testing.T, a *CSR, b []float64) []float64 {
	t.Helper()
	s := mat.NewSymDense(a.N, nil)
	for i := 0; i < a.N; i++ {
		for p := a.RowPtr[i]; p < a.RowPtr[i+1]; p++ {
			if j := a.Col[p]; j <= i {
				s.SetSym(i, j, a.Val[p])
			}
		}
	}
	var ch mat.Cholesky
	if !ch.Factorize(s) {
		t.Fatal("reference: matrix not positive definite")
	}
	var x mat.VecDense
	if err := ch.SolveVecTo(&x, mat.NewVecDense(a.N, append([]float64(nil), b...))); err != nil {
		t.Fatal(err)
	}
	return x.RawVector().Data
}

// TestCGPreconditioners solves random heterogeneous five-point systems
// with CG and each preconditioner and compares with gonum's dense
// Cholesky solve (reference library) to 1e-8 relative; the incomplete
// factorizations must need fewer iterations than Jacobi.
func TestCGPreconditioners(t *testing.T) {
	pres := []struct {
		name string
		f    PreconditionerFunc
	}{{"jacobi", NewJacobi}, {"ic0", NewIC0}, {"mic0", NewMIC0}}
	for seed := uint64(1); seed <= 3; seed++ {
		a := grid5(17, 13, 1.2, seed)
		r := rand.New(rand.NewPCG(seed, 9))
		b := make([]float64, a.N)
		for i := range b {
			b[i] = r.NormFloat64()
		}
		want := denseSolve(t, a, b)
		scale := 0.0
		for _, v := range want {
			scale = math.Max(scale, math.Abs(v))
		}
		iters := map[string]int{}
		for _, p := range pres {
			m, err := p.f(a)
			if err != nil {
				t.Fatal(err)
			}
			x := make([]float64, a.N)
			res, err := CG(a, b, x, m, CGSettings{Tol: 1e-13})
			if err != nil {
				t.Fatalf("%s: %v", p.name, err)
			}
			iters[p.name] = res.Iterations
			for i := range x {
				if math.Abs(x[i]-want[i]) > 1e-8*scale {
					t.Fatalf("seed %d, %s: x[%d] = %.12g, dense Cholesky %.12g", seed, p.name, i, x[i], want[i])
				}
			}
		}
		if iters["ic0"] >= iters["jacobi"] || iters["mic0"] >= iters["jacobi"] {
			t.Errorf("seed %d: iterations %v: incomplete Cholesky should beat Jacobi", seed, iters)
		}
	}
}

// TestIC0Shift: Kershaw's (1978, from memory) symmetric positive definite
// matrix makes plain IC(0) break down with a negative pivot; the
// factorization must then shift the diagonal (Manteuffel 1980) and still
// give a working preconditioner.
func TestIC0Shift(t *testing.T) {
	k := [][]float64{{3, -2, 0, 2}, {-2, 3, -2, 0}, {0, -2, 3, -2}, {2, 0, -2, 3}}
	var ts []Triplet
	for i, row := range k {
		for j, v := range row {
			if v != 0 {
				ts = append(ts, Triplet{i, j, v})
			}
		}
	}
	a, _ := FromTriplets(4, ts)
	b := []float64{1, 2, 3, 4}
	want := denseSolve(t, a, b) // also checks positive definiteness
	c, err := FactorIC0(a, 0)
	if err != nil {
		t.Fatal(err)
	}
	if c.Shift == 0 {
		t.Errorf("plain IC(0) of Kershaw's matrix did not break down")
	}
	x := make([]float64, 4)
	if _, err := CG(a, b, x, c, CGSettings{Tol: 1e-14}); err != nil {
		t.Fatal(err)
	}
	for i := range x {
		if math.Abs(x[i]-want[i]) > 1e-10*(1+math.Abs(want[i])) {
			t.Errorf("x[%d] = %.15g, want %.15g", i, x[i], want[i])
		}
	}
}

// TestIC0Errors: malformed matrices give errors, never panics.
func TestIC0Errors(t *testing.T) {
	cases := []struct {
		name  string
		a     *CSR
		relax float64
		want  string
	}{
		{"nil", nil, 0, "nil matrix"},
		{"no diagonal", &CSR{N: 2, RowPtr: []int{0, 1, 2}, Col: []int{1, 0}, Val: []float64{-1, -1}}, 0, "diagonal entry 0"},
		{"negative diagonal", &CSR{N: 1, RowPtr: []int{0, 1}, Col: []int{0}, Val: []float64{-2}}, 0, "not positive"},
		{"unsorted", &CSR{N: 2, RowPtr: []int{0, 2, 3}, Col: []int{1, 0, 1}, Val: []float64{-1, 2, 2}}, 0, "not sorted"},
		{"bad row pointers", &CSR{N: 2, RowPtr: []int{0, 5}, Col: []int{0}, Val: []float64{1}}, 0, "malformed"},
		{"relaxation", &CSR{N: 1, RowPtr: []int{0, 1}, Col: []int{0}, Val: []float64{1}}, 1.5, "relaxation"},
	}
	for _, tc := range cases {
		_, err := FactorIC0(tc.a, tc.relax)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want one containing %q", tc.name, err, tc.want)
		}
	}
}

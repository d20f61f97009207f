package sparse

import (
	"fmt"
	"math"
	"runtime"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// The SMG-preconditioned CG solution must agree with gonum's dense
// Cholesky solution (the external reference: LAPACK dpotrf/dpotrs through
// gonum) on small grids of every test field, odd and even sizes, and
// grids one cell wide.
func TestSMGMatchesDenseCholesky(t *testing.T) {
	tests := []struct {
		kind   amgFieldKind
		nx, ny int
	}{
		{fieldLogNormal1, 24, 24},
		{fieldLogNormal25, 31, 17},
		{fieldChannel1e6, 40, 30},
		{fieldAnisotropic, 33, 20},
		{fieldInactive, 40, 40},
		{fieldRough, 25, 26},
		{fieldLogNormal2, 1, 60},
		{fieldLogNormal2, 70, 1},
	}
	for _, tc := range tests {
		t.Run(fmt.Sprintf("%v-%dx%d", tc.kind, tc.nx, tc.ny), func(t *testing.T) {
			a, b, cells := newAMGProblem(tc.kind, tc.nx, tc.ny, 2).assemble()
			var ch mat.Cholesky
			if !ch.Factorize(amgDense(a)) {
				t.Fatal("dense Cholesky failed")
			}
			want := mat.NewVecDense(a.N, nil)
			if err := ch.SolveVecTo(want, mat.NewVecDense(a.N, b)); err != nil {
				t.Fatal(err)
			}
			h, err := NewSMG(a, tc.nx, tc.ny, cells)
			if err != nil {
				t.Fatal(err)
			}
			x := make([]float64, a.N)
			res, err := CG(a, b, x, h, CGSettings{Tol: 1e-12, MaxIter: 200})
			if err != nil {
				t.Fatalf("%v after %d iterations", err, res.Iterations)
			}
			// Residual 1e-12 and condition numbers up to about 1e8 for
			// these fields: 1e-6 is a few times the measured error (at
			// most 2e-7, on the 1e6 channels).
			if d := amgRelDiff(x, want.RawVector().Data); d > 1e-6 {
				t.Errorf("relative difference to dense Cholesky %.3g after %d iterations (%v)", d, res.Iterations, h)
			}
		})
	}
}

// The V-cycle is a symmetric positive definite operator: (M^-1 u, v) =
// (u, M^-1 v) to the round-off of its float32 arithmetic and (M^-1 u, u)
// > 0 for random vectors, on fields with inactive cells, faults and
// strong contrast.
func TestSMGSymmetricPositive(t *testing.T) {
	for _, kind := range []amgFieldKind{fieldInactive, fieldChannel1e6, fieldAnisotropic} {
		a, _, cells := newAMGProblem(kind, 45, 38, 4).assemble()
		h, err := NewSMG(a, 45, 38, cells)
		if err != nil {
			t.Fatal(err)
		}
		u, v := amgRandomVector(a.N, 1), amgRandomVector(a.N, 2)
		mu, mv := make([]float64, a.N), make([]float64, a.N)
		h.Apply(mu, u)
		h.Apply(mv, v)
		uv, vu := dot(mu, v), dot(u, mv)
		// Single precision (epsilon 6e-8): measured 1.5e-9 to 2.6e-8 of the
		// scale below; the float64 cycle gave 1e-16.
		scale := math.Sqrt(dot(mu, mu) * dot(v, v))
		t.Logf("%v: asymmetry %.2g", kind, math.Abs(uv-vu)/scale)
		if math.Abs(uv-vu) > 1e-7*scale {
			t.Errorf("%v: (Mu, v) = %.15g, (u, Mv) = %.15g", kind, uv, vu)
		}
		if dot(mu, u) <= 0 || dot(mv, v) <= 0 {
			t.Errorf("%v: not positive: %g %g", kind, dot(mu, u), dot(mv, v))
		}
	}
}

// Iterations of CG with SMG to 1e-8 stay flat with grid size on the test
// fields (the high-contrast, anisotropic and inactive cases of the AMG
// tests): the bound is the largest measured count plus a few (hypre's PFMG, the method of Ashby and Falgout 1996, takes 19 on a
// log-normal pattern at 1e-10, issue 19). 1000x1000 runs unless -short.
func TestSMGIterationBounds(t *testing.T) {
	sizes := []int{100, 300}
	if !testing.Short() {
		sizes = append(sizes, 1000)
	}
	bound := func(kind amgFieldKind) int {
		if kind == fieldRough {
			return 40 // measured 11, 18, 33: outside the list, held to the AMG test's bound
		}
		return 20 // measured 7 to 18 (18: the 1e6 channels at 1000x1000; 15 with a float64 cycle)
	}
	var table strings.Builder
	fmt.Fprintf(&table, "\n%-16s", "field")
	for _, s := range sizes {
		fmt.Fprintf(&table, " %9dx%-5d", s, s)
	}
	table.WriteString("   (CG iterations to 1e-8 / levels)\n")
	// At 1000x1000 the fields the others bound are left out to keep the
	// test short: the log-normal ones of standard deviation 1 and 2 share
	// the seed and correlation of the 2.5 field, the 1e3 channels those of
	// the 1e6 ones.
	skip := func(kind amgFieldKind, s int) bool {
		return s >= 1000 && (kind == fieldLogNormal1 || kind == fieldLogNormal2 || kind == fieldChannel1e3 || kind == fieldRough)
	}
	for _, kind := range amgFieldKinds {
		fmt.Fprintf(&table, "%-16s", kind)
		for _, s := range sizes {
			if skip(kind, s) {
				fmt.Fprintf(&table, " %15s", "-")
				continue
			}
			a, b, cells := newAMGProblem(kind, s, s, 1).assemble()
			h, err := NewSMG(a, s, s, cells)
			if err != nil {
				t.Fatalf("%v %d: %v", kind, s, err)
			}
			x := make([]float64, a.N)
			res, err := CG(a, b, x, h, CGSettings{Tol: 1e-8, MaxIter: 300})
			if err != nil {
				t.Errorf("%v %dx%d: %v after %d iterations", kind, s, s, err, res.Iterations)
			}
			fmt.Fprintf(&table, " %9d/%-5d", res.Iterations, h.Levels())
			if res.Iterations > bound(kind) {
				t.Errorf("%v %dx%d: %d iterations, want <= %d (%v)", kind, s, s, res.Iterations, bound(kind), h)
			}
		}
		table.WriteString("\n")
	}
	t.Log(table.String())
}

// The same solve gives bit-identical results for GOMAXPROCS 1 and 4.
func TestSMGDeterministic(t *testing.T) {
	a, b, cells := newAMGProblem(fieldLogNormal25, 300, 300, 9).assemble()
	run := func(p int) ([]float64, CGResult) {
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(p))
		h, err := NewSMG(a, 300, 300, cells)
		if err != nil {
			t.Fatal(err)
		}
		x := make([]float64, a.N)
		res, err := CG(a, b, x, h, CGSettings{Tol: 1e-10})
		if err != nil {
			t.Fatal(err)
		}
		return x, res
	}
	x1, r1 := run(1)
	x4, r4 := run(4)
	if r1 != r4 {
		t.Fatalf("GOMAXPROCS 1: %+v; GOMAXPROCS 4: %+v", r1, r4)
	}
	for i := range x1 {
		if math.Float64bits(x1[i]) != math.Float64bits(x4[i]) {
			t.Fatalf("x[%d] = %v with GOMAXPROCS 1 but %v with 4", i, x1[i], x4[i])
		}
	}
}

// NewSMG refuses what it cannot take with an error naming the problem.
func TestSMGBadInput(t *testing.T) {
	a, _, cells := newAMGProblem(fieldLogNormal1, 10, 10, 1).assemble()
	bad := append([]int(nil), cells...)
	bad[3] = bad[2]
	far, _ := FromTriplets(2, []Triplet{{0, 0, 2}, {0, 1, -1}, {1, 0, -1}, {1, 1, 2}})
	neg, _ := FromTriplets(1, []Triplet{{0, 0, -1}})
	tests := []struct {
		name   string
		a      *CSR
		nx, ny int
		cells  []int
		want   string
	}{
		{"empty grid", a, 0, 10, cells, "empty"},
		{"count", a, 10, 10, cells[1:], "cells for a matrix"},
		{"outside", a, 5, 5, cells, "outside"},
		{"twice", a, 10, 10, bad, "twice"},
		{"not neighbours", far, 4, 4, []int{0, 5}, "not a box neighbour"},
		{"negative diagonal", neg, 1, 1, []int{0}, "not positive"},
	}
	for _, tc := range tests {
		_, err := NewSMG(tc.a, tc.nx, tc.ny, tc.cells)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want one containing %q", tc.name, err, tc.want)
		}
	}
}

// The SMG's stencil operator multiplies like the matrix it was built
// from: bit-identical to CSR.MulVec (the same sums in the same order), and
// equal to gonum's dense product (the outside reference) to round-off, on
// boxes one and two cells wide and with a sealing fault (zero couplings
// the CSR matrix leaves out), serial and parallel (200x200). A box with
// inactive cells has no operator.
func TestSMGOperatorMatchesMatrix(t *testing.T) {
	for _, sz := range [][2]int{{1, 7}, {7, 1}, {2, 5}, {37, 23}, {200, 200}} {
		nx, ny := sz[0], sz[1]
		pb := newAMGProblem(fieldLogNormal2, nx, ny, 5)
		pb.sealX = make([]bool, (nx+1)*ny)
		for j := ny / 3; j < 2*ny/3; j++ {
			pb.sealX[j*(nx+1)+nx/2] = true
		}
		a, _, cells := pb.assemble()
		h, err := NewSMG(a, nx, ny, cells)
		if err != nil {
			t.Fatal(err)
		}
		op := h.Operator()
		if op == nil {
			t.Fatalf("%dx%d: no operator for a whole box", nx, ny)
		}
		x := amgRandomVector(a.N, 3)
		want, got := make([]float64, a.N), make([]float64, a.N)
		a.MulVec(want, x)
		op.MulVec(got, x)
		for u := range want {
			if math.Float64bits(got[u]) != math.Float64bits(want[u]) {
				t.Fatalf("%dx%d: row %d: stencil %v, CSR %v", nx, ny, u, got[u], want[u])
			}
		}
		if a.N <= 1000 {
			var ref mat.VecDense
			ref.MulVec(amgDense(a), mat.NewVecDense(a.N, x))
			// Five terms per row: a few units of round-off of the
			// largest term (measured up to 9e-16).
			worst := 0.0
			for u := range got {
				scale := 0.0
				for p := a.RowPtr[u]; p < a.RowPtr[u+1]; p++ {
					scale = max(scale, math.Abs(a.Val[p]*x[a.Col[p]]))
				}
				d := math.Abs(got[u] - ref.AtVec(u))
				worst = max(worst, d/scale)
				if d > 4e-15*scale {
					t.Errorf("%dx%d: row %d: stencil %v, dense %v", nx, ny, u, got[u], ref.AtVec(u))
				}
			}
			t.Logf("%dx%d: largest difference to the dense product %.2g of the largest term", nx, ny, worst)
		}
	}
	a, _, cells := newAMGProblem(fieldInactive, 30, 30, 1).assemble()
	h, err := NewSMG(a, 30, 30, cells)
	if err != nil {
		t.Fatal(err)
	}
	if h.Operator() != nil {
		t.Error("an operator for a box with inactive cells")
	}
}

// NewSMGStencil, given the stencil of a matrix, builds the same
// preconditioner as NewSMG given the matrix (bit-identical cycles and
// products, on a field with a sealing fault), and refuses a stencil that
// is not positive on the diagonal or couples across the grid's edge.
func TestSMGStencilMatchesCSR(t *testing.T) {
	nx, ny := 61, 47
	pb := newAMGProblem(fieldChannel1e6, nx, ny, 7)
	pb.sealX = make([]bool, (nx+1)*ny)
	for j := 10; j < 30; j++ {
		pb.sealX[j*(nx+1)+20] = true
	}
	a, _, cells := pb.assemble()
	fromCSR, err := NewSMG(a, nx, ny, cells)
	if err != nil {
		t.Fatal(err)
	}
	stencil := func(d, w, s []float64) {
		for u := 0; u < a.N; u++ {
			for p := a.RowPtr[u]; p < a.RowPtr[u+1]; p++ {
				switch a.Col[p] {
				case u:
					d[u] = a.Val[p]
				case u - 1:
					w[u] = a.Val[p]
				case u - nx:
					s[u] = a.Val[p]
				}
			}
		}
	}
	fromStencil, err := NewSMGStencil(nx, ny, stencil)
	if err != nil {
		t.Fatal(err)
	}
	if fromStencil.String() != fromCSR.String() {
		t.Fatalf("hierarchies %v and %v", fromStencil, fromCSR)
	}
	r := amgRandomVector(a.N, 11)
	z1, z2 := make([]float64, a.N), make([]float64, a.N)
	fromCSR.Apply(z1, r)
	fromStencil.Apply(z2, r)
	fromCSR.Operator().MulVec(r, z1)
	want := append([]float64(nil), r...)
	fromStencil.Operator().MulVec(r, z2)
	for u := range z1 {
		if math.Float64bits(z1[u]) != math.Float64bits(z2[u]) || math.Float64bits(want[u]) != math.Float64bits(r[u]) {
			t.Fatalf("unknown %d: cycles %v and %v, products %v and %v", u, z1[u], z2[u], want[u], r[u])
		}
	}
	for _, tc := range []struct {
		name string
		fill func(d, w, s []float64)
		want string
	}{
		{"zero diagonal", func(d, w, s []float64) { stencil(d, w, s); d[5] = 0 }, "not positive"},
		{"west edge", func(d, w, s []float64) { stencil(d, w, s); w[nx] = -1 }, "across the edge"},
		{"south edge", func(d, w, s []float64) { stencil(d, w, s); s[3] = -1 }, "across the edge"},
		{"not finite", func(d, w, s []float64) { stencil(d, w, s); s[nx+3] = math.NaN() }, "not finite"},
	} {
		if _, err := NewSMGStencil(nx, ny, tc.fill); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want one containing %q", tc.name, err, tc.want)
		}
	}
}

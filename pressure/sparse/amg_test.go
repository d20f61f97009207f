package sparse

import (
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// This file holds the AMG tests and the test problems they share with the
// benchmarks: two-point flux (TPFA) pressure matrices of an areal grid of
// unit square cells with wells.

// amgWell is a well of a test problem at cell (i, j), given as fractions of
// the grid size. A well with WI > 0 is held at bottom-hole pressure BHP and
// adds WI to the diagonal; a well with WI == 0 injects Rate.
type amgWell struct {
	fi, fj float64
	bhp    bool
	rate   float64
}

// amgProblem is a TPFA test problem: per-cell permeabilities, a mask of
// active cells, sealing faces and wells.
type amgProblem struct {
	name   string
	nx, ny int
	kx, ky []float64
	active []bool // nil: every cell is active
	sealX  []bool // x-faces of zero transmissibility, j*(nx+1)+i; nil: none
	wells  []amgWell
}

// amgFieldKind names the permeability fields of the tests.
type amgFieldKind int

const (
	fieldLogNormal1  amgFieldKind = iota // log-normal, log standard deviation 1
	fieldLogNormal2                      // log-normal, log standard deviation 2
	fieldLogNormal25                     // log-normal, log standard deviation 2.5
	fieldChannel1e3                      // sinuous 1000 md channels in 1 md
	fieldChannel1e6                      // sinuous 1000 md channels in 0.001 md
	fieldAnisotropic                     // log-normal sigma 1 with kx/ky = 100
	fieldInactive                        // log-normal sigma 2, a hole, a notch and a sealing fault
	fieldRough                           // log-normal sigma 2.5, correlation length 2 cells
)

var amgFieldKinds = []amgFieldKind{fieldLogNormal1, fieldLogNormal2, fieldLogNormal25,
	fieldChannel1e3, fieldChannel1e6, fieldAnisotropic, fieldInactive, fieldRough}

func (k amgFieldKind) String() string {
	return [...]string{"lognormal-1.0", "lognormal-2.0", "lognormal-2.5", "channel-1e3",
		"channel-1e6", "anisotropic-100", "inactive", "rough-2.5"}[k]
}

// amgFivePlusOne is the well pattern: four producers at bottom-hole
// pressure near the corners and two rate injectors.
var amgFivePlusOne = []amgWell{
	{fi: 0.05, fj: 0.05, bhp: true}, {fi: 0.95, fj: 0.05, bhp: true},
	{fi: 0.05, fj: 0.95, bhp: true}, {fi: 0.95, fj: 0.95, bhp: true},
	{fi: 0.5, fj: 0.2, rate: 1000}, {fi: 0.25, fj: 0.8, rate: 500},
}

// newAMGProblem builds the test problem of the given kind on an nx by ny
// grid; seed picks the random field.
func newAMGProblem(kind amgFieldKind, nx, ny int, seed uint64) amgProblem {
	pb := amgProblem{name: kind.String(), nx: nx, ny: ny, wells: amgFivePlusOne}
	corr := 0.1 * float64(max(nx, ny)) // correlation length: 10% of the domain
	switch kind {
	case fieldLogNormal1:
		pb.kx = amgLogNormalField(nx, ny, 100, 1.0, corr, seed)
	case fieldLogNormal2:
		pb.kx = amgLogNormalField(nx, ny, 100, 2.0, corr, seed)
	case fieldLogNormal25:
		pb.kx = amgLogNormalField(nx, ny, 100, 2.5, corr, seed)
	case fieldChannel1e3:
		pb.kx = amgChannelField(nx, ny, 1000, 1, seed)
	case fieldChannel1e6:
		pb.kx = amgChannelField(nx, ny, 1000, 0.001, seed)
	case fieldAnisotropic:
		pb.kx = amgLogNormalField(nx, ny, 100, 1.0, corr, seed)
		pb.ky = make([]float64, nx*ny)
		for k, v := range pb.kx {
			pb.ky[k] = v / 100
		}
	case fieldRough:
		pb.kx = amgLogNormalField(nx, ny, 100, 2.5, 2, seed)
	case fieldInactive:
		pb.kx = amgLogNormalField(nx, ny, 100, 2.0, corr, seed)
		pb.active = make([]bool, nx*ny)
		cx, cy, r := 0.5*float64(nx), 0.5*float64(ny), 0.15*float64(min(nx, ny))
		for j := 0; j < ny; j++ {
			for i := 0; i < nx; i++ {
				x, y := float64(i)+0.5, float64(j)+0.5
				hole := math.Hypot(x-cx, y-cy) < r
				notch := x > 0.6*float64(nx) && x < 0.75*float64(nx) && y > 0.7*float64(ny)
				pb.active[j*nx+i] = !hole && !notch
			}
		}
		// A sealing fault along x = 0.3*nx from 0.3*ny to 0.7*ny.
		pb.sealX = make([]bool, (nx+1)*ny)
		fi := int(0.3 * float64(nx))
		for j := int(0.3 * float64(ny)); j < int(0.7*float64(ny)); j++ {
			pb.sealX[j*(nx+1)+fi] = true
		}
	}
	if pb.ky == nil {
		pb.ky = pb.kx
	}
	return pb
}

// amgLogNormalField returns k = mean*exp(sigma*g) where g is a stationary
// Gaussian random field of unit variance with the Gaussian covariance
// exp(-(r/corr)^2), simulated by the randomization (spectral) method: a sum
// of random cosines whose wave vectors are drawn from the spectral density
// (Shinozuka and Jan 1972, from memory). Each cosine is split into
// cos(a+b) = cos a cos b - sin a sin b, so the cost per cell and mode is a
// few multiplications.
func amgLogNormalField(nx, ny int, mean, sigma, corr float64, seed uint64) []float64 {
	const modes = 256
	rng := rand.New(rand.NewPCG(seed, 0x5eed))
	g := make([]float64, nx*ny)
	cx, sx := make([]float64, nx), make([]float64, nx)
	cy, sy := make([]float64, ny), make([]float64, ny)
	for range modes {
		// The spectral density of exp(-(r/l)^2) is Gaussian with standard
		// deviation sqrt(2)/l in each wave-number component.
		kx := rng.NormFloat64() * math.Sqrt2 / corr
		ky := rng.NormFloat64() * math.Sqrt2 / corr
		phi := 2 * math.Pi * rng.Float64()
		for i := range nx {
			cx[i], sx[i] = math.Cos(kx*(float64(i)+0.5)+phi), math.Sin(kx*(float64(i)+0.5)+phi)
		}
		for j := range ny {
			cy[j], sy[j] = math.Cos(ky*(float64(j)+0.5)), math.Sin(ky*(float64(j)+0.5))
		}
		for j := range ny {
			row := g[j*nx : (j+1)*nx]
			c, s := cy[j], sy[j]
			for i := range row {
				row[i] += cx[i]*c - sx[i]*s
			}
		}
	}
	scale := math.Sqrt(2.0 / modes)
	for k, v := range g {
		g[k] = mean * math.Exp(sigma*scale*v)
	}
	return g
}

// amgChannelField returns a binary field of sinuous high-permeability channels
// (value hi) in a background of value lo: four channels running east-west
// with sine-wave centre lines.
func amgChannelField(nx, ny int, hi, lo float64, seed uint64) []float64 {
	rng := rand.New(rand.NewPCG(seed, 0xc4a7))
	k := make([]float64, nx*ny)
	for i := range k {
		k[i] = lo
	}
	width := max(2.0, float64(ny)/25)
	for c := range 4 {
		y0 := (float64(c) + 0.3 + 0.4*rng.Float64()) * float64(ny) / 4
		amp := (0.05 + 0.08*rng.Float64()) * float64(ny)
		wave := (0.3 + 0.4*rng.Float64()) * float64(nx)
		phase := 2 * math.Pi * rng.Float64()
		for i := range nx {
			yc := y0 + amp*math.Sin(2*math.Pi*(float64(i)+0.5)/wave+phase)
			for j := max(0, int(yc-width)); j < min(ny, int(yc+width)+1); j++ {
				if math.Abs(float64(j)+0.5-yc) <= width/2 {
					k[j*nx+i] = hi
				}
			}
		}
	}
	return k
}

// amgWellIndex is the Peaceman well index of a unit cell, thickness 1 and well
// radius 0.003: WI = 2 pi sqrt(kx ky) / ln(ro/rw) with the anisotropic
// equivalent radius of Peaceman (1983).
func amgWellIndex(kx, ky float64) float64 {
	const dx, dy, rw = 1.0, 1.0, 0.003
	ro := 0.28 * math.Sqrt(math.Sqrt(ky/kx)*dx*dx+math.Sqrt(kx/ky)*dy*dy) /
		(math.Pow(ky/kx, 0.25) + math.Pow(kx/ky, 0.25))
	return 2 * math.Pi * math.Sqrt(kx*ky) / math.Log(ro/rw)
}

// assemble builds the TPFA matrix and right-hand side of the problem. Face
// transmissibilities are the harmonic combination of the half-cell
// transmissibilities 2k (unit cells). Cells that are inactive or not
// connected to any well through open faces are left out; row r is cell
// cells[r].
func (pb amgProblem) assemble() (a *CSR, rhs []float64, cells []int) {
	nx, ny := pb.nx, pb.ny
	nc := nx * ny
	act := func(k int) bool { return pb.active == nil || pb.active[k] }
	tx := func(i, j int) float64 { // face between (i-1, j) and (i, j)
		if pb.sealX != nil && pb.sealX[j*(nx+1)+i] {
			return 0
		}
		k1, k2 := pb.kx[j*nx+i-1], pb.kx[j*nx+i]
		return 2 * k1 * k2 / (k1 + k2)
	}
	ty := func(i, j int) float64 { // face between (i, j-1) and (i, j)
		k1, k2 := pb.ky[(j-1)*nx+i], pb.ky[j*nx+i]
		return 2 * k1 * k2 / (k1 + k2)
	}
	wellCell := func(w amgWell) int {
		i := min(nx-1, int(w.fi*float64(nx)))
		j := min(ny-1, int(w.fj*float64(ny)))
		return j*nx + i
	}
	// Keep the cells connected to a well (breadth-first search).
	seen := make([]bool, nc)
	queue := make([]int, 0, nc)
	for _, w := range pb.wells {
		if k := wellCell(w); act(k) && !seen[k] {
			seen[k] = true
			queue = append(queue, k)
		}
	}
	for q := 0; q < len(queue); q++ {
		k := queue[q]
		i, j := k%nx, k/nx
		try := func(m int, t float64) {
			if act(m) && !seen[m] && t > 0 {
				seen[m] = true
				queue = append(queue, m)
			}
		}
		if i > 0 {
			try(k-1, tx(i, j))
		}
		if i < nx-1 {
			try(k+1, tx(i+1, j))
		}
		if j > 0 {
			try(k-nx, ty(i, j))
		}
		if j < ny-1 {
			try(k+nx, ty(i, j+1))
		}
	}
	row := make([]int, nc)
	for k := range nc {
		row[k] = -1
		if seen[k] {
			row[k] = len(cells)
			cells = append(cells, k)
		}
	}
	n := len(cells)
	a = &CSR{N: n, RowPtr: make([]int, n+1), Col: make([]int, 0, 5*n), Val: make([]float64, 0, 5*n)}
	rhs = make([]float64, n)
	wi := make([]float64, n)
	for _, w := range pb.wells {
		k := wellCell(w)
		if row[k] < 0 {
			continue
		}
		if w.bhp {
			wi[row[k]] += amgWellIndex(pb.kx[k], pb.ky[k])
			rhs[row[k]] += amgWellIndex(pb.kx[k], pb.ky[k]) * 100 // producer at 100
		} else {
			rhs[row[k]] += w.rate
		}
	}
	for r, k := range cells {
		i, j := k%nx, k/nx
		type nb struct {
			m int
			t float64
		}
		var nbs [4]nb
		cnt := 0
		if j > 0 && row[k-nx] >= 0 {
			nbs[cnt], cnt = nb{row[k-nx], ty(i, j)}, cnt+1
		}
		if i > 0 && row[k-1] >= 0 {
			nbs[cnt], cnt = nb{row[k-1], tx(i, j)}, cnt+1
		}
		diag := wi[r]
		for _, e := range nbs[:cnt] {
			diag += e.t
		}
		var up [2]nb
		cu := 0
		if i < nx-1 && row[k+1] >= 0 {
			up[cu], cu = nb{row[k+1], tx(i+1, j)}, cu+1
			diag += up[cu-1].t
		}
		if j < ny-1 && row[k+nx] >= 0 {
			up[cu], cu = nb{row[k+nx], ty(i, j+1)}, cu+1
			diag += up[cu-1].t
		}
		for _, e := range nbs[:cnt] {
			if e.t > 0 {
				a.Col = append(a.Col, e.m)
				a.Val = append(a.Val, -e.t)
			}
		}
		a.Col = append(a.Col, r)
		a.Val = append(a.Val, diag)
		for _, e := range up[:cu] {
			if e.t > 0 {
				a.Col = append(a.Col, e.m)
				a.Val = append(a.Val, -e.t)
			}
		}
		a.RowPtr[r+1] = len(a.Col)
	}
	return a, rhs, cells
}

// amgRandomVector returns a reproducible random vector of length n.
func amgRandomVector(n int, seed uint64) []float64 {
	rng := rand.New(rand.NewPCG(seed, 7))
	v := make([]float64, n)
	for i := range v {
		v[i] = rng.Float64()*2 - 1
	}
	return v
}

// amgDense returns a as a gonum symmetric dense matrix.
func amgDense(a *CSR) *mat.SymDense {
	s := mat.NewSymDense(a.N, nil)
	for i := 0; i < a.N; i++ {
		for p := a.RowPtr[i]; p < a.RowPtr[i+1]; p++ {
			if j := a.Col[p]; j >= i {
				s.SetSym(i, j, a.Val[p])
			}
		}
	}
	return s
}

func amgRelDiff(x, y []float64) float64 {
	num, den := 0.0, 0.0
	for i := range x {
		num += (x[i] - y[i]) * (x[i] - y[i])
		den += y[i] * y[i]
	}
	return math.Sqrt(num / den)
}

// The AMG-preconditioned CG solution must agree with gonum's dense Cholesky
// solution (the external reference: LAPACK dpotrf/dpotrs through gonum) and
// with the previous solver, Jacobi-preconditioned CG, on small grids.
func TestAMGMatchesDenseCholesky(t *testing.T) {
	tests := []struct {
		kind     amgFieldKind
		nx, ny   int
		settings AMGSettings
	}{
		{fieldLogNormal1, 15, 12, AMGSettings{MaxCoarse: 10}},
		{fieldLogNormal25, 15, 12, AMGSettings{MaxCoarse: 10}},
		{fieldChannel1e3, 15, 12, AMGSettings{MaxCoarse: 10}},
		{fieldChannel1e6, 15, 12, AMGSettings{MaxCoarse: 10}},
		{fieldAnisotropic, 15, 12, AMGSettings{MaxCoarse: 10}},
		{fieldInactive, 15, 12, AMGSettings{MaxCoarse: 10}},
		{fieldLogNormal2, 40, 30, AMGSettings{MaxCoarse: 20, Sweeps: 2}},
		{fieldInactive, 22, 20, AMGSettings{}}, // one level: the AMG is a direct solver
	}
	for _, tc := range tests {
		t.Run(fmt.Sprintf("%v-%dx%d", tc.kind, tc.nx, tc.ny), func(t *testing.T) {
			pb := newAMGProblem(tc.kind, tc.nx, tc.ny, 11)
			a, b, _ := pb.assemble()
			var ch mat.Cholesky
			if !ch.Factorize(amgDense(a)) {
				t.Fatal("gonum Cholesky failed: test matrix not positive definite")
			}
			var ref mat.VecDense
			if err := ch.SolveVecTo(&ref, mat.NewVecDense(a.N, append([]float64(nil), b...))); err != nil {
				t.Logf("gonum Cholesky: %v", err)
			}
			h, err := NewAMGWith(a, tc.settings)
			if err != nil {
				t.Fatal(err)
			}
			x := make([]float64, a.N)
			res, err := CG(a, b, x, h, CGSettings{Tol: 1e-14, MaxIter: 200})
			if err != nil && res.RelativeResidual > 1e-13 {
				t.Fatalf("CG: %v (%+v)", err, res)
			}
			e := amgRelDiff(x, ref.RawVector().Data)
			t.Logf("n=%d %v: %d iterations, error vs Cholesky %.2e", a.N, h.Stats(), res.Iterations, e)
			if e > 1e-8 {
				t.Errorf("relative difference from gonum Cholesky %.3e > 1e-8", e)
			}
			if h.Stats().Levels() == 1 {
				// A single level is a direct solve: one CG step suffices.
				x1 := make([]float64, a.N)
				if r1, err := CG(a, b, x1, h, CGSettings{Tol: 1e-10}); err != nil || r1.Iterations != 1 {
					t.Errorf("single level hierarchy is a direct solve, yet CG took %d iterations (%v)", r1.Iterations, err)
				}
			}
			// Previous solver: CG with the Jacobi preconditioner.
			jac, err := NewJacobi(a)
			if err != nil {
				t.Fatal(err)
			}
			xj := make([]float64, a.N)
			if _, err := CG(a, b, xj, jac, CGSettings{Tol: 1e-12, MaxIter: 20 * a.N}); err != nil {
				t.Fatalf("Jacobi CG: %v", err)
			}
			if e := amgRelDiff(x, xj); e > 1e-8 {
				t.Errorf("relative difference from Jacobi CG %.3e > 1e-8", e)
			}
		})
	}
}

// The V-cycle is a symmetric positive definite operator with the
// eigenvalues of M^-1 A in (0, 1]: the symmetric V-cycle with Galerkin
// coarse matrices, an exact coarsest solve and an A-convergent smoother
// has an error propagator I - M^-1 A that is A-self-adjoint with
// eigenvalues in [0, 1) (Vassilevski 2008, Multilevel Block Factorization
// Preconditioners, from memory). Checked densely with gonum's Cholesky
// and symmetric eigendecomposition on small grids.
func TestAMGSpectrumDense(t *testing.T) {
	for _, kind := range []amgFieldKind{fieldLogNormal25, fieldChannel1e6, fieldAnisotropic, fieldInactive} {
		t.Run(kind.String(), func(t *testing.T) {
			pb := newAMGProblem(kind, 16, 14, 3)
			a, _, _ := pb.assemble()
			n := a.N
			h, err := NewAMGWith(a, AMGSettings{MaxCoarse: 8})
			if err != nil {
				t.Fatal(err)
			}
			if h.Stats().Levels() < 3 {
				t.Fatalf("want at least 3 levels for this check, got %v", h.Stats())
			}
			minv := mat.NewDense(n, n, nil)
			e, col := make([]float64, n), make([]float64, n)
			for j := range n {
				e[j] = 1
				h.Apply(col, e)
				e[j] = 0
				minv.SetCol(j, col)
			}
			asym, scale := 0.0, 0.0
			for i := range n {
				for j := range n {
					asym = max(asym, math.Abs(minv.At(i, j)-minv.At(j, i)))
					scale = max(scale, math.Abs(minv.At(i, j)))
				}
			}
			if asym > 1e-12*scale {
				t.Errorf("M^-1 not symmetric: max |m_ij - m_ji| = %.3e (scale %.3e)", asym, scale)
			}
			var ch mat.Cholesky
			if !ch.Factorize(amgDense(a)) {
				t.Fatal("test matrix not positive definite")
			}
			var l mat.TriDense
			ch.LTo(&l)
			var tmp, b mat.Dense
			tmp.Mul(minv, &l)
			b.Mul(l.T(), &tmp)
			sym := mat.NewSymDense(n, nil)
			for i := range n {
				for j := i; j < n; j++ {
					sym.SetSym(i, j, 0.5*(b.At(i, j)+b.At(j, i)))
				}
			}
			var eig mat.EigenSym
			if !eig.Factorize(sym, false) {
				t.Fatal("eigendecomposition failed")
			}
			ev := eig.Values(nil)
			lo, hi := ev[0], ev[len(ev)-1]
			t.Logf("%v; eigenvalues of M^-1 A in [%.4f, %.6f], condition %.2f", h.Stats(), lo, hi, hi/lo)
			if !(lo > 0) || hi > 1+1e-10 {
				t.Errorf("eigenvalues of M^-1 A in [%g, %g], want within (0, 1]", lo, hi)
			}
		})
	}
}

// Symmetry x'M^-1 y = y'M^-1 x and positivity x'M^-1 x > 0 on the default
// hierarchy of 100x100 problems (the properties CG needs of a
// preconditioner: Hestenes and Stiefel 1952).
func TestAMGSymmetricPositive(t *testing.T) {
	for _, kind := range amgFieldKinds {
		t.Run(kind.String(), func(t *testing.T) {
			a, _, _ := newAMGProblem(kind, 100, 100, 5).assemble()
			h, err := NewAMG(a)
			if err != nil {
				t.Fatal(err)
			}
			u, v := make([]float64, a.N), make([]float64, a.N)
			for s := range uint64(3) {
				x, y := amgRandomVector(a.N, 2*s+1), amgRandomVector(a.N, 2*s+2)
				h.Apply(u, y)
				h.Apply(v, x)
				xmy, ymx := dot(x, u), dot(y, v)
				h.Apply(u, x)
				xmx := dot(x, u)
				h.Apply(v, y)
				ymy := dot(y, v)
				if !(xmx > 0 && ymy > 0) {
					t.Fatalf("not positive: x'Mx = %g, y'My = %g", xmx, ymy)
				}
				if d := math.Abs(xmy-ymx) / math.Sqrt(xmx*ymy); d > 1e-10 {
					t.Errorf("x'M^-1 y = %.15g, y'M^-1 x = %.15g: relative asymmetry %.2e", xmy, ymx, d)
				}
			}
		})
	}
}

// Iteration counts to a relative residual of 1e-8 stay under 30 (issue 9)
// for every field and size; the operator complexity stays under 2 (common
// practice for smoothed aggregation in two dimensions: about 1.2 to 1.6).
// 1000x1000 runs unless -short.
// At 1000x1000 the log-normal fields of standard deviation 1 and 2 are
// left out to keep the test short: they share the seed and correlation of
// the 2.5 field, which bounds them. The rough field (correlation length 2
// cells, contrast about 1e7 between neighbouring regions) lies outside the
// issue's list; it is held to a looser bound of 40 at 100x100 and 300x300
// only, to catch a breakdown.
func TestAMGIterationBounds(t *testing.T) {
	sizes := []int{100, 300}
	if !testing.Short() {
		sizes = append(sizes, 1000)
	}
	skip := func(kind amgFieldKind, s int) bool {
		return s >= 1000 && (kind == fieldLogNormal1 || kind == fieldLogNormal2 || kind == fieldRough)
	}
	bound := func(kind amgFieldKind) int {
		if kind == fieldRough {
			return 40
		}
		return 29 // under 30 (issue 9)
	}
	var table strings.Builder
	fmt.Fprintf(&table, "\n%-16s", "field")
	for _, s := range sizes {
		fmt.Fprintf(&table, " %6dx%-6d", s, s)
	}
	table.WriteString("   (CG iterations to 1e-8 / operator complexity)\n")
	for _, kind := range amgFieldKinds {
		fmt.Fprintf(&table, "%-16s", kind)
		for _, s := range sizes {
			if skip(kind, s) {
				fmt.Fprintf(&table, " %13s", "-")
				continue
			}
			a, b, _ := newAMGProblem(kind, s, s, 1).assemble()
			h, err := NewAMGWith(a, AMGSettings{})
			if err != nil {
				t.Fatalf("%v %d: %v", kind, s, err)
			}
			x := make([]float64, a.N)
			res, err := CG(a, b, x, h, CGSettings{Tol: 1e-8, MaxIter: 200})
			if err != nil {
				t.Errorf("%v %dx%d: %v after %d iterations", kind, s, s, err, res.Iterations)
			}
			st := h.Stats()
			fmt.Fprintf(&table, " %6d/%-6.2f", res.Iterations, st.OperatorComplexity)
			if res.Iterations > bound(kind) {
				t.Errorf("%v %dx%d: %d iterations, want <= %d (%v)", kind, s, s, res.Iterations, bound(kind), st)
			}
			if st.OperatorComplexity > 2 {
				t.Errorf("%v %dx%d: operator complexity %.3f > 2", kind, s, s, st.OperatorComplexity)
			}
		}
		table.WriteString("\n")
	}
	t.Log(table.String())
}

// The same solve gives bit-identical results for GOMAXPROCS 1 and 4: the
// block partition is fixed and every sum runs in a fixed order.
func TestAMGDeterministic(t *testing.T) {
	a, b, _ := newAMGProblem(fieldLogNormal25, 300, 300, 9).assemble()
	run := func(p int) ([]float64, CGResult, string) {
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(p))
		h, err := NewAMG(a)
		if err != nil {
			t.Fatal(err)
		}
		x := make([]float64, a.N)
		res, err := CG(a, b, x, h, CGSettings{Tol: 1e-10})
		if err != nil {
			t.Fatal(err)
		}
		return x, res, h.(*AMG).Stats().String()
	}
	x1, r1, s1 := run(1)
	x4, r4, s4 := run(4)
	if r1 != r4 || s1 != s4 {
		t.Fatalf("GOMAXPROCS 1: %+v %s; GOMAXPROCS 4: %+v %s", r1, s1, r4, s4)
	}
	for i := range x1 {
		if math.Float64bits(x1[i]) != math.Float64bits(x4[i]) {
			t.Fatalf("x[%d] = %v with GOMAXPROCS 1 but %v with 4", i, x1[i], x4[i])
		}
	}
}

// Apply with dst and r the same slice gives the same result, and Apply
// allocates a bounded amount whatever the size (no per-row allocation).
func TestAMGApplyAliasAndAllocs(t *testing.T) {
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(1))
	var counts []float64
	for _, s := range []int{100, 300} {
		a, _, _ := newAMGProblem(fieldLogNormal2, s, s, 2).assemble()
		h, err := NewAMGWith(a, AMGSettings{})
		if err != nil {
			t.Fatal(err)
		}
		r := amgRandomVector(a.N, 4)
		want := make([]float64, a.N)
		h.Apply(want, r)
		got := append([]float64(nil), r...)
		h.Apply(got, got)
		if amgRelDiff(got, want) != 0 {
			t.Errorf("%dx%d: aliased Apply differs by %g", s, s, amgRelDiff(got, want))
		}
		counts = append(counts, testing.AllocsPerRun(5, func() { h.Apply(want, r) }))
	}
	t.Logf("allocations per Apply: %v", counts)
	for _, c := range counts {
		if c > 64 {
			t.Errorf("Apply allocates %v times, want a small bounded number", c)
		}
	}
}

// A matrix without strong couplings (strongly diagonally dominant) cannot
// be coarsened: the hierarchy is one level larger than MaxCoarse, solved by
// symmetric Gauss-Seidel sweeps. The preconditioned CG solution must still
// match gonum's dense Cholesky, and the operator must stay symmetric.
func TestAMGNoStrongCouplings(t *testing.T) {
	const n = 600
	var ts []Triplet
	for i := range n {
		ts = append(ts, Triplet{i, i, 13 + float64(i%7)})
		if i > 0 {
			ts = append(ts, Triplet{i, i - 1, -1}, Triplet{i - 1, i, -1})
		}
	}
	a, err := FromTriplets(n, ts)
	if err != nil {
		t.Fatal(err)
	}
	h, err := NewAMGWith(a, AMGSettings{CoarseSweeps: 2})
	if err != nil {
		t.Fatal(err)
	}
	if st := h.Stats(); st.Levels() != 1 || st.DirectCoarse {
		t.Fatalf("want one level solved by sweeps, got %v", st)
	}
	b := amgRandomVector(n, 3)
	x := make([]float64, n)
	res, err := CG(a, b, x, h, CGSettings{Tol: 1e-13})
	if err != nil {
		t.Fatal(err)
	}
	var ch mat.Cholesky
	if !ch.Factorize(amgDense(a)) {
		t.Fatal("not positive definite")
	}
	var ref mat.VecDense
	if err := ch.SolveVecTo(&ref, mat.NewVecDense(n, append([]float64(nil), b...))); err != nil {
		t.Fatal(err)
	}
	if e := amgRelDiff(x, ref.RawVector().Data); e > 1e-10 {
		t.Errorf("relative difference from gonum Cholesky %.3e", e)
	}
	u, v := make([]float64, n), make([]float64, n)
	y := amgRandomVector(n, 4)
	h.Apply(u, y)
	h.Apply(v, b)
	if d := math.Abs(dot(b, u)-dot(y, v)) / math.Abs(dot(b, u)); d > 1e-12 {
		t.Errorf("sweeps not symmetric: relative asymmetry %.2e", d)
	}
	t.Logf("%v: %d iterations", h.Stats(), res.Iterations)
}

// Bad matrices give errors, never panics.
func TestAMGBadInput(t *testing.T) {
	good := func() *CSR {
		a, _ := FromTriplets(2, []Triplet{{0, 0, 2}, {0, 1, -1}, {1, 0, -1}, {1, 1, 2}})
		return a
	}
	tests := []struct {
		name string
		edit func(a *CSR) *CSR
	}{
		{"nil", func(*CSR) *CSR { return nil }},
		{"empty", func(*CSR) *CSR { return &CSR{} }},
		{"short row pointer", func(a *CSR) *CSR { a.RowPtr = a.RowPtr[:2]; return a }},
		{"column out of range", func(a *CSR) *CSR { a.Col[1] = 5; return a }},
		{"unsorted columns", func(a *CSR) *CSR { a.Col[0], a.Col[1] = 1, 0; return a }},
		{"NaN", func(a *CSR) *CSR { a.Val[1] = math.NaN(); return a }},
		{"zero diagonal", func(a *CSR) *CSR { a.Val[0] = 0; return a }},
		{"negative diagonal", func(a *CSR) *CSR { a.Val[3] = -1; return a }},
		{"asymmetric", func(a *CSR) *CSR { a.Val[1] = -1.5; return a }},
		{"values missing", func(a *CSR) *CSR { a.Val = a.Val[:3]; return a }},
		{"indefinite", func(a *CSR) *CSR { a.Val[1], a.Val[2] = -3, -3; return a }},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			p, err := NewAMG(tc.edit(good()))
			if err == nil || p != nil {
				t.Fatalf("want an error and no preconditioner, got %v, %v", p, err)
			}
			t.Log(err)
		})
	}
	if _, err := NewAMG(good()); err != nil {
		t.Fatalf("good matrix rejected: %v", err)
	}
	for _, s := range []AMGSettings{{Strength: math.NaN()}, {ProlongationWeight: math.Inf(1)}, {ProlongationWeight: 2.5}} {
		if _, err := NewAMGWith(good(), s); err == nil {
			t.Errorf("settings %+v accepted", s)
		}
	}
}

package sparse

import (
	"fmt"
	"math"
	"strings"

	"gonum.org/v1/gonum/mat"

	"floodtrace/internal/parallel"
)

// SMG is a structured semi-coarsening multigrid V-cycle used as a
// preconditioner for conjugate gradients on the five-point two-point flux
// matrix of a Cartesian grid. It follows the semi-coarsening multigrid of
// Schaffer (1998, "A semicoarsening multigrid method for elliptic partial
// differential equations with highly discontinuous and anisotropic
// coefficients", SIAM J. Sci. Comput. 20) in the form of the parallel
// PFMG of Ashby and Falgout (1996, "A parallel multigrid preconditioned
// conjugate gradient algorithm for groundwater flow simulations", Nucl.
// Sci. Eng. 124), with the operator-dependent interpolation and Galerkin
// coarse operators of the black-box multigrid of Dendy (1982, "Black box
// multigrid", J. Comput. Phys. 48).
//
// The grid. The unknowns are embedded in the nx by ny box of the grid;
// box cells that are not unknowns (inactive, unconnected or gauge cells)
// become decoupled rows with diagonal 1 and right-hand side 0, so they
// stay 0 on every level. Faults of multiplier 0 are zero couplings, and
// well terms sit on the diagonal: both enter the operator-dependent
// interpolation, which is what makes the method cope with them.
//
// Set-up, level by level: the coarsening direction is x or y, whichever
// carries the larger sum of coupling magnitudes (the strong direction;
// Schaffer 1998 and Ashby and Falgout 1996 coarsen one direction at a
// time so that anisotropy is followed level by level); every second line
// across that direction is kept. A fine point between two coarse points
// is interpolated from them with weights from its stencil collapsed
// across the coarsening direction (Schaffer 1998; Dendy 1982):
// w_lo = -a_lo/a_c, w_hi = -a_hi/a_c, where a_lo sums the couplings on the
// lower side, a_hi on the upper side and a_c is the diagonal plus the
// couplings across (so a cell held by a well or cut off by a fault gets
// weights summing to less than one, or zero). The coarse operator is the
// Galerkin product P^T A P, a nine-point stencil, stored by its lower half
// so that it is symmetric by construction. Coarsening stops at
// SMGCoarsest points or fewer, solved by dense Cholesky factorization.
//
// The smoother is four-colour point Gauss-Seidel (the colour of (i, j) is
// (i mod 2, j mod 2), so no two points of a colour are coupled by a
// nine-point stencil): one sweep over the colours in order before the
// coarse correction and one in reverse order after it, which makes the
// V-cycle a symmetric positive definite operator, as conjugate gradients
// need. Points of a colour are independent, so each colour is relaxed in
// parallel through internal/parallel and the result does not depend on
// the number of cores.
//
// What it cannot take: a matrix that is not a five-point stencil of the
// box given (NewSMG returns an error), and systems whose unknowns fill
// little of the box (the cycle works on every box cell); callers keep
// algebraic multigrid for those (see pressure.Solve).
//
// An SMG uses internal work space: one SMG must not be applied from
// several goroutines at once.
type SMG struct {
	levels []smgLevel
	cells  []int // box cell of each unknown
	chol   *mat.Cholesky
	cb, cx *mat.VecDense
}

// SMGCoarsest is the largest number of points of the coarsest SMG level.
const SMGCoarsest = 200

// smgLevel is one level of the hierarchy on an nx by ny box. Arrays are
// padded by pad = nx+2 entries on both sides, so that point (i, j) is at
// pad + j*nx + i and every neighbour index of a grid point is in range;
// coefficients are zero across the box edges and in the padding.
type smgLevel struct {
	nx, ny, pad int
	// The stencil by its lower half: d the diagonal, w the coupling to
	// (i-1, j), s to (i, j-1), sw to (i-1, j-1), se to (i+1, j-1); the
	// upper half follows by symmetry. sw and se are nil on the finest
	// (five-point) level.
	d, inv, w, s, sw, se []float64
	dir                  int       // coarsening direction to the next level: 0 x, 1 y
	plo, phi             []float64 // interpolation weights of the fine points between coarse ones
	x, b, r              []float64
}

func newSMGLevel(nx, ny int, corners bool) smgLevel {
	pad := nx + 2
	m := nx*ny + 2*pad
	l := smgLevel{nx: nx, ny: ny, pad: pad,
		d: make([]float64, m), inv: make([]float64, m), w: make([]float64, m), s: make([]float64, m),
		x: make([]float64, m), b: make([]float64, m), r: make([]float64, m)}
	if corners {
		l.sw, l.se = make([]float64, m), make([]float64, m)
	}
	return l
}

// coef returns the coupling of point p to its neighbour at offset (ox, oy).
func (l *smgLevel) coef(p, ox, oy int) float64 {
	nx := l.nx
	switch oy*3 + ox {
	case 0:
		return l.d[p]
	case -1:
		return l.w[p]
	case 1:
		return l.w[p+1]
	case -3:
		return l.s[p]
	case 3:
		return l.s[p+nx]
	}
	if l.sw == nil {
		return 0
	}
	switch oy*3 + ox {
	case -4:
		return l.sw[p]
	case 4:
		return l.sw[p+nx+1]
	case -2:
		return l.se[p]
	default: // 2: (-1, +1)
		return l.se[p+nx-1]
	}
}

// NewSMG returns the structured multigrid preconditioner of a, the matrix
// over the unknowns of an nx by ny grid whose unknown u is box cell
// cells[u] (cells numbered j*nx + i). a must be symmetric positive
// definite and couple each unknown only to its four box neighbours.
func NewSMG(a *CSR, nx, ny int, cells []int) (*SMG, error) {
	if nx < 1 || ny < 1 {
		return nil, fmt.Errorf("sparse: SMG: grid %d x %d is empty", nx, ny)
	}
	if len(cells) != a.N {
		return nil, fmt.Errorf("sparse: SMG: %d cells for a matrix of order %d", len(cells), a.N)
	}
	fine := newSMGLevel(nx, ny, false)
	for k := 0; k < nx*ny; k++ {
		fine.d[fine.pad+k] = math.NaN() // marks cells that are not unknowns
	}
	for _, k := range cells {
		if k < 0 || k >= nx*ny {
			return nil, fmt.Errorf("sparse: SMG: cell %d is outside the %d x %d grid", k, nx, ny)
		}
		if p := fine.pad + k; !math.IsNaN(fine.d[p]) {
			return nil, fmt.Errorf("sparse: SMG: cell %d is given twice", k)
		} else {
			fine.d[p] = 0
		}
	}
	for u, k := range cells {
		p := fine.pad + k
		ki, kj := k%nx, k/nx
		for q := a.RowPtr[u]; q < a.RowPtr[u+1]; q++ {
			l := cells[a.Col[q]]
			di, dj := l%nx-ki, l/nx-kj
			v := a.Val[q]
			switch {
			case di == 0 && dj == 0:
				fine.d[p] = v
			case di == -1 && dj == 0:
				fine.w[p] = v
			case di == 0 && dj == -1:
				fine.s[p] = v
			case (di == 1 && dj == 0) || (di == 0 && dj == 1):
				// the upper half, taken from the neighbour's row
			default:
				return nil, fmt.Errorf("sparse: SMG: row %d (cell %d) couples to cell %d, not a box neighbour", u, k, l)
			}
		}
		if !(fine.d[p] > 0) || math.IsInf(fine.d[p], 0) {
			return nil, fmt.Errorf("sparse: SMG: diagonal entry %d (cell %d) is %g, not positive", u, k, fine.d[p])
		}
	}
	for k := 0; k < nx*ny; k++ {
		if p := fine.pad + k; math.IsNaN(fine.d[p]) {
			fine.d[p] = 1
		}
	}
	h := &SMG{cells: cells}
	h.levels = append(h.levels, fine)
	for {
		l := &h.levels[len(h.levels)-1]
		l.finish()
		if l.nx*l.ny <= SMGCoarsest || (l.nx == 1 && l.ny == 1) {
			break
		}
		l.dir = l.direction()
		l.weights()
		c := l.coarsen()
		h.levels = append(h.levels, c)
	}
	if err := h.factorCoarse(); err != nil {
		return nil, err
	}
	return h, nil
}

// finish sets the inverse diagonal.
func (l *smgLevel) finish() {
	for k := 0; k < l.nx*l.ny; k++ {
		p := l.pad + k
		l.inv[p] = 1 / l.d[p]
	}
}

// direction picks the coarsening direction: the one with the larger sum
// of coupling magnitudes (corner couplings count for both).
func (l *smgLevel) direction() int {
	if l.nx == 1 {
		return 1
	}
	if l.ny == 1 {
		return 0
	}
	var mx, my float64
	for k := 0; k < l.nx*l.ny; k++ {
		p := l.pad + k
		c := 0.0
		if l.sw != nil {
			c = math.Abs(l.sw[p]) + math.Abs(l.se[p])
		}
		mx += math.Abs(l.w[p]) + c
		my += math.Abs(l.s[p]) + c
	}
	if mx >= my {
		return 0
	}
	return 1
}

// weights sets the interpolation weights of the points with an odd
// coordinate along the coarsening direction from their collapsed stencil.
func (l *smgLevel) weights() {
	nx, ny := l.nx, l.ny
	m := len(l.d)
	l.plo, l.phi = make([]float64, m), make([]float64, m)
	parallel.Each(ny, smgWorkers(l), 0, func(_, j int) {
		for i := 0; i < nx; i++ {
			along := i
			if l.dir == 1 {
				along = j
			}
			if along%2 == 0 {
				continue
			}
			p := l.pad + j*nx + i
			var lo, hi, c float64
			if l.dir == 0 {
				lo = l.coef(p, -1, -1) + l.coef(p, -1, 0) + l.coef(p, -1, 1)
				hi = l.coef(p, 1, -1) + l.coef(p, 1, 0) + l.coef(p, 1, 1)
				c = l.d[p] + l.coef(p, 0, -1) + l.coef(p, 0, 1)
			} else {
				lo = l.coef(p, -1, -1) + l.coef(p, 0, -1) + l.coef(p, 1, -1)
				hi = l.coef(p, -1, 1) + l.coef(p, 0, 1) + l.coef(p, 1, 1)
				c = l.d[p] + l.coef(p, -1, 0) + l.coef(p, 1, 0)
			}
			lo, hi = max(0, -lo), max(0, -hi)
			// A collapsed row that is not diagonally dominant (possible
			// on coarse levels) interpolates with weights summing to 1.
			c = max(c, lo+hi)
			if c > 0 {
				l.plo[p], l.phi[p] = lo/c, hi/c
			}
		}
	})
}

// coarsen returns the next level: every second line across the coarsening
// direction, with the Galerkin operator P^T A P.
func (l *smgLevel) coarsen() smgLevel {
	nx, ny := l.nx, l.ny
	cnx, cny := nx, ny
	if l.dir == 0 {
		cnx = (nx + 1) / 2
	} else {
		cny = (ny + 1) / 2
	}
	c := newSMGLevel(cnx, cny, true)
	// pw returns the weight on the coarse point at along coordinate pa of
	// fine point p at along coordinate along, or 0.
	pw := func(p, along, pa int) float64 {
		if along%2 == 0 {
			if along/2 == pa {
				return 1
			}
			return 0
		}
		switch pa {
		case (along - 1) / 2:
			return l.plo[p]
		case (along + 1) / 2:
			return l.phi[p]
		}
		return 0
	}
	parallel.Each(cny, smgWorkers(&c), 0, func(_, cj int) {
		var acc [3][3]float64
		for ci := 0; ci < cnx; ci++ {
			acc = [3][3]float64{}
			ca := ci // coarse coordinate along the direction
			fi, fj := 2*ci, cj
			if l.dir == 1 {
				ca = cj
				fi, fj = ci, 2*cj
			}
			for m := -1; m <= 1; m++ {
				ai, aj := fi+m, fj
				if l.dir == 1 {
					ai, aj = fi, fj+m
				}
				if ai < 0 || ai >= nx || aj < 0 || aj >= ny {
					continue
				}
				pf := l.pad + aj*nx + ai
				af := ai
				if l.dir == 1 {
					af = aj
				}
				wf := pw(pf, af, ca)
				if wf == 0 {
					continue
				}
				for oy := -1; oy <= 1; oy++ {
					for ox := -1; ox <= 1; ox++ {
						v := l.coef(pf, ox, oy)
						if v == 0 {
							continue
						}
						gi, gj := ai+ox, aj+oy
						pg := pf + oy*nx + ox
						ga := gi
						if l.dir == 1 {
							ga = gj
						}
						np := 1
						par := [2]int{ga / 2}
						wgs := [2]float64{1}
						if ga%2 != 0 {
							np = 2
							par = [2]int{(ga - 1) / 2, (ga + 1) / 2}
							wgs = [2]float64{l.plo[pg], l.phi[pg]}
						}
						for q := 0; q < np; q++ {
							wg := wgs[q]
							if wg == 0 {
								continue
							}
							dx, dy := par[q]-ca, gj-cj
							if l.dir == 1 {
								dx, dy = gi-ci, par[q]-ca
							}
							acc[dy+1][dx+1] += wf * v * wg
						}
					}
				}
			}
			p := c.pad + cj*cnx + ci
			c.d[p] = acc[1][1]
			c.w[p] = acc[1][0]
			c.s[p] = acc[0][1]
			c.sw[p] = acc[0][0]
			c.se[p] = acc[0][2]
		}
	})
	return c
}

// smgWorkers runs small levels on the caller's goroutine.
func smgWorkers(l *smgLevel) int {
	if l.nx*l.ny < 1<<14 {
		return 1
	}
	return procs()
}

// factorCoarse factors the coarsest level with gonum's dense Cholesky.
func (h *SMG) factorCoarse() error {
	l := &h.levels[len(h.levels)-1]
	n := l.nx * l.ny
	sym := mat.NewSymDense(n, nil)
	for k := 0; k < n; k++ {
		p := l.pad + k
		i, j := k%l.nx, k/l.nx
		sym.SetSym(k, k, l.d[p])
		if i > 0 {
			sym.SetSym(k, k-1, l.w[p])
		}
		if j > 0 {
			sym.SetSym(k, k-l.nx, l.s[p])
			if l.sw != nil && i > 0 {
				sym.SetSym(k, k-l.nx-1, l.sw[p])
			}
			if l.se != nil && i+1 < l.nx {
				sym.SetSym(k, k-l.nx+1, l.se[p])
			}
		}
	}
	var ch mat.Cholesky
	if ok := ch.Factorize(sym); !ok {
		return fmt.Errorf("sparse: SMG: coarsest matrix (order %d) is not positive definite", n)
	}
	h.chol = &ch
	h.cb = mat.NewVecDense(n, nil)
	h.cx = mat.NewVecDense(n, nil)
	return nil
}

// Levels returns the number of levels, the finest included.
func (h *SMG) Levels() int { return len(h.levels) }

// String describes the hierarchy: the level sizes and the direction each
// was coarsened in.
func (h *SMG) String() string {
	var b strings.Builder
	for i, l := range h.levels {
		if i > 0 {
			b.WriteString([...]string{" -x-> ", " -y-> "}[h.levels[i-1].dir])
		}
		fmt.Fprintf(&b, "%dx%d", l.nx, l.ny)
	}
	return b.String()
}

// Apply sets dst = M^-1 r for one V-cycle M^-1 started from zero. dst and
// r may be the same slice. It panics if their lengths differ from the
// order of the matrix.
func (h *SMG) Apply(dst, r []float64) {
	if len(dst) != len(h.cells) || len(r) != len(h.cells) {
		panic(fmt.Sprintf("sparse: SMG.Apply with vectors of length %d and %d for a matrix of order %d", len(dst), len(r), len(h.cells)))
	}
	f := &h.levels[0]
	for u, k := range h.cells {
		f.b[f.pad+k] = r[u]
	}
	h.cycle(0)
	for u, k := range h.cells {
		dst[u] = f.x[f.pad+k]
	}
}

// cycle runs the V-cycle on level k from x = 0: x = M_k^-1 b.
func (h *SMG) cycle(k int) {
	l := &h.levels[k]
	if k == len(h.levels)-1 {
		n := l.nx * l.ny
		copy(h.cb.RawVector().Data, l.b[l.pad:l.pad+n])
		// The only possible error is a condition-number warning; the
		// solution is still the best available, so it is used.
		_ = h.chol.SolveVecTo(h.cx, h.cb)
		copy(l.x[l.pad:l.pad+n], h.cx.RawVector().Data)
		return
	}
	clear(l.x)
	for c := 0; c < 4; c++ {
		l.relax(c)
	}
	l.residual()
	c := &h.levels[k+1]
	l.restrict(c)
	h.cycle(k + 1)
	l.prolong(c)
	for c := 3; c >= 0; c-- {
		l.relax(c)
	}
}

// relax runs Gauss-Seidel over the points of colour c: (i mod 2, j mod 2)
// = (c mod 2, c / 2).
func (l *smgLevel) relax(c int) {
	nx, ny := l.nx, l.ny
	ci, cj := c%2, c/2
	rows := (ny - cj + 1) / 2
	x, b, inv, w, s, sw, se := l.x, l.b, l.inv, l.w, l.s, l.sw, l.se
	parallel.Each(rows, smgWorkers(l), 0, func(_, r int) {
		j := cj + 2*r
		p0 := l.pad + j*nx
		if sw == nil {
			for p := p0 + ci; p < p0+nx; p += 2 {
				v := b[p] - w[p]*x[p-1] - w[p+1]*x[p+1] - s[p]*x[p-nx] - s[p+nx]*x[p+nx]
				x[p] = v * inv[p]
			}
			return
		}
		for p := p0 + ci; p < p0+nx; p += 2 {
			v := b[p] - w[p]*x[p-1] - w[p+1]*x[p+1] - s[p]*x[p-nx] - s[p+nx]*x[p+nx] -
				sw[p]*x[p-nx-1] - sw[p+nx+1]*x[p+nx+1] - se[p]*x[p-nx+1] - se[p+nx-1]*x[p+nx-1]
			x[p] = v * inv[p]
		}
	})
}

// residual sets r = b - A x.
func (l *smgLevel) residual() {
	nx := l.nx
	x, b, r, d, w, s, sw, se := l.x, l.b, l.r, l.d, l.w, l.s, l.sw, l.se
	parallel.Each(l.ny, smgWorkers(l), 0, func(_, j int) {
		p0 := l.pad + j*nx
		if sw == nil {
			for p := p0; p < p0+nx; p++ {
				r[p] = b[p] - d[p]*x[p] - w[p]*x[p-1] - w[p+1]*x[p+1] - s[p]*x[p-nx] - s[p+nx]*x[p+nx]
			}
			return
		}
		for p := p0; p < p0+nx; p++ {
			r[p] = b[p] - d[p]*x[p] - w[p]*x[p-1] - w[p+1]*x[p+1] - s[p]*x[p-nx] - s[p+nx]*x[p+nx] -
				sw[p]*x[p-nx-1] - sw[p+nx+1]*x[p+nx+1] - se[p]*x[p-nx+1] - se[p+nx-1]*x[p+nx-1]
		}
	})
}

// restrict sets the coarse right-hand side c.b = P^T r.
func (l *smgLevel) restrict(c *smgLevel) {
	nx, ny := l.nx, l.ny
	r, plo, phi := l.r, l.plo, l.phi
	st := 1 // fine stride along the coarsening direction
	if l.dir == 1 {
		st = nx
	}
	parallel.Each(c.ny, smgWorkers(c), 0, func(_, cj int) {
		for ci := 0; ci < c.nx; ci++ {
			fi, fj, along, n := 2*ci, cj, 2*ci, nx
			if l.dir == 1 {
				fi, fj, along, n = ci, 2*cj, 2*cj, ny
			}
			p := l.pad + fj*nx + fi
			v := r[p]
			if along > 0 {
				v += phi[p-st] * r[p-st]
			}
			if along+1 < n {
				v += plo[p+st] * r[p+st]
			}
			c.b[c.pad+cj*c.nx+ci] = v
		}
	})
}

// prolong adds the interpolated coarse correction: x += P c.x.
func (l *smgLevel) prolong(c *smgLevel) {
	nx := l.nx
	x, plo, phi, cx := l.x, l.plo, l.phi, c.x
	parallel.Each(l.ny, smgWorkers(l), 0, func(_, j int) {
		p0 := l.pad + j*nx
		if l.dir == 0 {
			q0 := c.pad + j*c.nx
			for i := 0; i < nx; i++ {
				p := p0 + i
				if i%2 == 0 {
					x[p] += cx[q0+i/2]
				} else {
					x[p] += plo[p]*cx[q0+i/2] + phi[p]*cx[q0+i/2+1]
				}
			}
			return
		}
		q0 := c.pad + (j/2)*c.nx
		if j%2 == 0 {
			for i := 0; i < nx; i++ {
				x[p0+i] += cx[q0+i]
			}
			return
		}
		for i := 0; i < nx; i++ {
			p := p0 + i
			x[p] += plo[p]*cx[q0+i] + phi[p]*cx[q0+c.nx+i]
		}
	})
}

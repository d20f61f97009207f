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
// The smoother is point Gauss-Seidel in zebra order: the even rows, then
// the odd rows, each row swept west to east (a nine-point stencil couples
// a row only to its neighbour rows, so rows of one parity are
// independent); one such sweep before the coarse correction and its
// adjoint (odd rows, then even rows, east to west) after it, which makes
// the V-cycle a symmetric positive definite operator, as conjugate
// gradients need. The rows of a parity are relaxed in parallel through
// internal/parallel, and the result does not depend on the number of
// cores.
//
// Precision and memory. The cycle works in float32 (stencils, weights and
// vectors; the set-up in float64), which halves its memory traffic; the
// conjugate gradients around it keep float64. When the unknowns are every
// cell of the box, the fine float64 stencil is kept as the matrix
// (Operator), and NewSMGStencil builds the hierarchy from a stencil
// without any CSR matrix.
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
	n      int   // order of the matrix
	cells  []int // box cell of each unknown; nil for every cell in order (NewSMGStencil)
	chol   *mat.Cholesky
	cb, cx *mat.VecDense
	op     *StencilOperator // the matrix as a stencil; nil unless every box cell is an unknown
}

// SMGCoarsest is the largest number of points of the coarsest SMG level.
const SMGCoarsest = 200

// smgLevel is one level of the hierarchy on an nx by ny box. Arrays are
// padded by pad = nx+2 entries on both sides, so that point (i, j) is at
// pad + j*nx + i and every neighbour index of a grid point is in range;
// coefficients are zero across the box edges and in the padding.
//
// The cycle's arrays are float32: the cycle is bound by memory traffic,
// and a preconditioner needs no more than single precision (the conjugate
// gradients around it work in float64 on the float64 matrix, so the
// solution's accuracy is theirs). The set-up works in float64 (set): the
// Galerkin products of a high-contrast field cancel, and coarse operators
// formed from rounded ones would lose their definiteness.
type smgLevel struct {
	nx, ny, pad int
	// The stencil by its lower half: the inverse diagonal inv, w the
	// coupling to (i-1, j), s to (i, j-1), sw to (i-1, j-1), se to
	// (i+1, j-1); the upper half follows by symmetry. sw and se are nil
	// on the finest (five-point) level.
	inv, w, s, sw, se []float32
	dir               int       // coarsening direction to the next level: 0 x, 1 y
	plo, phi          []float32 // interpolation weights of the fine points between coarse ones
	x, b, r           []float32
	set               smgSet // the float64 stencil, during the set-up only
}

// smgSet is a level's stencil in float64 while the hierarchy is built: d
// the diagonal, w, s, sw, se as in smgLevel.
type smgSet struct {
	d, w, s, sw, se []float64
}

// newSMGLevel returns a level with its float64 set-up stencil carved out
// of *scratch (grown when too small, cleared when reused): the set-up
// keeps two levels' stencils at a time, so two scratch buffers used in
// turn serve the whole hierarchy.
func newSMGLevel(nx, ny int, corners bool, scratch *[]float64) smgLevel {
	pad := nx + 2
	m := nx*ny + 2*pad
	l := smgLevel{nx: nx, ny: ny, pad: pad}
	k := 3
	if corners {
		k = 5
	}
	if cap(*scratch) < k*m {
		*scratch = make([]float64, k*m)
	} else {
		*scratch = (*scratch)[:k*m]
		clear(*scratch)
	}
	buf := *scratch
	l.set.d, l.set.w, l.set.s = buf[:m:m], buf[m:2*m:2*m], buf[2*m:3*m:3*m]
	if corners {
		l.set.sw, l.set.se = buf[3*m:4*m:4*m], buf[4*m:5*m:5*m]
	}
	return l
}

// coef returns the coupling of point p to its neighbour at offset (ox, oy).
func coef(st *[9][]float64, p, ox, oy int) float64 {
	if a := st[(oy+1)*3+ox+1]; a != nil {
		return a[p]
	}
	return 0
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
	var scratch [2][]float64
	fine := newSMGLevel(nx, ny, false, &scratch[0])
	d := fine.set.d
	for k := 0; k < nx*ny; k++ {
		d[fine.pad+k] = math.NaN() // marks cells that are not unknowns
	}
	for _, k := range cells {
		if k < 0 || k >= nx*ny {
			return nil, fmt.Errorf("sparse: SMG: cell %d is outside the %d x %d grid", k, nx, ny)
		}
		if p := fine.pad + k; !math.IsNaN(d[p]) {
			return nil, fmt.Errorf("sparse: SMG: cell %d is given twice", k)
		} else {
			d[p] = 0
		}
	}
	for u, k := range cells {
		p := fine.pad + k
		ki := k % nx
		for q := a.RowPtr[u]; q < a.RowPtr[u+1]; q++ {
			l := cells[a.Col[q]]
			v := a.Val[q]
			// By the difference of cell numbers: south first, since with
			// nx = 1 the south neighbour is also one cell down.
			switch diff := l - k; {
			case diff == 0:
				d[p] = v
			case diff == -nx:
				fine.set.s[p] = v
			case diff == -1 && ki > 0:
				fine.set.w[p] = v
			case diff == nx || (diff == 1 && ki < nx-1):
				// the upper half, taken from the neighbour's row
			default:
				return nil, fmt.Errorf("sparse: SMG: row %d (cell %d) couples to cell %d, not a box neighbour", u, k, l)
			}
		}
		if !(d[p] > 0) || math.IsInf(d[p], 0) {
			return nil, fmt.Errorf("sparse: SMG: diagonal entry %d (cell %d) is %g, not positive", u, k, d[p])
		}
	}
	for k := 0; k < nx*ny; k++ {
		if p := fine.pad + k; math.IsNaN(d[p]) {
			d[p] = 1
		}
	}
	h := &SMG{cells: cells, n: len(cells)}
	if whole(cells, nx*ny) {
		h.keepOperator(&fine, &scratch)
	}
	return h, h.build(fine, &scratch)
}

// NewSMGStencil returns the structured multigrid preconditioner of the
// five-point matrix whose unknowns are all the cells of an nx by ny box,
// in cell order (k = j*nx + i), given by its stencil instead of a CSR
// matrix: fill sets d[k], the diagonal of row k, w[k], the coupling of
// cell k to cell k-1, and s[k], to cell k-nx, on slices of length nx*ny
// that are zero when it is called (w[k] must stay 0 for i = 0, s[k] for
// j = 0). The matrix must be symmetric positive definite. The SMG's
// Operator multiplies by the matrix.
func NewSMGStencil(nx, ny int, fill func(d, w, s []float64)) (*SMG, error) {
	if nx < 1 || ny < 1 {
		return nil, fmt.Errorf("sparse: SMG: grid %d x %d is empty", nx, ny)
	}
	var scratch [2][]float64
	fine := newSMGLevel(nx, ny, false, &scratch[0])
	n, p0 := nx*ny, fine.pad
	d, w, s := fine.set.d[p0:p0+n], fine.set.w[p0:p0+n], fine.set.s[p0:p0+n]
	fill(d, w, s)
	for k := range n {
		if !(d[k] > 0) || math.IsInf(d[k], 0) {
			return nil, fmt.Errorf("sparse: SMG: diagonal entry %d is %g, not positive", k, d[k])
		}
		if math.IsNaN(w[k]) || math.IsInf(w[k], 0) || math.IsNaN(s[k]) || math.IsInf(s[k], 0) {
			return nil, fmt.Errorf("sparse: SMG: couplings of cell %d are %g and %g, not finite", k, w[k], s[k])
		}
		if (k%nx == 0 && w[k] != 0) || (k < nx && s[k] != 0) {
			return nil, fmt.Errorf("sparse: SMG: cell %d couples across the edge of the %d x %d grid", k, nx, ny)
		}
	}
	h := &SMG{n: n}
	h.keepOperator(&fine, &scratch)
	return h, h.build(fine, &scratch)
}

// keepOperator keeps the fine set-up stencil, which is the matrix, for
// Operator (its scratch buffer is then not reused).
func (h *SMG) keepOperator(fine *smgLevel, scratch *[2][]float64) {
	h.op = &StencilOperator{nx: fine.nx, ny: fine.ny, pad: fine.pad, d: fine.set.d, w: fine.set.w, s: fine.set.s}
	scratch[0] = nil
}

// build makes the hierarchy below the fine level.
func (h *SMG) build(fine smgLevel, scratch *[2][]float64) error {
	h.levels = append(h.levels, fine)
	for {
		k := len(h.levels) - 1
		l := &h.levels[k]
		if l.nx*l.ny <= SMGCoarsest || (l.nx == 1 && l.ny == 1) {
			if err := h.factorCoarse(); err != nil {
				return err
			}
			l.finish(false)
			return nil
		}
		l.dir = l.direction()
		l.weights()
		c := l.coarsen(&scratch[(k+1)%2])
		l.finish(true)
		h.levels = append(h.levels, c)
	}
}

// whole reports whether cells lists every one of the n box cells in order.
func whole(cells []int, n int) bool {
	if len(cells) != n {
		return false
	}
	for u, k := range cells {
		if k != u {
			return false
		}
	}
	return true
}

// finish sets the cycle's float32 arrays (the stencil when coefs) from
// the set-up stencil and lets the set-up stencil go (its scratch buffer
// serves the level after next).
func (l *smgLevel) finish(coefs bool) {
	m := len(l.set.d)
	l.x, l.b, l.r = make([]float32, m), make([]float32, m), make([]float32, m)
	if coefs {
		l.inv, l.w, l.s = make([]float32, m), make([]float32, m), make([]float32, m)
		if l.set.sw != nil {
			l.sw, l.se = make([]float32, m), make([]float32, m)
		}
		parallel.Pieces(m, smgPieces(l), smgWorkers(l), func(_, lo, hi int) {
			for p := lo; p < hi; p++ {
				if d := l.set.d[p]; d != 0 {
					l.inv[p] = float32(1 / d)
				}
				l.w[p], l.s[p] = float32(l.set.w[p]), float32(l.set.s[p])
				if l.sw != nil {
					l.sw[p], l.se[p] = float32(l.set.sw[p]), float32(l.set.se[p])
				}
			}
		})
	}
	l.set = smgSet{}
}

// smgPieces is the number of ranges finish splits a large level into.
func smgPieces(l *smgLevel) int {
	if smgWorkers(l) == 1 {
		return 1
	}
	return 16
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
	st := &l.set
	for k := 0; k < l.nx*l.ny; k++ {
		p := l.pad + k
		c := 0.0
		if st.sw != nil {
			c = math.Abs(st.sw[p]) + math.Abs(st.se[p])
		}
		mx += math.Abs(st.w[p]) + c
		my += math.Abs(st.s[p]) + c
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
	m := len(l.set.d)
	l.plo, l.phi = make([]float32, m), make([]float32, m)
	d := l.set.d
	st := l.stencil()
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
				lo = coef(&st, p, -1, -1) + coef(&st, p, -1, 0) + coef(&st, p, -1, 1)
				hi = coef(&st, p, 1, -1) + coef(&st, p, 1, 0) + coef(&st, p, 1, 1)
				c = d[p] + coef(&st, p, 0, -1) + coef(&st, p, 0, 1)
			} else {
				lo = coef(&st, p, -1, -1) + coef(&st, p, 0, -1) + coef(&st, p, 1, -1)
				hi = coef(&st, p, -1, 1) + coef(&st, p, 0, 1) + coef(&st, p, 1, 1)
				c = d[p] + coef(&st, p, -1, 0) + coef(&st, p, 1, 0)
			}
			lo, hi = max(0, -lo), max(0, -hi)
			// A collapsed row that is not diagonally dominant (possible
			// on coarse levels) interpolates with weights summing to 1.
			c = max(c, lo+hi)
			if c > 0 {
				l.plo[p], l.phi[p] = float32(lo/c), float32(hi/c)
			}
		}
	})
}

// coarsen returns the next level: every second line across the coarsening
// direction, with the Galerkin operator P^T A P.
//
// The coarse stencil goes to *scratch (see newSMGLevel).
func (l *smgLevel) coarsen(scratch *[]float64) smgLevel {
	nx, ny := l.nx, l.ny
	cnx, cny := nx, ny
	sa, sc, na := 1, nx, nx // fine strides along and across, points along
	if l.dir == 0 {
		cnx = (nx + 1) / 2
	} else {
		cny = (ny + 1) / 2
		sa, sc, na = nx, 1, ny
	}
	c := newSMGLevel(cnx, cny, true, scratch)
	st := l.stencil()
	// o[da+1][dc+1] is the stencil entry of offset da along and dc across.
	var o [3][3]int
	for da := -1; da <= 1; da++ {
		for dc := -1; dc <= 1; dc++ {
			ox, oy := da, dc
			if l.dir == 1 {
				ox, oy = dc, da
			}
			o[da+1][dc+1] = (oy+1)*3 + ox + 1
		}
	}
	// The coarse operator is stored by its lower half, so only five of
	// the nine entries of a coarse row are formed: need[dc+1][slot] marks
	// them by offset across and slot along (see at below).
	var need [3][3]bool
	if l.dir == 0 {
		need[1][1], need[1][0], need[0][0], need[0][1], need[0][2] = true, true, true, true, true
	} else {
		need[1][1], need[0][1], need[1][0], need[0][0], need[2][0] = true, true, true, true, true
	}
	// terms[m+1] lists, for the fine point at offset m along from the
	// coarse point, the stencil entries that reach a stored coarse entry,
	// in the order (dc, da): the contributions to each coarse entry come
	// in the order of (m, da), as in the plain triple loop. A neighbour
	// at an even offset t = m+da along is a coarse point (slot t/2+1,
	// factor 1); at an odd one it is interpolated from the coarse points
	// either side (slot lo with plo, lo+1 with phi).
	type term struct {
		a      []float64 // fine coefficients of the entry
		off    int       // index offset of the neighbour
		dc     int       // row of acc: dc+1
		odd    bool      // the neighbour is interpolated
		lo, hi int       // slots fed (factor 1 or plo, and phi); -1 for none
	}
	var terms [3][]term
	for m := -1; m <= 1; m++ {
		for dc := -1; dc <= 1; dc++ {
			for da := -1; da <= 1; da++ {
				a := st[o[da+1][dc+1]]
				if a == nil {
					continue
				}
				t := m + da
				tm := term{a: a, off: da*sa + dc*sc, dc: dc + 1, lo: -1, hi: -1}
				if t%2 == 0 {
					if sl := t/2 + 1; need[dc+1][sl] {
						tm.lo = sl
					}
				} else {
					tm.odd = true
					sl := (t + 1) / 2 // t = -1: slots 0, 1; t = 1: slots 1, 2
					if need[dc+1][sl] {
						tm.lo = sl
					}
					if need[dc+1][sl+1] {
						tm.hi = sl + 1
					}
				}
				if tm.lo >= 0 || tm.hi >= 0 {
					terms[m+1] = append(terms[m+1], tm)
				}
			}
		}
	}
	plo, phi := l.plo, l.phi
	parallel.Each(cny, smgWorkers(&c), 0, func(_, cj int) {
		for ci := 0; ci < cnx; ci++ {
			// acc[dc+1][dA+1]: the coarse row by offsets across and along.
			var acc [3][3]float64
			ca := ci // coarse coordinate along the direction
			fi, fj := 2*ci, cj
			if l.dir == 1 {
				ca = cj
				fi, fj = ci, 2*cj
			}
			p0 := l.pad + fj*nx + fi
			for m := -1; m <= 1; m++ {
				fa := 2*ca + m
				if fa < 0 || fa >= na {
					continue
				}
				pf := p0 + m*sa
				wf := 1.0
				switch m {
				case -1:
					wf = float64(phi[pf])
				case 1:
					wf = float64(plo[pf])
				}
				if wf == 0 {
					continue
				}
				for _, tm := range terms[m+1] {
					v := tm.a[pf]
					if v == 0 {
						continue
					}
					v *= wf
					ac := &acc[tm.dc]
					if !tm.odd {
						ac[tm.lo] += v
						continue
					}
					pg := pf + tm.off
					if tm.lo >= 0 {
						ac[tm.lo] += v * float64(plo[pg])
					}
					if w := phi[pg]; w != 0 && tm.hi >= 0 {
						ac[tm.hi] += v * float64(w)
					}
				}
			}
			// Back to (dx, dy): the lower half d, w (-1, 0), s (0, -1),
			// sw (-1, -1), se (+1, -1).
			at := func(dx, dy int) float64 {
				if l.dir == 0 {
					return acc[dy+1][dx+1]
				}
				return acc[dx+1][dy+1]
			}
			p := c.pad + cj*cnx + ci
			c.set.d[p] = at(0, 0)
			c.set.w[p] = at(-1, 0)
			c.set.s[p] = at(0, -1)
			c.set.sw[p] = at(-1, -1)
			c.set.se[p] = at(1, -1)
		}
	})
	return c
}

// stencil returns the nine coefficient arrays of the level: st[(oy+1)*3 +
// ox+1][p] is the coupling of point p to its neighbour at offset (ox, oy).
// The upper half are shifted views of the lower half; the corners are nil
// on a five-point level.
func (l *smgLevel) stencil() [9][]float64 {
	nx := l.nx
	var st [9][]float64
	t := &l.set
	st[4] = t.d
	st[3], st[5] = t.w, t.w[1:]
	st[1], st[7] = t.s, t.s[nx:]
	if t.sw != nil {
		st[0], st[8] = t.sw, t.sw[nx+1:]
		st[2], st[6] = t.se, t.se[nx-1:]
	}
	return st
}

// smgWorkers runs small levels on the caller's goroutine.
func smgWorkers(l *smgLevel) int {
	if l.nx*l.ny < 1<<15 {
		return 1
	}
	return procs()
}

// factorCoarse factors the coarsest level with gonum's dense Cholesky.
func (h *SMG) factorCoarse() error {
	l := &h.levels[len(h.levels)-1]
	n := l.nx * l.ny
	sym := mat.NewSymDense(n, nil)
	t := &l.set
	for k := 0; k < n; k++ {
		p := l.pad + k
		i, j := k%l.nx, k/l.nx
		sym.SetSym(k, k, t.d[p])
		if i > 0 {
			sym.SetSym(k, k-1, t.w[p])
		}
		if j > 0 {
			sym.SetSym(k, k-l.nx, t.s[p])
			if t.sw != nil && i > 0 {
				sym.SetSym(k, k-l.nx-1, t.sw[p])
			}
			if t.se != nil && i+1 < l.nx {
				sym.SetSym(k, k-l.nx+1, t.se[p])
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

// Operator returns the matrix the SMG was built from as a five-point
// stencil in float64 (the fine level's set-up stencil, kept), or nil when
// the unknowns are not every cell of the box in order. Its products are
// bit-identical to those of the CSR matrix and read about a third of the
// memory. Conjugate gradients can use it in place of the matrix, but
// only for that matrix: an SMG kept as the preconditioner of a changed
// matrix must not lend its operator.
func (h *SMG) Operator() *StencilOperator { return h.op }

// StencilOperator is a five-point matrix on an nx by ny box, every box
// cell an unknown, held by its diagonal and lower couplings in padded
// arrays (see smgLevel).
type StencilOperator struct {
	nx, ny, pad int
	d, w, s     []float64
}

// stencilPieces is the number of row ranges MulVec splits a large box
// into; rows are independent, so the product does not depend on it.
const stencilPieces = 32

// MulVec sets dst = A x. Each row is summed in the order of the CSR
// matrix's columns (south, west, self, east, north) from zero, and an
// entry the CSR matrix leaves out is a zero coefficient here, which adds
// nothing: the products are bit-identical for finite x. Large boxes are
// multiplied in parallel over fixed row ranges.
func (o *StencilOperator) MulVec(dst, x []float64) {
	n := o.nx * o.ny
	if len(dst) != n || len(x) != n {
		panic(fmt.Sprintf("sparse: StencilOperator.MulVec with vectors of length %d and %d for a matrix of order %d", len(dst), len(x), n))
	}
	if n < 1<<15 {
		o.mulRows(dst, x, 0, o.ny)
		return
	}
	parallel.Pieces(o.ny, stencilPieces, procs(), func(_, lo, hi int) { o.mulRows(dst, x, lo, hi) })
}

// mulRows sets rows [lo, hi) of dst = A x.
func (o *StencilOperator) mulRows(dst, x []float64, lo, hi int) {
	nx, ny := o.nx, o.ny
	for j := lo; j < hi; j++ {
		u0 := j * nx
		if j == 0 || j == ny-1 || nx < 3 {
			for i := 0; i < nx; i++ {
				dst[u0+i] = o.mulPoint(x, i, j)
			}
			continue
		}
		// An interior row: the edge points, then the rest without tests.
		dst[u0] = o.mulPoint(x, 0, j)
		dst[u0+nx-1] = o.mulPoint(x, nx-1, j)
		p0 := o.pad + u0
		d, w, s := o.d[p0:p0+nx], o.w[p0:p0+nx+1], o.s[p0:p0+2*nx]
		xs, xc, xn := x[u0-nx:u0], x[u0:u0+nx], x[u0+nx:u0+2*nx]
		out := dst[u0 : u0+nx]
		for i := 1; i < nx-1; i++ {
			v := 0.0
			v += s[i] * xs[i]
			v += w[i] * xc[i-1]
			v += d[i] * xc[i]
			v += w[i+1] * xc[i+1]
			v += s[nx+i] * xn[i]
			out[i] = v
		}
	}
}

// mulPoint returns row (i, j) of the operator times x, testing for the
// grid's edges (the rows mulRows does not take in its plain loop).
func (o *StencilOperator) mulPoint(x []float64, i, j int) float64 {
	nx, ny := o.nx, o.ny
	u := j*nx + i
	p := o.pad + u
	v := 0.0
	if j > 0 {
		v += o.s[p] * x[u-nx]
	}
	if i > 0 {
		v += o.w[p] * x[u-1]
	}
	v += o.d[p] * x[u]
	if i+1 < nx {
		v += o.w[p+1] * x[u+1]
	}
	if j+1 < ny {
		v += o.s[p+nx] * x[u+nx]
	}
	return v
}

// Apply sets dst = M^-1 r for one V-cycle M^-1 started from zero. dst and
// r may be the same slice. It panics if their lengths differ from the
// order of the matrix.
func (h *SMG) Apply(dst, r []float64) {
	if len(dst) != h.n || len(r) != h.n {
		panic(fmt.Sprintf("sparse: SMG.Apply with vectors of length %d and %d for a matrix of order %d", len(dst), len(r), h.n))
	}
	f := &h.levels[0]
	if h.op != nil { // every box cell, in order
		b, x := f.b[f.pad:f.pad+h.n], f.x[f.pad:f.pad+h.n]
		parallel.Pieces(h.n, smgPieces(f), smgWorkers(f), func(_, lo, hi int) {
			for u := lo; u < hi; u++ {
				b[u] = float32(r[u])
			}
		})
		h.cycle(0)
		parallel.Pieces(h.n, smgPieces(f), smgWorkers(f), func(_, lo, hi int) {
			for u := lo; u < hi; u++ {
				dst[u] = float64(x[u])
			}
		})
		return
	}
	for u, k := range h.cells {
		f.b[f.pad+k] = float32(r[u])
	}
	h.cycle(0)
	for u, k := range h.cells {
		dst[u] = float64(f.x[f.pad+k])
	}
}

// cycle runs the V-cycle on level k from x = 0: x = M_k^-1 b.
func (h *SMG) cycle(k int) {
	l := &h.levels[k]
	if k == len(h.levels)-1 {
		n := l.nx * l.ny
		cb, cx := h.cb.RawVector().Data, h.cx.RawVector().Data
		for k, v := range l.b[l.pad : l.pad+n] {
			cb[k] = float64(v)
		}
		// The only possible error is a condition-number warning; the
		// solution is still the best available, so it is used.
		_ = h.chol.SolveVecTo(h.cx, h.cb)
		for k, v := range cx {
			l.x[l.pad+k] = float32(v)
		}
		return
	}
	l.relaxFromZero()
	l.residual()
	c := &h.levels[k+1]
	l.restrict(c)
	h.cycle(k + 1)
	l.prolong(c)
	l.relax(false)
}

// relax runs one Gauss-Seidel sweep in zebra order: the even rows, then
// the odd ones, each row from west to east (forward); backward is its
// adjoint, the odd rows and then the even ones, each from east to west.
// A nine-point stencil couples a row only to the rows next to it, so the
// rows of one parity are independent and relaxed in parallel.
func (l *smgLevel) relax(forward bool) {
	for q := 0; q < 2; q++ {
		parity := q
		if !forward {
			parity = 1 - q
		}
		rows := (l.ny - parity + 1) / 2
		// Two rows of a parity at a time: their chains of dependent
		// operations (each point waits for its west or east neighbour)
		// interleave. Every row is relaxed as alone.
		parallel.Each((rows+1)/2, smgWorkers(l), 0, func(_, r int) {
			j := parity + 4*r
			if j+2 < l.ny {
				l.relaxRows(j, j+2, forward)
			} else {
				l.relaxRow(j, forward)
			}
		})
	}
}

// relaxRows is relaxRow on rows j and k together (rows of one parity, so
// independent), one point of each in turn.
func (l *smgLevel) relaxRows(j, k int, forward bool) {
	nx := l.nx
	p0, q0 := l.pad+j*nx, l.pad+k*nx
	x := l.x[p0-nx-1 : p0+2*nx+1]
	xs, xc, xn := x[:nx+2], x[nx:2*nx+2], x[2*nx:]
	y := l.x[q0-nx-1 : q0+2*nx+1]
	ys, yc, yn := y[:nx+2], y[nx:2*nx+2], y[2*nx:]
	b, inv := l.b[p0:p0+nx], l.inv[p0:p0+nx]
	bk, invk := l.b[q0:q0+nx], l.inv[q0:q0+nx]
	w, wk := l.w[p0:p0+nx+1], l.w[q0:q0+nx+1]
	s, sn := l.s[p0:p0+nx], l.s[p0+nx:p0+2*nx]
	sk, snk := l.s[q0:q0+nx], l.s[q0+nx:q0+2*nx]
	if l.sw == nil {
		if forward {
			for i := range b {
				t := b[i] - s[i]*xs[i+1] - sn[i]*xn[i+1] - w[i+1]*xc[i+2]
				u := bk[i] - sk[i]*ys[i+1] - snk[i]*yn[i+1] - wk[i+1]*yc[i+2]
				xc[i+1] = (t - w[i]*xc[i]) * inv[i]
				yc[i+1] = (u - wk[i]*yc[i]) * invk[i]
			}
			return
		}
		for i := nx - 1; i >= 0; i-- {
			t := b[i] - s[i]*xs[i+1] - sn[i]*xn[i+1] - w[i]*xc[i]
			u := bk[i] - sk[i]*ys[i+1] - snk[i]*yn[i+1] - wk[i]*yc[i]
			xc[i+1] = (t - w[i+1]*xc[i+2]) * inv[i]
			yc[i+1] = (u - wk[i+1]*yc[i+2]) * invk[i]
		}
		return
	}
	sw, ne := l.sw[p0:p0+nx], l.sw[p0+nx+1:p0+2*nx+1]
	se, nw := l.se[p0:p0+nx], l.se[p0+nx-1:p0+2*nx-1]
	swk, nek := l.sw[q0:q0+nx], l.sw[q0+nx+1:q0+2*nx+1]
	sek, nwk := l.se[q0:q0+nx], l.se[q0+nx-1:q0+2*nx-1]
	if forward {
		for i := range b {
			t := b[i] - s[i]*xs[i+1] - sn[i]*xn[i+1] - sw[i]*xs[i] - se[i]*xs[i+2] -
				ne[i]*xn[i+2] - nw[i]*xn[i] - w[i+1]*xc[i+2]
			u := bk[i] - sk[i]*ys[i+1] - snk[i]*yn[i+1] - swk[i]*ys[i] - sek[i]*ys[i+2] -
				nek[i]*yn[i+2] - nwk[i]*yn[i] - wk[i+1]*yc[i+2]
			xc[i+1] = (t - w[i]*xc[i]) * inv[i]
			yc[i+1] = (u - wk[i]*yc[i]) * invk[i]
		}
		return
	}
	for i := nx - 1; i >= 0; i-- {
		t := b[i] - s[i]*xs[i+1] - sn[i]*xn[i+1] - sw[i]*xs[i] - se[i]*xs[i+2] -
			ne[i]*xn[i+2] - nw[i]*xn[i] - w[i]*xc[i]
		u := bk[i] - sk[i]*ys[i+1] - snk[i]*yn[i+1] - swk[i]*ys[i] - sek[i]*ys[i+2] -
			nek[i]*yn[i+2] - nwk[i]*yn[i] - wk[i]*yc[i]
		xc[i+1] = (t - w[i+1]*xc[i+2]) * inv[i]
		yc[i+1] = (u - wk[i+1]*yc[i+2]) * invk[i]
	}
}

// relaxFromZero is the forward sweep of relax from x = 0, without
// clearing x first: an even row sees only its own relaxed points (its
// neighbour rows and the points east of it are still 0), an odd row the
// relaxed even rows and its own relaxed points. It gives the same x as
// clearing x and calling relax(true), with fewer loads and no clearing
// pass; every point of the box is written (the padding stays 0).
func (l *smgLevel) relaxFromZero() {
	// Two rows at a time, as in relax.
	even := (l.ny + 1) / 2
	parallel.Each((even+1)/2, smgWorkers(l), 0, func(_, r int) {
		j := 4 * r
		if j+2 >= l.ny {
			l.relaxEvenFromZero(j, j)
			return
		}
		l.relaxEvenFromZero(j, j+2)
	})
	parallel.Each(l.ny/2, smgWorkers(l), 0, func(_, r int) {
		l.relaxOddFromZero(1 + 2*r)
	})
}

// relaxEvenFromZero relaxes even rows j and k (j = k for one row) from
// x = 0: each point sees only its west neighbour, relaxed before it.
func (l *smgLevel) relaxEvenFromZero(j, k int) {
	nx := l.nx
	p0, q0 := l.pad+j*nx, l.pad+k*nx
	x, y := l.x[p0:p0+nx], l.x[q0:q0+nx]
	b, inv, w := l.b[p0:p0+nx], l.inv[p0:p0+nx], l.w[p0:p0+nx]
	bk, invk, wk := l.b[q0:q0+nx], l.inv[q0:q0+nx], l.w[q0:q0+nx]
	// The x of the points west of i; 0 west of the box.
	prev, prevk := float32(0), float32(0)
	for i := range b {
		prev = (b[i] - w[i]*prev) * inv[i]
		prevk = (bk[i] - wk[i]*prevk) * invk[i]
		x[i] = prev
		y[i] = prevk
	}
}

// relaxOddFromZero is relaxRow forward on odd row j whose own points are
// still 0 (their old values are not read).
func (l *smgLevel) relaxOddFromZero(j int) {
	nx := l.nx
	p0 := l.pad + j*nx
	x := l.x[p0-nx-1 : p0+2*nx+1]
	xs, xc, xn := x[:nx+2], x[nx+1:2*nx+1], x[2*nx:]
	b, inv := l.b[p0:p0+nx], l.inv[p0:p0+nx]
	w := l.w[p0 : p0+nx]
	s, sn := l.s[p0:p0+nx], l.s[p0+nx:p0+2*nx]
	prev := float32(0)
	if l.sw == nil {
		for i := range b {
			t := b[i] - s[i]*xs[i+1] - sn[i]*xn[i+1]
			prev = (t - w[i]*prev) * inv[i]
			xc[i] = prev
		}
		return
	}
	sw, ne := l.sw[p0:p0+nx], l.sw[p0+nx+1:p0+2*nx+1]
	se, nw := l.se[p0:p0+nx], l.se[p0+nx-1:p0+2*nx-1]
	for i := range b {
		t := b[i] - s[i]*xs[i+1] - sn[i]*xn[i+1] - sw[i]*xs[i] - se[i]*xs[i+2] -
			ne[i]*xn[i+2] - nw[i]*xn[i]
		prev = (t - w[i]*prev) * inv[i]
		xc[i] = prev
	}
}

// relaxRow runs Gauss-Seidel along row j. The couplings to the rows
// either side and to the point not yet relaxed are summed first, so that
// the chain from one point to the next is one multiply and subtract.
func (l *smgLevel) relaxRow(j int, forward bool) {
	nx := l.nx
	p0 := l.pad + j*nx
	x := l.x[p0-nx-1 : p0+2*nx+1]                  // point i of the row at nx+1+i
	xs, xc, xn := x[:nx+2], x[nx:2*nx+2], x[2*nx:] // rows j-1, j, j+1 from i = -1
	b, inv := l.b[p0:p0+nx], l.inv[p0:p0+nx]
	w := l.w[p0 : p0+nx+1] // w[i+1] couples i to i+1
	s, sn := l.s[p0:p0+nx], l.s[p0+nx:p0+2*nx]
	if l.sw == nil {
		if forward {
			for i := range b {
				t := b[i] - s[i]*xs[i+1] - sn[i]*xn[i+1] - w[i+1]*xc[i+2]
				xc[i+1] = (t - w[i]*xc[i]) * inv[i]
			}
			return
		}
		for i := nx - 1; i >= 0; i-- {
			t := b[i] - s[i]*xs[i+1] - sn[i]*xn[i+1] - w[i]*xc[i]
			xc[i+1] = (t - w[i+1]*xc[i+2]) * inv[i]
		}
		return
	}
	sw, ne := l.sw[p0:p0+nx], l.sw[p0+nx+1:p0+2*nx+1]
	se, nw := l.se[p0:p0+nx], l.se[p0+nx-1:p0+2*nx-1]
	if forward {
		for i := range b {
			t := b[i] - s[i]*xs[i+1] - sn[i]*xn[i+1] - sw[i]*xs[i] - se[i]*xs[i+2] -
				ne[i]*xn[i+2] - nw[i]*xn[i] - w[i+1]*xc[i+2]
			xc[i+1] = (t - w[i]*xc[i]) * inv[i]
		}
		return
	}
	for i := nx - 1; i >= 0; i-- {
		t := b[i] - s[i]*xs[i+1] - sn[i]*xn[i+1] - sw[i]*xs[i] - se[i]*xs[i+2] -
			ne[i]*xn[i+2] - nw[i]*xn[i] - w[i]*xc[i]
		xc[i+1] = (t - w[i+1]*xc[i+2]) * inv[i]
	}
}

// residual sets r = b - A x, by rows through row slices (as relaxRow).
func (l *smgLevel) residual() {
	parallel.Each(l.ny, smgWorkers(l), 0, func(_, j int) {
		nx := l.nx
		p0 := l.pad + j*nx
		x := l.x[p0-nx-1 : p0+2*nx+1]
		xs, xc, xn := x[:nx+2], x[nx:2*nx+2], x[2*nx:] // rows j-1, j, j+1 from i = -1
		b, inv, r := l.b[p0:p0+nx], l.inv[p0:p0+nx], l.r[p0:p0+nx]
		w := l.w[p0 : p0+nx+1]
		s, sn := l.s[p0:p0+nx], l.s[p0+nx:p0+2*nx]
		if l.sw == nil {
			for i := range b {
				r[i] = b[i] - xc[i+1]/inv[i] - w[i]*xc[i] - w[i+1]*xc[i+2] - s[i]*xs[i+1] - sn[i]*xn[i+1]
			}
			return
		}
		sw, ne := l.sw[p0:p0+nx], l.sw[p0+nx+1:p0+2*nx+1]
		se, nw := l.se[p0:p0+nx], l.se[p0+nx-1:p0+2*nx-1]
		for i := range b {
			r[i] = b[i] - xc[i+1]/inv[i] - w[i]*xc[i] - w[i+1]*xc[i+2] - s[i]*xs[i+1] - sn[i]*xn[i+1] -
				sw[i]*xs[i] - ne[i]*xn[i+2] - se[i]*xs[i+2] - nw[i]*xn[i]
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

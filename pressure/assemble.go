package pressure

import (
	"fmt"
	"math"
	"strings"

	"floodtrace/pressure/sparse"
	"floodtrace/reservoir"
)

// System is the assembled linear system of one pressure solve, A p = B,
// over the unknown cells. A is the symmetric positive definite two-point
// flux matrix plus the connection factors of BHP-controlled wells on the
// diagonal; B holds the rates of rate-controlled wells and
// connection factor times BHP of BHP-controlled wells. It is exported so
// that preconditioners and benchmarks can work on real pressure matrices.
type System struct {
	A *sparse.CSR
	B []float64
	// Unknown[u] is the cell of unknown u, in increasing cell order.
	Unknown []int
	// Index[k] is the unknown of cell k, or -1 if cell k is not an unknown
	// (inactive, unconnected to any open well, or a gauge cell).
	Index []int
	// Gauge lists the cells held at pressure 0 to fix the free constant of
	// regions whose wells are all rate-controlled; their equations are
	// dropped (they follow from the others when the rates balance), which
	// keeps A symmetric positive definite.
	Gauge []int
	// TX and TY are the face transmissibilities times the harmonic face
	// mobility (rate per unit pressure), numbered like
	// reservoir.Model.TransMultX and TransMultY.
	TX, TY []float64

	// Solve's default solve of a system on every cell of a large grid
	// leaves A out (nil) and gives the structured multigrid the stencil
	// instead; build makes A should another preconditioner need it.
	stencil func(d, w, s []float64)
	build   func() *sparse.CSR
}

// matrix returns A, building it first if the assembly left it out.
func (s *System) matrix() *sparse.CSR {
	if s.A == nil && s.build != nil {
		s.A, s.build = s.build(), nil
	}
	return s.A
}

// Assemble validates the input and builds the pressure system with every
// well on its given control (no BHP limits applied). Solve uses the same
// assembly.
func Assemble(in Input) (*System, error) {
	pb, err := newProblem(in)
	if err != nil {
		return nil, err
	}
	sys, _, err := pb.assemble(pb.initialControls())
	return sys, err
}

// control is the control in force for one well during a solve.
type control struct {
	open     bool    // not shut
	bhp      bool    // under BHP control
	target   float64 // BHP under BHP control, else the source rate (positive injection)
	switched bool    // a rate-controlled well moved to BHP control at its limit
	backflow bool    // shut for this solve: open, it would flow against its type
	// capped: a BHP-controlled producer held at its MaxRate (liquid
	// limit) on rate control.
	capped bool
}

// problem is the validated, control-independent part of a solve.
type problem struct {
	m      *reservoir.Model
	g      reservoir.Grid
	wells  []reservoir.Well
	cf     []float64 // connection factor lambda*WI per well (0 when shut)
	tx, ty []float64
	gx, gy []float64 // gravity flux per face at equal pressures; nil without depth
	comp   []int     // connected region per cell, -1 for inactive cells
	ncomp  int
	seed   []int     // lowest-numbered cell of each region
	driven []bool    // the region holds an open well
	mob    []float64 // total mobility per cell (Sequence compares it)
	// lazy lets assemble leave out the CSR matrix of a system on every
	// cell of the grid (Solve with the default preconditioner).
	lazy bool
}

func newProblem(in Input) (*problem, error) {
	if err := checkModel(in.Model); err != nil {
		return nil, err
	}
	m := in.Model
	mob, err := mobility(in)
	if err != nil {
		return nil, err
	}
	pb := &problem{m: m, g: m.Grid, wells: in.Wells, mob: mob}
	if pb.wells == nil {
		pb.wells = m.Wells
	}
	pb.tx, pb.ty = transmissibilities(m, mob)
	if err := pb.gravity(in); err != nil {
		return nil, err
	}
	if err := pb.checkWells(mob); err != nil {
		return nil, err
	}
	pb.regions()
	return pb, nil
}

// checkWells validates the wells and computes their connection factors.
func (pb *problem) checkWells(mob []float64) error {
	g, m := pb.g, pb.m
	pb.cf = make([]float64, len(pb.wells))
	finite := func(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
	for w := range pb.wells {
		wl := &pb.wells[w]
		bad := func(format string, a ...any) error {
			return &reservoir.WellError{Path: m.Path, Line: wl.Line, Well: wl.Name, Msg: fmt.Sprintf(format, a...)}
		}
		if wl.Cell < 0 || wl.Cell >= g.N() || wl.I < 0 || wl.I >= g.NX || wl.J < 0 || wl.J >= g.NY {
			return bad("cell %d (i=%d, j=%d) is outside the %d x %d grid", wl.Cell, wl.I, wl.J, g.NX, g.NY)
		}
		if g.Index(wl.I, wl.J) != wl.Cell {
			return bad("cell number %d does not match column %d, row %d", wl.Cell, wl.I, wl.J)
		}
		if wl.Type != reservoir.Injector && wl.Type != reservoir.Producer {
			return bad("unknown well type %q", wl.Type)
		}
		if wl.Shut {
			continue
		}
		switch wl.Control {
		case reservoir.RateControl:
			if !(wl.Rate >= 0) || !finite(wl.Rate) {
				return bad("rate %g must be finite and not negative (the type gives the direction)", wl.Rate)
			}
		case reservoir.BHPControl:
			if !finite(wl.BHP) {
				return bad("bottom-hole pressure %g is not a number", wl.BHP)
			}
		default:
			return bad("unknown control %q", wl.Control)
		}
		if !(wl.MaxBHP >= 0) || !finite(wl.MaxBHP) || !(wl.MinBHP >= 0) || !finite(wl.MinBHP) {
			return bad("BHP limits (max %g, min %g) must be finite and not negative", wl.MaxBHP, wl.MinBHP)
		}
		k := wl.Cell
		if !m.Active[k] {
			return bad("lies in inactive %s", cellName(g, k))
		}
		rw := wl.Radius
		if rw == 0 {
			rw = m.Units.DefaultWellRadius()
		}
		wi, err := WellIndex(m.Units.Darcy(), m.PermEast[k], m.PermNorth[k], m.Thickness[k], g.DX, g.DY, rw, wl.Skin)
		if err != nil {
			return bad("%s: %v", cellName(g, k), err)
		}
		pb.cf[w] = wi * mob[k]
		if !(pb.cf[w] > 0) {
			return bad("zero total mobility in %s: the well cannot flow", cellName(g, k))
		}
	}
	return nil
}

// regions labels the connected regions of active cells through faces of
// positive transmissibility (breadth-first search, whose queue holds about
// one front of cells, a few times the grid's side, where a depth-first
// stack can hold most of the grid) and marks the regions that hold an
// open well. Regions are numbered in the order of their lowest cell.
func (pb *problem) regions() {
	g := pb.g
	n := g.N()
	pb.comp = make([]int, n)
	for k := range pb.comp {
		pb.comp[k] = -1
	}
	queue := make([]int, 0, 1024)
	var nt [4]float64
	var nl [4]int
	for s := 0; s < n; s++ {
		if !pb.m.Active[s] || pb.comp[s] >= 0 {
			continue
		}
		c := pb.ncomp
		pb.ncomp++
		pb.seed = append(pb.seed, s)
		pb.comp[s] = c
		queue = append(queue[:0], s)
		for head := 0; head < len(queue); {
			k := queue[head]
			head++
			if head >= 1024 && 2*head >= len(queue) {
				// Drop the cells already taken.
				queue = queue[:copy(queue, queue[head:])]
				head = 0
			}
			nc := pb.neighbours(k, &nt, &nl)
			for q := 0; q < nc; q++ {
				if l := nl[q]; pb.comp[l] < 0 {
					pb.comp[l] = c
					queue = append(queue, l)
				}
			}
		}
	}
	pb.driven = make([]bool, pb.ncomp)
	for w := range pb.wells {
		if !pb.wells[w].Shut {
			pb.driven[pb.comp[pb.wells[w].Cell]] = true
		}
	}
}

func (pb *problem) initialControls() []control {
	ctl := make([]control, len(pb.wells))
	for w, wl := range pb.wells {
		c := control{open: !wl.Shut}
		if wl.Control == reservoir.BHPControl {
			c.bhp, c.target = true, wl.BHP
		} else {
			c.target = wl.Rate
			if wl.Type == reservoir.Producer {
				c.target = -wl.Rate
			}
		}
		ctl[w] = c
	}
	return ctl
}

// assemble builds the system for the given controls. It also returns, per
// region, whether the region is gauged (all its open wells rate-controlled).
func (pb *problem) assemble(ctl []control) (*System, []bool, error) {
	g := pb.g
	n := g.N()
	// A region is driven while it holds an open well; backflow can shut
	// wells, so this follows the controls.
	for c := range pb.driven {
		pb.driven[c] = false
	}
	for w := range pb.wells {
		if ctl[w].open {
			pb.driven[pb.comp[pb.wells[w].Cell]] = true
		}
	}
	gauged := make([]bool, pb.ncomp)
	for c := range gauged {
		gauged[c] = pb.driven[c]
	}
	for w := range pb.wells {
		if ctl[w].open && ctl[w].bhp {
			gauged[pb.comp[pb.wells[w].Cell]] = false
		}
	}
	sys := &System{Index: make([]int, n), TX: pb.tx, TY: pb.ty}
	// Rates of gauged regions must balance.
	for c, gd := range gauged {
		if !gd {
			continue
		}
		var net, tot float64
		var names []string
		for w := range pb.wells {
			if ctl[w].open && pb.comp[pb.wells[w].Cell] == c {
				net += ctl[w].target
				tot += math.Abs(ctl[w].target)
				names = append(names, pb.wells[w].Name)
			}
		}
		if math.Abs(net) > 1e-9*tot {
			return nil, nil, fmt.Errorf("pressure: wells %s are all rate-controlled in one connected region and their rates do not balance (net injection %.6g): an incompressible region needs balanced rates or a BHP-controlled well",
				strings.Join(names, ", "), net)
		}
		sys.Gauge = append(sys.Gauge, pb.seed[c])
	}
	// Number the unknowns in cell order, so each row's columns come out
	// sorted as south, west, self, east, north.
	nu := 0
	for k := 0; k < n; k++ {
		c := pb.comp[k]
		sys.Index[k] = -1
		if c < 0 || !pb.driven[c] || (gauged[c] && pb.seed[c] == k) {
			continue
		}
		sys.Index[k] = nu
		nu++
	}
	sys.Unknown = make([]int, nu)
	for k, u := range sys.Index {
		if u >= 0 {
			sys.Unknown[u] = k
		}
	}
	sys.B = make([]float64, nu)
	if pb.gx != nil {
		for u, k := range sys.Unknown {
			sys.B[u] -= pb.gravitySource(k)
		}
	}
	// The connection factors of BHP-controlled wells on the diagonal, in
	// well order.
	type diagTerm struct {
		u  int
		cf float64
	}
	var wellDiag []diagTerm
	for w := range pb.wells {
		c := ctl[w]
		u := sys.Index[pb.wells[w].Cell]
		if !c.open || u < 0 {
			continue // shut, or rate well in a gauge cell (equation dropped)
		}
		if c.bhp {
			wellDiag = append(wellDiag, diagTerm{u, pb.cf[w]})
			sys.B[u] += pb.cf[w] * c.target
		} else {
			sys.B[u] += c.target
		}
	}
	sys.build = func() *sparse.CSR {
		a, diagPos := pb.matrix(sys)
		for _, t := range wellDiag {
			a.Val[diagPos[t.u]] += t.cf
		}
		return a
	}
	if pb.lazy && nu == n && nu >= AMGThreshold {
		// Every cell is an unknown: the structured multigrid takes the
		// stencil, the same numbers as the matrix's rows.
		sys.stencil = func(d, w, s []float64) {
			pb.stencil(d, w, s)
			for _, t := range wellDiag {
				d[t.u] += t.cf
			}
		}
		return sys, gauged, nil
	}
	sys.matrix()
	return sys, gauged, nil
}

// neighbours stores in t and l the transmissibilities and cells of the
// neighbours of cell k joined by a face of positive transmissibility, in
// increasing cell order (south, west, east, north), and returns how many.
func (pb *problem) neighbours(k int, t *[4]float64, l *[4]int) int {
	g := pb.g
	i, j := k%g.NX, k/g.NX
	c := 0
	if j > 0 {
		if v := pb.ty[k]; v > 0 { // YFace(i, j) = k
			t[c], l[c] = v, k-g.NX
			c++
		}
	}
	if i > 0 {
		if v := pb.tx[k+j]; v > 0 { // XFace(i, j) = k + j
			t[c], l[c] = v, k-1
			c++
		}
	}
	if i+1 < g.NX {
		if v := pb.tx[k+j+1]; v > 0 {
			t[c], l[c] = v, k+1
			c++
		}
	}
	if j+1 < g.NY {
		if v := pb.ty[k+g.NX]; v > 0 {
			t[c], l[c] = v, k+g.NX
			c++
		}
	}
	return c
}

package pressure

import (
	"fmt"
	"math"
	"strings"

	"floodtrace/pressure/sparse"
	"floodtrace/reservoir"
)

// Solve solves the incompressible, areal pressure equation
// div(lambda_t K grad p) = q of one time step with a two-point flux
// approximation (half-cell transmissibilities combined harmonically, the
// total mobility inside each half) and Peaceman (1983) well indices, and
// returns pressures, face fluxes, well rates and bottom-hole pressures.
//
// Well controls. A rate-controlled well injects or produces its rate and
// its BHP follows as p_cell + q/(lambda*WI). A BHP-controlled well flows
// lambda*WI*(pbh - p_cell). A rate-controlled injector whose BHP would
// exceed MaxBHP (a producer whose BHP would fall below MinBHP) is put on
// BHP control at the limit and the system solved again; a switched well
// whose rate at the limit would exceed its target goes back to rate
// control. A BHP-controlled producer whose production would exceed its
// MaxRate (a liquid limit) is held at MaxRate on rate control, and goes
// back to BHP control when that gives less (applyRateCaps). The rounds
// repeat until no control changes. A rate-controlled producer without MinBHP has a default floor at atmospheric pressure
// (reservoir.UnitSystem.Atmospheric: 14.7 psi or 1.01325 bar, common
// practice), applied here at solve time; the model keeps MinBHP 0.
//
// Backflow. A well never flows against its type. When the controls have
// settled, a BHP-controlled well (given or switched at its limit) that
// would flow backwards, an injector with Q < 0 or a producer with Q > 0,
// is shut for this solve (WellResult.Backflow, with a warning naming the
// pressure it would have to overcome) and the system solved again: the
// backward injectors of a round first, the backward producers only in a
// round without any, since a backward injector is a sink that draws the
// producers' cells down and a backward producer a source that lifts the
// injectors' cells. A well shut so whose cell pressure later allows it to
// flow forward is reopened once; shut a second time it stays shut, so
// the rounds end after at most three per well. The last open well of a
// region is never shut (its rate is zero to round-off). Backward rates
// within round-off of zero are reported as 0.
//
// Regions. Active cells are grouped into regions connected through faces
// of positive transmissibility. A region without an open well carries no
// flow: its cells get pressure NaN and are listed in Solution.Unconnected.
// A region whose open wells are all rate-controlled must have balanced
// rates (else Solve returns an error naming the wells); its pressure is
// fixed only up to a constant, so its lowest-numbered cell is held at
// pressure 0 (its equation is dropped, which keeps the matrix symmetric
// positive definite), the pressures are reported as relative in a
// warning, and BHP limits (including the default floor) are not checked
// there: a limit in absolute pressure means nothing for relative
// pressures. Such wells have WellResult.Relative set; their BHPs may be
// negative.
//
// Gravity. In a case with depth (reservoir.Model.HasGravity) the flux
// across each face is T lambda_t ((p_a - p_b) - rho_f gamma (D_a - D_b)),
// the two-point flux of the potential p - rho gamma D, with rho_f the mean
// of the two cells' mobility-weighted densities (Input.Density) and gamma
// 1/144 psi per ft per lb/ft3 or 9.80665e-5 bar per m per kg/m3 (from
// memory); the gravity part moves to the right-hand side, so the matrix
// is unchanged. Cell pressures and well BHPs are at the cell's depth (a
// well's BHP is referred to the depth of its cell, with no wellbore
// head). A uniform depth changes nothing.
//
// The linear system is solved by preconditioned conjugate gradients
// (sparse.CG) with the preconditioner of Settings (by default
// GridPreconditioner: incomplete Cholesky on small systems, the
// structured multigrid on large ones, and smoothed aggregation algebraic
// multigrid on large ones the structured multigrid cannot take or does
// not solve in SMGMaxIterations).
func Solve(in Input, s Settings) (*Solution, error) {
	return solve(in, s, nil)
}

// solve is Solve; with seq, the first round starts from seq's last
// pressures and the linear solves go through seq (preconditioner reuse).
func solve(in Input, s Settings, seq *Sequence) (*Solution, error) {
	pb, err := newProblem(in)
	if err != nil {
		return nil, err
	}
	// The default solve needs no CSR matrix when the structured
	// multigrid takes the system (GridPreconditioner); a Sequence keeps
	// its preconditioner for later matrices and multiplies by them.
	pb.lazy = seq == nil && s.Preconditioner == nil
	tol := s.Tol
	if tol <= 0 {
		tol = 1e-10
	}
	g := pb.g
	n := g.N()
	ctl := pb.initialControls()
	p := make([]float64, n)
	q := make([]float64, len(pb.wells))   // well rates
	bhp := make([]float64, len(pb.wells)) // well BHPs
	sol := &Solution{Grid: g, P: p}
	var sys *System
	var gauged []bool
	maxRounds := 2*len(pb.wells) + 4
	limitRounds, flowRounds := 0, 0
	reopened := make([]bool, len(pb.wells))
	for round := 0; ; round++ {
		sys, gauged, err = pb.assemble(ctl)
		if err != nil {
			return nil, err
		}
		x := make([]float64, len(sys.Unknown))
		if round > 0 { // warm start from the previous round
			for u, k := range sys.Unknown {
				if v := p[k]; !math.IsNaN(v) {
					x[u] = v
				}
			}
		} else {
			pb.startLevel(ctl, sys, x)
			seq.start(pb, sys, x)
		}
		if len(x) > 0 {
			var res sparse.CGResult
			if seq != nil {
				res, err = seq.linearSolve(pb, sys, x, tol)
			} else {
				res, _, err = pb.linearSolve(sys, x, s.Preconditioner, tol)
			}
			sol.Iterations += res.Iterations
			sol.RelResidual = res.RelativeResidual
			if err != nil {
				return nil, err
			}
		}
		for k := range p {
			p[k] = math.NaN()
		}
		for _, k := range sys.Gauge {
			p[k] = 0
		}
		for u, k := range sys.Unknown {
			p[k] = x[u]
		}
		pb.wellState(ctl, p, q, bhp)
		if pb.applyLimits(ctl, gauged, q, bhp) {
			if limitRounds == maxRounds {
				return nil, fmt.Errorf("pressure: well controls did not settle after %d rounds of BHP-limit switching", limitRounds+1)
			}
			limitRounds++
			continue
		}
		// Each backflow round shuts or reopens at least one well, a well
		// is shut at most twice and reopened at most once.
		if flowRounds < 3*len(pb.wells) && pb.backflow(ctl, p, q, bhp, reopened) {
			flowRounds++
			limitRounds = 0
			continue
		}
		break
	}
	pb.clampBackflow(ctl, p, q)
	sol.Gauge = sys.Gauge
	pb.fluxes(sol, sys, q)
	pb.results(sol, ctl, gauged, q, bhp)
	return sol, nil
}

// startLevel sets the first guess of each region to the mean BHP of its
// BHP-controlled wells (0 in gauged regions), which removes the pressure
// level from the initial residual.
func (pb *problem) startLevel(ctl []control, sys *System, x []float64) {
	sum := make([]float64, pb.ncomp)
	cnt := make([]float64, pb.ncomp)
	for w := range pb.wells {
		if ctl[w].open && ctl[w].bhp {
			c := pb.comp[pb.wells[w].Cell]
			sum[c] += ctl[w].target
			cnt[c]++
		}
	}
	for u, k := range sys.Unknown {
		if c := pb.comp[k]; cnt[c] > 0 {
			x[u] = sum[c] / cnt[c]
		}
	}
}

// wellState sets the rate and BHP of every well from the cell pressures.
func (pb *problem) wellState(ctl []control, p, q, bhp []float64) {
	for w := range pb.wells {
		c := ctl[w]
		pc := p[pb.wells[w].Cell]
		switch {
		case !c.open:
			q[w], bhp[w] = 0, pc
		case c.bhp:
			q[w], bhp[w] = pb.cf[w]*(c.target-pc), c.target
		default:
			q[w], bhp[w] = c.target, pc+c.target/pb.cf[w]
		}
	}
}

// applyLimits switches rate-controlled wells that crossed their BHP limit
// to BHP control, and switched wells whose rate at the limit exceeds their
// target back to rate control. It reports whether any control changed.
func (pb *problem) applyLimits(ctl []control, gauged []bool, q, bhp []float64) bool {
	changed := false
	for w := range pb.wells {
		wl, c := &pb.wells[w], &ctl[w]
		if !c.open || wl.Control != reservoir.RateControl || gauged[pb.comp[wl.Cell]] && !c.switched {
			continue
		}
		inj := wl.Type == reservoir.Injector
		limit := pb.minBHP(w)
		if inj {
			limit = wl.MaxBHP
		}
		if !(limit > 0) {
			continue
		}
		if c.switched {
			// Back to rate control if the limit now gives more than the target.
			if (inj && q[w] > wl.Rate*(1+1e-9)) || (!inj && -q[w] > wl.Rate*(1+1e-9)) {
				*c = control{open: true, target: wl.Rate}
				if !inj {
					c.target = -wl.Rate
				}
				changed = true
			}
			continue
		}
		if (inj && bhp[w] > limit) || (!inj && bhp[w] < limit) {
			*c = control{open: true, bhp: true, target: limit, switched: true}
			changed = true
		}
	}
	return pb.applyRateCaps(ctl, q, bhp) || changed
}

// applyRateCaps holds a BHP-controlled producer whose production exceeds
// its MaxRate (a liquid limit) at that rate on rate control, and sends a
// held producer back to BHP control when at the capped rate its BHP is
// below its bhp target (BHP control would then produce less than the
// cap). The last BHP-controlled open well of a region is not held: the
// region keeps a pressure level and its production stays the injection
// (a warning in results). It reports whether any control changed.
func (pb *problem) applyRateCaps(ctl []control, q, bhp []float64) bool {
	changed := false
	for w := range pb.wells {
		wl, c := &pb.wells[w], &ctl[w]
		if !c.open || wl.Type != reservoir.Producer || wl.Control != reservoir.BHPControl || !(wl.MaxRate > 0) {
			continue
		}
		if c.capped {
			if bhp[w] < wl.BHP {
				*c = control{open: true, bhp: true, target: wl.BHP}
				changed = true
			}
			continue
		}
		if c.bhp && -q[w] > wl.MaxRate*(1+1e-9) && pb.otherBHPWell(ctl, w) {
			*c = control{open: true, target: -wl.MaxRate, capped: true}
			changed = true
		}
	}
	return changed
}

// otherBHPWell reports whether the region of well w holds another open
// BHP-controlled well.
func (pb *problem) otherBHPWell(ctl []control, w int) bool {
	c := pb.comp[pb.wells[w].Cell]
	for v := range pb.wells {
		if v != w && ctl[v].open && ctl[v].bhp && pb.comp[pb.wells[v].Cell] == c {
			return true
		}
	}
	return false
}

// minBHP is the lower BHP limit of well w: its MinBHP, or for a producer
// without one the default floor at atmospheric pressure.
func (pb *problem) minBHP(w int) float64 {
	if wl := &pb.wells[w]; wl.MinBHP > 0 || wl.Type != reservoir.Producer {
		return wl.MinBHP
	}
	return pb.m.Units.Atmospheric()
}

// flowTol is the rate below which a BHP-controlled well's flow is zero to
// round-off: 1e-7 of the connection factor times the pressure level (the
// linear solve's relative residual is 1e-10; the pressure error a few
// orders larger on ill-conditioned systems).
func (pb *problem) flowTol(w int, pc, pbh float64) float64 {
	return 1e-7 * pb.cf[w] * math.Max(math.Abs(pc), math.Abs(pbh))
}

// backward reports whether open, BHP-controlled well w flows against its
// type by more than round-off.
func (pb *problem) backward(ctl []control, w int, p, q []float64) bool {
	c := ctl[w]
	if !c.open || !c.bhp {
		return false
	}
	tol := pb.flowTol(w, p[pb.wells[w].Cell], c.target)
	if pb.wells[w].Type == reservoir.Injector {
		return q[w] < -tol
	}
	return q[w] > tol
}

// backflow shuts, for this solve, the wells that flow against their type:
// the backward injectors if there are any, else the backward producers,
// never the last open well of a region. In a round with none, it reopens
// once each well shut so whose cell pressure now lets it flow forward. It
// reports whether any control changed.
func (pb *problem) backflow(ctl []control, p, q, bhp []float64, reopened []bool) bool {
	var inj, prod []int
	for w := range pb.wells {
		if !pb.backward(ctl, w, p, q) {
			continue
		}
		if pb.wells[w].Type == reservoir.Injector {
			inj = append(inj, w)
		} else {
			prod = append(prod, w)
		}
	}
	set := inj
	if len(set) == 0 {
		set = prod
	}
	if len(set) > 0 {
		// Keep one well open in a region that would lose all its open
		// wells: the one flowing backwards least.
		open := make([]int, pb.ncomp)
		for w := range pb.wells {
			if ctl[w].open {
				open[pb.comp[pb.wells[w].Cell]]++
			}
		}
		keep := make([]int, pb.ncomp)
		for c := range keep {
			keep[c] = -1
		}
		shut := make([]int, pb.ncomp)
		for _, w := range set {
			c := pb.comp[pb.wells[w].Cell]
			shut[c]++
			if keep[c] < 0 || math.Abs(q[w]) < math.Abs(q[keep[c]]) {
				keep[c] = w
			}
		}
		changed := false
		for _, w := range set {
			c := pb.comp[pb.wells[w].Cell]
			if shut[c] == open[c] && keep[c] == w {
				continue
			}
			ctl[w].open, ctl[w].backflow = false, true
			changed = true
		}
		for c := range shut {
			if shut[c] > 0 {
				pb.keepDriven(ctl, c)
			}
		}
		return changed
	}
	changed := false
	for w := range pb.wells {
		c := &ctl[w]
		if !c.backflow || c.open || reopened[w] {
			continue
		}
		if reopens(*c, p[pb.wells[w].Cell], pb.wells[w].Type) {
			c.open, c.backflow = true, false
			reopened[w] = true
			changed = true
		}
	}
	return changed
}

// keepDriven handles region c when backflow has left it with open wells
// that are all rate-controlled and whose rates do not balance: with its
// BHP wells shut, the producers that take more than the injectors give are
// drawn down to their lower limit (MinBHP or the atmospheric floor), or
// the injectors that give more than the producers take are held at their
// MaxBHP, so the region keeps a pressure level. (applyLimits moves a well
// that would exceed its target back to rate control.) Injectors without
// MaxBHP that give more than the region can take are left alone: Solve
// reports the imbalance.
func (pb *problem) keepDriven(ctl []control, c int) {
	var net, tot float64
	for w := range pb.wells {
		if pb.comp[pb.wells[w].Cell] != c || !ctl[w].open {
			continue
		}
		if ctl[w].bhp {
			return
		}
		net += ctl[w].target
		tot += math.Abs(ctl[w].target)
	}
	if math.Abs(net) <= 1e-9*tot {
		return
	}
	for w := range pb.wells {
		wl := &pb.wells[w]
		if pb.comp[wl.Cell] != c || !ctl[w].open {
			continue
		}
		switch {
		case net < 0 && ctl[w].capped:
			ctl[w] = control{open: true, bhp: true, target: wl.BHP}
		case net < 0 && wl.Type == reservoir.Producer:
			ctl[w] = control{open: true, bhp: true, target: pb.minBHP(w), switched: true}
		case net > 0 && wl.Type == reservoir.Injector && wl.MaxBHP > 0:
			ctl[w] = control{open: true, bhp: true, target: wl.MaxBHP, switched: true}
		}
	}
}

// reopens reports whether a well shut for backflow, at BHP control c,
// would flow forward at cell pressure pc (beyond round-off).
func reopens(c control, pc float64, t reservoir.WellType) bool {
	tol := 1e-7 * math.Max(math.Abs(pc), math.Abs(c.target))
	if t == reservoir.Injector {
		return pc < c.target-tol
	}
	return pc > c.target+tol
}

// clampBackflow sets to 0 the rates of open BHP-controlled wells that are
// zero to round-off (flowTol), in either direction: a well left alone at
// the pressure of its region, or one shut in by backflow's neighbours.
// Wells flowing backwards by more (when the rounds ran out) keep their
// rate and get a warning in results.
func (pb *problem) clampBackflow(ctl []control, p, q []float64) {
	for w := range pb.wells {
		if c := ctl[w]; c.open && c.bhp && math.Abs(q[w]) <= pb.flowTol(w, p[pb.wells[w].Cell], c.target) {
			q[w] = 0
		}
	}
}

// fluxes sets the face fluxes (TPFA), the cell sources and the list of
// unconnected cells. A region where no well flows (all rates 0, as when
// backflow leaves one well at the region's pressure) carries no flux: its
// pressure is uniform and the differences are round-off.
func (pb *problem) fluxes(sol *Solution, sys *System, q []float64) {
	g, p := pb.g, sol.P
	sol.FluxX = make([]float64, g.NXFaces())
	sol.FluxY = make([]float64, g.NYFaces())
	still := make([]bool, pb.ncomp)
	for c := range still {
		still[c] = true
	}
	for w := range pb.wells {
		if q[w] != 0 {
			still[pb.comp[pb.wells[w].Cell]] = false
		}
	}
	if pb.gx != nil {
		// With gravity a region whose wells do not flow may still carry
		// a density-driven flux; at equilibrium it is round-off.
		for c := range still {
			still[c] = false
		}
	}
	for j := 0; j < g.NY; j++ {
		for i := 1; i < g.NX; i++ {
			f := g.XFace(i, j)
			if t := pb.tx[f]; t > 0 && !still[pb.comp[g.Index(i, j)]] {
				if v := t * (p[g.Index(i-1, j)] - p[g.Index(i, j)]); !math.IsNaN(v) {
					sol.FluxX[f] = v
					if pb.gx != nil {
						sol.FluxX[f] += pb.gx[f]
					}
				}
			}
		}
	}
	for j := 1; j < g.NY; j++ {
		for i := 0; i < g.NX; i++ {
			f := g.YFace(i, j)
			if t := pb.ty[f]; t > 0 && !still[pb.comp[g.Index(i, j)]] {
				if v := t * (p[g.Index(i, j-1)] - p[g.Index(i, j)]); !math.IsNaN(v) {
					sol.FluxY[f] = v
					if pb.gy != nil {
						sol.FluxY[f] += pb.gy[f]
					}
				}
			}
		}
	}
	for k, c := range pb.comp {
		if c >= 0 && !pb.driven[c] {
			sol.Unconnected = append(sol.Unconnected, k)
		}
	}
}

// results fills the well results, sources, mass balance and warnings.
func (pb *problem) results(sol *Solution, ctl []control, gauged []bool, q, bhp []float64) {
	g := pb.g
	sol.Source = make([]float64, g.N())
	var inj, prod, net float64
	_, _, _, _, pres, _ := pb.m.Units.Labels()
	sol.Wells = make([]WellResult, len(pb.wells))
	for w := range pb.wells {
		wl, c := &pb.wells[w], ctl[w]
		r := WellResult{Name: wl.Name, Type: wl.Type, Cell: wl.Cell, Q: q[w], BHP: bhp[w],
			Control: wl.Control, Shut: !c.open && !c.backflow, Backflow: c.backflow,
			Relative: gauged[pb.comp[wl.Cell]], WI: pb.cf[w]}
		floor := wl.Type == reservoir.Producer && wl.MinBHP == 0
		if c.switched {
			r.Control, r.LimitReached = reservoir.BHPControl, true
			if !c.backflow {
				what := fmt.Sprintf("BHP limit %.6g", c.target)
				if floor {
					what = fmt.Sprintf("default BHP floor %.6g %s (atmospheric; no min_bhp given)", c.target, pres)
				}
				sol.Warnings = append(sol.Warnings, fmt.Sprintf(
					"well %s: %s reached; switched from rate %.6g to BHP control, rate now %.6g",
					wl.Name, what, wl.Rate, math.Abs(q[w])))
			}
		}
		if c.capped {
			r.Control, r.AtMaxRate = reservoir.RateControl, true
			sol.Warnings = append(sol.Warnings, fmt.Sprintf(
				"well %s: max_rate %.6g reached; held at it on rate control (its bhp %.6g would give more)", wl.Name, wl.MaxRate, wl.BHP))
		} else if c.open && c.bhp && !c.switched && wl.Type == reservoir.Producer && wl.MaxRate > 0 && -q[w] > wl.MaxRate*(1+1e-9) {
			sol.Warnings = append(sol.Warnings, fmt.Sprintf(
				"well %s: produces %.6g, above its max_rate %.6g: it is the last well on BHP control of its region, which must produce what is injected", wl.Name, -q[w], wl.MaxRate))
		}
		if c.backflow {
			limit := "bhp"
			switch {
			case c.switched && wl.Type == reservoir.Injector:
				limit = "max_bhp"
			case c.switched && floor:
				limit = "default floor (atmospheric; no min_bhp given)"
			case c.switched:
				limit = "min_bhp"
			}
			if wl.Type == reservoir.Injector {
				sol.Warnings = append(sol.Warnings, fmt.Sprintf(
					"well %s: injects nothing: it would need more than %.6g %s (its cell pressure with the well shut), above its %s %.6g %s; shut for this pressure solve",
					wl.Name, bhp[w], pres, limit, c.target, pres))
			} else {
				sol.Warnings = append(sol.Warnings, fmt.Sprintf(
					"well %s: produces nothing: its cell pressure with the well shut, %.6g %s, is below its %s %.6g %s; shut for this pressure solve",
					wl.Name, bhp[w], pres, limit, c.target, pres))
			}
		}
		if pb.backward(ctl, w, sol.P, q) {
			sol.Warnings = append(sol.Warnings, fmt.Sprintf(
				"well %s: still flows against its type (rate %.6g): it could not be shut in this pressure solve", wl.Name, q[w]))
		}
		if c.backflow && reopens(c, bhp[w], wl.Type) {
			sol.Warnings = append(sol.Warnings, fmt.Sprintf(
				"well %s: shut for this pressure solve, but its cell pressure %.6g %s would now let it flow", wl.Name, bhp[w], pres))
		}
		if c.open && !c.bhp && gauged[pb.comp[wl.Cell]] &&
			((wl.Type == reservoir.Injector && wl.MaxBHP > 0) || (wl.Type == reservoir.Producer && wl.MinBHP > 0)) {
			sol.Warnings = append(sol.Warnings, fmt.Sprintf(
				"well %s: BHP limit not checked, because pressures in its region are relative", wl.Name))
		}
		sol.Wells[w] = r
		sol.Source[wl.Cell] += q[w]
		net += q[w]
		if q[w] > 0 {
			inj += q[w]
		} else {
			prod -= q[w]
		}
	}
	ref := inj
	if ref == 0 {
		ref = prod
	}
	if ref > 0 {
		sol.MassBalance = math.Abs(net) / ref
	}
	for c, gd := range gauged {
		if !gd {
			continue
		}
		var names []string
		for w := range pb.wells {
			if ctl[w].open && pb.comp[pb.wells[w].Cell] == c {
				names = append(names, pb.wells[w].Name)
			}
		}
		sol.Warnings = append(sol.Warnings, fmt.Sprintf(
			"pressures are relative in the region of well(s) %s: all its wells are rate-controlled, so %s is held at pressure 0",
			strings.Join(names, ", "), cellName(g, pb.seed[c])))
	}
	if len(sol.Unconnected) > 0 {
		nreg := 0
		for c := range pb.driven {
			if !pb.driven[c] {
				nreg++
			}
		}
		sol.Warnings = append(sol.Warnings, fmt.Sprintf(
			"%d active cells in %d region(s) are not connected to any open well and carry no flow (e.g. %s)",
			len(sol.Unconnected), nreg, cellName(g, sol.Unconnected[0])))
	}
}

// AMGThreshold is the number of unknowns from which DefaultPreconditioner
// and GridPreconditioner use multigrid instead of incomplete Cholesky.
const AMGThreshold = 4000

// DefaultPreconditioner is incomplete Cholesky IC(0) (Meijerink and van
// der Vorst 1977) for systems under AMGThreshold unknowns, where it is
// cheapest, and smoothed aggregation algebraic multigrid (Vanek, Mandel and
// Brezina 1996) above, where its iteration count stays nearly flat with
// grid size. It is the choice for a matrix given without its grid; Solve
// uses GridPreconditioner, which puts the structured multigrid in place of
// the algebraic one where it can.
func DefaultPreconditioner(a *sparse.CSR) (sparse.Preconditioner, error) {
	if a.N < AMGThreshold {
		return sparse.NewIC0(a)
	}
	return sparse.NewAMG(a)
}

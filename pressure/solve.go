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
// control. The rounds repeat until no control changes.
//
// Regions. Active cells are grouped into regions connected through faces
// of positive transmissibility. A region without an open well carries no
// flow: its cells get pressure NaN and are listed in Solution.Unconnected.
// A region whose open wells are all rate-controlled must have balanced
// rates (else Solve returns an error naming the wells); its pressure is
// fixed only up to a constant, so its lowest-numbered cell is held at
// pressure 0 (its equation is dropped, which keeps the matrix symmetric
// positive definite), the pressures are reported as relative in a
// warning, and BHP limits are not checked there.
//
// The linear system is solved by preconditioned conjugate gradients
// (sparse.CG) with the preconditioner of Settings (by default
// DefaultPreconditioner: incomplete Cholesky on small systems, smoothed
// aggregation algebraic multigrid on large ones).
func Solve(in Input, s Settings) (*Solution, error) {
	pb, err := newProblem(in)
	if err != nil {
		return nil, err
	}
	pre := s.Preconditioner
	if pre == nil {
		pre = DefaultPreconditioner
	}
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
		}
		if len(x) > 0 {
			m, err := pre(sys.A)
			if err != nil {
				return nil, &SolverError{Stage: "preconditioner", Unknowns: len(x), Err: err}
			}
			res, err := sparse.CG(sys.A, sys.B, x, m, sparse.CGSettings{Tol: tol})
			sol.Iterations += res.Iterations
			sol.RelResidual = res.RelativeResidual
			if err != nil {
				return nil, &SolverError{Stage: "linear solve", Unknowns: len(x), Iterations: res.Iterations, RelResidual: res.RelativeResidual, Err: err}
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
		if !pb.applyLimits(ctl, gauged, q, bhp) {
			break
		}
		if round == maxRounds {
			return nil, fmt.Errorf("pressure: well controls did not settle after %d rounds of BHP-limit switching", round+1)
		}
	}
	sol.Gauge = sys.Gauge
	pb.fluxes(sol, sys)
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
		limit := wl.MinBHP
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
	return changed
}

// fluxes sets the face fluxes (TPFA), the cell sources and the list of
// unconnected cells.
func (pb *problem) fluxes(sol *Solution, sys *System) {
	g, p := pb.g, sol.P
	sol.FluxX = make([]float64, g.NXFaces())
	sol.FluxY = make([]float64, g.NYFaces())
	for j := 0; j < g.NY; j++ {
		for i := 1; i < g.NX; i++ {
			f := g.XFace(i, j)
			if t := pb.tx[f]; t > 0 {
				if v := t * (p[g.Index(i-1, j)] - p[g.Index(i, j)]); !math.IsNaN(v) {
					sol.FluxX[f] = v
				}
			}
		}
	}
	for j := 1; j < g.NY; j++ {
		for i := 0; i < g.NX; i++ {
			f := g.YFace(i, j)
			if t := pb.ty[f]; t > 0 {
				if v := t * (p[g.Index(i, j-1)] - p[g.Index(i, j)]); !math.IsNaN(v) {
					sol.FluxY[f] = v
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
	sol.Wells = make([]WellResult, len(pb.wells))
	for w := range pb.wells {
		wl, c := &pb.wells[w], ctl[w]
		r := WellResult{Name: wl.Name, Type: wl.Type, Cell: wl.Cell, Q: q[w], BHP: bhp[w],
			Control: wl.Control, Shut: !c.open, WI: pb.cf[w]}
		if c.switched {
			r.Control, r.LimitReached = reservoir.BHPControl, true
			sol.Warnings = append(sol.Warnings, fmt.Sprintf(
				"well %s: BHP limit %.6g reached; switched from rate %.6g to BHP control, rate now %.6g",
				wl.Name, c.target, wl.Rate, math.Abs(q[w])))
		}
		if c.open && c.bhp {
			if wl.Type == reservoir.Injector && q[w] < 0 {
				sol.Warnings = append(sol.Warnings, fmt.Sprintf(
					"well %s: injector under BHP control produces %.6g (cell pressure %.6g above its BHP %.6g)", wl.Name, -q[w], bhp[w]-q[w]/pb.cf[w], bhp[w]))
			}
			if wl.Type == reservoir.Producer && q[w] > 0 {
				sol.Warnings = append(sol.Warnings, fmt.Sprintf(
					"well %s: producer under BHP control injects %.6g (cell pressure %.6g below its BHP %.6g)", wl.Name, q[w], bhp[w]-q[w]/pb.cf[w], bhp[w]))
			}
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
// uses algebraic multigrid instead of incomplete Cholesky.
const AMGThreshold = 4000

// DefaultPreconditioner is incomplete Cholesky IC(0) (Meijerink and van
// der Vorst 1977) for systems under AMGThreshold unknowns, where it is
// cheapest, and smoothed aggregation algebraic multigrid (Vanek, Mandel and
// Brezina 1996) above, where its iteration count stays nearly flat with
// grid size.
func DefaultPreconditioner(a *sparse.CSR) (sparse.Preconditioner, error) {
	if a.N < AMGThreshold {
		return sparse.NewIC0(a)
	}
	return sparse.NewAMG(a)
}

package pressure

import (
	"errors"

	"floodtrace/pressure/sparse"
	"floodtrace/reservoir"
)

// SMGMinFill is the least fraction of the grid's cells that must be
// unknowns for GridPreconditioner to pick the structured multigrid: its
// cycle works on every cell of the grid, so on a grid mostly inactive or
// unconnected the algebraic multigrid, which works on the unknowns only,
// is cheaper.
const SMGMinFill = 0.5

// SMGMaxIterations is the number of conjugate-gradient iterations Solve
// allows with the structured multigrid before it falls back to the
// algebraic multigrid, continuing from where it stopped. The structured
// multigrid takes 8 to 33 iterations to 1e-8 on the test fields up to a
// million cells (pressure/sparse/smg_test.go).
const SMGMaxIterations = 100

// smgMaxIter is SMGMaxIterations; tests lower it to exercise the fall-back.
var smgMaxIter = SMGMaxIterations

// Preconditioner names, as GridPreconditioner returns them.
const (
	PrecondIC0 = "ic0" // incomplete Cholesky (sparse.NewIC0)
	PrecondSMG = "smg" // structured semi-coarsening multigrid (sparse.NewSMG)
	PrecondAMG = "amg" // smoothed aggregation algebraic multigrid (sparse.NewAMG)
)

// GridPreconditioner builds the default preconditioner of a system
// assembled on grid g and returns it with its name: IC(0) under
// AMGThreshold unknowns; above, the structured multigrid (sparse.SMG:
// semi-coarsening, Schaffer 1998, Ashby and Falgout 1996) when the
// unknowns fill at least SMGMinFill of the grid, and the algebraic
// multigrid (sparse.AMG) when they do not or when the structured one
// cannot be built (a matrix that is not a five-point stencil of g).
//
// A system whose assembly left its matrix out (Solve's own, on every cell
// of a large grid) gives the structured multigrid its stencil; the matrix
// is then built only if another preconditioner needs it.
func GridPreconditioner(sys *System, g reservoir.Grid) (sparse.Preconditioner, string, error) {
	if sys.A == nil && sys.stencil != nil {
		if m, err := sparse.NewSMGStencil(g.NX, g.NY, sys.stencil); err == nil {
			return m, PrecondSMG, nil
		}
	}
	a := sys.matrix()
	n := a.N
	if n < AMGThreshold {
		m, err := sparse.NewIC0(a)
		return m, PrecondIC0, err
	}
	if float64(n) >= SMGMinFill*float64(g.N()) {
		if m, err := sparse.NewSMG(a, g.NX, g.NY, sys.Unknown); err == nil {
			return m, PrecondSMG, nil
		}
	}
	m, err := sparse.NewAMG(a)
	return m, PrecondAMG, err
}

// linearSolve solves sys for x (holding the start) by conjugate gradients
// to the relative residual tol, with pre when given, else with
// GridPreconditioner; when the structured multigrid has not converged in
// SMGMaxIterations, it goes on from there with the algebraic multigrid.
// It returns the name of the last preconditioner used ("" for pre).
func (pb *problem) linearSolve(sys *System, x []float64, pre sparse.PreconditionerFunc, tol float64) (sparse.CGResult, string, error) {
	res, name, _, err := pb.linearSolveKeep(sys, x, pre, tol)
	return res, name, err
}

// linearSolveKeep is linearSolve that also returns the preconditioner it
// used last (nil when the set-up failed), for Sequence to keep.
func (pb *problem) linearSolveKeep(sys *System, x []float64, pre sparse.PreconditionerFunc, tol float64) (sparse.CGResult, string, sparse.Preconditioner, error) {
	n := len(x)
	if pre != nil {
		a := sys.matrix()
		m, err := pre(a)
		if err != nil {
			return sparse.CGResult{}, "", nil, &SolverError{Stage: "preconditioner", Unknowns: n, Err: err}
		}
		res, err := sparse.CG(a, sys.B, x, m, sparse.CGSettings{Tol: tol})
		if err != nil {
			return res, "", m, &SolverError{Stage: "linear solve", Unknowns: n, Iterations: res.Iterations, RelResidual: res.RelativeResidual, Err: err}
		}
		return res, "", m, nil
	}
	m, name, err := GridPreconditioner(sys, pb.g)
	if err != nil {
		return sparse.CGResult{}, name, nil, &SolverError{Stage: "preconditioner", Unknowns: n, Err: err}
	}
	cs := sparse.CGSettings{Tol: tol}
	var op sparse.Operator
	if name == PrecondSMG {
		cs.MaxIter = smgMaxIter
		// The structured multigrid holds the matrix as a stencil: the
		// same products from a third of the memory traffic.
		if so := m.(*sparse.SMG).Operator(); so != nil {
			op = so
		}
	}
	if op == nil {
		op = sys.matrix()
	}
	res, err := sparse.CG(op, sys.B, x, m, cs)
	if name == PrecondSMG && errors.Is(err, sparse.ErrNotConverged) {
		before := res.Iterations
		a := sys.matrix()
		if m, err = sparse.NewAMG(a); err != nil {
			return res, PrecondAMG, nil, &SolverError{Stage: "preconditioner", Unknowns: n, Err: err}
		}
		name = PrecondAMG
		res, err = sparse.CG(a, sys.B, x, m, sparse.CGSettings{Tol: tol})
		res.Iterations += before
	}
	if err != nil {
		return res, name, m, &SolverError{Stage: "linear solve", Unknowns: n, Iterations: res.Iterations, RelResidual: res.RelativeResidual, Err: err}
	}
	return res, name, m, nil
}

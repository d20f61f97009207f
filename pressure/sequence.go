package pressure

import (
	"errors"
	"math"
	"slices"

	"floodtrace/pressure/sparse"
)

// DefaultReuseChange is the default Sequence.ReuseChange: the
// preconditioner of an earlier solve is reused while no active cell's
// total mobility has moved by more than 30% of its value then. Measured on
// the benchmark pattern at 300x300 (an invented front of rising mobility
// moving 300 ft per solve): CG to 1e-10 with a multigrid built for
// mobilities 25% off takes one iteration more than with a fresh one, 50%
// off three more, while a set-up costs about as much as 2.7 iterations
// (16 ms against 6 ms, docs/PERFORMANCE.md).
const DefaultReuseChange = 0.3

// Sequence solves a sequence of pressure problems on one model whose
// mobility and wells change a little from one solve to the next, the
// pressure updates of a run. Each Solve is Solve with two savings:
//
//   - warm start: conjugate gradients start from the pressures of the
//     previous solve (cells without a previous pressure start from the
//     mean BHP of their region, as in Solve);
//   - set-up reuse: the preconditioner built in an earlier solve is
//     reused while the unknowns are the same cells and no active cell's
//     total mobility has moved by more than ReuseChange (relative) since
//     it was built. A preconditioner of a nearby matrix is still symmetric
//     positive definite, so CG converges to the same tolerance, only in
//     more iterations. A reused solve must reach the relative residual
//     (against ||b||) of the solve that built the preconditioner when that
//     was below the tolerance (see reuseTol): the residual is the flux
//     imbalance that a streamline run books as a mass-balance error. When
//     a reused preconditioner needs more than twice the iterations of the
//     solve that built it (plus 4), the solve builds a fresh one and starts
//     again from the same first guess, and a reused one that needed more
//     than 1.5 times as many (plus 2) is dropped after the solve.
//
// The results agree with Solve's to the solve tolerance (they are not
// bit-identical: the start and the preconditioner differ), and they are
// the same for any core count, since every decision depends on the
// mobilities and iteration counts only. A Sequence is not safe for
// concurrent use; the zero value is not usable, call NewSequence.
type Sequence struct {
	s Settings
	// ReuseChange is the largest relative change of any active cell's
	// total mobility under which the preconditioner is reused; 0 means
	// DefaultReuseChange, a negative value never reuses (warm start only).
	ReuseChange float64

	prev       []float64 // cell pressures of the last solve (NaN: none)
	pre        sparse.Preconditioner
	preMob     []float64 // mobility the preconditioner was built for
	preUnknown []int     // unknowns it was built for
	preIters   int       // iterations of the solve that built it
	preRes     float64   // relative residual (against ||b||) that solve reached
	stats      SequenceStats
}

// SequenceStats counts what a Sequence did.
type SequenceStats struct {
	Solves     int // calls of Solve that returned a solution
	Built      int // preconditioner set-ups
	Reused     int // linear solves with a preconditioner built earlier
	Iterations int // conjugate-gradient iterations over all solves
}

// NewSequence returns a Sequence whose solves use settings s.
func NewSequence(s Settings) *Sequence {
	return &Sequence{s: s}
}

// Stats returns the counts so far.
func (q *Sequence) Stats() SequenceStats { return q.stats }

// Reset forgets the previous pressures and the kept preconditioner (for a
// caller whose model changed).
func (q *Sequence) Reset() {
	q.prev, q.pre, q.preMob, q.preUnknown = nil, nil, nil, nil
}

// Solve solves in as Solve does, warm-started and reusing the
// preconditioner as described at Sequence.
func (q *Sequence) Solve(in Input) (*Solution, error) {
	if q.prev != nil && in.Model != nil && len(q.prev) != in.Model.Grid.N() {
		q.Reset()
	}
	sol, err := solve(in, q.s, q)
	if err != nil {
		return nil, err
	}
	q.prev = append(q.prev[:0], sol.P...)
	q.stats.Solves++
	q.stats.Iterations += sol.Iterations
	return sol, nil
}

// start overwrites the first guess x with the previous pressures where
// there are some (nil q: nothing).
func (q *Sequence) start(pb *problem, sys *System, x []float64) {
	if q == nil || len(q.prev) != pb.g.N() {
		return
	}
	for u, k := range sys.Unknown {
		if v := q.prev[k]; !math.IsNaN(v) {
			x[u] = v
		}
	}
}

// reusable reports whether the kept preconditioner may serve sys.
func (q *Sequence) reusable(pb *problem, sys *System) bool {
	// A preconditioner whose solve took one iteration is exact (the
	// incomplete Cholesky factor of a tridiagonal system, a channel):
	// held to that solve's round-off residual, a reused one takes four or
	// more iterations (measured on the channels of the flood tests), more
	// than a fresh set-up and one iteration.
	if q.pre == nil || q.ReuseChange < 0 || q.preIters <= 1 || !slices.Equal(q.preUnknown, sys.Unknown) {
		return false
	}
	limit := q.ReuseChange
	if limit == 0 {
		limit = DefaultReuseChange
	}
	return mobilityChange(q.preMob, pb.mob, pb.m.Active) <= limit
}

// mobilityChange is the largest |b/a - 1| over active cells (+Inf when a
// is 0 and b is not).
func mobilityChange(a, b []float64, active []bool) float64 {
	worst := 0.0
	for k := range a {
		if !active[k] || a[k] == b[k] {
			continue
		}
		d := math.Abs(b[k]-a[k]) / a[k]
		if !(d <= worst) { // NaN and Inf count as too large
			if math.IsNaN(d) {
				return math.Inf(1)
			}
			worst = d
		}
	}
	return worst
}

// residualFloor is the smallest relative residual a reused
// preconditioner is asked for: a few times the round-off of the residual
// of a double-precision system (the cold solves of a 1D channel end near
// 6e-16, measured).
const residualFloor = 4e-15

// reuseTol is the tolerance of a solve with a kept preconditioner: the
// solve tolerance, or 10 times the relative residual (against ||b||) that
// the solve which built the preconditioner reached, when that is smaller
// (the same level, as CG overshoots its tolerance by up to a factor of
// ten per iteration anyway).
// The residual of a pressure solve is the imbalance of the cell fluxes,
// which a streamline run books as water gained or lost; a fresh
// preconditioner that is exact or nearly so (a channel, a small grid)
// ends a cold solve at round-off, far below the tolerance, and a reused
// one that stopped at the tolerance would show up as a mass-balance error
// a million times larger. Holding the reused solves to the level of the
// fresh ones keeps the fluxes as conservative as a cold solve makes them
// (a reused preconditioner that cannot get there is replaced, see
// linearSolve).
func reuseTol(tol, built float64) float64 {
	if !(built >= 0) {
		return tol
	}
	return min(tol, max(10*built, residualFloor))
}

// linearSolve solves sys for x with the kept preconditioner when it may
// serve, else (or when it turns out too weak) with a fresh one, which it
// keeps.
func (q *Sequence) linearSolve(pb *problem, sys *System, x []float64, tol float64) (sparse.CGResult, error) {
	before := 0
	if q.reusable(pb, sys) {
		x0 := slices.Clone(x)
		res, err := sparse.CG(sys.A, sys.B, x, q.pre, sparse.CGSettings{Tol: reuseTol(tol, q.preRes), MaxIter: 2*q.preIters + 4})
		if err == nil {
			q.stats.Reused++
			if 2*res.Iterations > 3*q.preIters+4 {
				q.pre = nil // worn out: build afresh next time
			}
			return res, nil
		}
		if !errors.Is(err, sparse.ErrNotConverged) {
			return res, &SolverError{Stage: "linear solve", Unknowns: len(x), Iterations: res.Iterations, RelResidual: res.RelativeResidual, Err: err}
		}
		// Start the fresh solve where this one started: from the
		// iterate it stopped at, whose residual may already be under the
		// solve tolerance, CG would stop at once, short of the level
		// reuseTol asked for.
		before = res.Iterations
		copy(x, x0)
	}
	res, _, m, err := pb.linearSolveKeep(sys, x, q.s.Preconditioner, tol)
	q.stats.Built++
	res.Iterations += before
	if err != nil {
		q.pre = nil
		return res, err
	}
	q.pre, q.preIters, q.preRes = m, max(res.Iterations-before, 1), res.RelativeResidual
	q.preMob = append(q.preMob[:0], pb.mob...)
	q.preUnknown = append(q.preUnknown[:0], sys.Unknown...)
	return res, nil
}

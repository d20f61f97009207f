package pressure

import (
	"errors"
	"strings"
	"testing"

	"floodtrace/pressure/sparse"
	"floodtrace/reservoir"
)

// TestSolverBreakdownIsSolverError builds a model that the pressure
// package accepts (finite, positive values) but whose transmissibilities
// overflow (permeability 1e300 md, which the case loader refuses): the
// incomplete Cholesky factor breaks down, and the error is a
// *SolverError naming the preconditioner, not an input error.
func TestSolverBreakdownIsSolverError(t *testing.T) {
	m := reservoir.NewUniform(6, 6, 100, 100, 1e300, 0.2, 10)
	if err := m.PlaceWell("I", reservoir.Injector, 50, 50, reservoir.RateControl, 100); err != nil {
		t.Fatal(err)
	}
	if err := m.PlaceWell("P", reservoir.Producer, 550, 550, reservoir.BHPControl, 1000); err != nil {
		t.Fatal(err)
	}
	_, err := Solve(Input{Model: m}, Settings{Preconditioner: sparse.NewIC0})
	var se *SolverError
	if !errors.As(err, &se) {
		t.Fatalf("error %v (%T) is not a *SolverError", err, err)
	}
	if se.Stage != "preconditioner" || se.Unknowns != 36 || !strings.Contains(err.Error(), "pressure solver broke down: preconditioner of 36 unknowns") {
		t.Errorf("error %q (stage %q, %d unknowns)", err, se.Stage, se.Unknowns)
	}
}

// TestSolverErrorMessage checks the message of a conjugate-gradient
// failure and that the cause is kept.
func TestSolverErrorMessage(t *testing.T) {
	e := &SolverError{Stage: "linear solve", Unknowns: 100, Iterations: 500, RelResidual: 1e-3, Err: sparse.ErrNotConverged}
	want := "pressure solver broke down: linear solve of 100 unknowns: sparse: conjugate gradients did not converge (500 iterations, relative residual 0.001)"
	if e.Error() != want || !errors.Is(e, sparse.ErrNotConverged) {
		t.Errorf("got %q, want %q", e.Error(), want)
	}
}

package pressure

import "fmt"

// SolverError is a breakdown of the linear solver on a problem that
// passed validation: the preconditioner could not be built or conjugate
// gradients did not converge. It is floodtrace's failure, not the input's:
// the command line reports it as an internal error (exit code 3).
type SolverError struct {
	Stage    string // "preconditioner" or "linear solve"
	Unknowns int    // order of the linear system
	// Iterations and RelResidual are those reached by conjugate gradients
	// (zero when the preconditioner failed).
	Iterations  int
	RelResidual float64
	Err         error // what broke
}

// Error names the stage, the size of the system and the cause.
func (e *SolverError) Error() string {
	if e.Stage == "preconditioner" {
		return fmt.Sprintf("pressure solver broke down: preconditioner of %d unknowns: %v", e.Unknowns, e.Err)
	}
	return fmt.Sprintf("pressure solver broke down: %s of %d unknowns: %v (%d iterations, relative residual %.3g)",
		e.Stage, e.Unknowns, e.Err, e.Iterations, e.RelResidual)
}

// Unwrap returns the cause.
func (e *SolverError) Unwrap() error { return e.Err }

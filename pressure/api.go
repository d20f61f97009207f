package pressure

import (
	"floodtrace/pressure/sparse"
	"floodtrace/reservoir"
)

// Settings controls a pressure solve. The zero value is a sensible default:
// relative residual 1e-10 and GridPreconditioner.
type Settings struct {
	Tol float64 // relative residual of the linear solve; 0 = 1e-10
	// Preconditioner builds the preconditioner; nil = GridPreconditioner
	// (IC(0) on small systems, structured multigrid on large ones, with
	// algebraic multigrid as the fall-back).
	Preconditioner sparse.PreconditionerFunc
}

// Input is one pressure problem.
type Input struct {
	Model *reservoir.Model
	// Mobility is the total mobility per cell, krw/muw + kro/muo, in 1/cp
	// (1/cP). nil means the uniform mobility of the initial state,
	// krw(Swi)/muw + kro(Swi)/muo from the model (see InitialMobility).
	Mobility []float64
	// Wells overrides Model.Wells (schedule changes); nil = Model.Wells.
	// Shut wells and wells not yet open are left out by the caller setting
	// Shut.
	Wells []reservoir.Well
	// Density is the mobility-weighted density per cell,
	// (lambda_w rho_w + lambda_o rho_o) / lambda_t (MixtureDensity), in
	// lb/ft3 (kg/m3); used only when the model has a depth
	// (reservoir.Model.HasGravity). nil means the density of the initial
	// state (InitialDensity).
	Density []float64
}

// WellResult is the solved state of one well.
type WellResult struct {
	Name string
	Type reservoir.WellType
	Cell int
	// Q is the volumetric rate into the reservoir (positive for injection,
	// negative for production), reservoir volume per day.
	Q float64
	// BHP is the bottom-hole pressure; for a shut well, the pressure of
	// its cell.
	BHP     float64
	Control reservoir.Control // the control in force after limits
	// LimitReached is true when a rate-controlled well hit its MaxBHP or
	// MinBHP (for a producer without MinBHP, the default floor
	// reservoir.UnitSystem.Atmospheric) and was switched to BHP control;
	// it stays true when the well was then shut for backflow.
	LimitReached bool
	// AtMaxRate is true for a BHP-controlled producer held at its MaxRate
	// (liquid limit) on rate control in this solve.
	AtMaxRate bool
	// Shut is true for a well shut in by the case or the schedule (Q = 0).
	Shut bool
	// Backflow is true for an open well that this solve shut because,
	// flowing, it would flow against its type: an injector whose BHP (or
	// MaxBHP) is below its cell pressure, a producer whose BHP (or MinBHP)
	// is above it. Q is 0 and BHP is the cell pressure with the well shut,
	// the pressure the well would have to overcome; a warning names it.
	Backflow bool
	// Relative is true for a well in a region whose open wells are all
	// rate-controlled: its pressures are relative to a gauge cell held at
	// 0 (see Solve), so its BHP may be negative, and no BHP limit applies.
	Relative bool
	WI       float64 // Peaceman well index times mobility (connection factor)
}

// Solution is the solved pressure field.
type Solution struct {
	Grid reservoir.Grid
	// P is the cell pressure; NaN for inactive cells and cells that are not
	// connected to any open well.
	P []float64
	// FluxX[Grid.XFace(i,j)] is the volumetric flux through the west face
	// of cell (i,j), positive eastward; FluxY[Grid.YFace(i,j)] through the
	// south face, positive northward. Reservoir volume per day. Boundary
	// faces carry zero.
	FluxX, FluxY []float64
	// Source is the well rate per cell (positive injection).
	Source []float64
	Wells  []WellResult
	// Unconnected lists active cells in regions without an open well; they
	// carry no flow.
	Unconnected []int
	// Gauge lists the cells held at pressure 0 in regions whose wells are
	// all rate-controlled (pressures there are relative); see Solve.
	Gauge []int
	// Iterations is the total number of conjugate-gradient iterations over
	// all rounds of BHP-limit switching; RelResidual is the final relative
	// residual ||b-Ax||/||b|| of the last linear solve.
	Iterations  int
	RelResidual float64
	// MassBalance is |sum of well rates| / total injection (total
	// production when nothing is injected).
	MassBalance float64
	// Warnings are messages for the user (limits reached, wells shut for
	// backflow with the pressure they would have to overcome, relative
	// pressures, isolated regions).
	Warnings []string
}

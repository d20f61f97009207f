// Package pressure solves the incompressible, areal pressure equation
// div(lambda_t K grad p) = q on the case grid with a two-point flux
// approximation, Peaceman well indices and rate or bottom-hole-pressure
// well controls, and returns cell pressures, face fluxes, well rates and
// bottom-hole pressures.
//
// Solve is the entry point; Assemble exposes the linear system for
// benchmarks and preconditioner work. Regions cut off from every open well
// are left out and reported; regions driven by rate-controlled wells alone
// are solved with a gauge cell at pressure 0. Wells never flow against
// their type: a well that would is shut for that solve and reported
// (WellResult.Backflow), and a rate producer without MinBHP has a default
// floor at atmospheric pressure (reservoir.UnitSystem.Atmospheric), set
// here at solve time rather than in the model.
//
// References: Peaceman (1978, 1983) for the well model; Meijerink and van
// der Vorst (1977) and Gustafsson (1978) for the incomplete Cholesky
// preconditioners of package sparse; Schaffer (1998), Ashby and Falgout
// (1996) and Dendy (1982) for its structured multigrid, the default on
// large grids (GridPreconditioner); Vanek, Mandel and Brezina (1996) for
// its algebraic multigrid, the fall-back.
package pressure

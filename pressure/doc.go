// Package pressure solves the incompressible, areal pressure equation
// div(lambda_t K grad p) = q on the case grid with a two-point flux
// approximation, Peaceman well indices and rate or bottom-hole-pressure
// well controls, and returns cell pressures, face fluxes, well rates and
// bottom-hole pressures.
package pressure

// Package streamline traces streamlines through the face fluxes of a
// pressure solution with Pollock's (1988) semi-analytical method and turns
// them into time of flight, well partitions, well-pair allocation and flow
// diagnostics (the F-Phi curve, the Lorenz coefficient and sweep against
// dimensionless time, Shook and Mitchell 2009).
//
// The package knows nothing about fluids or the pressure solver: its input
// is a Field (grid, pore volumes, face fluxes and net well rates), so it can
// trace any divergence-free flux field.
package streamline

// Package transport carries water-oil displacement along streamlines in
// time-of-flight coordinates: dS/dt + d fw(S)/d tau = 0, tau in days
// (Buckley and Leverett 1942).
//
// It provides the fractional-flow curve of a relative-permeability model
// (FracFlow), the exact self-similar solution of injecting one saturation
// into another by the upper concave envelope of fw (Riemann; the Welge 1952
// tangent is the common special case), and explicit conservative schemes
// that advance arbitrary saturation profiles along one streamline
// (Advance, with first-order upwind or a second-order TVD scheme) for the
// pressure-update mode. The package knows nothing of grids: a streamline
// is a list of segments, each with its own time of flight.
package transport

package pressure

import (
	"fmt"
	"math"

	"floodtrace/reservoir"
)

// InitialDensity returns the mobility-weighted density of the initial
// state, (lambda_w rho_w + lambda_o rho_o) / lambda_t at the initial water
// saturation, used when Input.Density is nil in a case with depth.
func InitialDensity(m *reservoir.Model) (float64, error) {
	if _, err := InitialMobility(m); err != nil {
		return 0, err
	}
	return MixtureDensity(m, m.Fluids.InitialSw), nil
}

// MixtureDensity returns the mobility-weighted density at water
// saturation sw, (lambda_w rho_w + lambda_o rho_o) / lambda_t, the density
// of the moving mixture; it is the oil density where the water is
// immobile and the water density where the oil is.
func MixtureDensity(m *reservoir.Model, sw float64) float64 {
	f := m.Fluids
	lw := m.RelPerm.Krw(sw) / f.WaterViscosity
	lo := m.RelPerm.Kro(sw) / f.OilViscosity
	if !(lw+lo > 0) {
		return 0.5 * (f.WaterDensity + f.OilDensity)
	}
	return (lw*f.WaterDensity + lo*f.OilDensity) / (lw + lo)
}

// gravity sets the gravity fluxes of the faces, pb.gx and pb.gy (nil in a
// case without depth): the flux a face carries from its west (south) cell
// a to its east (north) cell b when the two pressures are equal,
//
//	G = T lambda_t rho_f gamma (D_b - D_a),
//
// with T lambda_t the face transmissibility of the pressure equation, D
// the cell depths, gamma the gravity gradient
// (reservoir.UnitSystem.GravityGradient: 1/144 psi per ft per lb/ft3 or
// 9.80665e-5 bar per m per kg/m3, from memory) and rho_f the mean of the
// two cells' mobility-weighted densities (Input.Density). The face flux is
// then T lambda_t (p_a - p_b) + G: the two-point flux of the potential
// p - rho gamma D (Aziz and Settari 1979, chapter 5, from memory).
func (pb *problem) gravity(in Input) error {
	m := pb.m
	if !m.HasGravity() {
		return nil
	}
	g := m.Grid
	n := g.N()
	if len(m.Depth) != n {
		return fmt.Errorf("pressure: Depth has %d values, the grid has %d cells", len(m.Depth), n)
	}
	rho := in.Density
	if rho == nil {
		r0, err := InitialDensity(m)
		if err != nil {
			return err
		}
		rho = make([]float64, n)
		for k := range rho {
			rho[k] = r0
		}
	} else if len(rho) != n {
		return fmt.Errorf("pressure: Density has %d values, the grid has %d cells", len(rho), n)
	}
	for k := 0; k < n; k++ {
		if m.Active[k] && (math.IsNaN(rho[k]) || math.IsInf(rho[k], 0) || math.IsNaN(m.Depth[k]) || math.IsInf(m.Depth[k], 0)) {
			return fmt.Errorf("pressure: %s: density %g or depth %g is not finite", cellName(g, k), rho[k], m.Depth[k])
		}
	}
	gam := m.Units.GravityGradient()
	pb.gx = make([]float64, g.NXFaces())
	pb.gy = make([]float64, g.NYFaces())
	for j := 0; j < g.NY; j++ {
		for i := 1; i < g.NX; i++ {
			f := g.XFace(i, j)
			a, b := g.Index(i-1, j), g.Index(i, j)
			if t := pb.tx[f]; t > 0 {
				pb.gx[f] = t * 0.5 * (rho[a] + rho[b]) * gam * (m.Depth[b] - m.Depth[a])
			}
		}
	}
	for j := 1; j < g.NY; j++ {
		for i := 0; i < g.NX; i++ {
			f := g.YFace(i, j)
			a, b := g.Index(i, j-1), g.Index(i, j)
			if t := pb.ty[f]; t > 0 {
				pb.gy[f] = t * 0.5 * (rho[a] + rho[b]) * gam * (m.Depth[b] - m.Depth[a])
			}
		}
	}
	return nil
}

// gravitySource returns the net gravity flux out of cell k at uniform
// pressure, which moves to the right-hand side of its equation.
func (pb *problem) gravitySource(k int) float64 {
	if pb.gx == nil {
		return 0
	}
	g := pb.g
	i, j := k%g.NX, k/g.NX
	out := 0.0
	if i > 0 {
		out -= pb.gx[g.XFace(i, j)]
	}
	if i+1 < g.NX {
		out += pb.gx[g.XFace(i+1, j)]
	}
	if j > 0 {
		out -= pb.gy[g.YFace(i, j)]
	}
	if j+1 < g.NY {
		out += pb.gy[g.YFace(i, j+1)]
	}
	return out
}

// GeometricTransmissibilities returns the face transmissibilities without
// the mobility (rate per pressure per unit mobility): the harmonic
// combination of the half-cell values k h dy/(dx/2) times the Darcy factor
// and the face multiplier, numbered like reservoir.Model.TransMultX and
// TransMultY; 0 on boundary faces and faces touching an inactive cell.
// Transport uses them for the gravity flux across faces.
func GeometricTransmissibilities(m *reservoir.Model) (tx, ty []float64) {
	one := make([]float64, m.Grid.N())
	for k := range one {
		one[k] = 1
	}
	return transmissibilities(m, one)
}

package flood

import (
	"math"

	"floodtrace/pressure"
	"floodtrace/reservoir"
	"floodtrace/transport"
)

// gravityFaces holds what the transport steps need for the
// counter-current gravity flux across the grid faces of a case with depth.
type gravityFaces struct {
	m *reservoir.Model
	// cx and cy are, per face, T (rho_w - rho_o) gamma (D_b - D_a): the
	// geometric transmissibility times the density difference, the
	// gravity gradient and the depth difference from the west (south)
	// cell a to the east (north) cell b; positive when b is deeper.
	cx, cy []float64
	// sum is, per cell, the sum of |c| over its faces, and lip a bound
	// of the slope of the flux function in either argument: with sum it
	// bounds the gravity step's speed.
	sum []float64
	lip float64
	gr  *transport.Gravity
	// tx, ty are the geometric transmissibilities and drho the density
	// difference times the gravity gradient.
	tx, ty []float64
	drho   float64
}

// newGravityFaces returns the gravity faces of m, or nil for a case
// without depth or with equal densities.
func newGravityFaces(m *reservoir.Model) *gravityFaces {
	if !m.HasGravity() || m.Fluids.WaterDensity == m.Fluids.OilDensity {
		return nil
	}
	g := m.Grid
	tx, ty := pressure.GeometricTransmissibilities(m)
	drho := (m.Fluids.WaterDensity - m.Fluids.OilDensity) * m.Units.GravityGradient()
	gf := &gravityFaces{m: m, cx: make([]float64, len(tx)), cy: make([]float64, len(ty)), sum: make([]float64, g.N()),
		tx: tx, ty: ty, drho: drho}
	for j := 0; j < g.NY; j++ {
		for i := 1; i < g.NX; i++ {
			f := g.XFace(i, j)
			a, b := g.Index(i-1, j), g.Index(i, j)
			if tx[f] > 0 {
				gf.cx[f] = tx[f] * drho * (m.Depth[b] - m.Depth[a])
				gf.sum[a] += math.Abs(gf.cx[f])
				gf.sum[b] += math.Abs(gf.cx[f])
			}
		}
	}
	for j := 1; j < g.NY; j++ {
		for i := 0; i < g.NX; i++ {
			f := g.YFace(i, j)
			a, b := g.Index(i, j-1), g.Index(i, j)
			if ty[f] > 0 {
				gf.cy[f] = ty[f] * drho * (m.Depth[b] - m.Depth[a])
				gf.sum[a] += math.Abs(gf.cy[f])
				gf.sum[b] += math.Abs(gf.cy[f])
			}
		}
	}
	gf.gr = transport.NewGravity(
		func(s float64) float64 { return m.RelPerm.Krw(s) / m.Fluids.WaterViscosity },
		func(s float64) float64 { return m.RelPerm.Kro(s) / m.Fluids.OilViscosity })
	gf.lip = gf.gr.Lip
	return gf
}

// flux returns the water flux across a face from cell a to cell b driven
// by gravity alone (the oil flux is its opposite, the total flux is
// zero), with c the face's gravity factor (cx or cy) and sa, sb the two
// saturations: the counter-current flux lw lo / lt times c, each mobility
// upwinded in its phase's direction, the water's from the shallower cell
// (it sinks), the oil's from the deeper one (it rises)
// (transport.Gravity.Flux). It vanishes where either phase is immobile,
// so a column with water under oil is at rest.
func (gf *gravityFaces) flux(c, sa, sb float64) float64 { return gf.gr.Flux(c, sa, sb) }

// densities fills rho with the mobility-weighted density of each active
// cell at saturations sw (pressure.MixtureDensity).
func densities(m *reservoir.Model, sw, rho []float64) {
	for k := range rho {
		rho[k] = 0
		if m.Active[k] {
			rho[k] = pressure.MixtureDensity(m, sw[k])
		}
	}
}

// alongLine returns, per cell, the gravity coefficient of the fractional
// flow along the streamlines of the solve sol (transport.AdvanceGravity):
//
//	G = c (rho_w - rho_o) gamma (K grad D) . e / |u|,
//
// with u the cell's total Darcy velocity (the mean of its opposite face
// fluxes over the face areas), e its direction (the streamline's
// direction in the cell), grad D the depth gradient of the cell
// (reservoir.Model.DepthGradient) and c the Darcy factor; 0 where the
// velocity is 0. It also sets cx, cy and sum to the part of gravity
// across the streamlines: each face's depth difference less the
// along-line part (grad D . e) e of its two cells, which the gravity step
// on the grid moves (operator splitting, Bratvedt, Gimse and Tegnander
// 1996); in cells without flow the whole depth difference.
func (gf *gravityFaces) alongLine(sol *pressure.Solution, G []float64) {
	m := gf.m
	g := m.Grid
	nx := g.NX
	type dir struct{ ex, ey, a float64 } // direction and grad D . e
	d := make([]dir, g.N())
	c := m.Units.Darcy()
	for k := range G {
		G[k] = 0
		if !m.Active[k] || !(m.Thickness[k] > 0) {
			continue
		}
		i, j := g.IJ(k)
		ux := 0.5 * (sol.FluxX[g.XFace(i, j)] + sol.FluxX[g.XFace(i+1, j)]) / (g.DY * m.Thickness[k])
		uy := 0.5 * (sol.FluxY[g.YFace(i, j)] + sol.FluxY[g.YFace(i, j+1)]) / (g.DX * m.Thickness[k])
		u := math.Hypot(ux, uy)
		if !(u > 0) {
			continue
		}
		ex, ey := ux/u, uy/u
		gx, gy := m.DepthGradient(k)
		G[k] = c * gf.drho * (m.PermEast[k]*gx*ex + m.PermNorth[k]*gy*ey) / u
		d[k] = dir{ex, ey, gx*ex + gy*ey}
	}
	clear(gf.sum)
	for j := 0; j < g.NY; j++ {
		for i := 1; i < nx; i++ {
			f := g.XFace(i, j)
			a, b := g.Index(i-1, j), g.Index(i, j)
			gf.cx[f] = 0
			if gf.tx[f] > 0 {
				along := 0.5 * g.DX * (d[a].a*d[a].ex + d[b].a*d[b].ex)
				gf.cx[f] = gf.tx[f] * gf.drho * (m.Depth[b] - m.Depth[a] - along)
				gf.sum[a] += math.Abs(gf.cx[f])
				gf.sum[b] += math.Abs(gf.cx[f])
			}
		}
	}
	for j := 1; j < g.NY; j++ {
		for i := 0; i < nx; i++ {
			f := g.YFace(i, j)
			a, b := g.Index(i, j-1), g.Index(i, j)
			gf.cy[f] = 0
			if gf.ty[f] > 0 {
				along := 0.5 * g.DY * (d[a].a*d[a].ey + d[b].a*d[b].ey)
				gf.cy[f] = gf.ty[f] * gf.drho * (m.Depth[b] - m.Depth[a] - along)
				gf.sum[a] += math.Abs(gf.cy[f])
				gf.sum[b] += math.Abs(gf.cy[f])
			}
		}
	}
}

// step moves the saturations sw by the gravity flux across the faces
// (cx, cy) for a time dt, in equal explicit sub-steps with
// sum * lip * dt_sub / pv <= cfl, and returns the sub-step count. Each
// face's flux leaves one cell and enters the other, so water is
// conserved to round-off; delta is scratch of the grid's size.
func (gf *gravityFaces) step(sw, pv, delta []float64, dt, cfl float64) int {
	m := gf.m
	g := m.Grid
	nx := g.NX
	rate := 0.0
	for k, v := range gf.sum {
		if v > 0 && pv[k] > 0 {
			rate = math.Max(rate, v*gf.lip/pv[k])
		}
	}
	if !(rate > 0) || !(dt > 0) {
		return 0
	}
	nsub := max(int(math.Ceil(rate*dt/cfl)), 1)
	h := dt / float64(nsub)
	for range nsub {
		clear(delta)
		for j := 0; j < g.NY; j++ {
			for i := 1; i < nx; i++ {
				if c := gf.cx[g.XFace(i, j)]; c != 0 {
					a, b := g.Index(i-1, j), g.Index(i, j)
					f := gf.flux(c, sw[a], sw[b]) * h
					delta[a] -= f
					delta[b] += f
				}
			}
		}
		for j := 1; j < g.NY; j++ {
			for i := 0; i < nx; i++ {
				if c := gf.cy[g.YFace(i, j)]; c != 0 {
					a, b := g.Index(i, j-1), g.Index(i, j)
					f := gf.flux(c, sw[a], sw[b]) * h
					delta[a] -= f
					delta[b] += f
				}
			}
		}
		for k, v := range delta {
			if v != 0 {
				sw[k] += v / pv[k]
			}
		}
	}
	return nsub
}

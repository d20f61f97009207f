package flood

import (
	"math"

	"floodtrace/pressure"
	"floodtrace/reservoir"
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
	sum      []float64
	lip      float64
	muW, muO float64
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
		muW: m.Fluids.WaterViscosity, muO: m.Fluids.OilViscosity}
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
	// Lipschitz bound of lw(a) lo(b) / (lw(a) + lo(b)) in a and in b:
	// at most max |lw'| and max |lo'|, sampled on a fine saturation
	// grid (with a margin for the sampling).
	const n = 2000
	dw, do := 0.0, 0.0
	for k := 0; k < n; k++ {
		s0, s1 := float64(k)/n, float64(k+1)/n
		dw = math.Max(dw, math.Abs(gf.lw(s1)-gf.lw(s0))*n)
		do = math.Max(do, math.Abs(gf.lo(s1)-gf.lo(s0))*n)
	}
	gf.lip = 1.1 * math.Max(dw, do)
	return gf
}

func (gf *gravityFaces) lw(s float64) float64 {
	return gf.m.RelPerm.Krw(math.Min(1, math.Max(0, s))) / gf.muW
}

func (gf *gravityFaces) lo(s float64) float64 {
	return gf.m.RelPerm.Kro(math.Min(1, math.Max(0, s))) / gf.muO
}

// flux returns the water flux across a face from cell a to cell b driven
// by gravity alone (the oil flux is its opposite, the total flux is
// zero), with c the face's gravity factor (cx or cy) and sa, sb the two
// saturations:
//
//	F = c lw(s_up,w) lo(s_up,o) / (lw(s_up,w) + lo(s_up,o)),
//
// the counter-current flux lw lo / lt times the density difference and
// the depth difference, each mobility upwinded in its phase's direction:
// the water's from the shallower cell (it sinks), the oil's from the
// deeper one (it rises). This phase upwinding (Brenier and Jaffre 1991,
// from memory) is monotone: it vanishes where either phase is immobile,
// so a column with water under oil is at rest.
func (gf *gravityFaces) flux(c, sa, sb float64) float64 {
	if c == 0 {
		return 0
	}
	su, sd := sa, sb // water moves a -> b when c > 0 (b is deeper)
	if c < 0 {
		su, sd = sb, sa
	}
	w, o := gf.lw(su), gf.lo(sd)
	if !(w+o > 0) {
		return 0
	}
	return c * w * o / (w + o)
}

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

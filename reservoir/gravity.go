package reservoir

import (
	"fmt"
	"math"
)

// GravityGradient returns the pressure gradient of a column of fluid of
// unit density: 1/144 psi per ft per lb/ft3 in field units and
// 9.80665e-5 bar per m per kg/m3 in metric units (g = 9.80665 m/s2 and
// 1 bar = 1e5 Pa). Values from memory, common practice.
func (u UnitSystem) GravityGradient() float64 {
	if u == Metric {
		return 9.80665e-5
	}
	return 1.0 / 144
}

// DensityUnit returns the unit label of fluid densities: lb/ft3 or kg/m3.
func (u UnitSystem) DensityUnit() string {
	if u == Metric {
		return "kg/m3"
	}
	return "lb/ft3"
}

// HasGravity reports whether the case gives a depth (rock.depth): only
// then do the densities and gravity enter the pressure and transport.
func (m *Model) HasGravity() bool { return m.Depth != nil }

// DepthGradient returns the gradient of the depth in cell k, (dD/dx,
// dD/dy), dimensionless (length per length): central differences between
// the active neighbours on both sides, one-sided differences where only
// one side is active, 0 along a direction with no active neighbour. It is
// (0, 0) for inactive cells and cases without depth.
func (m *Model) DepthGradient(k int) (gx, gy float64) {
	if m.Depth == nil || !m.Active[k] {
		return 0, 0
	}
	g := m.Grid
	i, j := g.IJ(k)
	diff := func(lo, hi int, okLo, okHi bool, h float64) float64 {
		switch {
		case okLo && okHi:
			return (m.Depth[hi] - m.Depth[lo]) / (2 * h)
		case okLo:
			return (m.Depth[k] - m.Depth[lo]) / h
		case okHi:
			return (m.Depth[hi] - m.Depth[k]) / h
		}
		return 0
	}
	w, e := k-1, k+1
	gx = diff(w, e, i > 0 && m.Active[w], i+1 < g.NX && m.Active[e], g.DX)
	s, n := k-g.NX, k+g.NX
	gy = diff(s, n, j > 0 && m.Active[s], j+1 < g.NY && m.Active[n], g.DY)
	return gx, gy
}

// Dip returns the dip of cell k in degrees, atan(|grad D|) with
// DepthGradient.
func (m *Model) Dip(k int) float64 {
	gx, gy := m.DepthGradient(k)
	return math.Atan(math.Hypot(gx, gy)) * 180 / math.Pi
}

// DipRange returns the smallest and the largest dip over the active cells,
// in degrees, and the mean of the depth gradient's magnitude |grad D| (the
// tangent of the dip; the areal model's gravity terms use it); all 0
// without depth.
func (m *Model) DipRange() (lo, hi, meanGrad float64) {
	if m.Depth == nil {
		return 0, 0, 0
	}
	lo, hi = math.Inf(1), math.Inf(-1)
	n := 0
	for k, a := range m.Active {
		if !a {
			continue
		}
		gx, gy := m.DepthGradient(k)
		d := math.Atan(math.Hypot(gx, gy)) * 180 / math.Pi
		lo, hi = math.Min(lo, d), math.Max(hi, d)
		meanGrad += math.Hypot(gx, gy)
		n++
	}
	if n == 0 {
		return 0, 0, 0
	}
	return lo, hi, meanGrad / float64(n)
}

// GravityNumber returns the gravity number of the case: the ratio of the
// Darcy velocity gravity alone gives the oil at its end-point mobility
// along the mean dip to the mean total Darcy velocity through the field,
//
//	N_g = c k kro(swc)/mu_o (rho_w - rho_o) gamma |grad D| / u,
//	u   = Q / (h L),
//
// with c the Darcy factor (UnitSystem.Darcy), k the mean of sqrt(kx ky)
// over the active cells, gamma the gravity gradient
// (UnitSystem.GravityGradient), |grad D| the mean depth gradient, the
// tangent of the dip (DipRange; the areal grid measures distances on the
// map, so its gravity terms carry dD/dx, not the sine), Q the total rate of the rate-controlled injectors at the
// start, h the mean thickness and L the square root of the active area
// (the width of a square field). In a straight channel of uniform dip it
// is exactly the N of the gravity-modified fractional flow
// F(S) = fw(S) (1 -/+ N kro(S)/kro(swc)) of Buckley and Leverett (1942)
// when L is the channel's width; gravity matters when it is above about
// 0.1. It is NaN without depth, without a rate-controlled injector or
// without a relative permeability.
func (m *Model) GravityNumber() float64 {
	if m.Depth == nil || m.RelPerm == nil || !(m.Fluids.OilViscosity > 0) {
		return math.NaN()
	}
	q := 0.0
	for _, w := range m.Wells {
		if w.Type == Injector && w.Control == RateControl && w.Open == 0 && !w.Shut {
			q += w.Rate
		}
	}
	if !(q > 0) {
		return math.NaN()
	}
	var k, h float64
	n := 0
	for c, a := range m.Active {
		if a {
			k += math.Sqrt(m.PermEast[c] * m.PermNorth[c])
			h += m.Thickness[c]
			n++
		}
	}
	if n == 0 {
		return math.NaN()
	}
	k /= float64(n)
	h /= float64(n)
	L := math.Sqrt(float64(n) * m.Grid.DX * m.Grid.DY)
	swc, _ := m.RelPerm.Endpoints()
	_, _, grad := m.DipRange()
	// Darcy velocity in rate units per area: bbl/day/ft2 or m3/day/m2.
	ug := m.Units.Darcy() * k * m.RelPerm.Kro(swc) / m.Fluids.OilViscosity *
		(m.Fluids.WaterDensity - m.Fluids.OilDensity) * m.Units.GravityGradient() * grad
	u := q / (h * L)
	return ug / u
}

// checkGravity checks the densities against the depth: with rock.depth
// both densities are required, and equal densities draw a warning (no
// gravity effect); densities without depth draw a warning (no effect).
func (d *decoder) checkGravity(rc *rawCase) {
	m := rc.m
	f := m.Fluids
	if m.Depth == nil {
		if len(rc.densityNodes) > 0 {
			d.warnAt(nil, rc.densityNodes[0], "fluids: densities are given but rock.depth is not: gravity plays no part without a depth")
		}
		return
	}
	line := rc.depthNode
	if !(f.WaterDensity > 0) || !(f.OilDensity > 0) {
		d.fail(nil, line, "rock.depth brings gravity in: give fluids.water_density and fluids.oil_density (%s)", m.Units.DensityUnit())
		return
	}
	if f.WaterDensity == f.OilDensity {
		d.warnAt(nil, rc.densityNodes[len(rc.densityNodes)-1], "fluids.water_density and fluids.oil_density are equal (%g %s): with rock.depth given, gravity has no effect on the flood", f.WaterDensity, m.Units.DensityUnit())
	} else if f.WaterDensity < f.OilDensity {
		d.warnAt(nil, rc.densityNodes[len(rc.densityNodes)-1], "fluids.oil_density %g %s is above fluids.water_density %g: the oil is the heavier phase and slumps down-dip", f.OilDensity, m.Units.DensityUnit(), f.WaterDensity)
	}
}

// describeGravity returns the lines Describe adds for a case with depth:
// the depth and dip ranges and the gravity number.
func describeGravity(m *Model) string {
	if m.Depth == nil {
		return ""
	}
	length, _, _, _, _, _ := m.Units.Labels()
	dlo, dhi := math.Inf(1), math.Inf(-1)
	for k, a := range m.Active {
		if a {
			dlo, dhi = math.Min(dlo, m.Depth[k]), math.Max(dhi, m.Depth[k])
		}
	}
	lo, hi, _ := m.DipRange()
	s := fmt.Sprintf("  depth       %.6g to %.6g %s (positive down); dip %.3g to %.3g degrees\n", dlo, dhi, length, lo, hi)
	s += fmt.Sprintf("  densities   water %g, oil %g %s\n", m.Fluids.WaterDensity, m.Fluids.OilDensity, m.Units.DensityUnit())
	if ng := m.GravityNumber(); !math.IsNaN(ng) {
		s += fmt.Sprintf("  gravity     gravity number %.3g (gravity over viscous velocity; above about 0.1 gravity matters)\n", ng)
	} else {
		s += "  gravity     gravity number not defined (no rate-controlled injector open at the start)\n"
	}
	return s
}

package pressure

import (
	"errors"
	"fmt"
	"math"

	"floodtrace/reservoir"
)

// EquivalentRadius returns Peaceman's equivalent well-block radius of an
// anisotropic rectangular cell (Peaceman 1983):
//
//	ro = 0.28 * sqrt(sqrt(ky/kx)*dx^2 + sqrt(kx/ky)*dy^2) / ((ky/kx)^(1/4) + (kx/ky)^(1/4)).
//
// For a square isotropic cell it reduces to 0.1985*dx, the radius found
// for the square grid by Peaceman (1978). The pressure of the well block
// equals the steady radial pressure at distance ro from the well.
func EquivalentRadius(kx, ky, dx, dy float64) float64 {
	r := ky / kx
	s := math.Sqrt(r)
	q := math.Sqrt(s)
	return 0.28 * math.Sqrt(s*dx*dx+dy*dy/s) / (q + 1/q)
}

// WellIndex returns Peaceman's (1983) well index of a vertical well in a
// cell of permeabilities kx, ky, net thickness h and size dx by dy:
//
//	WI = 2*pi*darcy*sqrt(kx*ky)*h / (ln(ro/rw) + skin),
//
// with ro from EquivalentRadius and darcy the transmissibility factor of
// the unit system (reservoir.UnitSystem.Darcy). Multiplied by the total
// mobility it relates the rate to the drawdown: q = lambda*WI*(pbh - p).
// It returns an error if the data give no positive index, for instance a
// wellbore radius larger than ro with no skin to compensate.
func WellIndex(darcy, kx, ky, h, dx, dy, rw, skin float64) (float64, error) {
	if !(kx > 0) || !(ky > 0) || !(h > 0) || !(dx > 0) || !(dy > 0) || math.IsInf(kx+ky+h+dx+dy, 0) {
		return 0, fmt.Errorf("well index needs positive permeability, thickness and cell size (kx=%g ky=%g h=%g dx=%g dy=%g)", kx, ky, h, dx, dy)
	}
	if !(rw > 0) || math.IsInf(rw, 0) || math.IsNaN(skin) || math.IsInf(skin, 0) {
		return 0, fmt.Errorf("well index needs a positive wellbore radius and a finite skin (rw=%g skin=%g)", rw, skin)
	}
	ro := EquivalentRadius(kx, ky, dx, dy)
	den := math.Log(ro/rw) + skin
	if !(den > 0) {
		return 0, fmt.Errorf("ln(ro/rw)+skin = %.4g is not positive (ro=%.4g, rw=%g, skin=%g): the wellbore is too large for its cell", den, ro, rw, skin)
	}
	return 2 * math.Pi * darcy * math.Sqrt(kx*ky) * h / den, nil
}

// InitialMobility returns the total mobility of the initial state,
// krw(Swi)/muw + kro(Swi)/muo, used when Input.Mobility is nil.
func InitialMobility(m *reservoir.Model) (float64, error) {
	if m == nil {
		return 0, errors.New("pressure: no model")
	}
	f := m.Fluids
	if m.RelPerm == nil {
		return 0, errors.New("pressure: the model has no relative permeability, so the initial mobility is unknown")
	}
	if !(f.WaterViscosity > 0) || !(f.OilViscosity > 0) {
		return 0, fmt.Errorf("pressure: viscosities must be positive (water %g, oil %g)", f.WaterViscosity, f.OilViscosity)
	}
	sw := f.InitialSw
	lam := m.RelPerm.Krw(sw)/f.WaterViscosity + m.RelPerm.Kro(sw)/f.OilViscosity
	if !(lam > 0) || math.IsInf(lam, 0) {
		return 0, fmt.Errorf("pressure: the initial total mobility krw(%g)/muw + kro(%g)/muo = %g is not positive", sw, sw, lam)
	}
	return lam, nil
}

// cellName formats a cell for messages: column i and row j counted from 0
// at the south-west corner.
func cellName(g reservoir.Grid, k int) string {
	i, j := g.IJ(k)
	return fmt.Sprintf("cell (i=%d, j=%d)", i, j)
}

// checkModel validates the arrays of the model that the solve reads.
func checkModel(m *reservoir.Model) error {
	if m == nil {
		return errors.New("pressure: no model")
	}
	g := m.Grid
	if g.NX <= 0 || g.NY <= 0 {
		return fmt.Errorf("pressure: grid of %d x %d cells", g.NX, g.NY)
	}
	if !(g.DX > 0) || !(g.DY > 0) || math.IsInf(g.DX+g.DY, 0) {
		return fmt.Errorf("pressure: cell size %g x %g is not positive", g.DX, g.DY)
	}
	n := g.N()
	for _, a := range []struct {
		name string
		len  int
		want int
	}{
		{"PermEast", len(m.PermEast), n}, {"PermNorth", len(m.PermNorth), n}, {"Thickness", len(m.Thickness), n},
		{"Active", len(m.Active), n}, {"TransMultX", len(m.TransMultX), g.NXFaces()},
		{"TransMultY", len(m.TransMultY), g.NYFaces()},
	} {
		if a.len != a.want {
			return fmt.Errorf("pressure: %s has %d values, the grid needs %d", a.name, a.len, a.want)
		}
	}
	for k := 0; k < n; k++ {
		if !m.Active[k] {
			continue
		}
		kx, ky, h := m.PermEast[k], m.PermNorth[k], m.Thickness[k]
		if !(kx >= 0) || !(ky >= 0) || !(h >= 0) || math.IsInf(kx+ky+h, 0) {
			return fmt.Errorf("pressure: %s: permeability (%g, %g) and thickness %g must be finite and not negative", cellName(g, k), kx, ky, h)
		}
	}
	for f, v := range m.TransMultX {
		if !(v >= 0) || math.IsInf(v, 0) {
			return fmt.Errorf("pressure: x-face %d: transmissibility multiplier %g", f, v)
		}
	}
	for f, v := range m.TransMultY {
		if !(v >= 0) || math.IsInf(v, 0) {
			return fmt.Errorf("pressure: y-face %d: transmissibility multiplier %g", f, v)
		}
	}
	return nil
}

// mobility returns the total mobility per cell: in.Mobility checked, or
// the uniform initial mobility.
func mobility(in Input) ([]float64, error) {
	m := in.Model
	n := m.Grid.N()
	if in.Mobility == nil {
		lam, err := InitialMobility(m)
		if err != nil {
			return nil, err
		}
		mob := make([]float64, n)
		for k := range mob {
			mob[k] = lam
		}
		return mob, nil
	}
	if len(in.Mobility) != n {
		return nil, fmt.Errorf("pressure: Mobility has %d values, the grid has %d cells", len(in.Mobility), n)
	}
	for k, v := range in.Mobility {
		if m.Active[k] && (!(v >= 0) || math.IsInf(v, 0)) {
			return nil, fmt.Errorf("pressure: %s: total mobility %g must be finite and not negative", cellName(m.Grid, k), v)
		}
	}
	return in.Mobility, nil
}

// transmissibilities returns the face transmissibilities including the
// total mobility, in rate per pressure: the harmonic combination of the
// two half-cell values lambda*k*h*dy/(dx/2) (x faces; y faces with ky and
// dx, dy swapped), times the Darcy factor and the face multiplier.
// Boundary faces and faces touching an inactive cell get 0.
func transmissibilities(m *reservoir.Model, mob []float64) (tx, ty []float64) {
	g := m.Grid
	c := m.Units.Darcy()
	tx = make([]float64, g.NXFaces())
	ty = make([]float64, g.NYFaces())
	ax := 2 * g.DY / g.DX // half-cell geometric factor dy/(dx/2)
	ay := 2 * g.DX / g.DY
	for j := 0; j < g.NY; j++ {
		for i := 1; i < g.NX; i++ {
			w, e := g.Index(i-1, j), g.Index(i, j)
			if !m.Active[w] || !m.Active[e] {
				continue
			}
			t1 := mob[w] * m.PermEast[w] * m.Thickness[w] * ax
			t2 := mob[e] * m.PermEast[e] * m.Thickness[e] * ax
			if t1 > 0 && t2 > 0 {
				tx[g.XFace(i, j)] = c * m.TransMultX[g.XFace(i, j)] * t1 * t2 / (t1 + t2)
			}
		}
	}
	for j := 1; j < g.NY; j++ {
		for i := 0; i < g.NX; i++ {
			s, n := g.Index(i, j-1), g.Index(i, j)
			if !m.Active[s] || !m.Active[n] {
				continue
			}
			t1 := mob[s] * m.PermNorth[s] * m.Thickness[s] * ay
			t2 := mob[n] * m.PermNorth[n] * m.Thickness[n] * ay
			if t1 > 0 && t2 > 0 {
				ty[g.YFace(i, j)] = c * m.TransMultY[g.YFace(i, j)] * t1 * t2 / (t1 + t2)
			}
		}
	}
	return tx, ty
}

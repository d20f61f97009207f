package transport

import (
	"errors"
	"fmt"
	"math"

	"floodtrace/reservoir"
)

// Curve is a fractional-flow curve: the water fraction of the total flow
// fw(s) at water saturation s in [0, 1], and its derivative, the
// dimensionless speed of saturation s along time of flight.
type Curve interface {
	Fw(s float64) float64
	DFw(s float64) float64
}

// Func adapts a plain function of saturation on [0, 1] to a Curve. Its
// derivative is computed numerically by Richardson extrapolation of finite
// differences (Ridders 1982), one-sided at 0 and 1, so the function must
// be smooth on [0, 1] but need not be defined outside it.
type Func func(s float64) float64

// Fw returns f(s).
func (f Func) Fw(s float64) float64 { return f(s) }

// DFw returns the numerical derivative of f at s (Ridders 1982).
func (f Func) DFw(s float64) float64 { return ridders(f, s, 0, 1) }

// FracFlow is the fractional flow of water in a water-oil system without
// gravity or capillarity (Buckley and Leverett 1942):
//
//	fw = (krw/muw) / (krw/muw + kro/muo).
//
// For reservoir.Corey curves the derivative is analytic; for other
// relative-permeability models it is numerical (Ridders 1982) on the
// mobile range [swc, 1-sor], and zero outside it.
type FracFlow struct {
	rp       reservoir.RelPerm
	corey    *reservoir.Corey
	muW, muO float64
	swc, sor float64
}

// NewFracFlow returns the fractional-flow curve of relative permeabilities
// rp with water viscosity muW and oil viscosity muO. Call Validate to check
// the inputs; curves built from invalid inputs return NaN, which NewRiemann
// and NewFlux report as errors.
func NewFracFlow(rp reservoir.RelPerm, muW, muO float64) *FracFlow {
	f := &FracFlow{rp: rp, muW: muW, muO: muO}
	switch c := rp.(type) {
	case reservoir.Corey:
		f.corey = &c
	case *reservoir.Corey:
		if c == nil {
			f.rp = nil // a typed nil: no curves
		} else {
			cc := *c
			f.corey = &cc
		}
	}
	if f.rp != nil {
		f.swc, f.sor = f.rp.Endpoints()
	}
	return f
}

// Validate reports whether the curve is usable: relative permeabilities
// given, positive finite viscosities, and end points with swc+sor < 1.
func (f *FracFlow) Validate() error {
	switch {
	case f == nil || f.rp == nil:
		return errors.New("transport: fractional flow has no relative permeability")
	case !(f.muW > 0) || math.IsInf(f.muW, 0):
		return fmt.Errorf("transport: water viscosity %g must be positive", f.muW)
	case !(f.muO > 0) || math.IsInf(f.muO, 0):
		return fmt.Errorf("transport: oil viscosity %g must be positive", f.muO)
	case !(f.swc >= 0) || !(f.sor >= 0) || !(f.swc+f.sor < 1):
		return fmt.Errorf("transport: end points swc=%g, sor=%g leave no mobile range", f.swc, f.sor)
	}
	return nil
}

// Endpoints returns the connate water and residual oil saturations of the
// underlying relative permeabilities.
func (f *FracFlow) Endpoints() (swc, sor float64) { return f.swc, f.sor }

// Mobility returns the total mobility krw/muw + kro/muo at saturation s
// (reciprocal viscosity units).
func (f *FracFlow) Mobility(s float64) float64 {
	if f.rp == nil {
		return math.NaN()
	}
	return f.rp.Krw(s)/f.muW + f.rp.Kro(s)/f.muO
}

// Fw returns the water fractional flow at saturation s (Buckley and
// Leverett 1942). Where both phases are immobile it returns 0 below the
// middle of the mobile range and 1 above it. Without relative
// permeabilities it returns NaN.
func (f *FracFlow) Fw(s float64) float64 {
	if f.rp == nil {
		return math.NaN()
	}
	lw := f.rp.Krw(s) / f.muW
	lo := f.rp.Kro(s) / f.muO
	t := lw + lo
	if t == 0 {
		if s > 0.5*(f.swc+1-f.sor) {
			return 1
		}
		return 0
	}
	return lw / t
}

// DFw returns dfw/ds at s: analytic for Corey curves (one-sided at the end
// points of the mobile range, from the inside), numerical otherwise
// (Ridders 1982).
func (f *FracFlow) DFw(s float64) float64 {
	if f.rp == nil {
		return math.NaN()
	}
	if f.corey == nil {
		lo, hi := f.swc, 1-f.sor
		if s < lo || s > hi {
			return 0
		}
		return ridders(f.Fw, s, lo, hi)
	}
	c := f.corey
	d := 1 - c.Swc - c.Sor
	if d <= 0 {
		return 0
	}
	x := (s - c.Swc) / d
	if x < 0 || x > 1 {
		return 0
	}
	// x^n = x * x^(n-1): two powers instead of four.
	pw, po := math.Pow(x, c.Nw-1), math.Pow(1-x, c.No-1)
	krw, kro := c.KrwMax*x*pw, c.KroMax*(1-x)*po
	if x == 0 || c.Nw == 0 {
		krw = c.KrwMax * math.Pow(x, c.Nw)
	}
	if x == 1 || c.No == 0 {
		kro = c.KroMax * math.Pow(1-x, c.No)
	}
	dkrw, dkro := 0.0, 0.0
	if c.Nw != 0 {
		dkrw = c.KrwMax * c.Nw * pw / d
	}
	if c.No != 0 {
		dkro = -c.KroMax * c.No * po / d
	}
	lw, lo := krw/f.muW, kro/f.muO
	dlw, dlo := dkrw/f.muW, dkro/f.muO
	t := lw + lo
	if t == 0 {
		return 0
	}
	return (dlw*lo - lw*dlo) / (t * t)
}

// EndpointMobilityRatio returns M = (krw(1-sor)/muw) / (kro(swc)/muo), the
// end-point mobility ratio of water displacing oil (Craig 1971).
func (f *FracFlow) EndpointMobilityRatio() float64 {
	if f.rp == nil {
		return math.NaN()
	}
	return (f.rp.Krw(1-f.sor) / f.muW) / (f.rp.Kro(f.swc) / f.muO)
}

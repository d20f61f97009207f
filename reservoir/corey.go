package reservoir

import "math"

// Corey is the Corey (1954) power-law relative permeability model, in the
// Brooks-Corey form common in practice:
//
//	krw = KrwMax * Swn^Nw,  kro = KroMax * (1-Swn)^No,  Swn = (Sw-Swc)/(1-Swc-Sor)
//
// with Swn clamped to [0, 1].
type Corey struct {
	Swc, Sor       float64
	KrwMax, KroMax float64
	Nw, No         float64
}

func (c Corey) norm(sw float64) float64 {
	d := 1 - c.Swc - c.Sor
	if d <= 0 {
		return 0
	}
	s := (sw - c.Swc) / d
	return math.Min(1, math.Max(0, s))
}

// Krw returns the water relative permeability at water saturation sw.
func (c Corey) Krw(sw float64) float64 { return c.KrwMax * power(c.norm(sw), c.Nw) }

// Kro returns the oil relative permeability at water saturation sw.
func (c Corey) Kro(sw float64) float64 { return c.KroMax * power(1-c.norm(sw), c.No) }

// power is math.Pow(x, n) for x in [0, 1], with the common Corey exponent
// 2 as one product: math.Pow's repeated squaring of the mantissa rounds
// once, as x*x does, so the two agree bit for bit wherever x*x is a normal
// number (x above about 1.5e-154; tested), and smaller x go to math.Pow.
// The product takes about 0.6 ns against math.Pow's 12 ns in a loop here,
// and the update engine evaluates it twice per cell at every pressure
// solve.
func power(x, n float64) float64 {
	if n == 2 && x > 1e-150 {
		return x * x
	}
	return math.Pow(x, n)
}

// Endpoints returns Swc and Sor.
func (c Corey) Endpoints() (swc, sor float64) { return c.Swc, c.Sor }

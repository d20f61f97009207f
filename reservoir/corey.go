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
func (c Corey) Krw(sw float64) float64 { return c.KrwMax * math.Pow(c.norm(sw), c.Nw) }

// Kro returns the oil relative permeability at water saturation sw.
func (c Corey) Kro(sw float64) float64 { return c.KroMax * math.Pow(1-c.norm(sw), c.No) }

// Endpoints returns Swc and Sor.
func (c Corey) Endpoints() (swc, sor float64) { return c.Swc, c.Sor }

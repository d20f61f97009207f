package synth

import "math"

// correlation returns the correlation of the standardised field at reduced
// distance r (lag divided by the practical range in its direction), the
// complement of the normalised variogram gamma(h)/sigma^2 (Deutsch and
// Journel 1998, GSLIB, from memory).
func correlation(m Variogram, r float64) float64 {
	switch m {
	case Gaussian:
		return math.Exp(-3 * r * r)
	case Spherical:
		if r >= 1 {
			return 0
		}
		return 1 - 1.5*r + 0.5*r*r*r
	default:
		return math.Exp(-3 * r)
	}
}

// supportFactor is the number of practical ranges beyond which the model's
// correlation is negligible (below about 1e-4) and padding may stop.
func supportFactor(m Variogram) float64 {
	switch m {
	case Gaussian:
		return 2 // exp(-12) ~ 6e-6
	case Spherical:
		return 1 // exactly zero
	default:
		return 3 // exp(-9) ~ 1.2e-4
	}
}

// anisotropy maps a lag in map coordinates (x east, y north) to a reduced
// distance: geometric anisotropy, the lag rotated into the frame of the
// major axis (azimuth clockwise from north) and each component divided by
// the range along it (Deutsch and Journel 1998, from memory).
type anisotropy struct {
	ux, uy       float64 // unit vector of the major axis
	vx, vy       float64 // unit vector of the minor axis
	invA, invB   float64 // 1/RangeMajor, 1/RangeMinor
	extX, extY   float64 // half-widths of the range ellipse along x and y
	major, minor float64
}

func newAnisotropy(major, minor, azimuthDeg float64) anisotropy {
	th := azimuthDeg * math.Pi / 180
	sin, cos := math.Sincos(th)
	return anisotropy{
		ux: sin, uy: cos,
		vx: cos, vy: -sin,
		invA: 1 / major, invB: 1 / minor,
		extX:  math.Hypot(major*sin, minor*cos),
		extY:  math.Hypot(major*cos, minor*sin),
		major: major, minor: minor,
	}
}

// reduced returns the reduced distance of the lag (hx, hy).
func (a anisotropy) reduced(hx, hy float64) float64 {
	p := (hx*a.ux + hy*a.uy) * a.invA
	q := (hx*a.vx + hy*a.vy) * a.invB
	return math.Hypot(p, q)
}

package synth

import (
	"math"
	"testing"
)

// refCorrelation is the correlation (1 - normalised variogram) of the three
// models in terms of the practical range a (Deutsch and Journel 1998,
// GSLIB, from memory):
//
//	exponential 1 - exp(-3h/a), gaussian 1 - exp(-3h^2/a^2),
//	spherical 1.5h/a - 0.5(h/a)^3 up to a, 1 beyond.
func refCorrelation(model Variogram, h, a float64) float64 {
	x := h / a
	switch model {
	case Gaussian:
		return math.Exp(-3 * x * x)
	case Spherical:
		if x >= 1 {
			return 0
		}
		return 1 - (1.5*x - 0.5*x*x*x)
	default:
		return math.Exp(-3 * x)
	}
}

// refCov returns the covariance of ln k between cells dx, dy apart (in
// cells) for settings s, with geometric anisotropy written as the quadratic
// form h^T A h, A = R^T diag(1/a^2, 1/b^2) R with R the rotation taking
// map axes to the major/minor frame (Deutsch and Journel 1998, from memory).
func refCov(t testing.TB, s Settings) func(dx, dy int) float64 {
	t.Helper()
	r, err := s.resolved()
	if err != nil {
		t.Fatal(err)
	}
	th := r.Azimuth * math.Pi / 180
	// Major axis direction (east, north) components.
	mx, my := math.Sin(th), math.Cos(th)
	ia, ib := 1/(r.RangeMajor*r.RangeMajor), 1/(r.RangeMinor*r.RangeMinor)
	a11 := ia*mx*mx + ib*my*my
	a22 := ia*my*my + ib*mx*mx
	a12 := (ia - ib) * mx * my
	v := r.LogStd * r.LogStd
	return func(dx, dy int) float64 {
		hx, hy := float64(dx)*r.DX, float64(dy)*r.DY
		q := a11*hx*hx + 2*a12*hx*hy + a22*hy*hy
		return v * refCorrelation(r.Model, math.Sqrt(max(q, 0)), 1)
	}
}

// lagSum returns sum over all ordered cell pairs of an nx by ny rectangle
// of f(offset): sum_{dx,dy} (nx-|dx|)(ny-|dy|) f(dx, dy).
func lagSum(nx, ny int, f func(dx, dy int) float64) float64 {
	var s float64
	for dy := -(ny - 1); dy < ny; dy++ {
		wy := float64(ny - abs(dy))
		for dx := -(nx - 1); dx < nx; dx++ {
			s += wy * float64(nx-abs(dx)) * f(dx, dy)
		}
	}
	return s
}

func abs(i int) int {
	if i < 0 {
		return -i
	}
	return i
}

// logField returns ln k.
func logField(perm []float64) []float64 {
	z := make([]float64, len(perm))
	for i, k := range perm {
		z[i] = math.Log(k)
	}
	return z
}

// experimentalVariogram returns the classical estimator
// gamma(h) = 1/(2 N(h)) sum (z(x+h) - z(x))^2 over all pairs in the grid
// separated by (lx, ly) cells (Matheron 1962; Deutsch and Journel 1998,
// from memory) and N(h).
func experimentalVariogram(z []float64, nx, ny, lx, ly int) (float64, int) {
	var s float64
	n := 0
	for j := max(0, -ly); j < min(ny, ny-ly); j++ {
		for i := max(0, -lx); i < min(nx, nx-lx); i++ {
			d := z[(j+ly)*nx+i+lx] - z[j*nx+i]
			s += d * d
			n++
		}
	}
	return s / (2 * float64(n)), n
}

// variogramStdErr returns the exact standard deviation of the classical
// variogram estimator at lag (lx, ly) for a Gaussian field of covariance c:
// Var = 1/(2 N^2) sum_{a,b} (2C(d) - C(d+h) - C(d-h))^2 over pairs of
// increments with tail offset d (Isserlis' theorem for the fourth moments
// of a Gaussian vector, from memory).
func variogramStdErr(c func(dx, dy int) float64, nx, ny, lx, ly int) float64 {
	px, py := nx-abs(lx), ny-abs(ly)
	n := float64(px * py)
	s := lagSum(px, py, func(dx, dy int) float64 {
		g := 2*c(dx, dy) - c(dx+lx, dy+ly) - c(dx-lx, dy-ly)
		return g * g
	})
	return math.Sqrt(s / (2 * n * n))
}

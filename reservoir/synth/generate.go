package synth

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
)

// pcgStream is the second PCG seed word; the first is the user's seed.
const pcgStream = 0x5eed_f10d_7ace_0001

// Thresholds on the fraction of spectral mass in negative eigenvalues of the
// circulant embedding (sum of |negative| over sum of positive eigenvalues).
const (
	// spectrumTolerance: below this the embedding counts as nonnegative
	// definite and padding stops growing.
	spectrumTolerance = 1e-4
	// spectrumWarn: above this, clipping is reported as a warning.
	spectrumWarn = 1e-3
	// spectrumRefuse: above this, the field would miss the requested
	// variogram visibly and NewGenerator refuses.
	spectrumRefuse = 2e-2
)

// ErrEmbedding is returned (wrapped) when no periodic embedding within the
// memory budget has a nearly nonnegative spectrum, which happens when the
// range is hundreds of cells or more.
var ErrEmbedding = errors.New("synth: circulant embedding is not positive definite")

// Generator draws realizations of one Settings. It holds the square roots
// of the eigenvalues of the circulant embedding, so realizations after the
// first cost one 2D FFT each. A Generator is safe for concurrent use.
type Generator struct {
	s        Settings
	mx, my   int
	amp      []float64 // sqrt(lambda/(mx*my)) per torus cell
	clipped  float64
	warnings []string
}

// Realization is one drawn map pair.
type Realization struct {
	Seed uint64
	// Perm is the permeability in md and Poro the porosity, cells
	// k = j*NX + i with j = 0 the southern row.
	Perm, Poro []float64
	// PoroClipped counts cells whose porosity was clipped to
	// [MinPorosity, MaxPorosity].
	PoroClipped int
	// Warnings lists anything the caller should know: clipped spectrum,
	// clipped porosity.
	Warnings []string
}

// NewGenerator validates s, fills in its defaults and builds the circulant
// embedding of its covariance (Dietrich and Newsam 1997): the grid is padded
// to a periodic domain of at least NX + k*range by NY + k*range cells (k = 3
// for the exponential model, 2 Gaussian, 1 spherical, where the correlation
// has fallen below about 1e-4; never more than doubling the grid, which is
// already exact for every lag inside it; sizes rounded up to products of
// 2, 3 and 5). The covariance on the torus, symmetrised at the half-period
// lags, is transformed by a 2D FFT to give the eigenvalues. If the negative
// ones carry more than 1e-4 of the spectral mass the domain is doubled (in
// the direction whose half period spans fewer ranges) and tried again, within a budget of 2^23 cells; what remains is clipped to
// zero, reported as a warning above 1e-3 and refused above 2e-2. The clipped
// fraction bounds the absolute error of every covariance value relative to
// the sill.
func NewGenerator(s Settings) (*Generator, error) {
	s, err := s.resolved()
	if err != nil {
		return nil, err
	}
	an := newAnisotropy(s.RangeMajor, s.RangeMinor, s.Azimuth)
	k := supportFactor(s.Model)
	pad := func(n int, ext, d float64) int {
		p := k * ext / d
		if p >= float64(n) {
			return n
		}
		return int(math.Ceil(p))
	}
	mx := nextFast(s.NX + pad(s.NX, an.extX, s.DX))
	my := nextFast(s.NY + pad(s.NY, an.extY, s.DY))
	if mx*my > embeddingBudget {
		return nil, fmt.Errorf("synth: periodic embedding of %dx%d cells exceeds the budget of %d cells; use a coarser grid or a shorter range", mx, my, embeddingBudget)
	}
	var lam []float64
	var neg float64
	for {
		lam, neg = spectrum(s, an, mx, my)
		if neg <= spectrumTolerance {
			break
		}
		// Grow the direction whose half period is shorter in ranges (both
		// when they are within 20 % of each other).
		rx := float64(mx) * s.DX / an.extX
		ry := float64(my) * s.DY / an.extY
		nx, ny := mx, my
		if rx <= 1.2*ry {
			nx = nextFast(2 * mx)
		}
		if ry <= 1.2*rx {
			ny = nextFast(2 * my)
		}
		if nx*ny > embeddingBudget {
			break
		}
		mx, my = nx, ny
	}
	g := &Generator{s: s, mx: mx, my: my, clipped: neg}
	if neg > spectrumRefuse {
		return nil, fmt.Errorf("%w: %.2g of the spectral mass is negative on a %dx%d torus (the limit is %g); use a shorter range or a coarser grid",
			ErrEmbedding, neg, mx, my, spectrumRefuse)
	}
	if neg > spectrumWarn {
		g.warnings = append(g.warnings, fmt.Sprintf(
			"circulant embedding %dx%d: %.2g of the spectral mass was negative and set to zero; the field variance is approximate", mx, my, neg))
	}
	scale := 1 / float64(mx*my)
	g.amp = lam
	for i, l := range lam {
		g.amp[i] = math.Sqrt(max(l, 0) * scale)
	}
	return g, nil
}

// spectrum returns the eigenvalues of the circulant embedding of the
// standardised covariance on an mx by my torus and the fraction of spectral
// mass in negative eigenvalues.
func spectrum(s Settings, an anisotropy, mx, my int) ([]float64, float64) {
	c := make([]complex128, mx*my)
	lags := func(i, m int, d float64) (float64, float64, int) {
		switch {
		case 2*i < m:
			return float64(i) * d, 0, 1
		case 2*i > m:
			return float64(i-m) * d, 0, 1
		default: // half period: both signs, averaged to keep the torus symmetric
			h := float64(i) * d
			return h, -h, 2
		}
	}
	parallelRange(my, func(lo, hi int) {
		var hy [2]float64
		var hx [2]float64
		for j := lo; j < hi; j++ {
			y0, y1, ny := lags(j, my, s.DY)
			hy[0], hy[1] = y0, y1
			for i := range mx {
				x0, x1, nx := lags(i, mx, s.DX)
				hx[0], hx[1] = x0, x1
				var sum float64
				for b := range ny {
					for a := range nx {
						sum += correlation(s.Model, an.reduced(hx[a], hy[b]))
					}
				}
				c[j*mx+i] = complex(sum/float64(nx*ny), 0)
			}
		}
	})
	fft2(c, mx, my)
	lam := make([]float64, len(c))
	var pos, neg float64
	for i, v := range c {
		l := real(v)
		lam[i] = l
		if l >= 0 {
			pos += l
		} else {
			neg -= l
		}
	}
	if pos == 0 {
		return lam, math.Inf(1)
	}
	return lam, neg / pos
}

// Settings returns the settings with defaults filled in.
func (g *Generator) Settings() Settings { return g.s }

// Embedding returns the size of the periodic domain in cells.
func (g *Generator) Embedding() (mx, my int) { return g.mx, g.my }

// ClippedSpectrum returns the fraction of spectral mass that was negative
// and set to zero (0 for an exact embedding).
func (g *Generator) ClippedSpectrum() float64 { return g.clipped }

// Realize draws the realization of the given seed: complex white noise from
// a PCG generator (math/rand/v2) seeded with seed, two standard normal
// draws per torus cell in row order, scaled by the square roots of the
// eigenvalues and transformed by a 2D FFT. Its real and imaginary parts are
// two independent Gaussian fields with the requested covariance (Dietrich
// and Newsam 1997; Wood and Chan 1994): the first, z, gives
// ln k = LogMean + LogStd*z, the second, z2, gives porosity
// phi = PoroMean + PoroStd*(rho*z + sqrt(1-rho^2)*z2), clipped to
// [MinPorosity, MaxPorosity]. The sample moments are not forced to the
// requested ones.
func (g *Generator) Realize(seed uint64) *Realization {
	s := g.s
	rng := rand.New(rand.NewPCG(seed, pcgStream))
	w := make([]complex128, g.mx*g.my)
	for i, a := range g.amp {
		re := rng.NormFloat64()
		im := rng.NormFloat64()
		w[i] = complex(a*re, a*im)
	}
	fft2(w, g.mx, g.my)
	n := s.NX * s.NY
	r := &Realization{Seed: seed, Perm: make([]float64, n), Poro: make([]float64, n)}
	rho := s.PoroCorrelation
	rho2 := math.Sqrt(max(0, 1-rho*rho))
	for j := range s.NY {
		row := w[j*g.mx : j*g.mx+s.NX]
		for i, v := range row {
			k := j*s.NX + i
			z, z2 := real(v), imag(v)
			r.Perm[k] = math.Exp(s.LogMean + s.LogStd*z)
			phi := s.PoroMean + s.PoroStd*(rho*z+rho2*z2)
			if phi < MinPorosity || phi > MaxPorosity {
				phi = min(max(phi, MinPorosity), MaxPorosity)
				r.PoroClipped++
			}
			r.Poro[k] = phi
		}
	}
	r.Warnings = append(r.Warnings, g.warnings...)
	if r.PoroClipped > 0 {
		r.Warnings = append(r.Warnings, fmt.Sprintf("porosity clipped to [%g, %g] in %d of %d cells",
			MinPorosity, MaxPorosity, r.PoroClipped, n))
	}
	return r
}

// Generate returns the permeability (md) and porosity maps of s.Seed, cells
// k = j*NX + i with j = 0 the southern row, by circulant embedding
// (Dietrich and Newsam 1997; see NewGenerator and Generator.Realize).
// Warnings are dropped; use NewGenerator to see them.
func Generate(s Settings) (perm, poro []float64, err error) {
	g, err := NewGenerator(s)
	if err != nil {
		return nil, nil, err
	}
	r := g.Realize(s.Seed)
	return r.Perm, r.Poro, nil
}

// Ensemble returns n realizations of s with seeds s.Seed, s.Seed+1, ...,
// s.Seed+n-1 (Dietrich and Newsam 1997; see Generate). Member m equals
// Generate with Seed = s.Seed+m.
func Ensemble(s Settings, n int) (perms, poros [][]float64, err error) {
	if n <= 0 {
		return nil, nil, bad("n", float64(n), "ensemble size must be positive")
	}
	g, err := NewGenerator(s)
	if err != nil {
		return nil, nil, err
	}
	perms = make([][]float64, n)
	poros = make([][]float64, n)
	for m := range n {
		r := g.Realize(s.Seed + uint64(m))
		perms[m], poros[m] = r.Perm, r.Poro
	}
	return perms, poros, nil
}

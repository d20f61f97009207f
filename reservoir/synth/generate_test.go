package synth

import (
	"errors"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"runtime"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"
)

// zSigma is the number of standard deviations of sampling error a
// statistic may stray before a check fails. Seeds are fixed, so a passing
// check passes forever; 4 sigma keeps the chance that an honest generator
// fails one of the ~60 checks below about 0.4 %.
const zSigma = 4

// TestMomentsOfLogPerm: the sample mean and variance of ln k, averaged over
// R realizations, match LogMean and LogStd^2 within sampling error. The
// sample mean of a correlated field has variance
// (1/N^2) sum_{ij} C(x_i - x_j) (a lag sum; far above sigma^2/N), the
// sample variance has expectation sigma^2 - Var(mean) and, for a Gaussian
// field, variance about (2/N^2) sum_{ij} C(x_i - x_j)^2 (Isserlis; both
// standard results, from memory).
func TestMomentsOfLogPerm(t *testing.T) {
	const R = 6
	cases := []struct {
		name string
		s    Settings
	}{
		{"exponential iso range 10 cells", Settings{NX: 256, NY: 256, RangeMajor: 10, LogMean: math.Log(150), LogStd: 1.2}},
		{"exponential aniso 30/8 az 30", Settings{NX: 256, NY: 200, DX: 25, DY: 20, RangeMajor: 600, RangeMinor: 160, Azimuth: 30, LogMean: 3, LogStd: 0.8}},
		{"gaussian range 12 cells", Settings{NX: 200, NY: 256, DX: 10, DY: 10, RangeMajor: 120, Model: Gaussian, LogMean: 5, LogStd: 1.5}},
		{"spherical aniso az 120", Settings{NX: 256, NY: 256, RangeMajor: 25, RangeMinor: 10, Azimuth: 120, Model: Spherical, LogMean: 2, LogStd: 0.5}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			g, err := NewGenerator(tc.s)
			if err != nil {
				t.Fatal(err)
			}
			s := g.Settings()
			n := float64(s.NX * s.NY)
			c := refCov(t, s)
			varMean := lagSum(s.NX, s.NY, c) / (n * n)
			varVar := 2 * lagSum(s.NX, s.NY, func(dx, dy int) float64 { v := c(dx, dy); return v * v }) / (n * n)
			var meanSum, varSum float64
			for r := range R {
				z := logField(g.Realize(s.Seed + uint64(r)).Perm)
				m, v := stat.PopMeanVariance(z, nil)
				meanSum += m
				varSum += v
			}
			mean, variance := meanSum/R, varSum/R
			sill := s.LogStd * s.LogStd
			sdMean := math.Sqrt(varMean / R)
			sdVar := math.Sqrt(varVar / R)
			t.Logf("mean %.4f (want %.4f, sd %.4f; sigma/sqrt(N) would be %.4f), variance %.4f (want %.4f, sd %.4f)",
				mean, s.LogMean, sdMean, s.LogStd/math.Sqrt(n*R), variance, sill-varMean, sdVar)
			if d := math.Abs(mean - s.LogMean); d > zSigma*sdMean {
				t.Errorf("mean of ln k %.4f, want %.4f +- %.4f", mean, s.LogMean, zSigma*sdMean)
			}
			if d := math.Abs(variance - (sill - varMean)); d > zSigma*sdVar {
				t.Errorf("variance of ln k %.4f, want %.4f +- %.4f", variance, sill-varMean, zSigma*sdVar)
			}
		})
	}
}

// TestPorosity: porosity keeps its requested mean and standard deviation
// and its correlation with ln k. For the sample correlation of a pair of
// fields with a common correlogram rho(h) the standard error is about
// (1 - r^2) sqrt(sum_ij rho_ij^2)/N, the iid value (1 - r^2)/sqrt(N)
// (Fisher 1915, from memory) with N replaced by the effective number
// N^2 / sum_ij rho_ij^2 of a second-order statistic (common practice).
func TestPorosity(t *testing.T) {
	const R = 4
	cases := []struct {
		name    string
		s       Settings
		wantRho float64
	}{
		{"defaults", Settings{NX: 192, NY: 192, RangeMajor: 8, LogMean: 4, LogStd: 1}, DefaultPoroCorrelation},
		{"rho 0.3", Settings{NX: 192, NY: 192, RangeMajor: 8, LogMean: 4, LogStd: 1, PoroMean: 0.25, PoroStd: 0.04, PoroCorrelation: 0.3}, 0.3},
		{"rho -0.5 aniso", Settings{NX: 192, NY: 192, RangeMajor: 20, RangeMinor: 5, Azimuth: 60, LogMean: 4, LogStd: 1, PoroCorrelation: -0.5}, -0.5},
		{"literal zero", Settings{NX: 192, NY: 192, RangeMajor: 8, LogMean: 4, LogStd: 1, PoroMean: 0.18, PoroStd: 0.02, PoroLiteral: true}, 0},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			g, err := NewGenerator(tc.s)
			if err != nil {
				t.Fatal(err)
			}
			s := g.Settings()
			n := float64(s.NX * s.NY)
			c := refCov(t, s)
			s2 := s.LogStd * s.LogStd
			sumRho2 := lagSum(s.NX, s.NY, func(dx, dy int) float64 { v := c(dx, dy) / s2; return v * v })
			sumRho := lagSum(s.NX, s.NY, c) / s2
			var corr, mean, sd float64
			for r := range R {
				re := g.Realize(s.Seed + uint64(r))
				if re.PoroClipped != 0 {
					t.Fatalf("%d porosity cells clipped at 6+ standard deviations from the mean", re.PoroClipped)
				}
				corr += stat.Correlation(logField(re.Perm), re.Poro, nil)
				m, v := stat.PopMeanVariance(re.Poro, nil)
				mean += m
				sd += math.Sqrt(v)
			}
			corr, mean, sd = corr/R, mean/R, sd/R
			seCorr := (1 - tc.wantRho*tc.wantRho) * math.Sqrt(sumRho2/R) / n
			seMean := s.PoroStd * math.Sqrt(sumRho/R) / n
			seSD := s.PoroStd * math.Sqrt(sumRho2/(2*R)) / n // delta method on the variance
			wantSD := s.PoroStd * math.Sqrt(1-sumRho/(n*n))
			t.Logf("corr %.4f (want %.2f, se %.4f); mean %.5f (want %.3f, se %.5f); sd %.5f (want %.5f, se %.5f)",
				corr, tc.wantRho, seCorr, mean, s.PoroMean, seMean, sd, wantSD, seSD)
			if math.Abs(corr-tc.wantRho) > zSigma*seCorr {
				t.Errorf("corr(phi, ln k) = %.4f, want %.2f +- %.4f", corr, tc.wantRho, zSigma*seCorr)
			}
			if math.Abs(mean-s.PoroMean) > zSigma*seMean {
				t.Errorf("porosity mean %.5f, want %.3f +- %.5f", mean, s.PoroMean, zSigma*seMean)
			}
			if math.Abs(sd-wantSD) > zSigma*seSD+1e-4*s.PoroStd {
				t.Errorf("porosity sd %.5f, want %.5f +- %.5f", sd, wantSD, zSigma*seSD)
			}
		})
	}
}

// TestPorosityClipping: a wide porosity distribution is clipped to
// [0.01, 0.45] and the clipping is reported.
func TestPorosityClipping(t *testing.T) {
	g, err := NewGenerator(Settings{NX: 64, NY: 64, RangeMajor: 5, LogStd: 1, PoroMean: 0.2, PoroStd: 0.2})
	if err != nil {
		t.Fatal(err)
	}
	r := g.Realize(7)
	if r.PoroClipped == 0 {
		t.Fatal("no porosity clipped with PoroStd 0.2")
	}
	clipped := 0
	for _, p := range r.Poro {
		if p < MinPorosity || p > MaxPorosity {
			t.Fatalf("porosity %g outside [%g, %g]", p, MinPorosity, MaxPorosity)
		}
		if p == MinPorosity || p == MaxPorosity {
			clipped++
		}
	}
	if clipped != r.PoroClipped {
		t.Errorf("PoroClipped = %d, cells at the bounds = %d", r.PoroClipped, clipped)
	}
	if !slices.ContainsFunc(r.Warnings, func(w string) bool { return strings.Contains(w, "porosity clipped") }) {
		t.Errorf("no clipping warning in %q", r.Warnings)
	}
}

// TestJointCovarianceCholesky checks the whole covariance matrix of a small
// anisotropic field, not just a few lags: with C = L L^T from gonum's dense
// Cholesky (the reference) and the model covariance written out cell by
// cell, z^T C^-1 z is chi-square with N degrees of freedom (mean N,
// variance 2N), and for the independent second field z2 (porosity with
// correlation 0) the cross term z^T C^-1 z2 has mean 0 and variance N
// (standard multivariate normal results, from memory).
func TestJointCovarianceCholesky(t *testing.T) {
	const R = 600
	s := Settings{NX: 8, NY: 6, DX: 10, DY: 15, RangeMajor: 60, RangeMinor: 25, Azimuth: 30,
		LogMean: 3, LogStd: 0.9, PoroMean: 0.2, PoroStd: 0.02, PoroLiteral: true, Seed: 11}
	c := refCov(t, s)
	n := s.NX * s.NY
	cov := mat.NewSymDense(n, nil)
	for a := range n {
		for b := a; b < n; b++ {
			cov.SetSym(a, b, c(b%s.NX-a%s.NX, b/s.NX-a/s.NX)/(s.LogStd*s.LogStd))
		}
	}
	var chol mat.Cholesky
	if !chol.Factorize(cov) {
		t.Fatal("model covariance not positive definite")
	}
	perms, poros, err := Ensemble(s, R)
	if err != nil {
		t.Fatal(err)
	}
	var q1, q2, q12 float64
	z := mat.NewVecDense(n, nil)
	z2 := mat.NewVecDense(n, nil)
	var w mat.VecDense
	for r := range R {
		for k := range n {
			z.SetVec(k, (math.Log(perms[r][k])-s.LogMean)/s.LogStd)
			z2.SetVec(k, (poros[r][k]-s.PoroMean)/s.PoroStd)
		}
		if err := chol.SolveVecTo(&w, z); err != nil {
			t.Fatal(err)
		}
		q1 += mat.Dot(z, &w)
		q12 += mat.Dot(z2, &w)
		if err := chol.SolveVecTo(&w, z2); err != nil {
			t.Fatal(err)
		}
		q2 += mat.Dot(z2, &w)
	}
	q1, q2, q12 = q1/R, q2/R, q12/R
	sdQ := math.Sqrt(2 * float64(n) / R)
	sdX := math.Sqrt(float64(n) / R)
	t.Logf("mean z'C^-1 z = %.2f, z2'C^-1 z2 = %.2f (want %d +- %.2f); cross %.3f (want 0 +- %.3f)", q1, q2, n, sdQ, q12, sdX)
	for _, q := range []float64{q1, q2} {
		if math.Abs(q-float64(n)) > zSigma*sdQ {
			t.Errorf("mean quadratic form %.2f, want %d +- %.2f", q, n, zSigma*sdQ)
		}
	}
	if math.Abs(q12) > zSigma*sdX {
		t.Errorf("cross form %.3f, want 0 +- %.3f", q12, zSigma*sdX)
	}
}

// TestEmbeddingCovariance: the covariance implied by the clipped spectrum
// (the inverse DFT of the eigenvalues) equals the model at every lag inside
// the grid, within the 1e-4 truncation of the padding (Dietrich and Newsam
// 1997; model from Deutsch and Journel 1998, from memory).
func TestEmbeddingCovariance(t *testing.T) {
	cases := []struct {
		name string
		s    Settings
		tol  float64
	}{
		{"exponential", Settings{NX: 40, NY: 30, RangeMajor: 8, LogStd: 1}, 2e-4},
		{"exponential long range", Settings{NX: 40, NY: 30, RangeMajor: 60, RangeMinor: 20, Azimuth: 75, LogStd: 1}, 2e-4},
		{"gaussian aniso", Settings{NX: 50, NY: 40, DX: 2, DY: 3, RangeMajor: 40, RangeMinor: 15, Azimuth: 140, Model: Gaussian, LogStd: 1}, 1e-5},
		{"gaussian long range", Settings{NX: 30, NY: 30, RangeMajor: 45, Model: Gaussian, LogStd: 1}, 1e-5},
		{"spherical", Settings{NX: 30, NY: 50, RangeMajor: 20, RangeMinor: 6, Azimuth: 10, Model: Spherical, LogStd: 1}, 1e-9},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			g, err := NewGenerator(tc.s)
			if err != nil {
				t.Fatal(err)
			}
			mx, my := g.Embedding()
			c := make([]complex128, mx*my)
			for i, a := range g.amp {
				c[i] = complex(a*a, 0) // lambda/M
			}
			fft2(c, mx, my) // lambda real and even: forward = inverse
			ref := refCov(t, g.Settings())
			var worst float64
			for dy := -(tc.s.NY - 1); dy < tc.s.NY; dy++ {
				for dx := -(tc.s.NX - 1); dx < tc.s.NX; dx++ {
					v := c[((dy+my)%my)*mx+(dx+mx)%mx]
					worst = max(worst, math.Abs(real(v)-ref(dx, dy)), math.Abs(imag(v)))
				}
			}
			t.Logf("torus %dx%d, clipped spectrum %.2g, max covariance error %.2g", mx, my, g.ClippedSpectrum(), worst)
			if worst > tc.tol {
				t.Errorf("embedded covariance differs from the model by %.3g (> %g)", worst, tc.tol)
			}
		})
	}
}

// TestFFT2: the row-column transform equals the 2D DFT by its definition
// (Bracewell 1986, from memory) and does not depend on the core count.
func TestFFT2(t *testing.T) {
	for _, sz := range [][2]int{{1, 1}, {6, 10}, {17, 5}, {40, 33}} {
		mx, my := sz[0], sz[1]
		rng := rand.New(rand.NewPCG(uint64(mx), uint64(my)))
		x := make([]complex128, mx*my)
		for i := range x {
			x[i] = complex(rng.NormFloat64(), rng.NormFloat64())
		}
		want := make([]complex128, len(x))
		for l := range my {
			for k := range mx {
				var s complex128
				for j := range my {
					for i := range mx {
						ph := -2 * math.Pi * (float64(k*i)/float64(mx) + float64(l*j)/float64(my))
						s += x[j*mx+i] * cmplx.Rect(1, ph)
					}
				}
				want[l*mx+k] = s
			}
		}
		var got [2][]complex128
		for p, procs := range []int{1, 3} {
			old := runtime.GOMAXPROCS(procs)
			got[p] = slices.Clone(x)
			fft2(got[p], mx, my)
			runtime.GOMAXPROCS(old)
		}
		if !slices.Equal(got[0], got[1]) {
			t.Errorf("%dx%d: result depends on GOMAXPROCS", mx, my)
		}
		for i := range want {
			if cmplx.Abs(got[0][i]-want[i]) > 1e-10*float64(mx*my) {
				t.Fatalf("%dx%d: coefficient %d = %v, want %v", mx, my, i, got[0][i], want[i])
			}
		}
	}
}

func TestNextFast(t *testing.T) {
	for _, tc := range [][2]int{{0, 1}, {1, 1}, {7, 8}, {11, 12}, {13, 15}, {1030, 1080}, {1300, 1350}, {1024, 1024}} {
		if got := nextFast(tc[0]); got != tc[1] {
			t.Errorf("nextFast(%d) = %d, want %d", tc[0], got, tc[1])
		}
	}
}

// TestDeterminism: same seed, same bytes, whatever the core count; other
// seeds differ; Ensemble member m is Generate with Seed+m.
func TestDeterminism(t *testing.T) {
	s := Settings{NX: 90, NY: 70, RangeMajor: 15, RangeMinor: 6, Azimuth: 20, LogMean: 4, LogStd: 1, Seed: 42}
	var perms, poros [3][]float64
	for p, procs := range []int{1, 2, 5} {
		old := runtime.GOMAXPROCS(procs)
		var err error
		perms[p], poros[p], err = Generate(s)
		runtime.GOMAXPROCS(old)
		if err != nil {
			t.Fatal(err)
		}
	}
	for p := 1; p < 3; p++ {
		if !slices.Equal(perms[0], perms[p]) || !slices.Equal(poros[0], poros[p]) {
			t.Fatal("realization depends on GOMAXPROCS")
		}
	}
	again, _, _ := Generate(s)
	if !slices.Equal(again, perms[0]) {
		t.Fatal("same seed gave a different field")
	}
	ens, ensPoro, err := Ensemble(s, 3)
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(ens[0], perms[0]) || !slices.Equal(ensPoro[0], poros[0]) {
		t.Error("Ensemble member 0 differs from Generate")
	}
	s1 := s
	s1.Seed++
	p1, _, _ := Generate(s1)
	if !slices.Equal(ens[1], p1) {
		t.Error("Ensemble member 1 differs from Generate with Seed+1")
	}
	if slices.Equal(ens[1], ens[0]) || slices.Equal(ens[2], ens[1]) {
		t.Error("different seeds gave the same field")
	}
	// Regression pin of the random stream and the algorithm (values of
	// this implementation, recorded when it was written; a change means
	// old seeds no longer reproduce old maps). Relative tolerance allows
	// for fused multiply-adds on other architectures.
	pin := map[int]float64{0: pinPerm0, 1234: pinPerm1234, 6299: pinPerm6299}
	for k, want := range pin {
		if got := perms[0][k]; math.Abs(got-want) > 1e-9*want {
			t.Errorf("perm[%d] = %.15g, pinned %.15g", k, got, want)
		}
	}
}

// Pinned values of TestDeterminism.
const (
	pinPerm0    = 68.5640295117294
	pinPerm1234 = 54.671815515765
	pinPerm6299 = 48.5575464843356
)

func TestSettingsErrors(t *testing.T) {
	ok := Settings{NX: 10, NY: 10, RangeMajor: 3}
	cases := []struct {
		name  string
		edit  func(*Settings)
		field string
	}{
		{"zero NX", func(s *Settings) { s.NX = 0 }, "NX"},
		{"negative NY", func(s *Settings) { s.NY = -3 }, "NY"},
		{"huge grid", func(s *Settings) { s.NX, s.NY = 1<<20, 1<<20 }, "NX*NY"},
		{"negative DX", func(s *Settings) { s.DX = -1 }, "DX"},
		{"NaN DY", func(s *Settings) { s.DY = math.NaN() }, "DY"},
		{"zero range", func(s *Settings) { s.RangeMajor = 0 }, "RangeMajor"},
		{"denormal range", func(s *Settings) { s.RangeMajor = 1e-320 }, "RangeMajor"},
		{"astronomical cell", func(s *Settings) { s.DX = 1e300 }, "DX"},
		{"infinite range", func(s *Settings) { s.RangeMajor = math.Inf(1) }, "RangeMajor"},
		{"negative minor", func(s *Settings) { s.RangeMinor = -1 }, "RangeMinor"},
		{"minor above major", func(s *Settings) { s.RangeMinor = 5 }, "RangeMinor"},
		{"NaN azimuth", func(s *Settings) { s.Azimuth = math.NaN() }, "Azimuth"},
		{"unknown model", func(s *Settings) { s.Model = "cubic" }, "Model"},
		{"negative log std", func(s *Settings) { s.LogStd = -0.1 }, "LogStd"},
		{"infinite log mean", func(s *Settings) { s.LogMean = math.Inf(-1) }, "LogMean"},
		{"porosity mean above bound", func(s *Settings) { s.PoroMean = 0.6 }, "PoroMean"},
		{"negative porosity std", func(s *Settings) { s.PoroStd = -0.01 }, "PoroStd"},
		{"correlation above 1", func(s *Settings) { s.PoroCorrelation = 1.5 }, "PoroCorrelation"},
		{"literal zero porosity", func(s *Settings) { s.PoroLiteral = true }, "PoroMean"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			s := ok
			tc.edit(&s)
			_, _, err := Generate(s)
			var se *SettingsError
			if !errors.As(err, &se) {
				t.Fatalf("error %v, want a *SettingsError", err)
			}
			if se.Field != tc.field {
				t.Errorf("error names %q, want %q (%v)", se.Field, tc.field, err)
			}
		})
	}
	if _, _, err := Ensemble(ok, 0); err == nil {
		t.Error("Ensemble of 0 members accepted")
	}
	if _, err := NewGenerator(Settings{NX: 4000, NY: 4000, RangeMajor: 4000}); err == nil {
		t.Error("embedding beyond the budget accepted")
	}
}

func TestSettingsDefaults(t *testing.T) {
	g, err := NewGenerator(Settings{NX: 5, NY: 4, RangeMajor: 3, Model: " Gaussian "})
	if err != nil {
		t.Fatal(err)
	}
	s := g.Settings()
	want := Settings{NX: 5, NY: 4, DX: 1, DY: 1, RangeMajor: 3, RangeMinor: 3, Model: Gaussian,
		PoroMean: DefaultPoroMean, PoroStd: DefaultPoroStd, PoroCorrelation: DefaultPoroCorrelation}
	if s != want {
		t.Errorf("resolved settings %+v, want %+v", s, want)
	}
	// LogStd 0: homogeneous exp(LogMean).
	perm, poro, err := Generate(Settings{NX: 3, NY: 3, RangeMajor: 2, LogMean: math.Log(50)})
	if err != nil {
		t.Fatal(err)
	}
	for k := range perm {
		if math.Abs(perm[k]-50) > 1e-12 {
			t.Fatalf("perm %g with LogStd 0, want 50", perm[k])
		}
		if poro[k] < MinPorosity || poro[k] > MaxPorosity {
			t.Fatalf("porosity %g out of bounds", poro[k])
		}
	}
}

// TestEmbeddingReport: a range far beyond the grid leaves negative
// eigenvalues even on the largest torus allowed; a small clipped fraction
// (which bounds the absolute covariance error relative to the sill) is
// reported as a warning, a large one is refused (Dietrich and Newsam 1997
// discuss when an embedding fails to be nonnegative definite). The budget
// is lowered to 2^16 cells to keep the test fast; the logic is the same.
func TestEmbeddingReport(t *testing.T) {
	embeddingBudget = 1 << 16
	defer func() { embeddingBudget = maxEmbeddingCells }()
	g, err := NewGenerator(Settings{NX: 30, NY: 30, RangeMajor: 200, LogStd: 1})
	if err != nil {
		t.Fatal(err)
	}
	r := g.Realize(1)
	t.Logf("range 7x grid: torus %v, clipped %.2g, warnings %q", fmt2(g.Embedding()), g.ClippedSpectrum(), r.Warnings)
	if g.ClippedSpectrum() <= spectrumWarn || !slices.ContainsFunc(r.Warnings, func(w string) bool { return strings.Contains(w, "circulant embedding") }) {
		t.Errorf("clipped spectrum %.2g not reported: %q", g.ClippedSpectrum(), r.Warnings)
	}
	_, err = NewGenerator(Settings{NX: 30, NY: 30, RangeMajor: 600, LogStd: 1})
	if !errors.Is(err, ErrEmbedding) {
		t.Errorf("range 20x grid: error %v, want ErrEmbedding", err)
	}
}

func fmt2(a, b int) [2]int { return [2]int{a, b} }

// TestExtremeButValid: odd but legal settings give finite maps.
func TestExtremeButValid(t *testing.T) {
	cases := []Settings{
		{NX: 1, NY: 1, RangeMajor: 1, LogStd: 2},
		{NX: 1, NY: 300, RangeMajor: 20, Azimuth: -45, LogStd: 1},
		{NX: 50, NY: 40, DX: 1000, DY: 1000, RangeMajor: 1e-6, LogStd: 1}, // white noise
		{NX: 30, NY: 30, RangeMajor: 1e9, Model: Spherical, LogStd: 1},    // range beyond the grid
		{NX: 40, NY: 20, RangeMajor: 10, RangeMinor: 1e-3, Azimuth: 370, LogStd: 3, LogMean: -2},
	}
	for _, s := range cases {
		perm, poro, err := Generate(s)
		if err != nil {
			t.Errorf("%+v: %v", s, err)
			continue
		}
		for k := range perm {
			if !(perm[k] > 0) || math.IsInf(perm[k], 0) || !(poro[k] >= MinPorosity && poro[k] <= MaxPorosity) {
				t.Fatalf("%+v: cell %d has perm %g, porosity %g", s, k, perm[k], poro[k])
			}
		}
	}
}

package synth

import (
	"fmt"
	"math"
	"testing"
)

// TestVariogram: the experimental variogram of ln k, averaged over R
// realizations, matches the model at lags along the major and minor axes,
// gamma(h) = sigma^2 (1 - exp(-3h/a)) for the exponential model with
// practical range a and sigma^2 (1 - exp(-3h^2/a^2)) for the Gaussian
// (Deutsch and Journel 1998, GSLIB, from memory). The classical estimator is
// unbiased for a stationary field and its standard error is computed
// exactly for a Gaussian field (variogramStdErr). Azimuth 0 puts the major
// range north-south, 90 east-west: the directions swap.
func TestVariogram(t *testing.T) {
	const R = 6
	type lag struct {
		lx, ly int     // lag in cells
		axis   string  // "major" or "minor"
		h      float64 // lag length in map units
	}
	const dx = 10.0
	axisLags := func(majorAlongY bool, steps []int) []lag {
		var out []lag
		for _, n := range steps {
			if majorAlongY {
				out = append(out, lag{0, n, "major", float64(n) * dx}, lag{n, 0, "minor", float64(n) * dx})
			} else {
				out = append(out, lag{n, 0, "major", float64(n) * dx}, lag{0, n, "minor", float64(n) * dx})
			}
		}
		return out
	}
	var diag []lag
	for _, n := range []int{2, 5, 10, 20} {
		diag = append(diag, lag{n, n, "major", float64(n) * dx * math.Sqrt2}, lag{n, -n, "minor", float64(n) * dx * math.Sqrt2})
	}
	steps := []int{2, 5, 10, 20, 40}
	cases := []struct {
		name string
		s    Settings
		lags []lag
	}{
		{"exponential azimuth 0", Settings{NX: 160, NY: 160, DX: dx, DY: dx, RangeMajor: 240, RangeMinor: 80, Azimuth: 0, LogMean: 4, LogStd: 1}, axisLags(true, steps)},
		{"exponential azimuth 90", Settings{NX: 160, NY: 160, DX: dx, DY: dx, RangeMajor: 240, RangeMinor: 80, Azimuth: 90, LogMean: 4, LogStd: 1}, axisLags(false, steps)},
		{"exponential azimuth 45", Settings{NX: 160, NY: 160, DX: dx, DY: dx, RangeMajor: 240, RangeMinor: 80, Azimuth: 45, LogMean: 4, LogStd: 1}, diag},
		{"gaussian azimuth 0", Settings{NX: 160, NY: 160, DX: dx, DY: dx, RangeMajor: 200, RangeMinor: 100, Azimuth: 0, Model: Gaussian, LogMean: 3, LogStd: 0.7}, axisLags(true, []int{2, 5, 8, 12, 20})},
		{"gaussian azimuth 90", Settings{NX: 160, NY: 160, DX: dx, DY: dx, RangeMajor: 200, RangeMinor: 100, Azimuth: 90, Model: Gaussian, LogMean: 3, LogStd: 0.7}, axisLags(false, []int{2, 5, 8, 12, 20})},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			g, err := NewGenerator(tc.s)
			if err != nil {
				t.Fatal(err)
			}
			s := g.Settings()
			fields := make([][]float64, R)
			for r := range R {
				fields[r] = logField(g.Realize(uint64(100 + r)).Perm)
			}
			c := refCov(t, s)
			sill := s.LogStd * s.LogStd
			for _, l := range tc.lags {
				a := s.RangeMajor
				if l.axis == "minor" {
					a = s.RangeMinor
				}
				want := sill * (1 - refCorrelation(s.Model, l.h, a))
				var got float64
				for _, z := range fields {
					v, _ := experimentalVariogram(z, s.NX, s.NY, l.lx, l.ly)
					got += v / R
				}
				se := variogramStdErr(c, s.NX, s.NY, l.lx, l.ly) / math.Sqrt(R)
				msg := fmt.Sprintf("%s h=%4.0f (%3d,%3d): gamma %.4f, model %.4f, se %.4f", l.axis, l.h, l.lx, l.ly, got, want, se)
				t.Log(msg)
				if math.Abs(got-want) > zSigma*se {
					t.Errorf("%s: off by %.1f standard errors", msg, math.Abs(got-want)/se)
				}
			}
		})
	}
}

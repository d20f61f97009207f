package transport

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// TestResample: averaging a piecewise constant history onto another count
// of equal parts keeps its integral (the definition of a conservative
// remap; checked to round-off), gives every part the exact mean of the
// parts it covers when one count divides the other, and stays within the
// source's range.
func TestResample(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 7))
	for _, c := range [][2]int{{1, 1}, {1, 5}, {5, 1}, {3, 12}, {12, 3}, {7, 5}, {5, 7}, {64, 100}, {100, 64}} {
		mp, m := c[0], c[1]
		src := make([]float64, mp)
		lo, hi := 1.0, 0.0
		for j := range src {
			src[j] = rng.Float64()
			lo, hi = min(lo, src[j]), max(hi, src[j])
		}
		dst := make([]float64, m)
		resample(dst, src)
		a, b := 0.0, 0.0
		for _, v := range src {
			a += v / float64(mp)
		}
		for _, v := range dst {
			b += v / float64(m)
			if v < lo-1e-15 || v > hi+1e-15 {
				t.Errorf("%d -> %d: value %g outside [%g, %g]", mp, m, v, lo, hi)
			}
		}
		if math.Abs(a-b) > 1e-15 {
			t.Errorf("%d -> %d: integral %.17g -> %.17g", mp, m, a, b)
		}
		if m%mp == 0 {
			for k, v := range dst {
				if v != src[k*mp/m] {
					t.Errorf("%d -> %d: part %d is %g, want %g", mp, m, k, v, src[k*mp/m])
				}
			}
		}
	}
}

// TestLocalStepsCloseToRiemann: a front advanced over 40% of a
// non-uniform line in 20 calls (as an engine does from report to report)
// with local time stepping is at least as close to the Riemann solution
// (Buckley and Leverett 1942) as with the global step (measured: L1 2.9e-3
// against 3.9e-3: the long segments take steps closer to their own CFL
// limit, so less numerical diffusion), and the two differ by less than the
// global scheme's own error.
func TestLocalStepsCloseToRiemann(t *testing.T) {
	ff := sandstone()
	fl, _ := NewFlux(ff)
	r, _ := NewRiemann(ff, 0.2, 0.75)
	rng := rand.New(rand.NewPCG(8, 1))
	dtau := nonuniformLine(400, 200, rng)
	tEnd := 0.4 * 200 / r.FrontSpeed()
	errOf := func(s []float64) float64 {
		e, x := 0.0, 0.0
		for i, h := range dtau {
			e += math.Abs(s[i]-r.SegmentSaturation(x, x+h, tEnd)) * h
			x += h
		}
		return e / 200
	}
	run := func(set Settings) []float64 {
		s := make([]float64, len(dtau))
		for i := range s {
			s[i] = 0.2
		}
		// Twenty calls, as an engine advancing from report to report.
		for range 20 {
			if _, _, err := Advance(s, dtau, 0.75, tEnd/20, fl, set); err != nil {
				t.Fatal(err)
			}
		}
		return s
	}
	g, l := run(Settings{}), run(Settings{Local: true})
	eg, el := errOf(g), errOf(l)
	d := 0.0
	for i := range g {
		d += math.Abs(g[i]-l[i]) * dtau[i] / 200
	}
	t.Logf("L1 error against Riemann: global %.3e, local %.3e; difference %.3e", eg, el, d)
	if !(el <= 1.1*eg) {
		t.Errorf("local steps error %.3e, global %.3e", el, eg)
	}
	if !(d <= eg) {
		t.Errorf("local and global differ by %.3e, more than the global error %.3e", d, eg)
	}
}

// TestOutflowParts: the parts of the outlet history average to the
// Advance's outlet fraction (the same water, booked in parts), and a call
// without local steps has none.
func TestOutflowParts(t *testing.T) {
	ff := sandstone()
	fl, _ := NewFlux(ff)
	rng := rand.New(rand.NewPCG(2, 5))
	s, dtau := randomLine(rng, 120, 0.5, 0.2, 0.75)
	var w Workspace
	out, _, err := w.Advance(s, dtau, 0.75, 30, fl, Settings{Local: true})
	if err != nil {
		t.Fatal(err)
	}
	parts := make([]float64, 32)
	if !w.OutflowParts(parts) {
		t.Fatal("no outlet history after a local call")
	}
	mean := 0.0
	for _, v := range parts {
		mean += v / 32
	}
	if math.Abs(mean-out) > 1e-15 {
		t.Errorf("parts average to %.17g, outFw %.17g", mean, out)
	}
	if _, _, err := w.Advance(s, dtau, 0.75, 30, fl, Settings{}); err != nil {
		t.Fatal(err)
	}
	if w.OutflowParts(parts) {
		t.Error("outlet history after a global-step call")
	}
}

// TestClampFree: on every table interval marked clamp-free the cubic stays
// inside [0, 1] at 200 points (so Fw's clamp cannot act there), and a zone
// sweep without the clamp gives the sweep with it bit for bit on
// saturations in such a range (a differential test, common practice).
func TestClampFree(t *testing.T) {
	for _, c := range []Curve{sandstone(), quadCorey{2}} {
		fl, err := NewFlux(c)
		if err != nil {
			t.Fatal(err)
		}
		free := 0
		for k := range fl.poly {
			if fl.unsafe[k+1] != fl.unsafe[k] {
				continue
			}
			free++
			p := fl.poly[k]
			for j := 0; j <= 200; j++ {
				x := float64(j) / 200
				if v := p[0] + x*(p[1]+x*(p[2]+x*p[3])); !(v >= 0 && v <= 1) {
					t.Fatalf("interval %d marked clamp-free: cubic %g at t=%g", k, v, x)
				}
			}
		}
		if free < fluxIntervals/2 {
			t.Errorf("only %d of %d intervals clamp-free", free, fluxIntervals)
		}
		rng := rand.New(rand.NewPCG(6, 6))
		var w Workspace
		compared := 0
		for range 50 {
			lo := 0.3 + 0.3*rng.Float64()
			hi := lo + 0.1*rng.Float64()
			if !fl.clampFree(lo, hi) {
				continue
			}
			compared++
			n := 1 + rng.IntN(12)
			s := make([]float64, n)
			for i := range s {
				s[i] = lo + (hi-lo)*rng.Float64()
			}
			s2 := append([]float64(nil), s...)
			w.ratio = grow(w.ratio, n)
			for i := range n {
				w.ratio[i] = 0.2 * rng.Float64()
			}
			fin := make([]float64, 7)
			for k := range fin {
				fin[k] = fl.Fw(lo + (hi-lo)*rng.Float64())
			}
			h1, h2 := make([]float64, 7), make([]float64, 7)
			w.upwindHistory(s, fin, fl, h1, true)
			w.upwindHistory(s2, fin, fl, h2, false)
			for i := range s {
				if s[i] != s2[i] {
					t.Fatalf("segment %d: %v with the clamp, %v without", i, s[i], s2[i])
				}
			}
			for k := range h1 {
				if h1[k] != h2[k] {
					t.Fatalf("outflow %d: %v with the clamp, %v without", k, h1[k], h2[k])
				}
			}
		}
		if compared < 10 {
			t.Errorf("only %d clamp-free zones compared", compared)
		}
	}
}

// TestLocalRejectsBadSegments: local time stepping refuses a saturation
// outside [0, 1] (or NaN) and a time of flight that is not positive and
// finite, naming the first bad segment, in whichever zone it lies.
func TestLocalRejectsBadSegments(t *testing.T) {
	fl, err := NewFlux(sandstone())
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name  string
		seg   int
		s, h  float64
		wants string
	}{
		{"saturation above 1", 3, 1.5, 1, "saturation 1.5 of segment 3 outside [0, 1]"},
		{"negative saturation, second zone", 11, -0.1, 1, "saturation -0.1 of segment 11 outside [0, 1]"},
		{"NaN saturation", 20, math.NaN(), 1, "saturation NaN of segment 20 outside [0, 1]"},
		{"zero time of flight", 5, 0.3, 0, "segment 5 has time of flight 0"},
		{"infinite time of flight", 17, 0.3, math.Inf(1), "segment 17 has time of flight +Inf"},
		{"NaN time of flight", 9, 0.3, math.NaN(), "segment 9 has time of flight NaN"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			s, h := make([]float64, 24), make([]float64, 24)
			for i := range s {
				s[i], h[i] = 0.2, 1
			}
			s[tc.seg], h[tc.seg] = tc.s, tc.h
			_, _, err := Advance(s, h, 0.8, 0.5, fl, Settings{Local: true})
			if err == nil || !strings.Contains(err.Error(), tc.wants) {
				t.Errorf("error %v, want one containing %q", err, tc.wants)
			}
		})
	}
}

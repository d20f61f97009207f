package flood

import (
	"math"
	"math/rand/v2"
	"testing"
)

// maxGap returns the largest distance along y between the curve (x, y)
// and the polyline through its points keep, at every point of the curve.
func maxGap(x, y []float64, keep []int) float64 {
	worst := 0.0
	for s := 0; s+1 < len(keep); s++ {
		a, b := keep[s], keep[s+1]
		for k := a + 1; k < b; k++ {
			if x[b] > x[a] {
				v := y[a] + (y[b]-y[a])*(x[k]-x[a])/(x[b]-x[a])
				worst = math.Max(worst, math.Abs(y[k]-v))
				continue
			}
			// A vertical segment: the distance to its nearer end, or 0
			// between them.
			lo, hi := math.Min(y[a], y[b]), math.Max(y[a], y[b])
			worst = math.Max(worst, math.Max(lo-y[k], y[k]-hi))
		}
	}
	return worst
}

// TestThinCurveBound: the thinned sweep-like curve y = 1 - exp(-x) on
// 200 000 unevenly spaced points stays within the tolerance at every
// point left out, keeps both ends, and needs about as many points as the
// best interpolation of a smooth curve: linear interpolation over a
// segment of length h errs by up to h^2 |f2| / 8, f2 the second
// derivative (the interpolation error bound, e.g. Burden and Faires,
// Numerical Analysis, from memory), so a tolerance tol needs about the
// integral of sqrt(|f2| / (8 tol)) points, here 2 (1 - exp(-L/2)) /
// sqrt(8 tol).
func TestThinCurveBound(t *testing.T) {
	rng := rand.New(rand.NewPCG(19, 4))
	const n, L = 200000, 20.0
	x := make([]float64, n)
	for k := 1; k < n; k++ {
		x[k] = x[k-1] + rng.Float64()
	}
	scale := L / x[n-1]
	y := make([]float64, n)
	for k := range x {
		x[k] *= scale
		y[k] = 1 - math.Exp(-x[k])
	}
	for _, tol := range []float64{1e-4, 1e-6} {
		keep := thinCurve(x, y, tol)
		if keep[0] != 0 || keep[len(keep)-1] != n-1 {
			t.Fatalf("tol %g: ends not kept: %d ... %d", tol, keep[0], keep[len(keep)-1])
		}
		for i := 1; i < len(keep); i++ {
			if keep[i] <= keep[i-1] {
				t.Fatalf("tol %g: indices not increasing at %d", tol, i)
			}
		}
		if g := maxGap(x, y, keep); g > tol {
			t.Errorf("tol %g: a point left out is %g away", tol, g)
		}
		want := 2 * (1 - math.Exp(-L/2)) / math.Sqrt(8*tol)
		if got := float64(len(keep)); got < 0.95*want || got > 1.1*want {
			t.Errorf("tol %g: %d points, want about %.0f", tol, len(keep), want)
		}
		t.Logf("tol %g: %d of %d points (estimate %.0f), largest gap %.3g", tol, len(keep), n, want, maxGap(x, y, keep))
	}
}

// TestThinCurveSteps: a staircase with repeated x (vertical jumps) and
// flat runs keeps the corners, and short curves are kept whole.
func TestThinCurveSteps(t *testing.T) {
	x := []float64{0, 1, 1, 2, 3, 3, 4}
	y := []float64{0, 0, 1, 1, 1, 2, 2}
	keep := thinCurve(x, y, 1e-9)
	if g := maxGap(x, y, keep); g > 1e-9 {
		t.Errorf("gap %g, kept %v", g, keep)
	}
	for _, k := range []int{0, 1, 2, 4, 5, 6} {
		found := false
		for _, j := range keep {
			found = found || j == k
		}
		if !found {
			t.Errorf("corner %d dropped: kept %v", k, keep)
		}
	}
	if got := thinCurve([]float64{0, 1}, []float64{0, 1}, 1); len(got) != 2 {
		t.Errorf("two points: kept %v", got)
	}
	if got := thinCurve(nil, nil, 1); len(got) != 0 {
		t.Errorf("no points: kept %v", got)
	}
}

// TestSweepRows: sweep.csv holds the curve as computed up to SweepRows
// points, and above that a subset of its points within SweepTolerance.
func TestSweepRows(t *testing.T) {
	for _, n := range []int{SweepRows, SweepRows + 1, 5 * SweepRows} {
		td, ev := make([]float64, n), make([]float64, n)
		for k := range td {
			td[k] = 10 * float64(k) / float64(n)
			ev[k] = 1 - math.Exp(-td[k])
		}
		x, y := sweepRows(td, ev)
		if n <= SweepRows {
			if len(x) != n {
				t.Errorf("%d points: %d rows, want all", n, len(x))
			}
			continue
		}
		if len(x) >= n/10 || x[0] != td[0] || x[len(x)-1] != td[n-1] {
			t.Errorf("%d points: %d rows from %g to %g", n, len(x), x[0], x[len(x)-1])
		}
		// Every point of the curve is within the tolerance of the rows.
		for k := range td {
			v := Interpolate(x, y, td[k])
			if d := math.Abs(v - ev[k]); d > SweepTolerance*(1+1e-9) {
				t.Fatalf("%d points: point %d is %g from the rows", n, k, d)
			}
		}
	}
}

// TestThinPath: a noisy spiral is thinned so that every point left out
// is within the tolerance of the kept polyline (measured here against
// every segment of it, independently of how thinPath chose them), the
// ends kept; a straight line keeps its ends and one point per thinWindow;
// a circle of radius r sampled every degree keeps about as many points as
// its chords allow: a chord of angle a is r (1 - cos(a/2)) from the arc,
// so a tolerance tol needs 360 / a points.
func TestThinPath(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 19))
	var spiral [][2]float64
	for k := 0; k < 400; k++ {
		a := float64(k) / 20
		r := 10 + 2*a + 0.05*rng.NormFloat64()
		spiral = append(spiral, [2]float64{r * math.Cos(a), r * math.Sin(a)})
	}
	near := func(p [2]float64, path [][2]float64, idx []int) float64 {
		d := math.Inf(1)
		for s := 0; s+1 < len(idx); s++ {
			d = math.Min(d, math.Sqrt(segmentDistance2(p, path[idx[s]], path[idx[s+1]])))
		}
		return d
	}
	for _, tol := range []float64{0.01, 0.1, 1} {
		idx := thinPath(spiral, tol, nil)
		if idx[0] != 0 || idx[len(idx)-1] != len(spiral)-1 {
			t.Fatalf("tol %g: ends not kept", tol)
		}
		for k, p := range spiral {
			if d := near(p, spiral, idx); d > tol {
				t.Errorf("tol %g: point %d is %g from the thinned path", tol, k, d)
			}
		}
		t.Logf("tol %g: %d of %d points", tol, len(idx), len(spiral))
	}
	line := make([][2]float64, 50)
	for k := range line {
		line[k] = [2]float64{float64(k), 2 * float64(k)}
	}
	if idx := thinPath(line, 1e-9, nil); len(idx) != 3 {
		t.Errorf("straight line: kept %v", idx)
	}
	const r, tol = 100.0, 0.5
	circle := make([][2]float64, 361)
	for k := range circle {
		a := float64(k) * math.Pi / 180
		circle[k] = [2]float64{r * math.Cos(a), r * math.Sin(a)}
	}
	idx := thinPath(circle, tol, nil)
	want := 360 / (2 * math.Acos(1-tol/r) * 180 / math.Pi)
	if got := float64(len(idx) - 1); got < want || got > 1.35*want {
		t.Errorf("circle: %d segments, want about %.1f", len(idx)-1, want)
	}
	t.Logf("circle: %d segments, chord estimate %.1f", len(idx)-1, want)
}

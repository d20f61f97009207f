package flood

import "math"

// thinCurve returns the indices of the points of the curve (x[k], y[k]),
// x non-decreasing, to keep so that the polyline through the kept points
// is within tol of every point left out, measured along y (the distance
// between two piecewise-linear curves on the same x range is largest at
// a vertex, so the whole curve is within tol). The first and the last
// point are kept; each kept point is a point of the curve.
//
// The points are taken greedily from the last kept one (the anchor): the
// slopes from the anchor that pass within tol of every point since form an
// interval, narrowed by each new point; the segment is ended at the last
// point whose slope falls inside it (the sleeve, or cone-intersection,
// construction of piecewise-linear approximation; e.g. O'Rourke 1981,
// from memory).
func thinCurve(x, y []float64, tol float64) []int {
	n := min(len(x), len(y))
	if n <= 2 {
		out := make([]int, n)
		for k := range out {
			out[k] = k
		}
		return out
	}
	out := []int{0}
	a := 0
	inf := math.Inf(1)
	lo, hi := -inf, inf // slopes from the anchor within tol of every point between
	for k := a + 1; k < n; k++ {
		dx := x[k] - x[a]
		if dx <= 0 {
			// A point at the anchor's x: keep it if it is off by more than
			// tol, and anchor there.
			if d := y[k] - y[a]; d > tol || d < -tol {
				out = append(out, k)
				a, lo, hi = k, -inf, inf
			}
			continue
		}
		s := (y[k] - y[a]) / dx
		if s < lo || s > hi {
			// The chord to k misses a point between: end the segment at
			// k-1 and start again from there.
			a = k - 1
			out = append(out, a)
			lo, hi = -inf, inf
			k-- // k again, from the new anchor
			continue
		}
		lo = max(lo, (y[k]-tol-y[a])/dx)
		hi = min(hi, (y[k]+tol-y[a])/dx)
	}
	if out[len(out)-1] != n-1 {
		out = append(out, n-1)
	}
	return out
}

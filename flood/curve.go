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

// thinPath returns the indices of the points of the polyline p to keep so
// that every point left out lies within tol of the segment between the
// kept points around it. The points are taken greedily: from the last
// kept point, the segment is stretched to the farthest point (at most
// thinWindow ahead) whose segment passes within tol of every point in
// between, measured to the segment itself so the bound holds at its ends
// too; the first and the last point are kept. idx is scratch space for
// the indices, reused when long enough.
func thinPath(p [][2]float64, tol float64, idx []int) []int {
	n := len(p)
	idx = append(idx[:0], 0)
	if n <= 2 {
		if n == 2 {
			idx = append(idx, 1)
		}
		return idx[:n]
	}
	tol2 := tol * tol
	a := 0
	for a < n-1 {
		e := a + 1 // the farthest end found so far
		for c := a + 2; c < n && c-a <= thinWindow; c++ {
			ok := true
			for k := a + 1; k < c; k++ {
				if segmentDistance2(p[k], p[a], p[c]) > tol2 {
					ok = false
					break
				}
			}
			if !ok {
				break
			}
			e = c
		}
		idx = append(idx, e)
		a = e
	}
	return idx
}

// thinWindow is the most points one kept segment of thinPath spans.
const thinWindow = 32

// segmentDistance2 returns the squared distance from point p to the
// segment a-b.
func segmentDistance2(p, a, b [2]float64) float64 {
	dx, dy := b[0]-a[0], b[1]-a[1]
	px, py := p[0]-a[0], p[1]-a[1]
	l2 := dx*dx + dy*dy
	if l2 > 0 {
		u := (px*dx + py*dy) / l2
		u = math.Max(0, math.Min(1, u))
		px, py = px-u*dx, py-u*dy
	}
	return px*px + py*py
}

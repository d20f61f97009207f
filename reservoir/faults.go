package reservoir

import (
	"math"
	"slices"
)

// FaultFaces returns the x-faces and y-faces (numbered as Grid.XFace and
// Grid.YFace, ascending, each once) that the polyline trace crosses. A
// face between two cells is crossed when a segment of the trace intersects
// the segment joining the two cell centres; the test is exact segment
// intersection with orientation predicates, not a walk through cells.
// Conventions for the degenerate cases: a trace running along a
// centre-to-centre link does not cross it; a trace passing exactly through
// a cell centre crosses the links that leave that centre eastward and
// northward, not those that arrive at it, so a fault through a row of
// centres makes one barrier, not two. Boundary faces separate no cells and
// are never crossed.
func FaultFaces(g Grid, trace [][2]float64) (xFaces, yFaces []int) {
	if g.NX <= 0 || g.NY <= 0 || !(g.DX > 0) || !(g.DY > 0) {
		return nil, nil
	}
	for s := 0; s+1 < len(trace); s++ {
		q0, q1 := trace[s], trace[s+1]
		if q0 == q1 || !finite2(q0) || !finite2(q1) {
			continue
		}
		xmin, xmax := math.Min(q0[0], q1[0]), math.Max(q0[0], q1[0])
		ymin, ymax := math.Min(q0[1], q1[1]), math.Max(q0[1], q1[1])
		if (xmax-g.X0)/g.DX < -1 || (xmin-g.X0)/g.DX > float64(g.NX)+1 ||
			(ymax-g.Y0)/g.DY < -1 || (ymin-g.Y0)/g.DY > float64(g.NY)+1 {
			continue
		}
		// Index ranges of cells whose centres may bound a crossed link,
		// padded by one and clamped (in floating point, before converting,
		// so that far-away trace points cannot overflow); the exact test
		// decides.
		ilo := clampIdx(math.Floor((xmin-g.X0)/g.DX-0.5)-1, g.NX-1)
		ihi := clampIdx(math.Ceil((xmax-g.X0)/g.DX-0.5)+1, g.NX-1)
		jlo := clampIdx(math.Floor((ymin-g.Y0)/g.DY-0.5)-1, g.NY-1)
		jhi := clampIdx(math.Ceil((ymax-g.Y0)/g.DY-0.5)+1, g.NY-1)
		for j := jlo; j <= jhi; j++ {
			yc := g.Y0 + (float64(j)+0.5)*g.DY
			for i := max(ilo, 1); i <= ihi; i++ {
				// Link from the centre of (i-1, j) to the centre of (i, j).
				p0 := [2]float64{g.X0 + (float64(i)-0.5)*g.DX, yc}
				p1 := [2]float64{g.X0 + (float64(i)+0.5)*g.DX, yc}
				if crossesLink(p0, p1, q0, q1) {
					xFaces = append(xFaces, g.XFace(i, j))
				}
			}
		}
		for j := max(jlo, 1); j <= jhi; j++ {
			for i := ilo; i <= ihi; i++ {
				xc := g.X0 + (float64(i)+0.5)*g.DX
				p0 := [2]float64{xc, g.Y0 + (float64(j)-0.5)*g.DY}
				p1 := [2]float64{xc, g.Y0 + (float64(j)+0.5)*g.DY}
				if crossesLink(p0, p1, q0, q1) {
					yFaces = append(yFaces, g.YFace(i, j))
				}
			}
		}
	}
	slices.Sort(xFaces)
	slices.Sort(yFaces)
	return slices.Compact(xFaces), slices.Compact(yFaces)
}

// crossesLink reports whether the fault segment q0-q1 crosses the link
// p0-p1 between two cell centres. The link is half open: its start p0 on
// the fault counts, its end p1 does not; the fault segment is closed.
func crossesLink(p0, p1, q0, q1 [2]float64) bool {
	d1 := orient(q0, q1, p0)
	d2 := orient(q0, q1, p1)
	if d2 == 0 {
		// p1 on the fault line: either collinear or the excluded end.
		return false
	}
	if d1 != 0 && (d1 > 0) == (d2 > 0) {
		return false // both centres on the same side
	}
	d3 := orient(p0, p1, q0)
	d4 := orient(p0, p1, q1)
	if d3 != 0 && d4 != 0 && (d3 > 0) == (d4 > 0) {
		return false // the fault segment stops short of the link
	}
	return true
}

// orient is twice the signed area of the triangle a, b, c: positive when
// c lies left of the directed line a->b.
func orient(a, b, c [2]float64) float64 {
	return (b[0]-a[0])*(c[1]-a[1]) - (b[1]-a[1])*(c[0]-a[0])
}

func finite2(p [2]float64) bool {
	return !math.IsNaN(p[0]) && !math.IsInf(p[0], 0) && !math.IsNaN(p[1]) && !math.IsInf(p[1], 0)
}

// clampIdx clamps v to [0, hi] and converts it to an int.
func clampIdx(v float64, hi int) int {
	if !(v > 0) {
		return 0
	}
	if v >= float64(hi) {
		return hi
	}
	return int(v)
}

// ApplyFaults sets TransMultX and TransMultY from m.Faults: 1 on every
// face, multiplied by the multiplier of each fault that crosses the face
// (FaultFaces), once per fault. It returns, per fault, the number of faces
// crossed.
func (m *Model) ApplyFaults() []int {
	g := m.Grid
	m.TransMultX = resize(m.TransMultX, g.NXFaces())
	m.TransMultY = resize(m.TransMultY, g.NYFaces())
	for k := range m.TransMultX {
		m.TransMultX[k] = 1
	}
	for k := range m.TransMultY {
		m.TransMultY[k] = 1
	}
	counts := make([]int, len(m.Faults))
	for n, f := range m.Faults {
		xf, yf := FaultFaces(g, f.Trace)
		for _, k := range xf {
			m.TransMultX[k] *= f.Multiplier
		}
		for _, k := range yf {
			m.TransMultY[k] *= f.Multiplier
		}
		counts[n] = len(xf) + len(yf)
	}
	return counts
}

func resize(s []float64, n int) []float64 {
	if cap(s) >= n {
		return s[:n]
	}
	return make([]float64, n)
}

package screen

import (
	"fmt"
	"math"
	"sort"

	"floodtrace/reservoir"
)

// PatternKind names a regular flood pattern.
type PatternKind string

// The patterns, with the trade's names and geometry as described by Craig
// (1971, SPE Monograph 3) and Willhite (1986, SPE Textbook Series 3);
// both from memory, the geometry is common practice.
// Spacing a is the distance between neighbouring injectors along a side
// of the pattern element; the pattern origin holds an injector.
const (
	// FiveSpot: injectors on a square lattice of side a, a producer at the
	// centre of each square (1 producer per injector).
	FiveSpot PatternKind = "five-spot"
	// InvertedNineSpot: an injector at the centre of each square of side
	// a, producers at its corners and edge midpoints (3 producers per
	// injector).
	InvertedNineSpot PatternKind = "inverted-nine-spot"
	// DirectLineDrive: rows of injectors and rows of producers
	// alternating, wells a apart within a row, rows d apart (RowSpacing,
	// default a), each producer opposite an injector.
	DirectLineDrive PatternKind = "direct-line-drive"
	// StaggeredLineDrive: as the direct line drive with the producer rows
	// shifted by a/2 along the rows.
	StaggeredLineDrive PatternKind = "staggered-line-drive"
)

var patternNames = []string{string(FiveSpot), string(InvertedNineSpot), string(DirectLineDrive), string(StaggeredLineDrive)}

// Pattern is a regular pattern laid over the active area; it yields one
// layout that replaces the base case's wells.
type Pattern struct {
	Kind PatternKind
	Name string
	// Spacing is the side a of the pattern element; RowSpacing the
	// distance d between injector and producer rows of a line drive (0 =
	// Spacing).
	Spacing, RowSpacing float64
	// Rotation turns the pattern counter-clockwise by this many degrees
	// about its origin, which is the south-west corner of the grid moved
	// by Offset (map units).
	Rotation float64
	Offset   [2]float64
	// InjectorRate is the rate of every injector (rate control, with the
	// optional InjectorMaxBHP limit); ProducerBHP the bottom-hole
	// pressure of every producer.
	InjectorRate, InjectorMaxBHP, ProducerBHP float64
	Line                                      int
}

// PatternPoint is a well position of a pattern.
type PatternPoint struct {
	X, Y     float64
	Injector bool
}

// Points returns the pattern's well positions inside the rectangle
// [x0, x1] x [y0, y1] (map coordinates), sorted south to north then west
// to east. The pattern's origin is (ox, oy).
func (pt Pattern) Points(ox, oy, x0, y0, x1, y1 float64) ([]PatternPoint, error) {
	a := pt.Spacing
	d := pt.RowSpacing
	if d == 0 {
		d = a
	}
	if !(a > 0) || !(d > 0) || math.IsInf(a, 0) || math.IsInf(d, 0) {
		return nil, fmt.Errorf("pattern %s: spacing must be positive", pt.Name)
	}
	// Local lattice points (u, v) and their types, per unit cell of the
	// pattern: (cell size in u, cell size in v, points in the cell).
	type site struct {
		u, v float64
		inj  bool
	}
	var su, sv float64
	var sites []site
	switch pt.Kind {
	case FiveSpot:
		su, sv = a, a
		sites = []site{{0, 0, true}, {a / 2, a / 2, false}}
	case InvertedNineSpot:
		su, sv = a, a
		sites = []site{{0, 0, true}, {a / 2, 0, false}, {0, a / 2, false}, {a / 2, a / 2, false}}
	case DirectLineDrive:
		su, sv = a, 2*d
		sites = []site{{0, 0, true}, {0, d, false}}
	case StaggeredLineDrive:
		su, sv = a, 2*d
		sites = []site{{0, 0, true}, {a / 2, d, false}}
	default:
		return nil, fmt.Errorf("pattern %s: unknown kind %q", pt.Name, pt.Kind)
	}
	th := pt.Rotation * math.Pi / 180
	c, s := math.Cos(th), math.Sin(th)
	// Range of lattice indices covering the rectangle: the corners in
	// local coordinates (inverse rotation).
	umin, umax, vmin, vmax := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	for _, q := range [][2]float64{{x0, y0}, {x1, y0}, {x0, y1}, {x1, y1}} {
		dx, dy := q[0]-ox, q[1]-oy
		u, v := c*dx+s*dy, -s*dx+c*dy
		umin, umax = math.Min(umin, u), math.Max(umax, u)
		vmin, vmax = math.Min(vmin, v), math.Max(vmax, v)
	}
	// Count in floating point first: a tiny spacing must not overflow.
	if nw := ((umax-umin)/su + 3) * ((vmax-vmin)/sv + 3) * float64(len(sites)); !(nw <= 4e6) {
		return nil, fmt.Errorf("pattern %s: spacing %g gives more than a million wells over the grid", pt.Name, a)
	}
	if lim := 1e9; !(math.Abs(umin/su) < lim && math.Abs(umax/su) < lim && math.Abs(vmin/sv) < lim && math.Abs(vmax/sv) < lim) {
		return nil, fmt.Errorf("pattern %s: the offset puts the pattern's origin too far from the grid", pt.Name)
	}
	i0, i1 := int(math.Floor(umin/su))-1, int(math.Ceil(umax/su))+1
	j0, j1 := int(math.Floor(vmin/sv))-1, int(math.Ceil(vmax/sv))+1
	tol := 1e-9 * math.Max(math.Abs(x1-x0), math.Abs(y1-y0))
	var out []PatternPoint
	for j := j0; j <= j1; j++ {
		for i := i0; i <= i1; i++ {
			for _, st := range sites {
				u, v := float64(i)*su+st.u, float64(j)*sv+st.v
				x, y := ox+c*u-s*v, oy+s*u+c*v
				// Snap round-off so that points on the rectangle's edge
				// (and rotations by multiples of 90 degrees) are exact.
				x, y = snap(x), snap(y)
				if x < x0-tol || x > x1+tol || y < y0-tol || y > y1+tol {
					continue
				}
				out = append(out, PatternPoint{X: x, Y: y, Injector: st.inj})
			}
		}
	}
	sort.Slice(out, func(p, q int) bool {
		if out[p].Y != out[q].Y {
			return out[p].Y < out[q].Y
		}
		return out[p].X < out[q].X
	})
	return out, nil
}

// snap rounds x to a millionth of a map unit, removing the round-off of
// the rotation.
func snap(x float64) float64 {
	return math.Round(x*1e6) / 1e6
}

// wellName names a new well of the pattern: the pattern's name, then INJ-n
// or PRD-n ("five-600.INJ-3"), so it cannot be taken for a well of the
// base case (whose schedule events name its own wells).
func (pt Pattern) wellName(kind string, n int) string {
	if pt.Name == "" {
		return fmt.Sprintf("new.%s-%d", kind, n)
	}
	return fmt.Sprintf("%s.%s-%d", pt.Name, kind, n)
}

// Layout lays the pattern over the active cells of m and returns its
// wells: injectors <name>.INJ-n at InjectorRate, producers <name>.PRD-n at ProducerBHP,
// numbered south to north, west to east. Points in inactive cells, in a
// cell already taken by an earlier point, or with a bad Peaceman radius
// are dropped and counted.
func (pt Pattern) Layout(m *reservoir.Model) (wells []reservoir.Well, dropped int, err error) {
	g := m.Grid
	ox, oy := g.X0+pt.Offset[0], g.Y0+pt.Offset[1]
	pts, err := pt.Points(ox, oy, g.X0, g.Y0, g.X0+g.Width(), g.Y0+g.Height())
	if err != nil {
		return nil, 0, err
	}
	taken := map[int]bool{}
	nInj, nProd := 0, 0
	for _, q := range pts {
		i, j, ok := g.Locate(q.X, q.Y)
		if !ok {
			continue
		}
		k := g.Index(i, j)
		if !m.Active[k] || taken[k] {
			dropped++
			continue
		}
		w := reservoir.Well{X: q.X, Y: q.Y, I: i, J: j, Cell: k, Radius: m.Units.DefaultWellRadius()}
		if q.Injector {
			nInj++
			w.Name, w.Type, w.Control, w.Rate, w.MaxBHP = pt.wellName("INJ", nInj), reservoir.Injector, reservoir.RateControl, pt.InjectorRate, pt.InjectorMaxBHP
		} else {
			nProd++
			w.Name, w.Type, w.Control, w.BHP = pt.wellName("PRD", nProd), reservoir.Producer, reservoir.BHPControl, pt.ProducerBHP
		}
		if peacemanCheck(m, w) != "" {
			dropped++
			if q.Injector {
				nInj--
			} else {
				nProd--
			}
			continue
		}
		taken[k] = true
		wells = append(wells, w)
	}
	if nInj == 0 || nProd == 0 {
		return nil, dropped, fmt.Errorf("pattern %s: %d injector(s) and %d producer(s) fall in active cells; a smaller spacing or another offset is needed", pt.Name, nInj, nProd)
	}
	return wells, dropped, nil
}

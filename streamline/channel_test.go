package streamline

import (
	"math"
	"testing"

	"floodtrace/reservoir"
)

// channel is uniform flow along x through a homogeneous strip: every cell
// of the west column injects q, every cell of the east column produces q,
// so each row carries q from west to east. The exact solution (common
// practice, from the definition of time of flight): straight lines at
// constant y, time of flight PV/q in every cell and (pore volume of the
// row)/q from end to end.
type channel struct {
	nx, ny int
	dx, dy float64
	pv, q  float64
}

func (c channel) field() *Field {
	g := reservoir.Grid{NX: c.nx, NY: c.ny, DX: c.dx, DY: c.dy, X0: 1000, Y0: 2000}
	f := &Field{Grid: g, PoreVolume: make([]float64, g.N()), FluxX: make([]float64, g.NXFaces()), FluxY: make([]float64, g.NYFaces())}
	for k := range f.PoreVolume {
		f.PoreVolume[k] = c.pv
	}
	for j := 0; j < c.ny; j++ {
		for i := 1; i < c.nx; i++ {
			f.FluxX[g.XFace(i, j)] = c.q
		}
		f.Wells = append(f.Wells,
			Well{Name: "inj", Cell: g.Index(0, j), Q: c.q},
			Well{Name: "prod", Cell: g.Index(c.nx-1, j), Q: -c.q})
	}
	return f
}

func relErr(got, want float64) float64 { return math.Abs(got-want) / math.Abs(want) }

func TestUniformChannel(t *testing.T) {
	for _, c := range []channel{
		{nx: 20, ny: 5, dx: 100, dy: 50, pv: 1781.1, q: 37.5},
		{nx: 7, ny: 1, dx: 10, dy: 30, pv: 0.37, q: 1e-3},
		{nx: 2, ny: 3, dx: 1, dy: 1, pv: 5, q: 2}, // injector and producer in adjacent cells
	} {
		f := c.field()
		r, err := Trace(f, Settings{Count: 40 * c.ny, KeepPaths: true})
		if err != nil {
			t.Fatal(err)
		}
		if len(r.Warnings) > 0 {
			t.Errorf("%+v: warnings %q", c, r.Warnings)
		}
		cellTau := c.pv / c.q
		arrived := make([]float64, len(f.Wells))
		for n, l := range r.Lines {
			if l.Launch != FromInjector || l.Start != AtWell || l.End != AtWell {
				t.Fatalf("%+v: line %d launched from %v ends %v, %v", c, n, l.Launch, l.Start, l.End)
			}
			j := int(l.Cells[0]) / c.nx
			if len(l.Cells) != c.nx {
				t.Fatalf("%+v: line %d crosses %d cells, want %d", c, n, len(l.Cells), c.nx)
			}
			for m, k := range l.Cells {
				if int(k) != f.Grid.Index(m, j) {
					t.Fatalf("%+v: line %d leaves row %d at cell %d", c, n, j, k)
				}
				if e := relErr(l.Tau[m], cellTau); e > 1e-12 {
					t.Errorf("%+v: line %d cell %d: tau %g, want PV/q = %g", c, n, m, l.Tau[m], cellTau)
				}
			}
			if e := relErr(l.TotalTau, float64(c.nx)*c.pv/c.q); e > 1e-12 {
				t.Errorf("%+v: line %d: total tau %g, want row PV/q = %g", c, n, l.TotalTau, float64(c.nx)*c.pv/c.q)
			}
			// The path runs from the injector's centre to its face, straight
			// along the row, then to the producer's centre.
			inner := l.Path[1 : len(l.Path)-1]
			if len(inner) != c.nx-1 {
				t.Fatalf("%+v: line %d has %d face crossings, want %d", c, n, len(inner), c.nx-1)
			}
			for _, p := range inner {
				if p[1] != inner[0][1] {
					t.Fatalf("%+v: line %d is not straight: y %g then %g", c, n, inner[0][1], p[1])
				}
			}
			arrived[l.Producer] += l.Flux
		}
		for w, wl := range f.Wells {
			if wl.Q < 0 && math.Abs(arrived[w]+wl.Q) > 1e-9*c.q {
				t.Errorf("%+v: producer %d receives %g, rate %g", c, w, arrived[w], -wl.Q)
			}
		}
		for k := range f.PoreVolume {
			i := k % c.nx
			if e := relErr(r.Volume[k], c.pv); e > 1e-12 {
				t.Errorf("%+v: cell %d traced volume %g, pore volume %g", c, k, r.Volume[k], c.pv)
			}
			if e := relErr(r.TOF[k], (float64(i)+0.5)*cellTau); e > 1e-12 {
				t.Errorf("%+v: cell %d TOF %g, want %g", c, k, r.TOF[k], (float64(i)+0.5)*cellTau)
			}
			if e := relErr(r.BackTOF[k], (float64(c.nx-i)-0.5)*cellTau); e > 1e-12 {
				t.Errorf("%+v: cell %d back TOF %g, want %g", c, k, r.BackTOF[k], (float64(c.nx-i)-0.5)*cellTau)
			}
			if r.Stagnant[k] {
				t.Errorf("%+v: cell %d marked stagnant", c, k)
			}
		}
	}
}

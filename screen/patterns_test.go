package screen

import (
	"fmt"
	"math"
	"sort"
	"strings"
	"testing"

	"floodtrace/reservoir"
)

// key rounds a point for set comparisons.
func key(p PatternPoint) string {
	return fmt.Sprintf("%.6f,%.6f,%v", p.X, p.Y, p.Injector)
}

func keys(ps []PatternPoint) []string {
	out := make([]string, len(ps))
	for i, p := range ps {
		out[i] = key(p)
	}
	sort.Strings(out)
	return out
}

func counts(ps []PatternPoint) (inj, prod int) {
	for _, p := range ps {
		if p.Injector {
			inj++
		} else {
			prod++
		}
	}
	return
}

// TestFiveSpotCounts checks the five-spot over a rectangle of n x m
// pattern elements (Craig 1971, from memory: injectors at the corners of
// each square, a producer at its centre): (n+1)(m+1) injectors and n*m
// producers, and every producer has exactly four injectors at a/sqrt(2),
// the nearest wells, so the two kinds alternate on the lattice.
func TestFiveSpotCounts(t *testing.T) {
	const a = 200.0
	pt := Pattern{Kind: FiveSpot, Spacing: a}
	n, m := 5, 3
	ps, err := pt.Points(0, 0, 0, 0, float64(n)*a, float64(m)*a)
	if err != nil {
		t.Fatal(err)
	}
	inj, prod := counts(ps)
	if inj != (n+1)*(m+1) || prod != n*m {
		t.Fatalf("%d injectors and %d producers, want %d and %d", inj, prod, (n+1)*(m+1), n*m)
	}
	for _, p := range ps {
		if p.Injector {
			continue
		}
		near := 0
		for _, q := range ps {
			d := math.Hypot(p.X-q.X, p.Y-q.Y)
			if d == 0 {
				continue
			}
			if d < a/math.Sqrt2-1e-9 {
				t.Fatalf("producer (%g,%g) has a well at %g < a/sqrt2", p.X, p.Y, d)
			}
			if math.Abs(d-a/math.Sqrt2) < 1e-9 {
				if !q.Injector {
					t.Fatalf("producer (%g,%g) has a producer neighbour", p.X, p.Y)
				}
				near++
			}
		}
		if near != 4 {
			t.Fatalf("producer (%g,%g) has %d injector neighbours, want 4", p.X, p.Y, near)
		}
	}
}

// TestPatternRotationSymmetry: the five-spot and the inverted nine-spot
// are invariant under a quarter turn about an injector (their elements are
// squares; Craig 1971), so rotating by 90 degrees gives the same wells over
// a square centred on the origin. A line drive is not: its rows turn into
// columns.
func TestPatternRotationSymmetry(t *testing.T) {
	for _, c := range []struct {
		kind      PatternKind
		symmetric bool
	}{{FiveSpot, true}, {InvertedNineSpot, true}, {DirectLineDrive, false}, {StaggeredLineDrive, false}} {
		t.Run(string(c.kind), func(t *testing.T) {
			const a, ox, oy, half = 300.0, 1000.0, 2000.0, 1500.0
			p0 := Pattern{Kind: c.kind, Spacing: a}
			p90 := Pattern{Kind: c.kind, Spacing: a, Rotation: 90}
			ps0, err := p0.Points(ox, oy, ox-half, oy-half, ox+half, oy+half)
			if err != nil {
				t.Fatal(err)
			}
			ps90, err := p90.Points(ox, oy, ox-half, oy-half, ox+half, oy+half)
			if err != nil {
				t.Fatal(err)
			}
			same := strings.Join(keys(ps0), ";") == strings.Join(keys(ps90), ";")
			if same != c.symmetric {
				t.Errorf("rotation by 90 degrees maps the pattern onto itself: %v, want %v (%d and %d wells)", same, c.symmetric, len(ps0), len(ps90))
			}
			// A full turn always maps the pattern onto itself.
			p360 := Pattern{Kind: c.kind, Spacing: a, Rotation: 360}
			ps360, _ := p360.Points(ox, oy, ox-half, oy-half, ox+half, oy+half)
			if strings.Join(keys(ps0), ";") != strings.Join(keys(ps360), ";") {
				t.Error("rotation by 360 degrees changes the pattern")
			}
		})
	}
}

// TestInvertedNineSpot: an injector at the centre of each square, eight
// producers around it (four at a/2, four at a/sqrt(2)), three producers
// per injector in the interior (Craig 1971, from memory; common practice).
func TestInvertedNineSpot(t *testing.T) {
	const a = 400.0
	pt := Pattern{Kind: InvertedNineSpot, Spacing: a}
	// Over a large window the ratio tends to 3; count in the interior
	// cells [i a - a/2, i a + a/2) around each injector exactly.
	ps, err := pt.Points(0, 0, -4000, -4000, 4000, 4000)
	if err != nil {
		t.Fatal(err)
	}
	inj, prod := 0, 0
	for _, p := range ps {
		// The unit cell of the lattice centred on an injector at (0,0)
		// tiles the plane; count those inside [-2000, 2000).
		if p.X >= -2000 && p.X < 2000 && p.Y >= -2000 && p.Y < 2000 {
			if p.Injector {
				inj++
			} else {
				prod++
			}
		}
	}
	if inj == 0 || prod != 3*inj {
		t.Errorf("interior: %d injectors, %d producers; want 3 producers per injector", inj, prod)
	}
	for _, p := range ps {
		if !p.Injector || math.Abs(p.X) > 3000 || math.Abs(p.Y) > 3000 {
			continue
		}
		near, diag := 0, 0
		for _, q := range ps {
			d := math.Hypot(p.X-q.X, p.Y-q.Y)
			if q.Injector && d > 0 && d < a-1e-9 {
				t.Fatalf("injectors (%g,%g) and (%g,%g) closer than a", p.X, p.Y, q.X, q.Y)
			}
			if !q.Injector && math.Abs(d-a/2) < 1e-9 {
				near++
			}
			if !q.Injector && math.Abs(d-a/math.Sqrt2) < 1e-9 {
				diag++
			}
		}
		if near != 4 || diag != 4 {
			t.Fatalf("injector (%g,%g): %d producers at a/2 and %d at a/sqrt2, want 4 and 4", p.X, p.Y, near, diag)
		}
	}
}

// TestLineDrives: rows of injectors and producers alternate d apart; in
// the direct line drive each producer faces an injector (same x), in the
// staggered one it sits half a spacing along (Craig 1971; 1 producer per
// injector in both).
func TestLineDrives(t *testing.T) {
	const a, d = 300.0, 200.0
	for _, kind := range []PatternKind{DirectLineDrive, StaggeredLineDrive} {
		pt := Pattern{Kind: kind, Spacing: a, RowSpacing: d}
		ps, err := pt.Points(0, 0, -0.25*a, 0, 10*a-0.25*a, 8*d-1)
		if err != nil {
			t.Fatal(err)
		}
		inj, prod := counts(ps)
		if inj != prod || inj != 40 {
			t.Errorf("%s: %d injectors, %d producers; want 40 and 40", kind, inj, prod)
		}
		for _, p := range ps {
			row := math.Round(p.Y / d)
			if math.Abs(p.Y-row*d) > 1e-9 {
				t.Fatalf("%s: well off the rows at y=%g", kind, p.Y)
			}
			if (int(row)%2 == 0) != p.Injector {
				t.Fatalf("%s: row %v holds the wrong type", kind, row)
			}
			shift := math.Mod(p.X/a+10, 1)
			want := 0.0
			if kind == StaggeredLineDrive && !p.Injector {
				want = 0.5
			}
			if math.Abs(shift-want) > 1e-9 {
				t.Fatalf("%s: well at x=%g is %g spacings along, want %g", kind, p.X, shift, want)
			}
		}
	}
}

func TestPatternLayoutOnModel(t *testing.T) {
	m := reservoir.NewUniform(20, 20, 50, 50, 100, 0.2, 10)
	// Make the west quarter inactive.
	for j := 0; j < 20; j++ {
		for i := 0; i < 5; i++ {
			m.Active[m.Grid.Index(i, j)] = false
		}
	}
	pt := Pattern{Kind: FiveSpot, Name: "fs", Spacing: 400, Offset: [2]float64{25, 25}, InjectorRate: 300, ProducerBHP: 800}
	wells, dropped, err := pt.Layout(m)
	if err != nil {
		t.Fatal(err)
	}
	// Injectors at x,y = 25 + 400k (k = 0..2) and producers at 225 +
	// 400k (k = 0..1): 9 injectors and 4 producers over the grid; the
	// injectors at x = 25 (3) and the producers at x = 225 (2) lie west of
	// x = 250, in the inactive quarter.
	inj, prod := 0, 0
	seen := map[int]bool{}
	for _, w := range wells {
		if !m.Active[w.Cell] || seen[w.Cell] {
			t.Fatalf("well %s in an inactive or shared cell", w.Name)
		}
		seen[w.Cell] = true
		if w.Type == reservoir.Injector {
			inj++
			if w.Rate != 300 || w.Control != reservoir.RateControl {
				t.Errorf("injector %+v", w)
			}
		} else {
			prod++
			if w.BHP != 800 || w.Control != reservoir.BHPControl {
				t.Errorf("producer %+v", w)
			}
		}
	}
	if inj != 6 || prod != 2 || dropped != 5 {
		t.Errorf("%d injectors, %d producers, %d dropped; want 6, 2, 5", inj, prod, dropped)
	}
	if wells[0].Name != "fs.INJ-1" || wells[0].X != 425 || wells[0].Y != 25 {
		t.Errorf("first well %s at (%g, %g)", wells[0].Name, wells[0].X, wells[0].Y)
	}
	// New wells carry the pattern's name, so they cannot be taken for the
	// base case's wells (whose schedule events name them).
	for _, w := range wells {
		if m.WellIndex(w.Name) >= 0 {
			t.Errorf("pattern well %s has the name of a base well", w.Name)
		}
	}
	// A spacing larger than the grid leaves no producer.
	big := Pattern{Kind: FiveSpot, Name: "big", Spacing: 5000, Offset: [2]float64{500, 500}, InjectorRate: 1, ProducerBHP: 1}
	if _, _, err := big.Layout(m); err == nil {
		t.Error("a pattern without a producer was accepted")
	}
}

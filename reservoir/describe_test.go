package reservoir

import (
	"math"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
)

func TestDescribe(t *testing.T) {
	m := loadGood(t, "matrix_metric")
	s := Describe(m)
	for _, want := range []string{
		"Ostrel Flats pilot",
		"units       metric (m, mD, cP, m3/day, bar)",
		"grid        8 x 6 cells of 50 x 40 m, south-west corner (1000, 2000)",
		"cells       48, of which 48 active",
		"pore volume 135648 m3",
		"OOIP        105805 m3",
		"Corey: swc 0.18, sor 0.22",
		"INJ-1  injector  cell (i=2, j=3)",
		"rate 300 m3/day, BHP limit 250 bar",
		"PRD-1  producer  cell (i=7, j=5)",
		"PRD-2  producer  cell (i=0, j=0)",
		"BHP floor 20 bar",
		"schedule    4 events",
		"4 pressure solves",
		"memory      about",
	} {
		if !strings.Contains(s, want) {
			t.Errorf("description lacks %q:\n%s", want, s)
		}
	}
	// Pore volume printed is the sum of dx*dy*h*phi over the cells.
	pv := 0.0
	for k := range m.Thickness {
		pv += 50 * 40 * m.Thickness[k] * 0.18
	}
	if math.Abs(pv-135648) > 1 {
		t.Errorf("pore volume %g differs from the printed 135648", pv)
	}
	f := Describe(loadGood(t, "raster_field"))
	for _, want := range []string{"22 active", "bbl", "table of 7 rows", "swc 0.2, sor 0.3", "opens day 365", "Ridge"} {
		if !strings.Contains(f, want) {
			t.Errorf("description lacks %q:\n%s", want, f)
		}
	}
}

func TestEstimateMemory(t *testing.T) {
	// BytesPerCell per cell plus, per streamline, 128 bytes and 32 bytes
	// for each of 2*(nx+ny) crossings (the documented model).
	if got, want := EstimateMemory(100, 50, 10), int64(400*5000+10*(128+32*300)); got != want {
		t.Errorf("EstimateMemory(100, 50, 10) = %d, want %d", got, want)
	}
	if EstimateMemory(1e9, 1e9, 1e9) != math.MaxInt64 {
		t.Error("no saturation")
	}
	if EstimateMemory(-1, 5, -3) != 0 {
		t.Error("negative sizes")
	}
	if a, b := EstimateMemory(200, 200, 2000), EstimateMemory(400, 400, 2000); !(b > a) {
		t.Errorf("not increasing: %d %d", a, b)
	}
}

// TestEstimateCoversLoad measures the memory Load allocates for a 300 x 300
// case with a raster map and checks that the estimate of a run exceeds it
// (loading is the first part of a run).
func TestEstimateCoversLoad(t *testing.T) {
	if testing.Short() {
		t.Skip("allocates a few megabytes")
	}
	dir := t.TempDir()
	const nx, ny = 300, 300
	var b strings.Builder
	b.WriteString("ncols 300\nnrows 300\nxllcorner 0\nyllcorner 0\ncellsize 10\n")
	for r := 0; r < ny; r++ {
		for i := 0; i < nx; i++ {
			if i > 0 {
				b.WriteByte(' ')
			}
			b.WriteString("123.5")
		}
		b.WriteByte('\n')
	}
	write(t, dir, "perm.asc", b.String())
	write(t, dir, "case.yaml", `units: field
rock: {perm: perm.asc, porosity: 0.2, thickness: 10}
fluids: {water_viscosity: 1, oil_viscosity: 2}
relperm: {corey: {swc: 0.1, sor: 0.1, krw_max: 1, kro_max: 1, nw: 2, no: 2}}
wells:
  - {name: I, type: injector, x: 5, y: 5, rate: 10}
  - {name: P, type: producer, x: 2995, y: 2995, bhp: 100}
run: {streamlines: 1}
`)
	var before, after runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&before)
	m, err := Load(filepath.Join(dir, "case.yaml"))
	runtime.ReadMemStats(&after)
	if err != nil {
		t.Fatal(err)
	}
	used := int64(after.TotalAlloc - before.TotalAlloc)
	est := EstimateMemory(nx, ny, m.Run.Streamlines)
	t.Logf("load allocated %d bytes (%.0f per cell); run estimate %d bytes", used, float64(used)/(nx*ny), est)
	if used > est {
		t.Errorf("load alone allocated %d bytes, more than the run estimate %d", used, est)
	}
}

// TestPeacemanRadius checks the equivalent radius against Peaceman (1978):
// ro = 0.198 dx for a square isotropic cell (0.28/sqrt(2) = 0.19799), and
// Peaceman (1983): ro = 0.14 sqrt(dx^2 + dy^2) for an isotropic
// rectangular cell, and the anisotropic form's invariance under swapping
// the axes together with the permeabilities.
func TestPeacemanRadius(t *testing.T) {
	if got := peacemanRadius(100, 100, 50, 50); math.Abs(got-0.198*50) > 0.0005*50 {
		t.Errorf("square cell: ro = %g, want 0.198*dx = %g (Peaceman 1978)", got, 0.198*50)
	}
	if got, want := peacemanRadius(30, 30, 40, 90), 0.14*math.Sqrt(40*40+90*90); math.Abs(got-want) > 1e-12*want {
		t.Errorf("rectangular cell: ro = %g, want %g (Peaceman 1983)", got, want)
	}
	if a, b := peacemanRadius(10, 250, 40, 90), peacemanRadius(250, 10, 90, 40); math.Abs(a-b) > 1e-12*a {
		t.Errorf("axis swap: %g vs %g", a, b)
	}
}

func TestLevenshtein(t *testing.T) {
	// Levenshtein (1966) distances, worked by hand: kitten -> sitting
	// needs two substitutions and one insertion.
	for _, c := range []struct {
		a, b string
		d    int
	}{{"kitten", "sitting", 3}, {"", "abc", 3}, {"flaw", "lawn", 2}, {"same", "same", 0}} {
		if got := levenshtein(c.a, c.b); got != c.d {
			t.Errorf("levenshtein(%q, %q) = %d, want %d", c.a, c.b, got, c.d)
		}
	}
	if got, ok := Nearest("porosty", []string{"perm", "perm_y", "porosity"}); got != "porosity" || !ok {
		t.Errorf("Nearest(porosty) = %q, %v", got, ok)
	}
	if _, ok := Nearest("zzzzzzzz", []string{"perm"}); ok {
		t.Error("a distant word was suggested")
	}
}

package reservoir

import (
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// gravityCase writes a 6 x 4 case whose depth map is the plane
// D = 5000 + ax*x + ay*y (x, y at the cell centres) and returns its path.
func gravityCase(t *testing.T, ax, ay float64, fluids string) string {
	t.Helper()
	dir := t.TempDir()
	var b strings.Builder
	b.WriteString("ncols 6\nnrows 4\nxllcorner 0\nyllcorner 0\ncellsize 100\nNODATA_value -9999\n")
	for r := 0; r < 4; r++ {
		j := 3 - r
		for i := 0; i < 6; i++ {
			x, y := (float64(i)+0.5)*100, (float64(j)+0.5)*100
			if i > 0 {
				b.WriteString(" ")
			}
			b.WriteString(strconv.FormatFloat(5000+ax*x+ay*y, 'g', -1, 64))
		}
		b.WriteString("\n")
	}
	if err := os.WriteFile(filepath.Join(dir, "depth.asc"), []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	c := `units: field
grid: {nx: 6, ny: 4, dx: 100, dy: 100}
rock: {perm: 200, porosity: 0.2, thickness: 20, depth: depth.asc}
fluids: {water_viscosity: 0.5, oil_viscosity: 2, ` + fluids + `}
relperm:
  corey: {swc: 0.2, sor: 0.2, krw_max: 0.3, kro_max: 0.8, nw: 2, no: 2}
wells:
  - {name: I, type: injector, x: 50, y: 50, rate: 100}
  - {name: P, type: producer, x: 550, y: 350, bhp: 1000}
`
	p := filepath.Join(dir, "case.yaml")
	if err := os.WriteFile(p, []byte(c), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// TestDipOfAPlane: on a plane of gradient (ax, ay) every cell's dip is
// atan(hypot(ax, ay)) (the differences are exact on a plane), and the
// gravity number follows its closed form (GravityNumber's definition).
func TestDipOfAPlane(t *testing.T) {
	for _, tc := range []struct{ ax, ay float64 }{{0.1, 0}, {0, -0.2}, {0.05, 0.05}} {
		m, err := Load(gravityCase(t, tc.ax, tc.ay, "water_density: 64, oil_density: 50"))
		if err != nil {
			t.Fatal(err)
		}
		if len(m.Warnings) != 0 {
			t.Errorf("warnings %v", m.Warnings)
		}
		want := math.Atan(math.Hypot(tc.ax, tc.ay)) * 180 / math.Pi
		lo, hi, grad := m.DipRange()
		if math.Abs(lo-want) > 1e-9 || math.Abs(hi-want) > 1e-9 || math.Abs(grad-math.Hypot(tc.ax, tc.ay)) > 1e-12 {
			t.Errorf("gradient %v: dip %g..%g, want %g", tc, lo, hi, want)
		}
		// N = c k kro(swc)/muo drho gamma |grad D| / (Q/(h L)), L = sqrt(24) * 100.
		ng := 0.001127 * 200 * 0.8 / 2 * 14 / 144 * grad / (100 / (20 * math.Sqrt(24) * 100))
		if got := m.GravityNumber(); math.Abs(got-ng) > 1e-12*ng {
			t.Errorf("gravity number %g, want %g", got, ng)
		}
		if !strings.Contains(Describe(m), "gravity number") {
			t.Error("Describe does not give the gravity number")
		}
	}
}

// TestGravityWarnings: equal densities with a depth, or densities without
// a depth, are accepted with a warning naming the line.
func TestGravityWarnings(t *testing.T) {
	m, err := Load(gravityCase(t, 0.1, 0, "water_density: 55, oil_density: 55"))
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Warnings) != 1 || !strings.Contains(m.Warnings[0], "case.yaml:4: fluids.water_density and fluids.oil_density are equal") {
		t.Errorf("warnings %q", m.Warnings)
	}
	data := `units: field
grid: {nx: 4, ny: 3, dx: 10, dy: 10}
rock: {perm: 100, porosity: 0.25, thickness: 10}
fluids: {water_viscosity: 1, oil_viscosity: 2, water_density: 62, oil_density: 50}
relperm:
  corey: {swc: 0.15, sor: 0.2, krw_max: 0.4, kro_max: 1, nw: 2, no: 2}
wells:
  - {name: I, type: injector, x: 5, y: 5, rate: 10}
  - {name: P, type: producer, x: 35, y: 25, rate: 10}
`
	m, err = Parse("mini/case.yaml", []byte(data))
	if err != nil {
		t.Fatal(err)
	}
	if m.HasGravity() || len(m.Warnings) != 1 || !strings.Contains(m.Warnings[0], "mini/case.yaml:4: fluids: densities are given but rock.depth is not") {
		t.Errorf("gravity %v, warnings %q", m.HasGravity(), m.Warnings)
	}
	if !math.IsNaN(m.GravityNumber()) || strings.Contains(Describe(m), "gravity number") {
		t.Error("a case without depth has a gravity number")
	}
}

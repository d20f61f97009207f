package reservoir

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// rangeBase is a valid field-unit case; the tests change one line of it.
// Line numbers: 5 perm, 12 the injector, 13 the producer.
const rangeBase = `title: range test
units: field
grid: {nx: 10, ny: 8, dx: 100, dy: 100, origin: [0, 0]}
rock:
  perm: 150
  porosity: 0.2
  thickness: 25
fluids: {water_viscosity: 0.5, oil_viscosity: 3, initial_water_saturation: 0.2}
relperm:
  corey: {swc: 0.2, sor: 0.25, krw_max: 0.35, kro_max: 0.9, nw: 2.5, no: 2}
wells:
  - {name: I-1, type: injector, x: 150, y: 150, rate: 1000, max_bhp: 4000}
  - {name: P-1, type: producer, x: 850, y: 650, bhp: 800}
`

// writeCase writes the case text and the named map files into a new
// directory and returns the path of the case file.
func writeCase(t *testing.T, text string, files map[string]string) string {
	t.Helper()
	dir := t.TempDir()
	for name, body := range files {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	p := filepath.Join(dir, "case.yaml")
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func edit(t *testing.T, text, old, new string) string {
	t.Helper()
	if !strings.Contains(text, old) {
		t.Fatalf("the base case has no %q", old)
	}
	return strings.Replace(text, old, new, 1)
}

// matrix returns a 10 x 8 map of v with the given (row, column) cells,
// counted from 1 at the top left, set to other values.
func matrix(v string, cells map[[2]int]string) string {
	var b strings.Builder
	for r := 1; r <= 8; r++ {
		for c := 1; c <= 10; c++ {
			if c > 1 {
				b.WriteByte(' ')
			}
			if x, ok := cells[[2]int{r, c}]; ok {
				b.WriteString(x)
			} else {
				b.WriteString(v)
			}
		}
		b.WriteByte('\n')
	}
	return b.String()
}

// TestBaseHasNoWarning checks that the plain case is accepted without a
// warning, so that the warnings below come from the edits.
func TestBaseHasNoWarning(t *testing.T) {
	m, err := Load(writeCase(t, rangeBase, nil))
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Warnings) != 0 {
		t.Errorf("warnings for a plain case: %q", m.Warnings)
	}
}

// TestAbsurdMagnitudesRefused checks the two values of the report (issue
// 14): permeability 1e300 and a rate of 1e30 are refused at load, naming
// the file and the line (or the map, row and column).
func TestAbsurdMagnitudesRefused(t *testing.T) {
	for _, c := range []struct {
		name  string
		text  string
		files map[string]string
		want  string // after the directory
	}{
		{"perm 1e300 in the case", edit(t, rangeBase, "perm: 150", "perm: 1e300"), nil,
			"case.yaml:5: rock.perm = 1e300 is outside the accepted range [1e-07, 1e+07] md"},
		{"perm 1e300 in a map", edit(t, rangeBase, "perm: 150", "perm: perm.txt"),
			map[string]string{"perm.txt": matrix("150", map[[2]int]string{{2, 3}: "1e300"})},
			"perm.txt: row 2, column 3: permeability 1e+300 is outside the accepted range"},
		{"perm_y 1e300 in a map", edit(t, rangeBase, "perm: 150", "perm: 150\n  perm_y: py.txt"),
			map[string]string{"py.txt": matrix("150", map[[2]int]string{{8, 10}: "1e300"})},
			"py.txt: row 8, column 10: permeability in y 1e+300 is outside the accepted range"},
		{"rate 1e30", edit(t, rangeBase, "rate: 1000, max_bhp: 4000", "rate: 1e30"), nil,
			"case.yaml:12: well I-1: rate = 1e30 is outside the accepted range [0.01, 1e+06] bbl/day"},
		{"metric max_bhp", edit(t, rangeBase, "units: field", "units: metric"), nil,
			"case.yaml:12: well I-1: max_bhp = 4000 is outside the accepted range [0, 2000] bar"},
	} {
		t.Run(c.name, func(t *testing.T) {
			p := writeCase(t, c.text, c.files)
			_, err := Load(p)
			if err == nil {
				t.Fatal("accepted")
			}
			want := filepath.Join(filepath.Dir(p), c.want)
			if !strings.Contains(err.Error(), want) {
				t.Errorf("error\n  %v\ndoes not contain\n  %s", err, want)
			}
			var ie *InputError
			var we *WellError
			if !errors.As(err, &ie) && !errors.As(err, &we) {
				t.Errorf("error %T is not an input error", err)
			}
		})
	}
}

// TestWarningsNearTheEdge checks that values inside the accepted range but
// outside the usual one load, with one warning naming the file and the
// line or cell; and that fault multipliers above 1, unsorted or repeated
// snapshot times and NODATA cells without an active map warn.
func TestWarningsNearTheEdge(t *testing.T) {
	for _, c := range []struct {
		name  string
		text  string
		files map[string]string
		want  string // after the directory
	}{
		{"high rate", edit(t, rangeBase, "rate: 1000, max_bhp: 4000", "rate: 2e5"), nil,
			"case.yaml:12: well I-1: rate = 200000 is outside the usual range [1, 100000] bbl/day"},
		{"high permeability in a map", edit(t, rangeBase, "perm: 150", "perm: perm.txt"),
			map[string]string{"perm.txt": matrix("150", map[[2]int]string{{4, 5}: "3e5", {6, 1}: "2e6"})},
			"perm.txt: row 4, column 5: permeability 300000 is outside the usual range [0.001, 100000] md in an active cell (and 1 more cell)"},
		{"thin", edit(t, rangeBase, "thickness: 25", "thickness: 0.5"), nil,
			"case.yaml:7: rock.thickness = 0.5 is outside the usual range [1, 2000] ft"},
		{"viscous water", edit(t, rangeBase, "water_viscosity: 0.5", "water_viscosity: 20"), nil,
			"case.yaml:8: fluids.water_viscosity = 20 is outside the usual range [0.1, 5] cp"},
		{"steep Corey", edit(t, rangeBase, "nw: 2.5", "nw: 12"), nil,
			"case.yaml:10: relperm.corey.nw = 12 is outside the usual range [1, 8]"},
		{"little movable oil", edit(t, rangeBase, "initial_water_saturation: 0.2", "initial_water_saturation: 0.72"), nil,
			"case.yaml:8: fluids.initial_water_saturation = 0.72 leaves only 0.03 of movable oil"},
		{"few streamlines", rangeBase + "run: {streamlines: 20}\n", nil,
			"case.yaml:14: run.streamlines = 20 is outside the usual range [100, 200000]"},
		{"conduit fault", rangeBase + "faults:\n  - {name: F-1, trace: [[500, 0], [500, 800]], multiplier: 5}\n", nil,
			`case.yaml:15: fault "F-1": multiplier 5 is above 1: the fault is a conduit`},
		{"unsorted snapshots", rangeBase + "run: {snapshots: [900, 300]}\n", nil,
			"case.yaml:14: run.snapshots are not in increasing order; they are taken sorted"},
		{"repeated snapshots", rangeBase + "run: {snapshots: [300, 300, 900]}\n", nil,
			"case.yaml:14: run.snapshots gives 300 more than once; each time is taken once"},
		{"NODATA without an active map", edit(t, rangeBase, "perm: 150", "perm: perm.asc"),
			map[string]string{"perm.asc": "ncols 10\nnrows 8\nxllcorner 0\nyllcorner 0\ncellsize 100\nNODATA_value -1\n" +
				matrix("150", map[[2]int]string{{1, 1}: "-1", {1, 2}: "-1", {8, 10}: "-1"})},
			"perm.asc: 3 of 80 cells are NODATA in this permeability map and became inactive (the case gives no active map)"},
	} {
		t.Run(c.name, func(t *testing.T) {
			p := writeCase(t, c.text, c.files)
			m, err := Load(p)
			if err != nil {
				t.Fatal(err)
			}
			if len(m.Warnings) != 1 {
				t.Fatalf("%d warnings, want 1: %q", len(m.Warnings), m.Warnings)
			}
			want := filepath.Join(filepath.Dir(p), c.want)
			if !strings.Contains(m.Warnings[0], want) {
				t.Errorf("warning\n  %s\ndoes not contain\n  %s", m.Warnings[0], want)
			}
			if d := Describe(m); !strings.Contains(d, "warnings    1") || !strings.Contains(d, m.Warnings[0]) {
				t.Errorf("Describe does not list the warning:\n%s", d)
			}
		})
	}
}

// TestSnapshotsSortedOnce checks the times a warned snapshot list yields.
func TestSnapshotsSortedOnce(t *testing.T) {
	m, err := Load(writeCase(t, rangeBase+"run: {snapshots: [900, 300, 900]}\n", nil))
	if err != nil {
		t.Fatal(err)
	}
	if got := m.Run.Snapshots; len(got) != 2 || got[0] != 300 || got[1] != 900 {
		t.Errorf("snapshots %v, want [300 900]", got)
	}
	if len(m.Warnings) != 2 {
		t.Errorf("want a warning for the order and one for the repeat: %q", m.Warnings)
	}
}

// TestLimitBoundaries checks each range at its ends: the accepted bounds
// themselves load (with a warning), a value just outside is refused.
func TestLimitBoundaries(t *testing.T) {
	for _, c := range []struct {
		lim        int
		u          UnitSystem
		ok, refuse []float64
	}{
		{limPerm, Field, []float64{1e-7, 1e7}, []float64{0, -1, 0.99e-7, 1.01e7, 1e300}},
		{limPorosity, Field, []float64{1e-4, 0.75}, []float64{0, 0.76, 1}},
		{limRate, Field, []float64{0.01, 1e6}, []float64{0, 1.01e6, 1e30}},
		{limRate, Metric, []float64{0.001, 1.6e5}, []float64{1.7e5}},
		{limBHP, Field, []float64{1, 3e4}, []float64{0, -5, 3.1e4}},
		{limBHP, Metric, []float64{0.5, 2000}, []float64{2100}},
		{limFaultMult, Field, []float64{0, 1000}, []float64{-1, 1001}},
		{limSkin, Field, []float64{-10, 1000}, []float64{-11, 1e6}},
	} {
		l := Limits[c.lim]
		for _, v := range c.ok {
			if m := l.refuse(c.u, v); m != "" {
				t.Errorf("%s (%s) = %g refused: %s", l.Name, c.u, v, m)
			}
		}
		for _, v := range c.refuse {
			if m := l.refuse(c.u, v); m == "" {
				t.Errorf("%s (%s) = %g accepted", l.Name, c.u, v)
			}
		}
		b := l.Bound(c.u)
		if !(b.Lo <= b.UsualLo && b.UsualLo <= b.UsualHi && b.UsualHi <= b.Hi) {
			t.Errorf("%s (%s): usual range [%g, %g] not inside [%g, %g]", l.Name, c.u, b.UsualLo, b.UsualHi, b.Lo, b.Hi)
		}
	}
	for _, l := range Limits {
		for _, b := range []Bound{l.Field, l.Metric} {
			if !(b.Lo <= b.UsualLo && b.UsualLo <= b.UsualHi && b.UsualHi <= b.Hi) {
				t.Errorf("%s: usual range [%g, %g] not inside [%g, %g]", l.Name, b.UsualLo, b.UsualHi, b.Lo, b.Hi)
			}
		}
	}
}

// TestLimitsDocumented checks that README.md shows the table of ranges
// exactly as the code applies them.
func TestLimitsDocumented(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(b), LimitsMarkdown()) {
		t.Errorf("README.md does not hold the current table of ranges; paste LimitsMarkdown():\n%s", LimitsMarkdown())
	}
}

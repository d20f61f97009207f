package reservoir

import (
	"math"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

func loadGood(t *testing.T, name string) *Model {
	t.Helper()
	m, err := Load(filepath.Join("testdata", "good", name, "case.yaml"))
	if err != nil {
		t.Fatalf("load %s: %v", name, err)
	}
	return m
}

// TestLoadRasterFieldCase loads a field-unit case whose grid comes from a
// GIS ASCII raster (xllcenter form, NODATA in one corner), with a
// comma-separated porosity matrix, an active mask raster, a constant
// perm_y and a tabular relative permeability.
func TestLoadRasterFieldCase(t *testing.T) {
	m := loadGood(t, "raster_field")
	g := m.Grid
	if m.Units != Field || m.Title != "Korvanne south lobe" {
		t.Errorf("units %q title %q", m.Units, m.Title)
	}
	// The grid comes from perm.asc: xllcenter 50 with cellsize 100 puts
	// the south-west corner at 0.
	if want := (Grid{NX: 6, NY: 4, DX: 100, DY: 100, X0: 0, Y0: 0}); g != want {
		t.Fatalf("grid %+v, want %+v", g, want)
	}
	// perm.asc row r (from the top), column c holds 100*r + 10*(c-1)
	// except the NODATA cell at row 1, column 6; j = NY - r.
	for j := 0; j < g.NY; j++ {
		for i := 0; i < g.NX; i++ {
			k := g.Index(i, j)
			r := g.NY - j
			nodata := r == 1 && i == 5 // NODATA in perm.asc and in mask.asc
			masked := r == 4 && i == 0 // mask.asc row 4, column 1 is 0
			if m.Active[k] == (nodata || masked) {
				t.Errorf("cell (%d,%d) active = %v", i, j, m.Active[k])
			}
			if !m.Active[k] {
				if m.PermEast[k] != 0 || m.Porosity[k] != 0 || m.Thickness[k] != 0 || m.PermNorth[k] != 0 {
					t.Errorf("inactive cell (%d,%d) has non-zero properties", i, j)
				}
				continue
			}
			if want := float64(100*r + 10*i); m.PermEast[k] != want {
				t.Errorf("perm(%d,%d) = %g, want %g", i, j, m.PermEast[k], want)
			}
			// poro.csv row r: 0.21 - 0.01*r + 0.01*i.
			if want := 0.21 - 0.01*float64(r) + 0.01*float64(i); math.Abs(m.Porosity[k]-want) > 1e-12 {
				t.Errorf("porosity(%d,%d) = %g, want %g", i, j, m.Porosity[k], want)
			}
			if m.PermNorth[k] != 50 || m.Thickness[k] != 20 {
				t.Errorf("cell (%d,%d): perm_y %g thickness %g", i, j, m.PermNorth[k], m.Thickness[k])
			}
		}
	}
	// Volumetric OOIP in field units: 7758 bbl per acre-ft times area,
	// net thickness, porosity and oil saturation (common practice; e.g.
	// Craft and Hawkins 1959, from memory). 7758 is 43560/5.6146 rounded,
	// hence the 1e-4 tolerance.
	want := 0.0
	acres := g.DX * g.DY / 43560
	for k := range m.Active {
		if m.Active[k] {
			want += 7758 * acres * m.Thickness[k] * m.Porosity[k] * (1 - 0.25)
		}
	}
	if got := m.OOIP(); math.Abs(got-want) > 1e-4*want {
		t.Errorf("OOIP %g bbl, volumetric formula %g", got, want)
	}
	tab, ok := m.RelPerm.(*Table)
	if !ok {
		t.Fatalf("relperm is %T, want *Table", m.RelPerm)
	}
	if swc, sor := tab.Endpoints(); swc != 0.2 || math.Abs(sor-0.3) > 1e-12 {
		t.Errorf("table endpoints %g %g, want 0.2 0.3", swc, sor)
	}
	// Wells: a point on a face goes to the cell east and north of it.
	cells := map[string][2]int{"INJ-A": {1, 0}, "PRD-B": {4, 3}, "PRD-C": {5, 1}}
	for _, w := range m.Wells {
		c := cells[w.Name]
		if w.I != c[0] || w.J != c[1] || w.Cell != g.Index(c[0], c[1]) {
			t.Errorf("well %s in (%d,%d) cell %d, want %v", w.Name, w.I, w.J, w.Cell, c)
		}
	}
	b := m.Wells[1]
	if b.Control != BHPControl || b.BHP != 900 || b.MinBHP != 500 || b.Radius != 0.25 || b.Skin != 1 || b.Line != 15 {
		t.Errorf("PRD-B %+v", b)
	}
	if a := m.Wells[0]; a.Control != RateControl || a.Rate != 500 || a.MaxBHP != 3500 || a.Radius != 0.3 {
		t.Errorf("INJ-A %+v", a)
	}
	if m.Wells[2].Open != 365 {
		t.Errorf("PRD-C opens %g", m.Wells[2].Open)
	}
	// The fault at x = 300 from y = 0 to y = 250 crosses the links between
	// columns 2 and 3 in rows 0 and 1, and touches the row-2 link with its
	// end point (a closed trace counts it).
	for j := 0; j < g.NY; j++ {
		for i := 0; i <= g.NX; i++ {
			want := 1.0
			if i == 3 && j <= 2 {
				want = 0.1
			}
			if got := m.TransMultX[g.XFace(i, j)]; got != want {
				t.Errorf("x-face (%d,%d) multiplier %g, want %g", i, j, got, want)
			}
		}
	}
	for _, v := range m.TransMultY {
		if v != 1 {
			t.Fatalf("a y-face multiplier is %g", v)
		}
	}
	// Schedule sorted by time.
	if len(m.Schedule) != 2 || m.Schedule[0].Time != 365.5 || m.Schedule[0].Rate != 800 || !math.IsNaN(m.Schedule[0].BHP) ||
		m.Schedule[1].Well != "PRD-C" || !m.Schedule[1].Shut || m.Schedule[1].Line != 20 {
		t.Errorf("schedule %+v", m.Schedule)
	}
	r := m.Run
	if r.End != 1800 || r.ReportEvery != 15 || r.Streamlines != 500 || r.PressureUpdates != 1 || !slices.Equal(r.Snapshots, []float64{900, 1800}) {
		t.Errorf("run %+v", r)
	}
}

// TestLoadMatrixMetricCase loads a metric case with a grid section,
// whitespace, comma (CRLF) and tab-separated matrices, Corey curves, two
// faults, a schedule with a conversion and explicit update times.
func TestLoadMatrixMetricCase(t *testing.T) {
	m := loadGood(t, "matrix_metric")
	g := m.Grid
	if want := (Grid{NX: 8, NY: 6, DX: 50, DY: 40, X0: 1000, Y0: 2000}); g != want {
		t.Fatalf("grid %+v", g)
	}
	if m.Units != Metric {
		t.Fatalf("units %q", m.Units)
	}
	for j := 0; j < g.NY; j++ {
		r := g.NY - j // file row, 1 = north
		for i := 0; i < g.NX; i++ {
			k := g.Index(i, j)
			if want := float64(100*r + i); m.PermEast[k] != want {
				t.Errorf("perm(%d,%d) = %g, want %g", i, j, m.PermEast[k], want)
			}
			if want := float64(10*r+i) + 0.5; m.PermNorth[k] != want {
				t.Errorf("perm_y(%d,%d) = %g, want %g", i, j, m.PermNorth[k], want)
			}
			if want := 5 + float64(r-1) + 0.1*float64(i); math.Abs(m.Thickness[k]-want) > 1e-12 {
				t.Errorf("thickness(%d,%d) = %g, want %g", i, j, m.Thickness[k], want)
			}
			if !m.Active[k] || m.Porosity[k] != 0.18 {
				t.Errorf("cell (%d,%d) active %v porosity %g", i, j, m.Active[k], m.Porosity[k])
			}
		}
	}
	// Pore volume in metric units: sum of dx*dy*h*phi in m3 (the
	// definition of pore volume).
	pv := 0.0
	for k := range m.Thickness {
		pv += 50 * 40 * m.Thickness[k] * 0.18
	}
	if got := m.TotalPoreVolume(); math.Abs(got-pv) > 1e-9*pv {
		t.Errorf("pore volume %g m3, want %g", got, pv)
	}
	if c, ok := m.RelPerm.(Corey); !ok || c != (Corey{Swc: 0.18, Sor: 0.22, KrwMax: 0.3, KroMax: 0.85, Nw: 3, No: 2}) {
		t.Errorf("relperm %#v", m.RelPerm)
	}
	if m.Fluids != (Fluids{WaterViscosity: 0.4, OilViscosity: 1.6, InitialSw: 0.22, OilFVF: 1, WaterFVF: 1}) {
		t.Errorf("fluids %+v", m.Fluids)
	}
	// Placement rules of DESIGN.md section 4: a point on a face goes to
	// the cell east/north of it (INJ-1 at x = x0 + 2 dx, y = y0 + 3 dy),
	// a point on the north-east corner to the last cell, the south-west
	// corner to the first.
	want := map[string][2]int{"INJ-1": {2, 3}, "PRD-1": {7, 5}, "PRD-2": {0, 0}}
	for _, w := range m.Wells {
		if c := want[w.Name]; w.I != c[0] || w.J != c[1] {
			t.Errorf("well %s in (%d,%d), want %v", w.Name, w.I, w.J, c)
		}
		if w.Radius != 0.1 {
			t.Errorf("well %s radius %g, want the metric default 0.1 m", w.Name, w.Radius)
		}
	}
	// The schedule comes back sorted by time, unset numbers NaN.
	times := []float64{}
	for _, e := range m.Schedule {
		times = append(times, e.Time)
	}
	if !slices.Equal(times, []float64{200, 500, 900, 1000}) {
		t.Errorf("schedule times %v", times)
	}
	if e := m.Schedule[1]; e.Convert != Injector || e.Rate != 150 || !math.IsNaN(e.BHP) || e.Well != "PRD-2" {
		t.Errorf("conversion event %+v", e)
	}
	if e := m.Schedule[3]; !e.Reopen || e.Shut || !math.IsNaN(e.Rate) {
		t.Errorf("reopen event %+v", e)
	}
	r := m.Run
	if r.End != 1500 || r.ReportEvery != 30 || r.Streamlines != 800 || r.PressureUpdates != 4 ||
		!slices.Equal(r.UpdateTimes, []float64{300, 600, 900}) || !slices.Equal(r.Snapshots, []float64{500, 1500}) {
		t.Errorf("run %+v", r)
	}
	// The straight diagonal fault (multiplier 0) against the analytic
	// crossing of each centre-to-centre link; the kinked fault has
	// multiplier 0.25, so a face of value 0 or 0.25 tells which crossed it.
	line := func(x float64) float64 { return 2000 + 0.6*(x-1000) }
	inv := func(y float64) float64 { return 1000 + (y-2000)/0.6 }
	for j := 0; j < g.NY; j++ {
		yc := 2000 + (float64(j)+0.5)*40
		for i := 1; i < g.NX; i++ {
			xa, xb := 1000+(float64(i)-0.5)*50, 1000+(float64(i)+0.5)*50
			x := inv(yc)
			crossed := xa <= x && x < xb
			if got := m.TransMultX[g.XFace(i, j)]; (got == 0) != crossed {
				t.Errorf("x-face (%d,%d): multiplier %g, diagonal crosses: %v", i, j, got, crossed)
			}
		}
	}
	for j := 1; j < g.NY; j++ {
		for i := 0; i < g.NX; i++ {
			xc := 1000 + (float64(i)+0.5)*50
			ya, yb := 2000+(float64(j)-0.5)*40, 2000+(float64(j)+0.5)*40
			y := line(xc)
			crossed := ya <= y && y < yb
			if got := m.TransMultY[g.YFace(i, j)]; (got == 0) != crossed {
				t.Errorf("y-face (%d,%d): multiplier %g, diagonal crosses: %v", i, j, got, crossed)
			}
		}
	}
	// The kinked fault: its vertical leg x = 1210 from y = 2000 to 2100
	// crosses the links between columns 3 and 4 (centres 1175 and 1225) in
	// rows 0 and 1 (centres 2020, 2060); row 2 (2100) is touched by the
	// leg's end point.
	for _, j := range []int{0, 1} {
		if got := m.TransMultX[g.XFace(4, j)]; got != 0.25 {
			t.Errorf("kink x-face (4,%d) multiplier %g, want 0.25", j, got)
		}
	}
}

// TestLoadDefaults checks the documented defaults on a minimal case.
func TestLoadDefaults(t *testing.T) {
	data := `units: field
grid: {nx: 4, ny: 3, dx: 10, dy: 10}
rock: {perm: 100, porosity: 0.25, thickness: 10}
fluids: {water_viscosity: 1, oil_viscosity: 2}
relperm:
  corey: {swc: 0.15, sor: 0.2, krw_max: 0.4, kro_max: 1, nw: 2, no: 2}
wells:
  - {name: I, type: injector, x: 5, y: 5, rate: 10}
  - {name: P, type: producer, x: 35, y: 25, rate: 10}
`
	m, err := Parse("mini/case.yaml", []byte(data))
	if err != nil {
		t.Fatal(err)
	}
	if m.Title != "case" {
		t.Errorf("title %q, want the file name", m.Title)
	}
	if m.Fluids.InitialSw != 0.15 {
		t.Errorf("initial Sw %g, want swc 0.15", m.Fluids.InitialSw)
	}
	r := m.Run
	// report_every = end/120 = 30.4 rounded to 30 days.
	if r.End != 3650 || r.ReportEvery != 30 || r.Streamlines != 2000 || r.PressureUpdates != 1 || !slices.Equal(r.Snapshots, []float64{3650}) {
		t.Errorf("run defaults %+v", r)
	}
	if m.Grid.X0 != 0 || m.Grid.Y0 != 0 {
		t.Errorf("origin %g %g", m.Grid.X0, m.Grid.Y0)
	}
	if !slices.Equal(m.PermNorth, m.PermEast) || &m.PermNorth[0] == &m.PermEast[0] {
		t.Error("perm_y must default to a copy of perm")
	}
	for _, v := range append(m.TransMultX, m.TransMultY...) {
		if v != 1 {
			t.Fatal("face multipliers must start at 1")
		}
	}
	if len(m.TransMultX) != m.Grid.NXFaces() || len(m.TransMultY) != m.Grid.NYFaces() {
		t.Error("face multiplier lengths")
	}
	if m.Wells[1].I != 3 || m.Wells[1].J != 2 {
		t.Errorf("P at (%d,%d), want the last cell (3,2)", m.Wells[1].I, m.Wells[1].J)
	}
}

// TestLoadErrorsInline covers problems that are easier to state inline
// than as corpus files, including several problems reported at once.
func TestLoadErrorsInline(t *testing.T) {
	base := `units: field
grid: {nx: 4, ny: 3, dx: 10, dy: 10}
rock: {perm: 100, porosity: 0.25, thickness: 10}
fluids: {water_viscosity: 1, oil_viscosity: 2}
relperm:
  corey: {swc: 0.15, sor: 0.2, krw_max: 0.4, kro_max: 1, nw: 2, no: 2}
wells:
  - {name: I, type: injector, x: 5, y: 5, rate: 10}
  - {name: P, type: producer, x: 35, y: 25, bhp: 100}
`
	cases := []struct {
		name, old, new string
		want           []string
	}{
		{"several unknown keys", "rock: {perm: 100,", "rock: {prem: 100, porosty: 1,",
			[]string{`x.yaml:3: unknown key "prem" in rock; did you mean "perm"?`, `x.yaml:3: unknown key "porosty" in rock; did you mean "porosity"?`, `x.yaml:3: missing key "perm" in rock`}},
		{"far-off key lists valid keys", "units: field", "units: field\nzzzzzz: 1", []string{`x.yaml:2: unknown key "zzzzzz" at the top level; valid keys: title, units`}},
		{"tab indentation", "relperm:\n  corey", "relperm:\n\tcorey", []string{"x.yaml:6: YAML syntax", "indent with spaces"}},
		{"unknown anchor", "perm: 100", "perm: *nope", []string{`x.yaml:3: YAML syntax: unknown anchor "nope"`}},
		{"grid as list", "grid: {nx: 4, ny: 3, dx: 10, dy: 10}", "grid: [4, 3]", []string{"x.yaml:2: grid must be a mapping of keys"}},
		{"rock map is a list", "perm: 100", "perm: [1, 2]", []string{"x.yaml:3: rock.perm must be a number or the path of a map file, found a list"}},
		{"bool as number", "porosity: 0.25", "porosity: true", []string{"x.yaml:3: rock.porosity"}},
		{"bad origin", "dy: 10}", "dy: 10, origin: [1, 2, 3]}", []string{"x.yaml:2: grid.origin must be [x0, y0], found 3 numbers"}},
		{"negative dx", "dx: 10", "dx: -10", []string{"x.yaml:2: grid.dx = -10 is not positive"}},
		{"case-insensitive duplicate", "name: P,", "name: i,", []string{"x.yaml:9: well i: duplicate well name (also on line 8)"}},
		{"bhp above max_bhp", "x: 5, y: 5, rate: 10}", "x: 5, y: 5, bhp: 5000, max_bhp: 4000}", []string{"x.yaml:8: well I: bhp = 5000 is above its max_bhp 4000"}},
		{"injector min_bhp", "rate: 10}", "rate: 10, min_bhp: 10}", []string{"x.yaml:8: well I: min_bhp is a producer limit"}},
		{"well open negative", "rate: 10}", "rate: 10, open: -3}", []string{"x.yaml:8: well I: open = -3 is negative"}},
		{"swi leaves no oil", "oil_viscosity: 2}", "oil_viscosity: 2, initial_water_saturation: 0.85}", []string{"x.yaml:4: fluids.initial_water_saturation = 0.85 leaves no movable oil"}},
		{"krw_max above one", "krw_max: 0.4", "krw_max: 1.4", []string{"x.yaml:6: relperm.corey.krw_max = 1.4 is outside (0, 1]"}},
		{"both relperm kinds", "relperm:\n", "relperm:\n  table: kr.csv\n", []string{"x.yaml:6: relperm: give corey or table, not both"}},
		{"no relperm kind", "  corey: {swc: 0.15, sor: 0.2, krw_max: 0.4, kro_max: 1, nw: 2, no: 2}\n", "  {}\n", []string{"relperm"}},
		{"streamlines not whole", "wells:", "run: {streamlines: 10.5}\nwells:", []string{"x.yaml:7: run.streamlines = 10.5 is not a whole number"}},
		{"report_every longer than run", "wells:", "run: {end: 100, report_every: 200}\nwells:", []string{"x.yaml:7: run.report_every = 200 is longer than the run"}},
		{"update time outside", "wells:", "run: {end: 100, update_times: [50, 150]}\nwells:", []string{"x.yaml:7: run.update_times: 150 is not inside the run"}},
		{"update times not increasing", "wells:", "run: {end: 100, update_times: [50, 40]}\nwells:", []string{"x.yaml:7: run.update_times: 40 does not increase"}},
		{"empty wells", "wells:\n  - {name: I, type: injector, x: 5, y: 5, rate: 10}\n  - {name: P, type: producer, x: 35, y: 25, bhp: 100}\n", "wells: []\n", []string{"x.yaml:7: wells: the list is empty"}},
		{"event both controls", "bhp: 100}\n", "bhp: 100}\nschedule:\n  - {time: 5, well: P, rate: 3, bhp: 4}\n", []string{"x.yaml:11: schedule: an event gives rate or bhp, not both"}},
		{"event shut false", "bhp: 100}\n", "bhp: 100}\nschedule:\n  - {time: 5, well: P, shut: false}\n", []string{"x.yaml:11: schedule: shut: false changes nothing"}},
		{"event shut with rate", "bhp: 100}\n", "bhp: 100}\nschedule:\n  - {time: 5, well: P, shut: true, rate: 3}\n", []string{"x.yaml:11: schedule: shut and reopen stand alone"}},
		{"event convert bad", "bhp: 100}\n", "bhp: 100}\nschedule:\n  - {time: 5, well: P, convert: water}\n", []string{`x.yaml:11: schedule: convert "water" must be injector or producer`}},
		{"fault one point", "bhp: 100}\n", "bhp: 100}\nfaults:\n  - {trace: [[1, 2]], multiplier: 0}\n", []string{`x.yaml:11: fault "fault 1": the trace needs at least two points`}},
		{"fault bad point", "bhp: 100}\n", "bhp: 100}\nfaults:\n  - {trace: [[1, 2], [3]], multiplier: 0}\n", []string{`x.yaml:11: fault "fault 1": each trace point must be [x, y]`}},
		{"shutting the only BHP well unbalances", "bhp: 100}\n", "bhp: 100}\nschedule:\n  - {time: 5, well: P, rate: 7}\n", []string{"x.yaml:11: unbalanced rates from day 5", "take 10 bbl/day while the producers give 7 bbl/day"}},
		{"unbalanced after opening", "x: 35, y: 25, bhp: 100}", "x: 35, y: 25, rate: 10}\n  - {name: P2, type: producer, x: 15, y: 15, rate: 5, open: 30}", []string{"x.yaml:10: unbalanced rates from day 30"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if !strings.Contains(base, c.old) {
				t.Fatalf("test bug: %q not in base", c.old)
			}
			data := strings.Replace(base, c.old, c.new, 1)
			_, err := Parse("x.yaml", []byte(data))
			if err == nil {
				t.Fatal("no error")
			}
			for _, w := range c.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("message\n%s\nlacks %q", err, w)
				}
			}
		})
	}
	// The base itself loads.
	if _, err := Parse("x.yaml", []byte(base)); err != nil {
		t.Fatal(err)
	}
}

// TestLoadFromCaseWithoutGridDefinesGridByFirstRaster checks that a later
// raster that disagrees with the first one is reported naming both files.
func TestLoadSecondRasterDisagrees(t *testing.T) {
	dir := t.TempDir()
	write(t, dir, "perm.asc", "ncols 3\nnrows 2\nxllcorner 0\nyllcorner 0\ncellsize 10\n1 2 3\n4 5 6\n")
	write(t, dir, "poro.asc", "ncols 3\nnrows 2\nxllcorner 0\nyllcorner 0\ncellsize 20\n0.1 0.2 0.3\n0.1 0.2 0.3\n")
	write(t, dir, "case.yaml", `units: metric
rock: {perm: perm.asc, porosity: poro.asc, thickness: 3}
fluids: {water_viscosity: 1, oil_viscosity: 2}
relperm: {corey: {swc: 0, sor: 0, krw_max: 1, kro_max: 1, nw: 2, no: 2}}
wells:
  - {name: I, type: injector, x: 5, y: 5, rate: 10}
  - {name: P, type: producer, x: 25, y: 15, bhp: 100}
`)
	_, err := Load(filepath.Join(dir, "case.yaml"))
	want := "poro.asc: raster header cell size 20 in x disagrees with the grid (dx 10, from the header of " + filepath.Join(dir, "perm.asc") + ")"
	if err == nil || !strings.Contains(err.Error(), want) {
		t.Fatalf("got %v\nwant %s", err, want)
	}
}

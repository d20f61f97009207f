package reservoir

import (
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

// TestGISDemoSameModel loads the demo and its GIS variant
// (examples/vardel-gis: GeoTIFF maps, GeoJSON wells, fault and outline, and
// the wells again as CSV): the models must be the same in every cell,
// well and fault (only the file names and lines differ).
func TestGISDemoSameModel(t *testing.T) {
	ref, err := Load(filepath.Join("..", "examples", "vardel", "case.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	gisDir, _ := filepath.Abs(filepath.Join("..", "examples", "vardel-gis"))
	b, err := os.ReadFile(filepath.Join(gisDir, "case.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	// The CSV variant: the same case with wells: wells.csv, written
	// elsewhere with absolute paths.
	csvCase := strings.ReplaceAll(string(b), ": perm.tif", ": "+filepath.Join(gisDir, "perm.tif"))
	for _, f := range []string{"poro.tif", "outline.geojson", "faults.geojson", "history.csv"} {
		csvCase = strings.ReplaceAll(csvCase, ": "+f, ": "+filepath.Join(gisDir, f))
	}
	csvCase = strings.ReplaceAll(csvCase, "wells: wells.geojson", "wells: "+filepath.Join(gisDir, "wells.csv"))
	csvPath := filepath.Join(t.TempDir(), "case.yaml")
	os.WriteFile(csvPath, []byte(csvCase), 0o644)
	for _, p := range []string{filepath.Join(gisDir, "case.yaml"), csvPath} {
		m, err := Load(p)
		if err != nil {
			t.Fatal(err)
		}
		if m.Grid != ref.Grid {
			t.Fatalf("%s: grid %+v, want %+v", p, m.Grid, ref.Grid)
		}
		for name, pair := range map[string][2]any{
			"perm": {m.PermEast, ref.PermEast}, "perm_y": {m.PermNorth, ref.PermNorth}, "porosity": {m.Porosity, ref.Porosity},
			"thickness": {m.Thickness, ref.Thickness}, "active": {m.Active, ref.Active},
			"x multipliers": {m.TransMultX, ref.TransMultX}, "y multipliers": {m.TransMultY, ref.TransMultY},
		} {
			if !reflect.DeepEqual(pair[0], pair[1]) {
				t.Errorf("%s: %s differs from the demo's", p, name)
			}
		}
		if len(m.Wells) != len(ref.Wells) || len(m.Faults) != len(ref.Faults) {
			t.Fatalf("%s: %d wells %d faults", p, len(m.Wells), len(m.Faults))
		}
		for i, w := range m.Wells {
			r := ref.Wells[i]
			w.Line, w.Source = r.Line, r.Source
			if w != r {
				t.Errorf("%s: well %+v, want %+v", p, w, r)
			}
		}
		f := m.Faults[0]
		f.Line, f.Source = ref.Faults[0].Line, ref.Faults[0].Source
		if !reflect.DeepEqual(f, ref.Faults[0]) {
			t.Errorf("%s: fault %+v, want %+v", p, f, ref.Faults[0])
		}
	}
}

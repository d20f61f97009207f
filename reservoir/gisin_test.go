package reservoir

import (
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

// TestOutline: holes are honoured, MultiPolygons join their parts, and a
// centre on the outer boundary counts as inside (orb/planar's rule).
func TestOutline(t *testing.T) {
	g := Grid{NX: 5, NY: 4, DX: 10, DY: 10}
	outline := `{"type":"FeatureCollection","features":[
{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[
  [[0,0],[30,0],[30,40],[0,40],[0,0]],
  [[10,10],[20,10],[20,30],[10,30],[10,10]]]}},
{"type":"Feature","properties":{},"geometry":{"type":"MultiPolygon","coordinates":[
  [[[40,0],[45,0],[45,10],[40,10],[40,0]]]]}}]}`
	v, err := ReadOutline([]byte(outline), "o.geojson", g)
	if err != nil {
		t.Fatal(err)
	}
	// Rows from the south; the hole covers the centres of (1,1) and (1,2);
	// the sliver [40,45] reaches the centre x = 45 of column 4 in row 0.
	want := []float64{
		1, 1, 1, 0, 1,
		1, 0, 1, 0, 0,
		1, 0, 1, 0, 0,
		1, 1, 1, 0, 0,
	}
	if !reflect.DeepEqual(v, want) {
		t.Errorf("active %v, want %v", v, want)
	}
}

// TestGISInputErrors: each refusal names the file and the feature or line.
func TestGISInputErrors(t *testing.T) {
	g := Grid{NX: 5, NY: 4, DX: 10, DY: 10}
	pt := `{"type":"Feature","properties":{"name":"W"},"geometry":{"type":"Point","coordinates":[1,2]}}`
	line := `{"type":"Feature","properties":{"name":"F"},"geometry":{"type":"LineString","coordinates":[[1,2],[3,4]]}}`
	fc := func(f string) []byte { return []byte(`{"type":"FeatureCollection","features":[` + f + `]}`) }
	cases := []struct {
		name string
		run  func() error
		want string
	}{
		{"well not a point", func() error { _, err := WellsGeoJSONNodes(fc(line), "w.geojson"); return err }, "w.geojson: feature 1 (F): a well must be a Point, found a LineString"},
		{"well with x property", func() error {
			_, err := WellsGeoJSONNodes(fc(strings.Replace(pt, `"name":"W"`, `"name":"W","x":3`, 1)), "w.geojson")
			return err
		}, `property "x": x and y come from the point`},
		{"fault not a line", func() error { _, err := FaultsGeoJSONNodes(fc(pt), "f.geojson"); return err }, "f.geojson: feature 1 (W): a fault must be a LineString, found a Point"},
		{"outline a point", func() error { _, err := ReadOutline(fc(pt), "o.geojson", g); return err }, "an outline must be a Polygon or MultiPolygon"},
		{"not geojson", func() error { _, err := ReadOutline([]byte("ncols 3"), "o.geojson", g); return err }, "o.geojson: not a GeoJSON FeatureCollection"},
		{"no features", func() error { _, err := WellsGeoJSONNodes(fc(""), "w.geojson"); return err }, "no features"},
		{"csv short row", func() error {
			_, err := WellsCSVNodes([]byte("name,type,x,y,rate\nI,injector,1,2,100\nP,producer,3\n"), "w.csv")
			return err
		}, "w.csv:3: column 1: wrong number of fields"},
		{"csv header only", func() error { _, err := WellsCSVNodes([]byte("name,type,x,y\n"), "w.csv"); return err }, "no wells"},
	}
	for _, c := range cases {
		err := c.run()
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v, want %q", c.name, err, c.want)
		}
	}
}

// TestWellFileErrorsNameTheFile: a bad well in wells.csv is reported on
// its CSV line, naming the well.
func TestWellFileErrorsNameTheFile(t *testing.T) {
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, "wells.csv"), []byte("name,type,x,y,rate,bhp,max_bhp\nI-1,injector,50,50,1000,,4000\nP-1,producer,350,250,,-5,\n"), 0o644)
	base := strings.Replace(strings.Replace(gisBase, "%PERM%", "150", 1), "wells:\n", "wells: wells.csv\nunused:\n", 1)
	base = base[:strings.Index(base, "unused:")]
	p := filepath.Join(dir, "case.yaml")
	os.WriteFile(p, []byte(base), 0o644)
	_, err := Load(p)
	if err == nil || !strings.Contains(err.Error(), filepath.Join(dir, "wells.csv")+":3: well P-1: bhp") {
		t.Errorf("error %v", err)
	}
}

// FuzzGISReaders feeds arbitrary bytes to the GeoJSON and CSV readers:
// they must return a result or an error, never panic.
func FuzzGISReaders(f *testing.F) {
	for _, p := range []string{"outline.geojson", "wells.geojson", "faults.geojson", "wells.csv"} {
		b, _ := os.ReadFile(filepath.Join("..", "examples", "vardel-gis", p))
		f.Add(b)
	}
	f.Add([]byte(`{"type":"FeatureCollection","features":[{"type":"Feature","geometry":{"type":"Polygon","coordinates":[[]]}}]}`))
	g := Grid{NX: 8, NY: 6, DX: 500, DY: 500}
	f.Fuzz(func(t *testing.T, b []byte) {
		ReadOutline(b, "o.geojson", g)
		WellsGeoJSONNodes(b, "w.geojson")
		FaultsGeoJSONNodes(b, "f.geojson")
		WellsCSVNodes(b, "w.csv")
	})
}

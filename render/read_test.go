package render

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"floodtrace/reservoir"
)

// TestReadASC: rows run from north to south (ESRI ASCII grid convention,
// common practice), so the first value read is cell (0, NY-1); NODATA
// becomes NaN.
func TestReadASC(t *testing.T) {
	g := reservoir.Grid{NX: 3, NY: 2, DX: 10, DY: 10}
	src := "ncols 3\nnrows 2\nxllcorner 0\nyllcorner 0\ncellsize 10\nNODATA_value -9999\n1 2 3\n4 -9999 6\n"
	v, err := parseASC(strings.NewReader(src), g)
	if err != nil {
		t.Fatal(err)
	}
	want := []float64{4, math.NaN(), 6, 1, 2, 3}
	for k := range want {
		if !(v[k] == want[k] || math.IsNaN(v[k]) && math.IsNaN(want[k])) {
			t.Fatalf("cell %d = %v, want %v (all %v)", k, v[k], want[k], v)
		}
	}
}

func TestReadASCErrors(t *testing.T) {
	g := reservoir.Grid{NX: 3, NY: 2, DX: 10, DY: 10}
	hdr := "ncols 3\nnrows 2\nxllcorner 0\nyllcorner 0\ncellsize 10\n"
	cases := map[string]string{
		"wrong size":      "ncols 4\nnrows 2\nxllcorner 0\nyllcorner 0\ncellsize 10\n1 2 3 4 5 6 7 8\n",
		"wrong cell size": "ncols 3\nnrows 2\nxllcorner 0\nyllcorner 0\ncellsize 20\n1 2 3 4 5 6\n",
		"too few":         hdr + "1 2 3 4 5\n",
		"too many":        hdr + "1 2 3 4 5 6 7\n",
		"not a number":    hdr + "1 2 x 4 5 6\n",
		"no header":       "1 2 3 4 5 6\n",
		"dangling key":    "ncols",
	}
	for name, src := range cases {
		if _, err := parseASC(strings.NewReader(src), g); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
	if _, err := readASC(filepath.Join(t.TempDir(), "absent.asc"), g); err == nil {
		t.Error("absent file: no error")
	}
}

func TestReadStreamlines(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "s.geojson")
	must(t, os.WriteFile(p, []byte(`{"type":"FeatureCollection","features":[
{"type":"Feature","geometry":{"type":"LineString","coordinates":[[0,0],[10,5,1]]},"properties":{"injector":"I","producer":"P","flux":2.5,"tof_days":120}}]}`), 0o644))
	ls, err := readStreamlines(p)
	if err != nil {
		t.Fatal(err)
	}
	if len(ls) != 1 || ls[0].TotalTOF != 120 || ls[0].Flux != 2.5 || ls[0].X[1] != 10 || ls[0].Y[1] != 5 || ls[0].Producer != "P" {
		t.Errorf("read %+v", ls)
	}
	for name, src := range map[string]string{
		"not json":  `{"type":`,
		"not a fc":  `{"type":"Feature"}`,
		"polygon":   `{"type":"FeatureCollection","features":[{"type":"Feature","geometry":{"type":"Polygon","coordinates":[]}}]}`,
		"short pos": `{"type":"FeatureCollection","features":[{"type":"Feature","geometry":{"type":"LineString","coordinates":[[1]]}}]}`,
	} {
		must(t, os.WriteFile(p, []byte(src), 0o644))
		if _, err := readStreamlines(p); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
}

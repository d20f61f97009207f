package main

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"floodtrace/reservoir"
)

// runFiles runs a case without pictures and returns its files by name.
func runFiles(t *testing.T, c string, args ...string) map[string][]byte {
	t.Helper()
	dir := t.TempDir()
	if code, _, e := run(t, append([]string{"run", c, "--out", dir, "--no-pictures", "-q"}, args...)...); code != 0 {
		t.Fatalf("%s: code %d: %s", c, code, e)
	}
	files := map[string][]byte{}
	filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err == nil && !d.IsDir() {
			rel, _ := filepath.Rel(dir, p)
			files[rel], _ = os.ReadFile(p)
		}
		return nil
	})
	return files
}

// TestRastersFlag: --rasters tif writes GeoTIFF rasters holding the values
// of the ASCII rasters. Both round the same results, the ASCII ones to 7
// significant digits (at most 5e-7 relative) and the GeoTIFF ones to
// float32 (2^-24, 6e-8 relative), so they agree to 5.6e-7 relative; the
// largest difference measured on the demo is 3.9e-7. Other values of the
// flag are usage errors.
func TestRastersFlag(t *testing.T) {
	if code, _, e := run(t, "run", demo, "--out", t.TempDir(), "--rasters", "png"); code != 2 || !strings.Contains(e, "--rasters must be asc or tif") {
		t.Errorf("--rasters png: code %d: %s", code, e)
	}
	if testing.Short() {
		t.Skip("runs the demo twice")
	}
	asc := runFiles(t, demo)
	tif := runFiles(t, demo, "--rasters", "tif")
	n := 0
	for name := range asc {
		if !strings.HasSuffix(name, ".asc") {
			continue
		}
		n++
		tname := strings.TrimSuffix(name, ".asc") + ".tif"
		if _, ok := tif[name]; ok {
			t.Errorf("%s written with --rasters tif", name)
		}
		a, err := reservoir.ReadASCIIRaster(bytes.NewReader(asc[name]), name)
		if err != nil {
			t.Fatal(err)
		}
		p := filepath.Join(t.TempDir(), "x.tif")
		os.WriteFile(p, tif[tname], 0o644)
		g, err := reservoir.ReadGeoTIFF(p)
		if err != nil {
			t.Fatalf("%s: %v", tname, err)
		}
		if g.Grid != a.Grid || g.NoData != a.NoData {
			t.Fatalf("%s: grid %+v nodata %g, want %+v %g", tname, g.Grid, g.NoData, a.Grid, a.NoData)
		}
		for k, v := range a.Values {
			w := g.Values[k]
			if math.IsNaN(v) != math.IsNaN(w) || math.Abs(v-w) > 5.6e-7*math.Abs(v) {
				t.Fatalf("%s cell %d: %v, ASCII %v", tname, k, w, v)
			}
		}
	}
	if n < 8 {
		t.Errorf("only %d rasters compared", n)
	}
	if !bytes.Contains(tif["summary.json"], []byte(`"saturation_365.tif"`)) {
		t.Error("summary.json does not name the .tif snapshots")
	}
}

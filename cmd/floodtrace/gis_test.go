package main

import (
	"bytes"
	"math"
	"os"
	"os/exec"
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

// TestProjectionReachesGIS runs the GIS demo with a .prj beside perm.tif
// (the WKT of EPSG:32631, WGS 84 / UTM zone 31N, written out here) and
// checks with GDAL's gdalinfo (Debian gdal-bin; skipped when absent) that
// an output ASCII raster, a GeoTIFF raster and streamlines.geojson carry
// that system.
func TestProjectionReachesGIS(t *testing.T) {
	if _, err := exec.LookPath("gdalinfo"); err != nil {
		t.Skip("gdalinfo not installed (Debian package gdal-bin)")
	}
	src := t.TempDir()
	for _, f := range []string{"case.yaml", "perm.tif", "poro.tif", "outline.geojson", "wells.geojson", "faults.geojson", "history.csv"} {
		b, err := os.ReadFile(filepath.Join("..", "..", "examples", "vardel-gis", f))
		if err != nil {
			t.Fatal(err)
		}
		os.WriteFile(filepath.Join(src, f), b, 0o644)
	}
	wkt := `PROJCS["WGS 84 / UTM zone 31N",GEOGCS["WGS 84",DATUM["WGS_1984",SPHEROID["WGS 84",6378137,298.257223563,AUTHORITY["EPSG","7030"]],AUTHORITY["EPSG","6326"]],PRIMEM["Greenwich",0,AUTHORITY["EPSG","8901"]],UNIT["degree",0.0174532925199433,AUTHORITY["EPSG","9122"]],AUTHORITY["EPSG","4326"]],PROJECTION["Transverse_Mercator"],PARAMETER["latitude_of_origin",0],PARAMETER["central_meridian",3],PARAMETER["scale_factor",0.9996],PARAMETER["false_easting",500000],PARAMETER["false_northing",0],UNIT["metre",1,AUTHORITY["EPSG","9001"]],AXIS["Easting",EAST],AXIS["Northing",NORTH],AUTHORITY["EPSG","32631"]]`
	os.WriteFile(filepath.Join(src, "perm.prj"), []byte(wkt), 0o644)
	for _, format := range []string{"asc", "tif"} {
		out := t.TempDir()
		if code, _, e := run(t, "run", filepath.Join(src, "case.yaml"), "--out", out, "--no-pictures", "-q", "--rasters", format); code != 0 {
			t.Fatalf("code %d: %s", code, e)
		}
		info, err := exec.Command("gdalinfo", filepath.Join(out, "tof."+format)).CombinedOutput()
		if err != nil || !strings.Contains(string(info), `ID["EPSG",32631]`) {
			t.Errorf("gdalinfo tof.%s: %v\n%s", format, err, info)
		}
		gj, _ := os.ReadFile(filepath.Join(out, "streamlines.geojson"))
		if !bytes.Contains(gj, []byte(`"crs":{"type":"name","properties":{"name":"urn:ogc:def:crs:EPSG::32631"}}`)) {
			t.Errorf("streamlines.geojson (%s run) has no crs member", format)
		}
	}
}

package flood

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"

	"floodtrace/internal/outdir"
	"floodtrace/reservoir"
	"floodtrace/runfolder"
)

// TestGeoTIFFRasters writes a run's rasters as GeoTIFF and reads them back:
// each cell is the run's value rounded to float32 (the file's sample
// type), inactive cells NODATA, the grid the model's; the projection is
// written beside every raster and into streamlines.geojson.
func TestGeoTIFFRasters(t *testing.T) {
	m := heteroCase(t, 16, 2, 0.4, 0.5, 0.9, 5)
	m.Active[3] = false
	wkt := `PROJCS["invented",GEOGCS["x",AUTHORITY["EPSG","4326"]],AUTHORITY["EPSG","32631"]]`
	m.CRS = reservoir.CRS{EPSG: 32631, WKT: wkt}
	r, err := Run(m, Settings{Frames: -1})
	if err != nil {
		t.Fatal(err)
	}
	r.Rasters = runfolder.RastersTIF
	dir := t.TempDir()
	d, err := outdir.Open(dir, false)
	if err != nil {
		t.Fatal(err)
	}
	if err := r.WriteData(d); err != nil {
		t.Fatal(err)
	}
	check := func(name string, want []float64) {
		t.Helper()
		tif := runfolder.RasterName(name, runfolder.RastersTIF)
		ras, err := reservoir.ReadGeoTIFF(filepath.Join(dir, tif))
		if err != nil {
			t.Fatal(err)
		}
		if ras.Grid != m.Grid || ras.NoData != runfolder.RasterNodata {
			t.Errorf("%s: grid %+v nodata %g, want %+v", tif, ras.Grid, ras.NoData, m.Grid)
		}
		for k, v := range ras.Values {
			w := float64(float32(want[k]))
			if !m.Active[k] {
				w = math.NaN()
			}
			if math.Float64bits(v) != math.Float64bits(w) && !(math.IsNaN(v) && math.IsNaN(w)) {
				t.Fatalf("%s cell %d: %v, want %v", tif, k, v, w)
			}
		}
		prj, err := os.ReadFile(filepath.Join(dir, runfolder.PRJName(tif)))
		if err != nil || string(prj) != wkt+"\n" {
			t.Errorf("%s: .prj %q %v", tif, prj, err)
		}
		if _, err := os.Stat(filepath.Join(dir, name)); err == nil {
			t.Errorf("%s written as well", name)
		}
	}
	check(runfolder.PressureFile, r.Pressure.P)
	check(runfolder.TOFFile, r.Trace.TOF)
	for _, sn := range r.Snapshots {
		check(runfolder.SnapshotName(sn.Time), sn.Sw)
	}
	b, err := os.ReadFile(filepath.Join(dir, runfolder.StreamlinesFile))
	if err != nil {
		t.Fatal(err)
	}
	var gj struct {
		CRS struct {
			Properties struct{ Name string } `json:"properties"`
		} `json:"crs"`
	}
	if err := json.Unmarshal(b, &gj); err != nil || gj.CRS.Properties.Name != "urn:ogc:def:crs:EPSG::32631" {
		t.Errorf("streamlines crs %q, %v", gj.CRS.Properties.Name, err)
	}
}

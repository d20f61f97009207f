package reservoir

import (
	"bytes"

	"floodtrace/internal/geotiff"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// gisBase is a small valid case; %s takes extra top-level keys and the
// perm value.
const gisBase = `title: gis
units: field
grid: {nx: 4, ny: 3, dx: 100, dy: 100, origin: [0, 0]}
rock: {perm: %PERM%, porosity: 0.2, thickness: 25}
fluids: {water_viscosity: 0.5, oil_viscosity: 3, initial_water_saturation: 0.2}
relperm:
  corey: {swc: 0.2, sor: 0.25, krw_max: 0.35, kro_max: 0.9, nw: 2.5, no: 2}
wells:
  - {name: I-1, type: injector, x: 50, y: 50, rate: 1000, max_bhp: 4000}
  - {name: P-1, type: producer, x: 350, y: 250, bhp: 800}
`

func writeGISCase(t *testing.T, dir, extra, perm string) string {
	t.Helper()
	p := filepath.Join(dir, "case.yaml")
	if err := os.WriteFile(p, []byte(strings.Replace(gisBase, "%PERM%", perm, 1)+extra), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

const permASC = "ncols 4\nnrows 3\nxllcorner 0\nyllcorner 0\ncellsize 100\n150 150 150 150\n150 150 150 150\n150 150 150 150\n"

// TestCRS reads the coordinate system from the crs key and from a .prj
// beside a map; the EPSG code of a WKT is its last EPSG authority
// (WKT 1, OGC 01-009, 2001: the outermost system's AUTHORITY comes last).
func TestCRS(t *testing.T) {
	wkt := `PROJCS["WGS 84 / UTM zone 31N",GEOGCS["WGS 84",AUTHORITY["EPSG","4326"]],AUTHORITY["EPSG","32631"]]`
	cases := []struct {
		name, extra, prj string
		want             CRS
		err              string
	}{
		{"key", "crs: EPSG:2154\n", "", CRS{EPSG: 2154}, ""},
		{"prj", "", wkt, CRS{EPSG: 32631, WKT: wkt}, ""},
		{"key and agreeing prj", "crs: epsg:32631\n", wkt, CRS{EPSG: 32631, WKT: wkt}, ""},
		{"key wins over another prj", "crs: EPSG:2154\n", wkt, CRS{EPSG: 2154}, ""},
		{"prj without code", "", `PROJCS["local"]`, CRS{WKT: `PROJCS["local"]`}, ""},
		{"bad key", "crs: UTM31\n", "", CRS{}, "crs must be EPSG:n"},
		{"code out of range", "crs: EPSG:40000\n", "", CRS{}, "crs must be EPSG:n"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			os.WriteFile(filepath.Join(dir, "perm.asc"), []byte(permASC), 0o644)
			if c.prj != "" {
				os.WriteFile(filepath.Join(dir, "perm.prj"), []byte(c.prj+"\n"), 0o644)
			}
			m, err := Load(writeGISCase(t, dir, c.extra, "perm.asc"))
			if c.err != "" {
				if err == nil || !strings.Contains(err.Error(), c.err) || !strings.Contains(err.Error(), "case.yaml:11") {
					t.Fatalf("error %v, want %q on case.yaml:11", err, c.err)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			m.CRS.From = ""
			if m.CRS != c.want {
				t.Errorf("CRS %+v, want %+v", m.CRS, c.want)
			}
		})
	}
}

// TestCRSFromGeoTIFF: without a crs key or .prj, the EPSG code of a
// GeoTIFF map's GeoKeys is the case's.
func TestCRSFromGeoTIFF(t *testing.T) {
	dir := t.TempDir()
	g := Grid{NX: 4, NY: 3, DX: 100, DY: 100}
	var b bytes.Buffer
	if err := geotiff.Write(&b, &geotiff.Image{Width: 4, Height: 3, Values: fill(12, 150), NoData: -9999, EPSG: 32631,
		Georef: geotiff.Georef{Left: 0, Top: g.Height(), PixelWidth: 100, PixelHeight: 100}}); err != nil {
		t.Fatal(err)
	}
	os.WriteFile(filepath.Join(dir, "perm.tif"), b.Bytes(), 0o644)
	m, err := Load(writeGISCase(t, dir, "", "perm.tif"))
	if err != nil {
		t.Fatal(err)
	}
	if m.CRS.EPSG != 32631 || m.PermEast[5] != 150 {
		t.Errorf("CRS %+v, perm %g", m.CRS, m.PermEast[5])
	}
	m, err = Load(writeGISCase(t, dir, "crs: EPSG:2154\n", "perm.tif"))
	if err != nil || m.CRS.EPSG != 2154 {
		t.Errorf("the crs key must win: %+v %v", m.CRS, err)
	}
}

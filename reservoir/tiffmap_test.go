package reservoir

import (
	"math"
	"path/filepath"
	"strings"
	"testing"
)

// TestReadMapGeoTIFF reads GeoTIFF files written by gdal_translate (GDAL
// 3.6, Debian gdal-bin; commands in internal/geotiff/testdata/README)
// through ReadMap and compares them with the GIS ASCII rasters they were
// made from: the same grid, NODATA in the same cells, and values equal to
// the last bit once the ASCII value is rounded to the file's sample type.
func TestReadMapGeoTIFF(t *testing.T) {
	dir := filepath.Join("..", "internal", "geotiff", "testdata")
	for _, c := range []struct {
		tif, asc string
		f32      bool
	}{
		{"float32_deflate_tiled.tif", "float.asc", true},
		{"float64_deflate_pred3.tif", "float.asc", false},
		{"int16_lzw_pred2.tif", "int16.asc", false},
		{"uint8_none.tif", "uint8.asc", false},
	} {
		t.Run(c.tif, func(t *testing.T) {
			want, wg, err := ReadMap(filepath.Join(dir, c.asc), nil)
			if err != nil {
				t.Fatal(err)
			}
			got, gg, err := ReadMap(filepath.Join(dir, c.tif), nil)
			if err != nil {
				t.Fatal(err)
			}
			if *gg != *wg {
				t.Fatalf("grid %+v, want %+v", *gg, *wg)
			}
			// With the grid given, the header must agree with it.
			if _, _, err := ReadMap(filepath.Join(dir, c.tif), wg); err != nil {
				t.Fatal(err)
			}
			for k := range want {
				w := want[k]
				if c.f32 && !math.IsNaN(w) {
					w = float64(float32(w))
				}
				if math.Float64bits(got[k]) != math.Float64bits(w) && !(math.IsNaN(w) && math.IsNaN(got[k])) {
					t.Errorf("cell %d: %v, want %v", k, got[k], w)
				}
			}
			// A grid shifted by a cell is refused, naming the tag.
			sh := *wg
			sh.X0 += sh.DX
			_, _, err = ReadMap(filepath.Join(dir, c.tif), &sh)
			if err == nil || !strings.Contains(err.Error(), "ModelPixelScale west edge") {
				t.Errorf("shifted grid: %v", err)
			}
		})
	}
}

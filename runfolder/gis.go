package runfolder

import (
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"

	"floodtrace/internal/geotiff"
	"floodtrace/reservoir"
)

// The raster formats of a run folder (flood.Result.Rasters and the
// --rasters flag of `floodtrace run`): GIS ASCII grids (the default) or
// GeoTIFF.
const (
	RastersASC = "asc"
	RastersTIF = "tif"
)

// RasterName returns the file name of a run-folder raster (one of the
// .asc names, or a path ending in one) in the given format.
func RasterName(name, format string) string {
	if format == RastersTIF {
		return strings.TrimSuffix(name, ".asc") + ".tif"
	}
	return name
}

// PRJName returns the name of the projection file beside a raster:
// the raster's name with .prj for its extension.
func PRJName(raster string) string {
	return strings.TrimSuffix(raster, filepath.Ext(raster)) + ".prj"
}

// FindRaster returns the path of the raster name (an .asc name) in dir,
// or of its GeoTIFF form when only that exists.
func FindRaster(dir, name string) string {
	p := filepath.Join(dir, name)
	if _, err := os.Stat(p); err != nil {
		t := filepath.Join(dir, RasterName(name, RastersTIF))
		if _, err := os.Stat(t); err == nil {
			return t
		}
	}
	return p
}

// WriteRasterTIF writes the cell values v of grid g as a run-folder
// GeoTIFF (geotiff.Write: float32, Deflate, tiled) with the NODATA value
// of the ASCII rasters, inactive and NaN cells NODATA, and the EPSG code
// of the case when it has one (0: none).
func WriteRasterTIF(w io.Writer, g reservoir.Grid, v []float64, active []bool, epsg int) error {
	img := &geotiff.Image{Width: g.NX, Height: g.NY, Values: make([]float64, g.N()), NoData: RasterNodata, EPSG: epsg,
		Georef: geotiff.Georef{Left: g.X0, Top: g.Y0 + g.Height(), PixelWidth: g.DX, PixelHeight: g.DY}}
	for j := range g.NY {
		for i := range g.NX {
			k := g.Index(i, j)
			x := math.NaN()
			if k < len(v) && (active == nil || active[k]) {
				x = v[k]
			}
			img.Values[(g.NY-1-j)*g.NX+i] = x
		}
	}
	return geotiff.Write(w, img)
}

package reservoir

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"floodtrace/internal/geotiff"
)

// isTIFFPath reports whether a map path names a GeoTIFF by its extension.
func isTIFFPath(path string) bool {
	ext := strings.ToLower(filepath.Ext(path))
	return ext == ".tif" || ext == ".tiff"
}

// ReadGeoTIFF reads a single-band GeoTIFF map (package internal/geotiff
// lists what it takes) as a Raster: the grid from its georeferencing, the
// values flipped so that j = 0 is the south row, NODATA pixels NaN. Maps of
// more than MaxCells cells are refused.
func ReadGeoTIFF(path string) (*Raster, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, openError(path, err)
	}
	h, f, err := parseTIFF(data, path, MaxCells)
	if err != nil {
		return nil, err
	}
	return tiffValues(h, f)
}

// parseTIFF reads the header of a GeoTIFF: the returned Raster has the grid
// and NODATA value but no values yet.
func parseTIFF(data []byte, path string, limit int) (*Raster, *geotiff.File, error) {
	f, err := geotiff.Parse(data, path, limit)
	if err != nil {
		return nil, nil, tiffError(path, err)
	}
	g := f.Georef
	h := &Raster{Grid: Grid{NX: f.Width, NY: f.Height, DX: g.PixelWidth, DY: g.PixelHeight,
		X0: g.Left, Y0: g.Top - float64(f.Height)*g.PixelHeight}, NoData: f.NoData, HasNoData: f.HasNoData}
	return h, f, nil
}

// tiffValues decodes the pixels of f into h.
func tiffValues(h *Raster, f *geotiff.File) (*Raster, error) {
	v, err := f.Values()
	if err != nil {
		return nil, tiffError(f.Name, err)
	}
	nx, ny := h.Grid.NX, h.Grid.NY
	h.Values = make([]float64, len(v))
	for r := range ny {
		copy(h.Values[(ny-1-r)*nx:(ny-r)*nx], v[r*nx:(r+1)*nx])
	}
	return h, nil
}

func tiffError(path string, err error) error {
	var ge *geotiff.Error
	if errors.As(err, &ge) {
		ie := &InputError{Path: path, Msg: ge.Detail(), Err: ge}
		if ge.TooLarge {
			ie.Err = ErrTooLarge
		}
		return ie
	}
	return &InputError{Path: path, Msg: err.Error(), Err: err}
}

// readTIFFMapFile reads the GeoTIFF map at path (readTIFFMap) and returns
// its EPSG code too (0: none).
func readTIFFMapFile(path string, g *Grid, gridFrom string, limit int) ([]float64, int, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, 0, openError(path, err)
	}
	epsg := 0
	vals, _, err := readTIFFMap(path, data, g, gridFrom, limit, &epsg)
	return vals, epsg, err
}

// readTIFFMap is readMapFile for a GeoTIFF: with g given, the file's
// georeferencing must agree with it (the message names the tag). The EPSG
// code of the file goes to *epsg when epsg is not nil.
func readTIFFMap(path string, data []byte, g *Grid, gridFrom string, limit int, epsg *int) ([]float64, *Grid, error) {
	h, f, err := parseTIFF(data, path, limit)
	if err != nil {
		return nil, nil, err
	}
	if epsg != nil {
		*epsg = f.EPSG
	}
	if g != nil {
		if hv, gv := headerMismatch(h.Grid, *g); hv != "" {
			from := ""
			if gridFrom != "" {
				from = ", " + gridFrom
			}
			return nil, nil, &InputError{Path: path, Msg: fmt.Sprintf("%s disagrees with the grid (%s%s)", tiffLabel(hv, f.GeorefTag), gv, from)}
		}
	}
	r, err := tiffValues(h, f)
	if err != nil {
		return nil, nil, err
	}
	if g != nil {
		return r.Values, g, nil
	}
	return r.Values, &r.Grid, nil
}

// tiffLabel renames the ASCII header words of a headerMismatch description
// after the GeoTIFF tags that hold them.
func tiffLabel(hv, georefTag string) string {
	for _, r := range []struct{ from, to string }{
		{"ncols ", "ImageWidth "},
		{"nrows ", "ImageLength "},
		{"cell size ", georefTag + " cell size "},
		{"xllcorner ", georefTag + " west edge "},
		{"yllcorner ", georefTag + " south edge "},
	} {
		if strings.HasPrefix(hv, r.from) {
			return r.to + strings.TrimPrefix(hv, r.from)
		}
	}
	return hv
}

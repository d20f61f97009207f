package render

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"floodtrace/reservoir"
	"floodtrace/runfolder"
)

// readASC reads a GIS ASCII raster into cell order of the grid g (k =
// j*NX+i, j counting north) with the reader of the case maps
// (reservoir.ReadMap); NODATA becomes NaN. The header must agree with g.
func readASC(path string, g reservoir.Grid) ([]float64, error) {
	v, _, err := reservoir.ReadMap(path, &g)
	if err != nil {
		return nil, fmt.Errorf("render: %w", err)
	}
	return v, nil
}

// parseASC is readASC on a reader (reservoir.ReadASCIIRaster), with the
// raster's size and cell size checked against g.
func parseASC(r io.Reader, g reservoir.Grid) ([]float64, error) {
	ras, err := reservoir.ReadASCIIRaster(r, "raster")
	if err != nil {
		return nil, err
	}
	h := ras.Grid
	if h.NX != g.NX || h.NY != g.NY {
		return nil, fmt.Errorf("raster is %dx%d cells, the run grid %dx%d", h.NX, h.NY, g.NX, g.NY)
	}
	if tol := 1e-6 * math.Max(g.DX, g.DY); math.Abs(h.DX-g.DX) > tol || math.Abs(h.DY-g.DY) > tol {
		return nil, fmt.Errorf("raster cell size %gx%g, the run grid %gx%g", h.DX, h.DY, g.DX, g.DY)
	}
	return ras.Values, nil
}

// Table is a CSV file read by column name.
type Table struct {
	Header []string
	Rows   [][]string
	col    map[string]int
}

// readTable reads a CSV file with a header line.
func readTable(path string) (*Table, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("render: %w", err)
	}
	defer f.Close()
	return parseTable(path, f)
}

// parseTable reads CSV records with a header line from in; path names the
// file in messages.
func parseTable(path string, in io.Reader) (*Table, error) {
	r := csv.NewReader(in)
	r.TrimLeadingSpace = true
	recs, err := r.ReadAll()
	if err != nil {
		return nil, fmt.Errorf("render: %s: %w", path, err)
	}
	if len(recs) == 0 {
		return nil, fmt.Errorf("render: %s: empty file", path)
	}
	t := &Table{Header: recs[0], Rows: recs[1:], col: map[string]int{}}
	for i, h := range t.Header {
		t.col[strings.TrimSpace(strings.ToLower(h))] = i
	}
	return t, nil
}

// Has reports whether the table has the named column.
func (t *Table) Has(name string) bool { _, ok := t.col[name]; return ok }

// Str returns the text of column name in row r ("" if absent).
func (t *Table) Str(r int, name string) string {
	i, ok := t.col[name]
	if !ok || i >= len(t.Rows[r]) {
		return ""
	}
	return strings.TrimSpace(t.Rows[r][i])
}

// Num returns the number in column name of row r; NaN when absent, empty
// or not a number.
func (t *Table) Num(r int, name string) float64 {
	v, err := strconv.ParseFloat(t.Str(r, name), 64)
	if err != nil {
		return math.NaN()
	}
	return v
}

// need checks that the table has every column.
func (t *Table) need(path string, cols ...string) error {
	for _, c := range cols {
		if !t.Has(c) {
			return fmt.Errorf("render: %s has no column %q", path, c)
		}
	}
	return nil
}

// seriesBy groups rows by the text of column key (in order of first
// appearance) and returns, per group, the x and y columns.
func (t *Table) seriesBy(key, x, y string) (names []string, xs, ys [][]float64) {
	idx := map[string]int{}
	for r := range t.Rows {
		name := t.Str(r, key)
		n, ok := idx[name]
		if !ok {
			n = len(names)
			idx[name] = n
			names = append(names, name)
			xs = append(xs, nil)
			ys = append(ys, nil)
		}
		xv, yv := t.Num(r, x), t.Num(r, y)
		if math.IsNaN(xv) || math.IsNaN(yv) {
			continue
		}
		xs[n] = append(xs[n], xv)
		ys[n] = append(ys[n], yv)
	}
	return names, xs, ys
}

// readStreamlines reads streamlines.geojson: a FeatureCollection of
// LineStrings with properties injector, producer, flux and tof_days.
func readStreamlines(path string) ([]Polyline, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("render: %w", err)
	}
	return parseStreamlines(path, b)
}

// parseStreamlines parses the content of streamlines.geojson; path names
// the file in messages.
func parseStreamlines(path string, b []byte) ([]Polyline, error) {
	var fc struct {
		Type     string `json:"type"`
		Features []struct {
			Geometry struct {
				Type        string      `json:"type"`
				Coordinates [][]float64 `json:"coordinates"`
			} `json:"geometry"`
			Properties struct {
				Injector string   `json:"injector"`
				Producer string   `json:"producer"`
				Flux     float64  `json:"flux"`
				TOF      *float64 `json:"tof_days"`
			} `json:"properties"`
		} `json:"features"`
	}
	if err := json.Unmarshal(b, &fc); err != nil {
		return nil, fmt.Errorf("render: %s: %w", path, err)
	}
	if fc.Type != "FeatureCollection" {
		return nil, fmt.Errorf("render: %s: type %q, want FeatureCollection", path, fc.Type)
	}
	out := make([]Polyline, 0, len(fc.Features))
	for n, f := range fc.Features {
		if f.Geometry.Type != "LineString" {
			return nil, fmt.Errorf("render: %s: feature %d is a %q, want LineString", path, n, f.Geometry.Type)
		}
		p := Polyline{Injector: f.Properties.Injector, Producer: f.Properties.Producer, Flux: f.Properties.Flux, TotalTOF: math.NaN()}
		if f.Properties.TOF != nil {
			p.TotalTOF = *f.Properties.TOF
		}
		for i, c := range f.Geometry.Coordinates {
			if len(c) < 2 {
				return nil, fmt.Errorf("render: %s: feature %d point %d has %d coordinates", path, n, i, len(c))
			}
			p.X = append(p.X, c[0])
			p.Y = append(p.Y, c[1])
		}
		out = append(out, p)
	}
	return out, nil
}

// frameFile is a saturation raster with its day.
type frameFile struct {
	Day  float64
	Path string
	Name string // base name without extension
}

// listDays finds the saturation maps (runfolder.SnapshotName) in dir,
// sorted by day.
func listDays(dir string) []frameFile {
	m, _ := filepath.Glob(filepath.Join(dir, runfolder.SnapshotGlob))
	if len(m) == 0 {
		m, _ = filepath.Glob(filepath.Join(dir, runfolder.RasterName(runfolder.SnapshotGlob, runfolder.RastersTIF)))
	}
	var out []frameFile
	for _, p := range m {
		base := filepath.Base(p)
		if strings.HasSuffix(base, ".tif") {
			base = strings.TrimSuffix(base, ".tif") + ".asc" // SnapshotDay reads the ASCII name
		}
		d, ok := runfolder.SnapshotDay(base)
		if !ok {
			continue
		}
		out = append(out, frameFile{Day: d, Path: p, Name: strings.TrimSuffix(filepath.Base(p), filepath.Ext(p))})
	}
	sort.Slice(out, func(a, b int) bool { return out[a].Day < out[b].Day })
	return out
}

package reservoir

import (
	"bytes"
	"errors"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func write(t *testing.T, dir, name, content string) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := os.WriteFile(p, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// TestReadASCIIRasterHeaders reads the header variants of the GIS ASCII
// raster format: upper, lower and mixed case keys, corner and centre
// registration, a single cellsize or dx and dy, with and without NODATA.
func TestReadASCIIRasterHeaders(t *testing.T) {
	rows := "1 2 3\n4 5 6\n"
	cases := []struct {
		name, hdr string
		grid      Grid
		nodata    bool
	}{
		{"upper", "NCOLS 3\nNROWS 2\nXLLCORNER 100\nYLLCORNER 200\nCELLSIZE 10\nNODATA_VALUE -9999\n", Grid{3, 2, 10, 10, 100, 200}, true},
		{"mixed, any order", "nrows 2\nNcols 3\ncellsize 10\nyllcorner 200\nxllCorner 100\n", Grid{3, 2, 10, 10, 100, 200}, false},
		{"centres", "ncols 3\nnrows 2\nxllcenter 105\nyllcenter 205\ncellsize 10\n", Grid{3, 2, 10, 10, 100, 200}, false},
		{"dx dy", "ncols 3\nnrows 2\nxllcorner 0\nyllcorner 0\ndx 10\ndy 20\n", Grid{3, 2, 10, 20, 0, 0}, false},
		{"crlf and bom", "\ufeffncols 3\r\nnrows 2\r\nxllcorner 100\r\nyllcorner 200\r\ncellsize 10\r\n", Grid{3, 2, 10, 10, 100, 200}, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r, err := ReadASCIIRaster(strings.NewReader(c.hdr+rows), "t.asc")
			if err != nil {
				t.Fatal(err)
			}
			if r.Grid != c.grid || r.HasNoData != c.nodata {
				t.Errorf("grid %+v nodata %v, want %+v %v", r.Grid, r.HasNoData, c.grid, c.nodata)
			}
			// The first file row is the north row: j = 1.
			want := []float64{4, 5, 6, 1, 2, 3}
			for k := range want {
				if r.Values[k] != want[k] {
					t.Fatalf("values %v, want %v", r.Values, want)
				}
			}
		})
	}
}

func TestReadASCIIRasterNoData(t *testing.T) {
	src := "ncols 2\nnrows 2\nxllcorner 0\nyllcorner 0\ncellsize 1\nnodata_value -9999\n-9999 2\n3 -9999.0\n"
	r, err := ReadASCIIRaster(strings.NewReader(src), "t.asc")
	if err != nil {
		t.Fatal(err)
	}
	// South row first: (3, NODATA), then (NODATA, 2).
	if r.Values[0] != 3 || !math.IsNaN(r.Values[1]) || !math.IsNaN(r.Values[2]) || r.Values[3] != 2 {
		t.Errorf("values %v", r.Values)
	}
}

// TestMapErrors checks that every parse problem names the file and the
// row and column (or the line) of the culprit.
func TestMapErrors(t *testing.T) {
	hdr := "ncols 3\nnrows 2\nxllcorner 0\nyllcorner 0\ncellsize 1\n"
	raster := []struct{ name, src, want string }{
		{"non-numeric", hdr + "1 2 3\n4 x5 6\n", `r.asc: row 2, column 2: "x5" is not a number`},
		{"nan", hdr + "1 2 NaN\n4 5 6\n", `r.asc: row 1, column 3: "NaN" is not a finite number`},
		{"inf", hdr + "1 2 3\n-Inf 5 6\n", `r.asc: row 2, column 1: "-Inf" is not a finite number`},
		{"overflow", hdr + "1 2 3\n4 5 1e999\n", `r.asc: row 2, column 3: "1e999" is out of range`},
		{"short row", hdr + "1 2 3\n4 5\n", "r.asc:7: row 2 has 2 values; expected 3"},
		{"long row", hdr + "1 2 3 4\n4 5 6\n", "r.asc:6: row 1 has 4 values; expected 3"},
		{"missing row", hdr + "1 2 3\n", "r.asc: only 1 rows; expected 2 (nrows)"},
		{"extra row", hdr + "1 2 3\n4 5 6\n7 8 9\n", "r.asc:8: more than 2 rows; expected 2 (nrows)"},
		{"no cellsize", "ncols 3\nnrows 2\nxllcorner 0\nyllcorner 0\n1 2 3\n4 5 6\n", "r.asc: raster header has no cellsize (or dx and dy)"},
		{"no ncols", "nrows 2\nxllcorner 0\nyllcorner 0\ncellsize 1\n1 2 3\n4 5 6\n", "r.asc: raster header has no ncols"},
		{"zero ncols", "ncols 0\nnrows 2\nxllcorner 0\nyllcorner 0\ncellsize 1\n", "r.asc:1: raster header ncols must be a positive whole number (got 0)"},
		{"fractional nrows", "ncols 3\nnrows 2.5\nxllcorner 0\nyllcorner 0\ncellsize 1\n", "r.asc:2: raster header nrows must be a positive whole number"},
		{"negative cellsize", "ncols 3\nnrows 2\nxllcorner 0\nyllcorner 0\ncellsize -1\n", "r.asc:5: raster cell size must be positive"},
		{"duplicate key", "ncols 3\nNCOLS 3\n", "r.asc:2: raster header key NCOLS given twice (first on line 1)"},
		{"corner and centre", "ncols 3\nnrows 2\nxllcorner 0\nxllcenter 0\nyllcorner 0\ncellsize 1\n", "r.asc:4: raster header gives both xllcorner and xllcenter"},
		{"bad header value", "ncols three\n", `r.asc:1: raster header ncols: "three" is not a finite number`},
		{"header with two values", "ncols 3 4\n", `r.asc:1: raster header line "ncols 3 4" must be a key and one value`},
		{"misspelt key", "ncols 3\nnrowz 2\n", `r.asc:2: unknown raster header key "nrowz"; did you mean "nrows"?`},
		{"empty", "", "r.asc: empty map file"},
		{"binary", "ncols 3\n\x00\x00\n", "r.asc:2: not a text file"},
		{"too large", "ncols 1000000\nnrows 1000000\nxllcorner 0\nyllcorner 0\ncellsize 1\n", "r.asc:1: grid 1000000 x 1000000 = 1e+12 cells is too large"},
	}
	for _, c := range raster {
		t.Run("raster/"+c.name, func(t *testing.T) {
			_, err := ReadASCIIRaster(strings.NewReader(c.src), "r.asc")
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("got %v\nwant %s", err, c.want)
			}
			var ie *InputError
			if !errors.As(err, &ie) {
				t.Errorf("%T is not an *InputError", err)
			}
		})
	}
	matrix := []struct{ name, src, want string }{
		{"comma gap", "1,,3\n4,5,6\n", "m.txt:1: column 2: empty value between commas"},
		{"word", "1 2 3\n4 five 6\n", `m.txt: row 2, column 2: "five" is not a number`},
		{"short", "1 2 3\n", "m.txt: only 1 rows; expected 2 (ny)"},
		{"ragged", "1 2 3\n4 5\n", "m.txt:2: row 2 has 2 values; expected 3"},
		{"nodata is not special", "1 2 3\n4 5 nan\n", `m.txt: row 2, column 3: "nan" is not a finite number`},
	}
	for _, c := range matrix {
		t.Run("matrix/"+c.name, func(t *testing.T) {
			_, err := ReadMatrix(strings.NewReader(c.src), "m.txt", 3, 2)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("got %v\nwant %s", err, c.want)
			}
		})
	}
}

func TestReadMatrixSeparators(t *testing.T) {
	for name, src := range map[string]string{
		"spaces":   "1 2 3\n4 5 6\n",
		"tabs":     "1\t2\t3\n\n4\t5\t6\n",
		"commas":   "1,2,3\r\n4, 5 ,6\r\n",
		"comments": "# a comment\n1 2 3\n# another\n4 5 6\n",
		"bom":      "\ufeff1 2 3\n4 5 6",
	} {
		v, err := ReadMatrix(strings.NewReader(src), name, 3, 2)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		want := []float64{4, 5, 6, 1, 2, 3}
		for k := range want {
			if v[k] != want[k] {
				t.Fatalf("%s: %v, want %v", name, v, want)
			}
		}
	}
}

// TestWriteASCIIRasterRoundTrip writes random values and reads them back
// exactly, with inactive and NaN cells as NODATA, for square and
// rectangular cells.
func TestWriteASCIIRasterRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, g := range []Grid{{NX: 7, NY: 5, DX: 25, DY: 25, X0: 512345.5, Y0: 6.75e6}, {NX: 1, NY: 1, DX: 1, DY: 3}, {NX: 4, NY: 9, DX: 10, DY: 20, X0: -3, Y0: 2}} {
		n := g.N()
		vals := make([]float64, n)
		active := make([]bool, n)
		for k := range vals {
			vals[k] = rng.NormFloat64() * math.Pow(10, float64(rng.IntN(20)-10))
			active[k] = rng.IntN(5) != 0
		}
		vals[n-1] = math.NaN()
		var buf bytes.Buffer
		if err := WriteASCIIRaster(&buf, g, vals, active, -9999); err != nil {
			t.Fatal(err)
		}
		r, err := ReadASCIIRaster(&buf, "round.asc")
		if err != nil {
			t.Fatal(err)
		}
		if r.Grid != g {
			t.Errorf("grid %+v, want %+v", r.Grid, g)
		}
		for k := range vals {
			if !active[k] || math.IsNaN(vals[k]) {
				if !math.IsNaN(r.Values[k]) {
					t.Errorf("cell %d: %g, want NODATA", k, r.Values[k])
				}
			} else if r.Values[k] != vals[k] {
				t.Errorf("cell %d: %g, want %g", k, r.Values[k], vals[k])
			}
		}
	}
}

func TestWriteASCIIRasterFormat(t *testing.T) {
	g := Grid{NX: 2, NY: 2, DX: 50, DY: 50, X0: 10, Y0: 20}
	var buf bytes.Buffer
	if err := WriteASCIIRaster(&buf, g, []float64{1, 2, 3.5, 4}, []bool{true, false, true, true}, -1); err != nil {
		t.Fatal(err)
	}
	want := "ncols 2\nnrows 2\nxllcorner 10\nyllcorner 20\ncellsize 50\nNODATA_value -1\n3.5 4\n1 -1\n"
	if buf.String() != want {
		t.Errorf("got\n%s\nwant\n%s", buf.String(), want)
	}
	for name, f := range map[string]func() error{
		"nodata collision": func() error { return WriteASCIIRaster(&buf, g, []float64{1, -1, 3, 4}, nil, -1) },
		"infinite":         func() error { return WriteASCIIRaster(&buf, g, []float64{1, math.Inf(1), 3, 4}, nil, -1) },
		"short":            func() error { return WriteASCIIRaster(&buf, g, []float64{1}, nil, -1) },
		"nan nodata":       func() error { return WriteASCIIRaster(&buf, g, []float64{1, 2, 3, 4}, nil, math.NaN()) },
	} {
		if f() == nil {
			t.Errorf("%s: no error", name)
		}
	}
}

func TestReadMap(t *testing.T) {
	dir := t.TempDir()
	asc := write(t, dir, "a.asc", "ncols 2\nnrows 1\nxllcorner 0\nyllcorner 0\ncellsize 5\n7 8\n")
	mat := write(t, dir, "m.txt", "1 2\n")
	notasc := write(t, dir, "b.asc", "1 2\n")
	v, g, err := ReadMap(asc, nil)
	if err != nil || g.NX != 2 || g.DX != 5 || v[1] != 8 {
		t.Fatalf("raster without grid: %v %+v %v", v, g, err)
	}
	if _, _, err := ReadMap(mat, nil); err == nil || !strings.Contains(err.Error(), "a plain matrix cannot define the grid") {
		t.Errorf("matrix without grid: %v", err)
	}
	if v, _, err := ReadMap(mat, &Grid{NX: 2, NY: 1, DX: 1, DY: 1}); err != nil || v[0] != 1 {
		t.Errorf("matrix with grid: %v %v", v, err)
	}
	if _, _, err := ReadMap(asc, &Grid{NX: 2, NY: 1, DX: 5, DY: 5, Y0: 1}); err == nil || !strings.Contains(err.Error(), "yllcorner 0 disagrees with the grid (origin y 1)") {
		t.Errorf("header mismatch: %v", err)
	}
	if _, _, err := ReadMap(notasc, &Grid{NX: 2, NY: 1, DX: 1, DY: 1}); err == nil || !strings.Contains(err.Error(), "b.asc:1: no GIS ASCII raster header") {
		t.Errorf(".asc without header: %v", err)
	}
	_, _, err = ReadMap(filepath.Join(dir, "none.asc"), nil)
	if !errors.Is(err, os.ErrNotExist) || !strings.Contains(err.Error(), "none.asc: file not found") {
		t.Errorf("missing file: %v", err)
	}
}

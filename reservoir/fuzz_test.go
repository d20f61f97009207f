package reservoir

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// The fuzz tests feed arbitrary bytes to the parsers: errors are fine,
// panics and inconsistent results are not. Their seed corpus is in
// testdata/fuzz/<FuzzName>; run one for a while with, for example,
// go test ./reservoir -run '^$' -fuzz FuzzLoadCase -fuzztime 30s.

func FuzzReadASCIIRaster(f *testing.F) {
	f.Add([]byte("ncols 3\nnrows 2\nxllcorner 0\nyllcorner 0\ncellsize 1\nNODATA_value -9999\n1 2 3\n4 -9999 6\n"))
	f.Add([]byte("NCOLS 2\r\nNROWS 1\r\nXLLCENTER 0.5\r\nYLLCENTER 0.5\r\nDX 1\r\nDY 2\r\n1,2\r\n"))
	f.Add([]byte("ncols 1\nnrows 1\nxllcorner 0\nyllcorner 0\ncellsize 1\nnodata_value nan\nnan\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		r, err := ReadASCIIRaster(bytes.NewReader(data), "fuzz.asc")
		if err != nil {
			return
		}
		g := r.Grid
		if g.NX <= 0 || g.NY <= 0 || !(g.DX > 0) || !(g.DY > 0) || len(r.Values) != g.N() {
			t.Fatalf("inconsistent raster: %+v with %d values", g, len(r.Values))
		}
		for _, v := range r.Values {
			if math.IsInf(v, 0) {
				t.Fatalf("infinite value accepted")
			}
		}
		// What was read writes back and reads again identically.
		var buf bytes.Buffer
		if err := WriteASCIIRaster(&buf, g, r.Values, nil, -1.5e300); err != nil {
			return // a value equal to the NODATA chosen here; fine
		}
		r2, err := ReadASCIIRaster(&buf, "again.asc")
		if err != nil {
			t.Fatalf("re-reading a written raster: %v", err)
		}
		for k := range r.Values {
			a, b := r.Values[k], r2.Values[k]
			if a != b && !(math.IsNaN(a) && math.IsNaN(b)) {
				t.Fatalf("cell %d: %g became %g", k, a, b)
			}
		}
	})
}

func FuzzReadMatrix(f *testing.F) {
	f.Add([]byte("1 2 3\n4 5 6\n"), uint8(3), uint8(2))
	f.Add([]byte("# c\n1,2\r\n3, 4\r\n"), uint8(2), uint8(2))
	f.Add([]byte("1e3\t-2.5\n"), uint8(2), uint8(1))
	f.Fuzz(func(t *testing.T, data []byte, nx, ny uint8) {
		v, err := ReadMatrix(bytes.NewReader(data), "fuzz.txt", int(nx), int(ny))
		if err != nil {
			return
		}
		if len(v) != int(nx)*int(ny) {
			t.Fatalf("%d values for %d x %d", len(v), nx, ny)
		}
		for _, x := range v {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				t.Fatalf("non-finite value %g accepted", x)
			}
		}
	})
}

func FuzzLoadCase(f *testing.F) {
	// Seeds: the good cases and the malformed corpus. Fuzzed cases are
	// parsed as if they lived in testdata/good/raster_field, so map and
	// table paths there resolve.
	for _, p := range []string{
		filepath.Join("testdata", "good", "raster_field", "case.yaml"),
		filepath.Join("testdata", "good", "matrix_metric", "case.yaml"),
	} {
		if b, err := os.ReadFile(p); err == nil {
			f.Add(b)
		}
	}
	bad, _ := filepath.Glob(filepath.Join("..", "testdata", "bad", "*", "case.yaml"))
	for _, p := range bad {
		if b, err := os.ReadFile(p); err == nil && len(b) < 4096 {
			f.Add(b)
		}
	}
	path := filepath.Join("testdata", "good", "raster_field", "case.yaml")
	loader := Loader{MaxCells: 4096}
	f.Fuzz(func(t *testing.T, data []byte) {
		m, err := loader.Parse(path, data)
		if err != nil {
			if err.Error() == "" {
				t.Fatal("empty error message")
			}
			return
		}
		g := m.Grid
		n := g.N()
		if n <= 0 || n > 4096 || len(m.PermEast) != n || len(m.PermNorth) != n || len(m.Porosity) != n ||
			len(m.Thickness) != n || len(m.Active) != n || len(m.TransMultX) != g.NXFaces() || len(m.TransMultY) != g.NYFaces() {
			t.Fatalf("inconsistent model arrays for grid %+v", g)
		}
		seen := map[int]bool{}
		for _, w := range m.Wells {
			if w.I < 0 || w.I >= g.NX || w.J < 0 || w.J >= g.NY || w.Cell != g.Index(w.I, w.J) || !m.Active[w.Cell] || seen[w.Cell] {
				t.Fatalf("well %s badly placed: %+v", w.Name, w)
			}
			seen[w.Cell] = true
		}
		for k := range m.Active {
			if m.Active[k] && !(m.PermEast[k] > 0 && m.PermNorth[k] > 0 && m.Porosity[k] > 0 && m.Porosity[k] <= 1 && m.Thickness[k] > 0) {
				t.Fatalf("active cell %d with bad properties", k)
			}
		}
		if m.RelPerm == nil || !(m.Fluids.WaterViscosity > 0) || !(m.Fluids.OilViscosity > 0) {
			t.Fatal("fluids or relative permeability missing")
		}
		_ = Describe(m)
	})
}

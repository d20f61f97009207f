package reservoir

import (
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"strconv"
	"strings"
	"testing"
)

// refRaster formats a raster value by value with strconv, north row first:
// the plain reading of the format that the banded, parallel writer must
// reproduce byte for byte.
func refRaster(g Grid, v []float64, active []bool, nodata float64, digits int) string {
	var b strings.Builder
	fmt.Fprintf(&b, "ncols %d\nnrows %d\nxllcorner %s\nyllcorner %s\ncellsize %s\nNODATA_value %s\n",
		g.NX, g.NY, ftoa(g.X0), ftoa(g.Y0), ftoa(g.DX), ftoa(nodata))
	for j := g.NY - 1; j >= 0; j-- {
		for i := 0; i < g.NX; i++ {
			k := j*g.NX + i
			x := v[k]
			if (active != nil && !active[k]) || math.IsNaN(x) {
				x = nodata
			}
			if i > 0 {
				b.WriteByte(' ')
			}
			b.WriteString(strconv.FormatFloat(x, 'g', digits, 64))
		}
		b.WriteByte('\n')
	}
	return b.String()
}

// TestWriteRasterBands checks the banded writer against refRaster on
// grids of one to thousands of bands, with runs of equal values, zeros of
// both signs, NaN, inactive cells and 7 or all digits, on 1 and 4
// goroutines.
func TestWriteRasterBands(t *testing.T) {
	prev := runtime.GOMAXPROCS(0)
	defer runtime.GOMAXPROCS(prev)
	r := rand.New(rand.NewPCG(1, 2))
	for _, sz := range [][2]int{{1, 1}, {3, 7}, {7, 3}, {250, 40}, {13, 5000}} {
		g := Grid{NX: sz[0], NY: sz[1], DX: 10, DY: 10, X0: 100.5}
		n := g.N()
		v := make([]float64, n)
		active := make([]bool, n)
		for k := range v {
			switch r.IntN(6) {
			case 0:
				v[k] = 0.2 // runs of one value
			case 1:
				v[k] = math.Copysign(0, float64(r.IntN(2))-0.5)
			case 2:
				v[k] = math.NaN()
			case 3:
				v[k] = float64(r.IntN(4))
			default:
				v[k] = math.Exp(20 * (r.Float64() - 0.5))
			}
			active[k] = r.IntN(10) > 0
		}
		for _, digits := range []int{7, -1} {
			want := refRaster(g, v, active, -9999, digits)
			for _, procs := range []int{1, 4} {
				runtime.GOMAXPROCS(procs)
				var buf bytes.Buffer
				if err := WriteASCIIRasterDigits(&buf, g, v, active, -9999, digits); err != nil {
					t.Fatal(err)
				}
				if got := buf.String(); got != want {
					t.Errorf("%dx%d digits %d procs %d: output differs from value-by-value formatting", g.NX, g.NY, digits, procs)
				}
			}
		}
	}
}

// TestWriteRasterBandsFirstError: with bad values in several bands, the
// error names the first in file order (north row first).
func TestWriteRasterBandsFirstError(t *testing.T) {
	g := Grid{NX: 10, NY: 20000, DX: 1, DY: 1}
	v := make([]float64, g.N())
	v[5*g.NX+3] = math.Inf(1)      // south, written late
	v[19000*g.NX+4] = math.Inf(-1) // north, written early
	err := WriteASCIIRaster(&bytes.Buffer{}, g, v, nil, -9999)
	if err == nil || !strings.Contains(err.Error(), "(i=4, j=19000)") {
		t.Fatalf("error %v, want the cell i=4, j=19000", err)
	}
}

// BenchmarkWriteRaster1000 writes a 1000 x 1000 saturation-like raster
// with 7 significant digits.
func BenchmarkWriteRaster1000(b *testing.B) {
	g := Grid{NX: 1000, NY: 1000, DX: 10, DY: 10}
	r := rand.New(rand.NewPCG(3, 4))
	v := make([]float64, g.N())
	for k := range v {
		v[k] = 0.2
		if r.IntN(3) > 0 {
			v[k] = 0.2 + 0.55*r.Float64()
		}
	}
	var buf bytes.Buffer
	for b.Loop() {
		buf.Reset()
		if err := WriteASCIIRasterDigits(&buf, g, v, nil, -9999, 7); err != nil {
			b.Fatal(err)
		}
	}
	b.SetBytes(int64(buf.Len()))
}

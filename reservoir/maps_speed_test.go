package reservoir

import (
	"bytes"
	"errors"
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

// TestReadRasterBands reads a raster large enough for many parallel bands
// and checks it value by value against strconv.ParseFloat of the
// whitespace-separated tokens; then the first of several bad values, in
// file order, must be the one reported, and a shape defect after a bad
// value must not hide it.
func TestReadRasterBands(t *testing.T) {
	prev := runtime.GOMAXPROCS(0)
	defer runtime.GOMAXPROCS(prev)
	g := Grid{NX: 37, NY: 900, DX: 5, DY: 5}
	r := rand.New(rand.NewPCG(5, 6))
	v := make([]float64, g.N())
	for k := range v {
		v[k] = math.Exp(30 * (r.Float64() - 0.5))
		if r.IntN(20) == 0 {
			v[k] = math.NaN()
		}
	}
	var buf bytes.Buffer
	if err := WriteASCIIRaster(&buf, g, v, nil, -9999); err != nil {
		t.Fatal(err)
	}
	text := buf.String()
	lines := strings.Split(strings.TrimSpace(text), "\n")[6:]
	for _, procs := range []int{1, 3} {
		runtime.GOMAXPROCS(procs)
		ras, err := ReadASCIIRaster(strings.NewReader(text), "big.asc")
		if err != nil {
			t.Fatal(err)
		}
		for row, l := range lines {
			for c, tok := range strings.Fields(l) {
				want, _ := strconv.ParseFloat(tok, 64)
				got := ras.Values[(g.NY-1-row)*g.NX+c]
				if !(got == want || (want == -9999 && math.IsNaN(got))) {
					t.Fatalf("procs %d: row %d col %d: %v, want %v", procs, row+1, c+1, got, want)
				}
			}
		}
		bad := append([]string(nil), lines...)
		setTok := func(row, col int, tok string) { // 0-based
			f := strings.Fields(bad[row])
			f[col] = tok
			bad[row] = strings.Join(f, " ")
		}
		setTok(850, 0, "x1")
		setTok(400, 1, "1..2")
		setTok(400, 5, "z")
		setTok(401, 0, "y")
		bad[600] = bad[600] + " 7" // a shape defect after the bad values
		head := strings.Join(strings.Split(text, "\n")[:6], "\n") + "\n"
		_, err = ReadASCIIRaster(strings.NewReader(head+strings.Join(bad, "\n")), "bad.asc")
		var ie *InputError
		if !errors.As(err, &ie) || ie.Row != 401 || ie.Col != 2 {
			t.Fatalf("procs %d: error %v, want row 401 col 2", procs, err)
		}
	}
}

// BenchmarkReadRaster1000 reads a 1000 x 1000 raster of values written
// with all their digits, as floodtrace synth writes them.
func BenchmarkReadRaster1000(b *testing.B) {
	g := Grid{NX: 1000, NY: 1000, DX: 10, DY: 10}
	r := rand.New(rand.NewPCG(7, 8))
	v := make([]float64, g.N())
	for k := range v {
		v[k] = 100 * math.Exp(1.5*r.NormFloat64())
	}
	var buf bytes.Buffer
	if err := WriteASCIIRaster(&buf, g, v, nil, -9999); err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(buf.Len()))
	for b.Loop() {
		if _, err := ReadASCIIRaster(bytes.NewReader(buf.Bytes()), "bench.asc"); err != nil {
			b.Fatal(err)
		}
	}
}

// TestAppendG compares appendG with strconv.AppendFloat ('g') on random
// values spread over many decades, on values made of few binary digits
// (exact decimal half-way cases) and on values next to powers of ten.
func TestAppendG(t *testing.T) {
	r := rand.New(rand.NewPCG(9, 10))
	check := func(v float64, prec int) {
		t.Helper()
		want := strconv.FormatFloat(v, 'g', prec, 64)
		if got := string(appendG(nil, v, prec)); got != want {
			t.Fatalf("appendG(%v, %d) = %s, want %s", v, prec, got, want)
		}
	}
	n := 400_000
	if testing.Short() {
		n = 50_000
	}
	for i := 0; i < n; i++ {
		prec := 1 + r.IntN(15)
		if i%2 == 0 {
			prec = 7
		}
		v := math.Pow(10, 14*r.Float64()-6) * (1 + r.Float64())
		if r.IntN(2) == 0 {
			v = -v
		}
		check(v, prec)
		// Few binary digits: decimal ties such as 0.125 or 2^-11.
		check(math.Ldexp(float64(r.IntN(1<<12)), -r.IntN(30)), prec)
		check(float64(r.IntN(100_000_000))/math.Pow(10, float64(r.IntN(12))), prec)
	}
	for e := -6; e <= 16; e++ {
		p := math.Pow(10, float64(e))
		for _, v := range []float64{p, math.Nextafter(p, 0), math.Nextafter(p, 2*p), p * (1 - 5e-8), p * (1 - 4.9999999e-8), p * (1 - 5.0000001e-8)} {
			for prec := 1; prec <= 16; prec++ {
				check(v, prec)
			}
		}
	}
	for _, v := range []float64{0, math.Copysign(0, -1), 0.2, 0.75, 1, 9999999.5, 9999999.49, 0.00099999995, 1e-4, 99999.995, math.NaN(), math.Inf(1), math.MaxFloat64, math.SmallestNonzeroFloat64} {
		for prec := -1; prec <= 17; prec++ {
			if prec != 0 {
				check(v, prec)
			}
		}
	}
}

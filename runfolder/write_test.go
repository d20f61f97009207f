package runfolder

import (
	"math"
	"math/rand/v2"
	"strconv"
	"testing"
)

// TestAppendFixed compares AppendFixed with strconv.AppendFloat ('f') on
// random coordinates, on values made of few binary digits (exact decimal
// half-way cases such as 0.125) and on special values.
func TestAppendFixed(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	check := func(v float64, dec int) {
		t.Helper()
		want := strconv.FormatFloat(v, 'f', dec, 64)
		if got := string(AppendFixed(nil, v, dec)); got != want {
			t.Fatalf("AppendFixed(%v, %d) = %s, want %s", v, dec, got, want)
		}
	}
	n := 300_000
	if testing.Short() {
		n = 30_000
	}
	for i := 0; i < n; i++ {
		dec := r.IntN(8) - 1
		if i%2 == 0 {
			dec = 2
		}
		v := math.Pow(10, 16*r.Float64()-4) * (r.Float64() - 0.5)
		check(v, dec)
		check(math.Ldexp(float64(r.IntN(1<<20)), -r.IntN(12)), dec)
		check(float64(r.IntN(1_000_000_000))/1000, dec)
		check(-float64(r.IntN(1_000_000))/200, dec)
	}
	for _, v := range []float64{0, math.Copysign(0, -1), -0.001, -0.004, -0.005, 0.005, 0.015, 0.125, 2.675, 1e12, 999999999999.995, math.NaN(), math.Inf(-1)} {
		for dec := -1; dec <= 8; dec++ {
			check(v, dec)
		}
	}
}

// BenchmarkAppendFixed formats map coordinates with two decimals, as the
// streamline polylines are written.
func BenchmarkAppendFixed(b *testing.B) {
	r := rand.New(rand.NewPCG(13, 14))
	v := make([]float64, 4096)
	for i := range v {
		v[i] = 10000 * r.Float64()
	}
	buf := make([]byte, 0, 64)
	for b.Loop() {
		for _, x := range v {
			buf = AppendFixed(buf[:0], x, 2)
		}
	}
}

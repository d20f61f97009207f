package synth

import (
	"fmt"
	"testing"
)

// BenchmarkGenerate times Generate (embedding and one realization) on
// square grids with an exponential variogram of range a tenth of the grid.
func BenchmarkGenerate(b *testing.B) {
	for _, n := range []int{100, 300, 1000} {
		s := Settings{NX: n, NY: n, DX: 10, DY: 10, RangeMajor: float64(n), RangeMinor: float64(n) / 2, Azimuth: 30, LogMean: 4, LogStd: 1}
		b.Run(fmt.Sprintf("%dx%d", n, n), func(b *testing.B) {
			for b.Loop() {
				if _, _, err := Generate(s); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkRealize times one more realization from a built Generator (the
// cost per ensemble member).
func BenchmarkRealize(b *testing.B) {
	for _, n := range []int{100, 300, 1000} {
		g, err := NewGenerator(Settings{NX: n, NY: n, RangeMajor: float64(n) / 10, LogStd: 1})
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprintf("%dx%d", n, n), func(b *testing.B) {
			var seed uint64
			for b.Loop() {
				seed++
				g.Realize(seed)
			}
		})
	}
}

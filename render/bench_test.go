package render

import (
	"fmt"
	"math"
	"testing"

	"floodtrace/reservoir"
)

// BenchmarkDrawField draws a 1920x1080 map of a 300x300 and a 1000x1000
// grid: the cells are written straight into the picture's pixels (nearest
// cell per pixel), so the cost follows the picture size, not the cell
// count.
func BenchmarkDrawField(b *testing.B) {
	for _, n := range []int{300, 1000} {
		g := reservoir.Grid{NX: n, NY: n, DX: 10, DY: 10}
		v := make([]float64, g.N())
		for k := range v {
			i, j := g.IJ(k)
			v[k] = 0.2 + 0.5*math.Exp(-float64((i-n/2)*(i-n/2)+(j-n/3)*(j-n/3))/float64(n*n/16))
		}
		s := Scene{Title: "Benchmark", Subtitle: "water saturation", Grid: g, LengthUnit: "m",
			Wells: []WellMark{{Name: "I-1", X: 5 * float64(n), Y: 10 * float64(n) / 3, Injector: true}, {Name: "P-1", X: 100, Y: 100}}}
		sc := Scale{Label: "Water saturation", Min: 0.2, Max: 0.7}
		b.Run(fmt.Sprintf("%dx%d", n, n), func(b *testing.B) {
			for b.Loop() {
				if _, err := DrawField(s, v, sc, DefaultWidth, DefaultHeight); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

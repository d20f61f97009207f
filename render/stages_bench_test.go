package render

import (
	"bytes"
	"fmt"
	"math"
	"testing"

	"floodtrace/reservoir"
)

// BenchmarkStageRender times the one picture of a run drawn with
// --pictures minimal: the saturation map at 1920x1080 (DrawField) and its
// PNG encoding, for grids of 100x100, 300x300 and 1000x1000 cells (the
// last skipped under -short). The field is a smooth flood front around
// an injector.
func BenchmarkStageRender(b *testing.B) {
	for _, n := range []int{100, 300, 1000} {
		b.Run(fmt.Sprintf("%dx%d", n, n), func(b *testing.B) {
			if n >= 1000 && testing.Short() {
				b.Skip("1000x1000 under -short")
			}
			dx := 10000 / float64(n)
			g := reservoir.Grid{NX: n, NY: n, DX: dx, DY: dx}
			v := make([]float64, g.N())
			for k := range v {
				i, j := g.IJ(k)
				r := math.Hypot(float64(i-n/4), float64(j-n/4)) / float64(n)
				v[k] = 0.2 + 0.5/(1+math.Exp((r-0.3)*40))
			}
			s := Scene{Title: "Benchmark pattern", Subtitle: "Water saturation", Grid: g, LengthUnit: "ft",
				Wells: []WellMark{{Name: "I1", X: 2500, Y: 2500, Injector: true}, {Name: "P1", X: 500, Y: 500}}}
			sc := Scale{Label: "Water saturation", Unit: "fraction of pore volume", Min: 0.2, Max: 0.75, Map: &SaturationColors}
			var buf bytes.Buffer
			for b.Loop() {
				img, err := DrawField(s, v, sc, DefaultWidth, DefaultHeight)
				if err != nil {
					b.Fatal(err)
				}
				buf.Reset()
				if err := writePNG(&buf, img); err != nil { // the run's encoder
					b.Fatal(err)
				}
				recycle(img)
			}
			b.ReportMetric(float64(buf.Len()), "png-bytes")
		})
	}
}

// BenchmarkRunPictures times Run on the synthetic run folder of the tests
// (every map, chart, the animation and the report at the default sizes),
// at GOMAXPROCS as given by -cpu: the pictures are drawn in parallel.
func BenchmarkRunPictures(b *testing.B) {
	dir := b.TempDir()
	newSynthCase().write(b, dir)
	for b.Loop() {
		if _, err := Run(dir, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}

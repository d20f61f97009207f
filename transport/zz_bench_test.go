package transport

import (
	"math/rand/v2"
	"testing"
)

func BenchmarkZZLocal(b *testing.B) {
	ff := sandstone()
	fl, _ := NewFlux(ff)
	r, _ := NewRiemann(ff, 0.2, 0.75)
	rng := rand.New(rand.NewPCG(8, 1))
	dtau := nonuniformLine(160, 200, rng)
	tEnd := 0.9 * 200 / r.FrontSpeed()
	for _, set := range []Settings{{}, {Local: true}} {
		b.Run(map[bool]string{false: "global", true: "local"}[set.Local], func(b *testing.B) {
			var w Workspace
			s := make([]float64, len(dtau))
			for b.Loop() {
				for i := range s {
					s[i] = 0.2
				}
				for range 50 {
					w.Advance(s, dtau, 0.75, tEnd/50, fl, set)
				}
			}
		})
	}
}

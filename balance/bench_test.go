package balance

import (
	"fmt"
	"math"
	"testing"

	"floodtrace/reservoir"
	"floodtrace/reservoir/synth"
)

// benchCase is the balance benchmark of docs/PERFORMANCE.md: the
// benchmark pattern's permeability field (internal/benchcase: log-normal,
// ln k standard deviation 1.5, seed 3) on a 100 x 100 grid of a 10 km
// square, ten rate injectors (two rows of five) and six BHP producers,
// 5000 streamlines, ten years.
func benchCase(tb testing.TB) *reservoir.Model {
	n := 100
	dx := 10000 / float64(n)
	perm, poro, err := synth.Generate(synth.Settings{NX: n, NY: n, DX: dx, DY: dx, RangeMajor: 1500, RangeMinor: 600,
		Azimuth: 30, LogMean: math.Log(100), LogStd: 1.5, Seed: 3})
	if err != nil {
		tb.Fatal(err)
	}
	m := reservoir.NewUniform(n, n, dx, dx, 100, 0.2, 20)
	m.PermEast, m.PermNorth, m.Porosity = perm, perm, poro
	m.Fluids = reservoir.Fluids{WaterViscosity: 0.5, OilViscosity: 2, InitialSw: 0.2}
	m.RelPerm = reservoir.Corey{Swc: 0.2, Sor: 0.25, KrwMax: 0.3, KroMax: 0.85, Nw: 2.5, No: 2}
	m.Run = reservoir.RunSettings{End: 3650, ReportEvery: 90, Streamlines: 5000, PressureUpdates: 1}
	for i := range 10 {
		x, y := 1000+2000*float64(i%5), 3300+3400*float64(i/5)
		if err := m.PlaceWell(fmt.Sprintf("I%d", i+1), reservoir.Injector, x, y, reservoir.RateControl, 2000); err != nil {
			tb.Fatal(err)
		}
	}
	for i := range 6 {
		x, y := 1000+4000*float64(i%3), 500+4500*float64(i/3)
		if err := m.PlaceWell(fmt.Sprintf("P%d", i+1), reservoir.Producer, x, y, reservoir.BHPControl, 500); err != nil {
			tb.Fatal(err)
		}
	}
	return m
}

// BenchmarkBalance100 balances the 100 x 100 case with ten injectors.
func BenchmarkBalance100(b *testing.B) {
	m := benchCase(b)
	for b.Loop() {
		r, err := Balance(m, Settings{})
		if err != nil {
			b.Fatal(err)
		}
		b.ReportMetric(float64(r.Forecasts), "forecasts")
		b.ReportMetric(100*(r.Recommended.Objective/r.Now.Objective-1), "gain%")
	}
}

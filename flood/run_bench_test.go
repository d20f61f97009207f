package flood

import (
	"math"
	"testing"

	"floodtrace/reservoir"
	"floodtrace/reservoir/synth"
)

// benchModel is an n x n log-normal case (log-standard deviation 1, range a
// fifth of the side) with an injector in the centre and four BHP producers
// near the corners, 2000 streamlines and 120 report steps.
func benchModel(b *testing.B, n int) *reservoir.Model {
	b.Helper()
	perm, poro, err := synth.Generate(synth.Settings{NX: n, NY: n, DX: 10, DY: 10, RangeMajor: float64(n) * 2,
		LogMean: math.Log(100), LogStd: 1, Seed: 5})
	if err != nil {
		b.Fatal(err)
	}
	m := reservoir.NewUniform(n, n, 10, 10, 100, 0.2, 10)
	copy(m.PermEast, perm)
	copy(m.PermNorth, perm)
	copy(m.Porosity, poro)
	m.Fluids = reservoir.Fluids{WaterViscosity: 0.5, OilViscosity: 2, InitialSw: 0.2}
	m.RelPerm = reservoir.Corey{Swc: 0.2, Sor: 0.25, KrwMax: 0.3, KroMax: 0.85, Nw: 2.5, No: 2}
	L := float64(n) * 10
	must := func(err error) {
		if err != nil {
			b.Fatal(err)
		}
	}
	must(m.PlaceWell("I", reservoir.Injector, L/2, L/2, reservoir.RateControl, 500))
	for i, p := range [][2]float64{{0.1, 0.1}, {0.9, 0.1}, {0.1, 0.9}, {0.9, 0.9}} {
		must(m.PlaceWell(string(rune('A'+i)), reservoir.Producer, p[0]*L, p[1]*L, reservoir.BHPControl, 500))
	}
	pv := m.TotalPoreVolume()
	end := 1.5 * pv / 500
	m.Run = reservoir.RunSettings{End: end, ReportEvery: end / 120, Streamlines: 2000, PressureUpdates: 1, Snapshots: []float64{end}}
	return m
}

// BenchmarkFixedRun200 is issue 4's target: a 200x200 run with 2000
// streamlines and 120 report steps (pressure, tracing, transport, maps;
// no files) in under a second.
func BenchmarkFixedRun200(b *testing.B) {
	m := benchModel(b, 200)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		r, err := Run(m, Settings{Frames: -1})
		if err != nil {
			b.Fatal(err)
		}
		if len(r.Times) != 120 {
			b.Fatalf("%d report times", len(r.Times))
		}
	}
}

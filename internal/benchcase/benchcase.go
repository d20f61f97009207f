// Package benchcase builds the benchmark pattern of docs/PERFORMANCE.md,
// shared by the stage benchmarks of several packages: a 10 km square of
// log-normal permeability (reservoir/synth, ln k standard deviation 1.5,
// ranges 1500 x 600 at azimuth 30, seed 3), four rate injectors at the
// quarter points and five BHP producers at the corners and the centre,
// 5000 streamlines, 20 years with a report every 60 days. scripts/perf.sh
// writes the same case as a case file.
package benchcase

import (
	"fmt"
	"math"

	"floodtrace/reservoir"
	"floodtrace/reservoir/synth"
)

// Pattern returns the benchmark pattern on an n x n grid.
func Pattern(n int) (*reservoir.Model, error) {
	dx := 10000 / float64(n)
	perm, poro, err := synth.Generate(synth.Settings{NX: n, NY: n, DX: dx, DY: dx, RangeMajor: 1500, RangeMinor: 600,
		Azimuth: 30, LogMean: math.Log(100), LogStd: 1.5, Seed: 3})
	if err != nil {
		return nil, err
	}
	m := reservoir.NewUniform(n, n, dx, dx, 100, 0.2, 20)
	m.PermEast, m.PermNorth, m.Porosity = perm, perm, poro
	m.Fluids = reservoir.Fluids{WaterViscosity: 0.5, OilViscosity: 2, InitialSw: 0.2}
	m.RelPerm = reservoir.Corey{Swc: 0.2, Sor: 0.25, KrwMax: 0.3, KroMax: 0.85, Nw: 2.5, No: 2}
	m.Run = reservoir.RunSettings{End: 7300, ReportEvery: 60, Snapshots: []float64{7300}, Streamlines: 5000, PressureUpdates: 1}
	for i, xy := range [][2]float64{{2500, 2500}, {7500, 2500}, {2500, 7500}, {7500, 7500}} {
		if err := m.PlaceWell(fmt.Sprintf("I%d", i+1), reservoir.Injector, xy[0], xy[1], reservoir.RateControl, 5000); err != nil {
			return nil, err
		}
	}
	for i, xy := range [][2]float64{{500, 500}, {9500, 500}, {500, 9500}, {9500, 9500}, {5000, 5000}} {
		if err := m.PlaceWell(fmt.Sprintf("P%d", i+1), reservoir.Producer, xy[0], xy[1], reservoir.BHPControl, 500); err != nil {
			return nil, err
		}
	}
	return m, nil
}

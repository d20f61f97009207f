package main

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"testing"

	"floodtrace/reservoir"
	"floodtrace/reservoir/synth"
)

// benchCase writes a synthetic n x n case (log-normal permeability with
// log-standard deviation 1.5, 10 ft cells, four injectors on a regular
// pattern and five producers, 5000 streamlines, one snapshot) into dir and
// returns the path of its case file. The same n gives the same case.
func benchCase(b *testing.B, dir string, n int) string {
	b.Helper()
	dx := 10000.0 / float64(n)
	perm, poro, err := synth.Generate(synth.Settings{NX: n, NY: n, DX: dx, DY: dx, RangeMajor: 1500, RangeMinor: 600,
		Azimuth: 30, LogMean: 4.605170185988092, LogStd: 1.5, Seed: 3})
	if err != nil {
		b.Fatal(err)
	}
	g := reservoir.Grid{NX: n, NY: n, DX: dx, DY: dx}
	for name, v := range map[string][]float64{"perm.asc": perm, "poro.asc": poro} {
		f, err := os.Create(filepath.Join(dir, name))
		if err != nil {
			b.Fatal(err)
		}
		if err := reservoir.WriteASCIIRaster(f, g, v, nil, -9999); err != nil {
			b.Fatal(err)
		}
		if err := f.Close(); err != nil {
			b.Fatal(err)
		}
	}
	yaml := `title: Benchmark pattern
units: field
rock: {perm: perm.asc, porosity: poro.asc, thickness: 20}
fluids: {water_viscosity: 0.5, oil_viscosity: 2.0, initial_water_saturation: 0.2}
relperm:
  corey: {swc: 0.2, sor: 0.25, krw_max: 0.3, kro_max: 0.85, nw: 2.5, no: 2}
wells:
  - {name: I1, type: injector, x: 2500, y: 2500, rate: 5000}
  - {name: I2, type: injector, x: 7500, y: 2500, rate: 5000}
  - {name: I3, type: injector, x: 2500, y: 7500, rate: 5000}
  - {name: I4, type: injector, x: 7500, y: 7500, rate: 5000}
  - {name: P1, type: producer, x: 500, y: 500, bhp: 500}
  - {name: P2, type: producer, x: 9500, y: 500, bhp: 500}
  - {name: P3, type: producer, x: 500, y: 9500, bhp: 500}
  - {name: P4, type: producer, x: 9500, y: 9500, bhp: 500}
  - {name: P5, type: producer, x: 5000, y: 5000, bhp: 500}
run: {end: 7300, report_every: 60, snapshots: [7300], streamlines: 5000}
`
	p := filepath.Join(dir, "case.yaml")
	if err := os.WriteFile(p, []byte(yaml), 0o644); err != nil {
		b.Fatal(err)
	}
	return p
}

// BenchmarkPipeline runs the whole command (read, solve, trace, transport,
// write, one picture) on the benchmark pattern at three sizes. The
// 1000 x 1000 case is skipped under -short.
func BenchmarkPipeline(b *testing.B) {
	for _, n := range []int{100, 300, 1000} {
		b.Run(fmt.Sprintf("%dx%d", n, n), func(b *testing.B) {
			if n >= 1000 && testing.Short() {
				b.Skip("1000 x 1000 under -short")
			}
			dir := b.TempDir()
			cs := benchCase(b, dir, n)
			out := filepath.Join(dir, "out")
			for b.Loop() {
				if code := runMain([]string{"run", cs, "--out", out, "--force", "-q", "--pictures", "minimal"}, io.Discard, os.Stderr); code != 0 {
					b.Fatalf("exit code %d", code)
				}
			}
		})
	}
}

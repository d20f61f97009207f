package flood

import (
	"encoding/csv"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"testing"

	"floodtrace/internal/outdir"
	"floodtrace/reservoir"
	"floodtrace/runfolder"
)

// surfaceCase returns a small invented case in units (field or metric)
// with the fluids line extra added to its fluids block.
func surfaceCase(t *testing.T, units, extra string) *reservoir.Model {
	t.Helper()
	dx, rate, bhp := "50", "500", "1000"
	if units == "metric" {
		dx, rate, bhp = "15", "80", "70"
	}
	text := `title: Orrin surface-volume test
units: ` + units + `
grid: {nx: 12, ny: 6, dx: ` + dx + `, dy: ` + dx + `, origin: [0, 0]}
rock: {perm: 150, porosity: 0.2, thickness: 10}
fluids: {water_viscosity: 0.5, oil_viscosity: 2, initial_water_saturation: 0.2` + extra + `}
relperm:
  corey: {swc: 0.2, sor: 0.25, krw_max: 0.4, kro_max: 0.9, nw: 2, no: 2}
wells:
  - {name: I-1, type: injector, x: 1, y: 1, rate: ` + rate + `}
  - {name: P-1, type: producer, x: ` + dx + `0, y: ` + dx + `, bhp: ` + bhp + `}
run: {end: 1500, report_every: 100, streamlines: 100}
`
	m, err := reservoir.Parse(filepath.Join(t.TempDir(), "case.yaml"), []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// readCSV reads a run-folder CSV: its header and its rows.
func readCSV(t *testing.T, path string) ([]string, [][]string) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	return recs[0], recs[1:]
}

// TestSurfaceColumns: with a formation volume factor in the case, the
// surface columns of wells.csv, producers.csv, field.csv, pairs.csv and
// injectors.csv are the
// reservoir columns divided by the factor (a formation volume factor is
// reservoir volume per surface volume: common practice), the surface
// liquid rate the sum of the surface oil and water rates, and
// summary.json has the surface totals; without one, the headers are the
// plain ones and summary.json has no surface key.
func TestSurfaceColumns(t *testing.T) {
	for _, c := range []struct {
		name, units, extra string
		bo, bw             float64
		surface            bool
	}{
		{"field, both factors", "field", ", oil_fvf: 1.25, water_fvf: 1.02", 1.25, 1.02, true},
		{"metric, oil factor only", "metric", ", oil_fvf: 1.4", 1.4, 1, true},
		{"field, factors of 1 given", "field", ", oil_fvf: 1, water_fvf: 1", 1, 1, true},
		{"no factor", "field", "", 1, 1, false},
	} {
		t.Run(c.name, func(t *testing.T) {
			m := surfaceCase(t, c.units, c.extra)
			r, err := Run(m, Settings{Workers: 1})
			if err != nil {
				t.Fatal(err)
			}
			out := filepath.Join(t.TempDir(), "out")
			d, err := outdir.Open(out, false)
			if err != nil {
				t.Fatal(err)
			}
			if err := r.WriteData(d); err != nil {
				t.Fatal(err)
			}
			if err := r.WriteSummary(d); err != nil {
				t.Fatal(err)
			}
			if err := d.Close(); err != nil {
				t.Fatal(err)
			}
			u := runfolder.SurfaceUnit(c.units)
			for _, f := range []struct {
				file string
				cols []string
			}{{runfolder.WellsFile, runfolder.WellsColumns}, {runfolder.ProducersFile, runfolder.ProducersColumns}, {runfolder.FieldFile, runfolder.FieldColumns},
				{runfolder.PairsFile, runfolder.PairsColumns}, {runfolder.InjectorsFile, runfolder.InjectorsColumns}} {
				head, rows := readCSV(t, filepath.Join(out, f.file))
				if !c.surface {
					if !slices.Equal(head, f.cols) {
						t.Errorf("%s header %v, want %v", f.file, head, f.cols)
					}
					continue
				}
				if !slices.Equal(head, runfolder.WithSurface(f.cols, c.units)) {
					t.Fatalf("%s header %v", f.file, head)
				}
				col := map[string]int{}
				for i, h := range head {
					col[h] = i
				}
				num := func(row []string, name string) float64 {
					v, err := strconv.ParseFloat(row[col[name]], 64)
					if err != nil {
						t.Fatalf("%s %s: %v", f.file, name, err)
					}
					return v
				}
				for _, row := range rows {
					for res, fvf := range map[string]float64{runfolder.ColOilRate: c.bo, runfolder.ColWaterRate: c.bw, runfolder.ColCumOil: c.bo, runfolder.ColCumWater: c.bw,
						runfolder.ColAttributedOilRate: c.bo, runfolder.ColRate: c.bw} {
						if _, ok := col[res]; !ok {
							continue
						}
						sc := runfolder.SurfaceColumn(res, c.units)
						if want, got := num(row, res)/fvf, num(row, sc); math.Abs(got-want) > 1e-9*math.Max(1, math.Abs(want)) {
							t.Errorf("%s %s = %g, want %s / %g = %g", f.file, sc, got, res, fvf, want)
						}
					}
					if f.file == runfolder.WellsFile {
						liq := runfolder.ColLiquidRate + "_" + u + "_day"
						want := num(row, runfolder.ColOilRate+"_"+u+"_day") + num(row, runfolder.ColWaterRate+"_"+u+"_day")
						if got := num(row, liq); math.Abs(got-want) > 1e-9*math.Max(1, want) {
							t.Errorf("%s %s = %g, want %g", f.file, liq, got, want)
						}
					}
				}
			}
			s, err := runfolder.ReadSummary(out)
			if err != nil {
				t.Fatal(err)
			}
			if !c.surface {
				if s.OOIPSurface != nil || s.UnitLabels.SurfaceVolume != "" || s.Producers[0].CumOilSurface != nil || s.Field.FinalCumOilSurface != nil {
					t.Errorf("surface keys without a formation volume factor: %+v", s)
				}
				return
			}
			if s.UnitLabels.SurfaceVolume != u || s.OOIPSurface == nil || math.Abs(float64(*s.OOIPSurface)*c.bo-float64(s.OOIP)) > 1e-9*float64(s.OOIP) {
				t.Errorf("surface_volume %q, ooip_surface %v (ooip %g)", s.UnitLabels.SurfaceVolume, s.OOIPSurface, float64(s.OOIP))
			}
			p, in := s.Producers[0], s.Injectors[0]
			if math.Abs(float64(*p.CumOilSurface)*c.bo-float64(p.CumOil)) > 1e-9*float64(p.CumOil) ||
				math.Abs(float64(*p.CumWaterSurface)*c.bw-float64(p.CumWater)) > 1e-9*math.Max(1, float64(p.CumWater)) ||
				math.Abs(float64(*in.CumWaterSurface)*c.bw-float64(in.CumWater)) > 1e-9*float64(in.CumWater) ||
				math.Abs(float64(*s.Field.FinalCumOilSurface)*c.bo-float64(s.Field.FinalCumOil)) > 1e-9*float64(s.Field.FinalCumOil) {
				t.Errorf("surface totals do not convert: producer %+v injector %+v field %+v", p, in, s.Field)
			}
		})
	}
}

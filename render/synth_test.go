package render

import (
	"floodtrace/runfolder"

	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"floodtrace/reservoir"
)

// synthCase describes the synthetic run folder the tests write: a 60x40
// grid in an invented field, one injector, two producers, a fault, an
// inactive north-east corner, a small unconnected pocket, and a radial
// saturation pattern around the injector. Files follow docs/OUTPUTS.md.
type synthCase struct {
	grid     reservoir.Grid
	inj      [2]int // cell of the injector
	prods    [][2]int
	frontR   func(day float64) float64 // radius of the swept zone, ft
	swi, swf float64
}

func newSynthCase() synthCase {
	return synthCase{
		grid:   reservoir.Grid{NX: 60, NY: 40, DX: 50, DY: 50, X0: 1000, Y0: 2000},
		inj:    [2]int{25, 20},
		prods:  [][2]int{{5, 6}, {50, 8}},
		frontR: func(d float64) float64 { return 320 * math.Sqrt(d/365) },
		swi:    0.2, swf: 0.75,
	}
}

func (c synthCase) active(i, j int) bool {
	g := c.grid
	if (g.NX-1-i)+(g.NY-1-j) < 16 { // north-east corner outside the reservoir
		return false
	}
	return true
}

// pocket cells are active but carry no flow (no pressure, no time of flight).
func (c synthCase) pocket(i, j int) bool { return i >= 2 && i <= 5 && j >= 33 && j <= 36 }

func (c synthCase) dist(i, j int) float64 {
	dx := float64(i-c.inj[0]) * c.grid.DX
	dy := float64(j-c.inj[1]) * c.grid.DY
	return math.Hypot(dx, dy)
}

// sw is the radial saturation at a day: swf inside half the front radius,
// falling to 0.55 at the front, swi beyond.
func (c synthCase) sw(i, j int, day float64) float64 {
	r, R := c.dist(i, j), c.frontR(day)
	switch {
	case r <= 0.5*R:
		return c.swf
	case r <= R:
		return c.swf - (c.swf-0.55)*(r-0.5*R)/(0.5*R)
	}
	return c.swi
}

func (c synthCase) wellXY(ij [2]int) (float64, float64) {
	return c.grid.X0 + (float64(ij[0])+0.5)*c.grid.DX, c.grid.Y0 + (float64(ij[1])+0.5)*c.grid.DY
}

// writeASC writes a raster of f(i,j) (NaN = NODATA) rows north to south.
func (c synthCase) writeASC(t testing.TB, path string, f func(i, j int) float64) {
	t.Helper()
	g := c.grid
	var b strings.Builder
	fmt.Fprintf(&b, "ncols %d\nnrows %d\nxllcorner %g\nyllcorner %g\ncellsize %g\nNODATA_value -9999\n", g.NX, g.NY, g.X0, g.Y0, g.DX)
	for j := g.NY - 1; j >= 0; j-- {
		for i := range g.NX {
			v := math.NaN()
			if c.active(i, j) {
				v = f(i, j)
			}
			if i > 0 {
				b.WriteByte(' ')
			}
			if math.IsNaN(v) {
				b.WriteString("-9999")
			} else {
				fmt.Fprintf(&b, "%.6g", v)
			}
		}
		b.WriteByte('\n')
	}
	must(t, os.WriteFile(path, []byte(b.String()), 0o644))
}

func must(t testing.TB, err error) {
	t.Helper()
	if err != nil {
		t.Fatal(err)
	}
}

var synthSnapshots = []float64{365, 1095, 1825}

// write fills dir with a complete synthetic run.
func (c synthCase) write(t testing.TB, dir string) {
	t.Helper()
	g := c.grid
	must(t, os.MkdirAll(filepath.Join(dir, "frames"), 0o755))
	for _, d := range synthSnapshots {
		c.writeASC(t, filepath.Join(dir, fmt.Sprintf("saturation_%d.asc", int(d))), func(i, j int) float64 { return c.sw(i, j, d) })
	}
	for n := range 12 {
		d := 150 + float64(n)*(1825-150)/11
		d = math.Round(d*10) / 10
		c.writeASC(t, filepath.Join(dir, "frames", "saturation_"+runfolder.DayLabel(d)+".asc"), func(i, j int) float64 { return c.sw(i, j, d) })
	}
	c.writeASC(t, filepath.Join(dir, "pressure.asc"), func(i, j int) float64 {
		if c.pocket(i, j) {
			return math.NaN()
		}
		p := 3000 - 180*math.Log(math.Max(c.dist(i, j), 25)/25)
		for _, pr := range c.prods {
			dx, dy := float64(i-pr[0])*g.DX, float64(j-pr[1])*g.DY
			p += 120 * math.Log(math.Max(math.Hypot(dx, dy), 25)/25)
		}
		return p
	})
	c.writeASC(t, filepath.Join(dir, "tof.asc"), func(i, j int) float64 {
		if c.pocket(i, j) {
			return math.NaN()
		}
		r := c.dist(i, j)
		return 2 + 365*(r/320)*(r/320)
	})
	c.writeASC(t, filepath.Join(dir, "tof_producers.asc"), func(i, j int) float64 { return 100 })
	c.writeASC(t, filepath.Join(dir, "injector_partition.asc"), func(i, j int) float64 {
		if c.pocket(i, j) {
			return 0
		}
		return 1
	})
	c.writeASC(t, filepath.Join(dir, "producer_partition.asc"), func(i, j int) float64 {
		if c.pocket(i, j) {
			return 0
		}
		if i < 28 {
			return 2
		}
		return 3
	})

	// Streamlines: curved paths from the injector to each producer.
	ix, iy := c.wellXY(c.inj)
	var feats []string
	for n := range 80 {
		pr := c.prods[n%2]
		px, py := c.wellXY(pr)
		bend := (float64(n/2)/39 - 0.5) * 1600
		mx, my := (ix+px)/2, (iy+py)/2
		nx, ny := -(py - iy), px-ix
		l := math.Hypot(nx, ny)
		cx, cy := mx+bend*nx/l, my+bend*ny/l
		var pts []string
		for k := 0; k <= 24; k++ {
			s := float64(k) / 24
			x := (1-s)*(1-s)*ix + 2*(1-s)*s*cx + s*s*px
			y := (1-s)*(1-s)*iy + 2*(1-s)*s*cy + s*s*py
			pts = append(pts, fmt.Sprintf("[%.2f,%.2f]", x, y))
		}
		tof := 300 * math.Exp(math.Abs(bend)/400)
		feats = append(feats, fmt.Sprintf(`{"type":"Feature","geometry":{"type":"LineString","coordinates":[%s]},"properties":{"injector":"I-1","producer":"P-%d","flux":%.3f,"tof_days":%.3f}}`,
			strings.Join(pts, ","), n%2+1, 18.75, tof))
	}
	must(t, os.WriteFile(filepath.Join(dir, "streamlines.geojson"),
		[]byte(`{"type":"FeatureCollection","features":[`+strings.Join(feats, ",\n")+"]}\n"), 0o644))

	// Tables.
	pv := 1.2e6
	q := 1500.0
	var prodCSV, fieldCSV, wellsCSV, effCSV strings.Builder
	prodCSV.WriteString("time_days,pvi,well,water_cut,oil_rate,water_rate,cum_oil,cum_water\n")
	fieldCSV.WriteString("time_days,pvi,water_cut,oil_rate,water_rate,cum_oil,cum_water,recovery_factor\n")
	wellsCSV.WriteString("time_days,well,type,control,rate,bhp\n")
	effCSV.WriteString("time_days,well,avg_water_saturation,water_cut\n")
	cum := [2][2]float64{}
	bt := [2]float64{420, 760}
	for d := 30.0; d <= 1825; d += 30 {
		pvi := q * d / pv
		fo, fw, fc := 0.0, 0.0, 0.0
		for k := range 2 {
			wc := 0.0
			if d > bt[k] {
				wc = 0.95 * (1 - math.Exp(-(d-bt[k])/500))
			}
			rate := q / 2
			oil, wat := rate*(1-wc), rate*wc
			cum[k][0] += oil * 30
			cum[k][1] += wat * 30
			fo += oil
			fw += wat
			fc += cum[k][0]
			fmt.Fprintf(&prodCSV, "%g,%.5f,P-%d,%.5f,%.3f,%.3f,%.1f,%.1f\n", d, pvi, k+1, wc, oil, wat, cum[k][0], cum[k][1])
			fmt.Fprintf(&effCSV, "%g,P-%d,%.5f,%.5f\n", d, k+1, 0.2+0.5*(1-math.Exp(-d/(700+300*float64(k)))), wc)
		}
		fmt.Fprintf(&fieldCSV, "%g,%.5f,%.5f,%.3f,%.3f,%.1f,%.1f,%.5f\n", d, pvi, fw/(fo+fw), fo, fw, fc, cum[0][1]+cum[1][1], fc/(pv*0.8))
	}
	for _, d := range []float64{0, 730} {
		fmt.Fprintf(&wellsCSV, "%g,I-1,injector,rate,%g,%g\n", d, q, 4100.0)
		fmt.Fprintf(&wellsCSV, "%g,P-1,producer,bhp,%g,%g\n", d, q/2, 800.0)
		fmt.Fprintf(&wellsCSV, "%g,P-2,producer,bhp,%g,%g\n", d, q/2, 800.0)
	}
	must(t, os.WriteFile(filepath.Join(dir, "producers.csv"), []byte(prodCSV.String()), 0o644))
	must(t, os.WriteFile(filepath.Join(dir, "field.csv"), []byte(fieldCSV.String()), 0o644))
	must(t, os.WriteFile(filepath.Join(dir, "wells.csv"), []byte(wellsCSV.String()), 0o644))
	must(t, os.WriteFile(filepath.Join(dir, "effective_curves.csv"), []byte(effCSV.String()), 0o644))
	must(t, os.WriteFile(filepath.Join(dir, "allocation.csv"), []byte(
		"injector,producer,rate,fraction_of_injector,fraction_of_producer,pore_volume\n"+
			"I-1,P-1,780,0.52,1,610000\nI-1,P-2,720,0.48,1,590000\n"), 0o644))
	var fphi, sweep strings.Builder
	fphi.WriteString("phi,F\n")
	sweep.WriteString("tD,sweep\n")
	for n := 0; n <= 100; n++ {
		phi := float64(n) / 100
		F := 1 - math.Pow(1-phi, 2.2)
		tD := 2 * phi
		fmt.Fprintf(&fphi, "%.4f,%.6f\n", phi, F)
		fmt.Fprintf(&sweep, "%.4f,%.6f\n", tD, math.Min(1, 0.72*math.Sqrt(tD+1e-12)+0.1*tD))
	}
	must(t, os.WriteFile(filepath.Join(dir, "f_phi.csv"), []byte(fphi.String()), 0o644))
	must(t, os.WriteFile(filepath.Join(dir, "sweep.csv"), []byte(sweep.String()), 0o644))

	// summary.json
	ix0, iy0 := c.wellXY(c.inj)
	p1x, p1y := c.wellXY(c.prods[0])
	p2x, p2y := c.wellXY(c.prods[1])
	type m = map[string]any
	snaps := []m{}
	for _, d := range synthSnapshots {
		snaps = append(snaps, m{"time_days": d, "pvi": q * d / pv, "file": fmt.Sprintf("saturation_%d.asc", int(d))})
	}
	lc := 0.375
	sum := m{
		"title": "Quillback Ridge pilot, pattern B", "case_file": "/cases/quillback/pattern_b.yaml", "units": "field",
		"unit_labels": m{"length": "ft", "rate": "bbl/day", "volume": "bbl", "pressure": "psi"},
		"grid":        m{"nx": g.NX, "ny": g.NY, "dx": g.DX, "dy": g.DY, "x0": g.X0, "y0": g.Y0},
		"wells": []m{
			{"name": "I-1", "type": "injector", "x": ix0, "y": iy0, "i": c.inj[0], "j": c.inj[1]},
			{"name": "P-1", "type": "producer", "x": p1x, "y": p1y, "i": c.prods[0][0], "j": c.prods[0][1]},
			{"name": "P-2", "type": "producer", "x": p2x, "y": p2y, "i": c.prods[1][0], "j": c.prods[1][1]},
		},
		"faults": []m{{"name": "F-1", "trace": [][2]float64{{g.X0 + 8*50, g.Y0 + 29*50}, {g.X0 + 34*50, g.Y0 + 37.5*50}}}},
		"engine": "streamline", "end_days": 1825, "pore_volume": pv, "ooip": pv * 0.8,
		"producers": []m{
			{"name": "P-1", "tracer_breakthrough_days": 300, "tracer_breakthrough_pvi": 0.375, "breakthrough_days": bt[0], "breakthrough_pvi": q * bt[0] / pv, "final_water_cut": 0.9, "cum_oil": cum[0][0], "cum_water": cum[0][1]},
			{"name": "P-2", "tracer_breakthrough_days": 520, "tracer_breakthrough_pvi": 0.65, "breakthrough_days": nil, "breakthrough_pvi": nil, "final_water_cut": 0.7, "cum_oil": cum[1][0], "cum_water": cum[1][1]},
		},
		"injectors":          []m{{"name": "I-1", "cum_water": q * 1825, "max_bhp_reached": true}},
		"field":              m{"final_pvi": q * 1825 / pv, "final_recovery_factor": 0.31, "final_water_cut": 0.82},
		"lorenz_coefficient": lc, "mass_balance_error": 2.1e-9, "streamlines": 80,
		"pressure_solver": m{"iterations": 143, "relative_residual": 3.2e-9, "solves": 1},
		"snapshots":       snaps,
		"warnings":        []string{"I-1 reached its maximum BHP of 4200 psi at day 730 and switched to BHP control."},
	}
	b, err := json.MarshalIndent(sum, "", "  ")
	must(t, err)
	must(t, os.WriteFile(filepath.Join(dir, "summary.json"), b, 0o644))
}

// scene returns the synthetic case as a render.Scene.
func (c synthCase) scene() Scene {
	g := c.grid
	act := make([]bool, g.N())
	for k := range act {
		i, j := g.IJ(k)
		act[k] = c.active(i, j)
	}
	ix, iy := c.wellXY(c.inj)
	s := Scene{Title: "Quillback Ridge pilot", Subtitle: "test", Grid: g, Active: act, LengthUnit: "ft",
		Wells: []WellMark{{Name: "I-1", X: ix, Y: iy, Injector: true}}}
	for n, p := range c.prods {
		x, y := c.wellXY(p)
		s.Wells = append(s.Wells, WellMark{Name: fmt.Sprintf("P-%d", n+1), X: x, Y: y})
	}
	s.Faults = [][][2]float64{{{g.X0 + 8*50, g.Y0 + 29*50}, {g.X0 + 34*50, g.Y0 + 37.5*50}}}
	s.FaultNames = []string{"F-1"}
	return s
}

func (c synthCase) satValues(day float64) []float64 {
	g := c.grid
	v := make([]float64, g.N())
	for k := range v {
		i, j := g.IJ(k)
		v[k] = c.sw(i, j, day)
		if !c.active(i, j) {
			v[k] = math.NaN()
		}
	}
	return v
}

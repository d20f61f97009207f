// Command vardelhistory writes the invented production history of the
// demo case, examples/vardel/history.csv (and the same file for its GIS
// variant, examples/vardel-gis/history.csv).
//
// The history is invented: no field produced it. It is the demo case run
// on a perturbed permeability map (the "truth", which the demo's own map
// then fails to match in places), with noise on the monthly volumes:
//
//   - the permeability of the demo map is multiplied by 5 in a streak 200
//     ft wide from INJ-2 to PRD-3 (PRD-3 sees water years before the
//     demo model predicts) and by 0.3 in a band 300 ft wide across the
//     path from INJ-1 to PRD-2, 500 ft from PRD-2 (PRD-2 sees water later);
//     the other producers are left to the map and match roughly;
//   - the truth run uses the case's own controls (injectors on rate,
//     producers on their BHP) for eight years from start_date, reported
//     daily, and the volumes of each calendar month are summed;
//   - each monthly volume is converted to surface volumes (the case's
//     formation volume factors) and given noise: the liquid volume is
//     multiplied by 1 + 0.01 N, the water cut moved by 0.01 N (clipped to
//     [0, 1]) once water has arrived, the injected volume multiplied by 1
//   - 0.01 N, and the BHP moved by 15 psi N, N a standard normal
//     number from a PCG generator with a fixed seed (so the file is the
//     same on every run). The noise is kept small so that the grouping of
//     the history's periods (flood.HistoryTolerance) still merges
//     months and the demo stays fast;
//   - values are written to 0.1 bbl and 0.1 psi.
//
// Run it from the repository root:
//
//	go run ./scripts/vardelhistory
//
// It reads examples/vardel/case.yaml (without its history key).
package main

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"time"

	"floodtrace/flood"
	"floodtrace/reservoir"
)

const (
	caseFile = "examples/vardel/case.yaml"
	years    = 8
	seed     = 15
)

func main() {
	if err := run(); err != nil {
		fmt.Fprintln(os.Stderr, "vardelhistory:", err)
		os.Exit(1)
	}
}

// distToSegment returns the distance from (x, y) to the segment from a to b.
func distToSegment(x, y float64, a, b [2]float64) float64 {
	dx, dy := b[0]-a[0], b[1]-a[1]
	t := ((x-a[0])*dx + (y-a[1])*dy) / (dx*dx + dy*dy)
	t = math.Max(0, math.Min(1, t))
	px, py := a[0]+t*dx, a[1]+t*dy
	return math.Hypot(x-px, y-py)
}

// perturb changes the permeability of m into the invented truth.
func perturb(m *reservoir.Model) {
	at := func(name string) [2]float64 {
		w := m.Wells[m.WellIndex(name)]
		return [2]float64{w.X, w.Y}
	}
	inj1, inj2, prd2, prd3 := at("INJ-1"), at("INJ-2"), at("PRD-2"), at("PRD-3")
	// The band across INJ-1 -> PRD-2, centred 500 ft from PRD-2.
	ux, uy := inj1[0]-prd2[0], inj1[1]-prd2[1]
	l := math.Hypot(ux, uy)
	ux, uy = ux/l, uy/l
	cx, cy := prd2[0]+500*ux, prd2[1]+500*uy
	for k := range m.PermEast {
		x, y := m.Grid.Center(k)
		f := 1.0
		if distToSegment(x, y, inj2, prd3) < 100 {
			f = 5
		}
		// Distance along the INJ-1 -> PRD-2 direction from the band's
		// centre line, within 600 ft of the path.
		along := (x-cx)*ux + (y-cy)*uy
		if math.Abs(along) < 150 && distToSegment(x, y, inj1, prd2) < 600 {
			f = 0.3
		}
		m.PermEast[k] *= f
		m.PermNorth[k] *= f
	}
}

func run() error {
	b, err := os.ReadFile(caseFile)
	if err != nil {
		return err
	}
	var lines []string
	for _, l := range strings.Split(string(b), "\n") {
		if !strings.HasPrefix(l, "history:") {
			lines = append(lines, l)
		}
	}
	m, err := reservoir.Parse(caseFile, []byte(strings.Join(lines, "\n")))
	if err != nil {
		return err
	}
	if m.StartDate.IsZero() {
		return fmt.Errorf("%s: no start_date", caseFile)
	}
	start := m.StartDate
	stop := start.AddDate(years, 0, 0)
	end := stop.Sub(start).Hours() / 24
	perturb(m)
	m.Run.End = end
	m.Run.ReportEvery = 1
	m.Run.Snapshots = nil
	res, err := flood.Run(m, flood.Settings{Workers: 1})
	if err != nil {
		return err
	}
	// The truth's average reservoir pressure (pore-volume weighted), the
	// invented "pressure survey" given as history.pressure_datum.
	sum, pv := 0.0, 0.0
	for k, p := range res.Pressure.P {
		if m.Active[k] && !math.IsNaN(p) {
			sum += m.PoreVolume(k) * p
			pv += m.PoreVolume(k)
		}
	}
	fmt.Printf("average reservoir pressure of the truth: %.1f\n", sum/pv)
	at := func(day float64) int {
		for k, t := range res.Times {
			if math.Abs(t-day) < 1e-6 {
				return k
			}
		}
		return -1
	}
	bo, bw := m.Fluids.Bo(), m.Fluids.Bw()
	rng := rand.New(rand.NewPCG(seed, seed))
	var out strings.Builder
	out.WriteString("well,date,oil,water,injected,bhp\n")
	prevO := make([]float64, len(res.Producers))
	prevW := make([]float64, len(res.Producers))
	for d := start.AddDate(0, 1, 0); !d.After(stop); d = d.AddDate(0, 1, 0) {
		day := d.Sub(start).Hours() / 24
		prevDay := d.AddDate(0, -1, 0).Sub(start).Hours() / 24
		k := at(day)
		if k < 0 {
			return fmt.Errorf("no report on day %g", day)
		}
		label := d.AddDate(0, 0, -1).Format(time.DateOnly)
		for _, w := range m.Wells {
			if w.Type != reservoir.Injector {
				continue
			}
			var rate, bhp float64
			for _, x := range res.WellLog {
				if x.Well == w.Name && x.Time <= prevDay {
					rate, bhp = x.Rate, x.BHP
				}
			}
			inj := rate * (day - prevDay) / bw * (1 + 0.01*rng.NormFloat64())
			fmt.Fprintf(&out, "%s,%s,,,%.1f,%.1f\n", w.Name, label, inj, bhp+15*rng.NormFloat64())
		}
		for p, pr := range res.Producers {
			o := (pr.CumOil[k] - prevO[p]) / bo
			wv := (pr.CumWater[k] - prevW[p]) / bw
			prevO[p], prevW[p] = pr.CumOil[k], pr.CumWater[k]
			liq := (o + wv) * (1 + 0.01*rng.NormFloat64())
			wc := wv / (o + wv)
			if wc > 1e-3 {
				wc = math.Max(0, math.Min(1, wc+0.01*rng.NormFloat64()))
			} else {
				wc = 0
			}
			bhp := m.Wells[pr.Well].BHP + 15*rng.NormFloat64()
			fmt.Fprintf(&out, "%s,%s,%.1f,%.1f,,%.1f\n", pr.Name, label, liq*(1-wc), liq*wc, bhp)
		}
	}
	for _, dir := range []string{"examples/vardel", "examples/vardel-gis"} {
		path := filepath.Join(dir, "history.csv")
		if err := os.WriteFile(path, []byte(out.String()), 0o644); err != nil {
			return err
		}
		fmt.Println("wrote", path)
	}
	return nil
}

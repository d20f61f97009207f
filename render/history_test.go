package render

import (
	"bytes"
	"encoding/json"
	"fmt"
	"image"
	"image/color"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strings"
	"testing"
	"time"

	"floodtrace/flood"
	"floodtrace/internal/outdir"
	"floodtrace/reservoir"
	"floodtrace/runfolder"
)

// historyCaseText is a small invented case: one injector in the south-west
// corner, a producer north of it (P-N), one east (P-E), one far (P-F) and
// one opened after the history (P-X). extra is added at the top level.
func historyCaseText(rock, extra string) string {
	return `title: Histpics test
units: field
start_date: 2020-01-01
grid: {nx: 20, ny: 10, dx: 50, dy: 50, origin: [0, 0]}
rock: {` + rock + `, porosity: 0.22, thickness: 30}
fluids: {water_viscosity: 0.5, oil_viscosity: 2, initial_water_saturation: 0.2}
relperm:
  corey: {swc: 0.2, sor: 0.25, krw_max: 0.4, kro_max: 0.9, nw: 2, no: 2}
wells:
  - {name: I-1, type: injector, x: 75, y: 75, rate: 600, max_bhp: 9000}
  - {name: P-N, type: producer, x: 75, y: 475, rate: 200, min_bhp: 50}
  - {name: P-E, type: producer, x: 475, y: 75, rate: 200, min_bhp: 50}
  - {name: P-F, type: producer, x: 925, y: 425, rate: 200, min_bhp: 50}
  - {name: P-X, type: producer, x: 925, y: 75, rate: 100, min_bhp: 50, open: 1200}
schedule:
  - {time: 1200, well: I-1, rate: 700}
` + extra
}

func loadCase(t *testing.T, dir, text string) *reservoir.Model {
	t.Helper()
	p := filepath.Join(dir, "case.yaml")
	must(t, os.WriteFile(p, []byte(text), 0o644))
	m, err := reservoir.Load(p)
	must(t, err)
	return m
}

// historyRun makes a run folder with a history: the "observed" history is
// the monthly volumes of a run of the same wells in an anisotropic
// reservoir (perm_y three times perm), so that in the isotropic model the
// north producer's water comes late and the east producer's early. The
// folder is written and not yet rendered.
func historyRun(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	a, err := flood.Run(loadCase(t, dir, historyCaseText("perm: 200, perm_y: 600", "run: {end: 1096, report_every: 1, streamlines: 200}\n")), flood.Settings{Workers: 1})
	must(t, err)
	var b strings.Builder
	b.WriteString("well,date,oil,water,injected,bhp\n")
	start := time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC)
	prev := map[string][2]float64{}
	prevT := 0.0
	for k, day := range a.Times {
		// Month ends: the report whose next day is the first of a month.
		next := start.AddDate(0, 0, int(day))
		if day != math.Trunc(day) || next.Day() != 1 || day == 0 {
			continue
		}
		date := next.AddDate(0, 0, -1).Format(time.DateOnly)
		for _, p := range a.Producers {
			if p.Name == "P-X" {
				continue
			}
			o, w := p.CumOil[k]-prev[p.Name][0], p.CumWater[k]-prev[p.Name][1]
			prev[p.Name] = [2]float64{p.CumOil[k], p.CumWater[k]}
			fmt.Fprintf(&b, "%s,%s,%.3f,%.3f,,\n", p.Name, date, math.Max(o, 0), math.Max(w, 0))
		}
		fmt.Fprintf(&b, "I-1,%s,,,%.3f,\n", date, 600*(day-prevT))
		prevT = day
	}
	must(t, os.WriteFile(filepath.Join(dir, "history.csv"), []byte(b.String()), 0o644))
	m := loadCase(t, dir, historyCaseText("perm: 200", "history: {file: history.csv}\nrun: {end: 1461, report_every: 30, streamlines: 200}\n"))
	r, err := flood.Run(m, flood.Settings{Workers: 1})
	must(t, err)
	out := filepath.Join(dir, "out")
	d, err := outdir.Open(out, false)
	must(t, err)
	must(t, r.WriteData(d))
	must(t, r.WriteSummary(d))
	must(t, d.Close())
	return out
}

// nearRGB reports whether two colours differ by at most tol in each channel.
func nearRGB(a, b color.RGBA, tol int) bool {
	d := func(x, y uint8) int { return int(math.Abs(float64(x) - float64(y))) }
	return d(a.R, b.R) <= tol && d(a.G, b.G) <= tol && d(a.B, b.B) <= tol
}

// countNear counts the pixels of the picture at path within r that are
// within tol of col.
func countNear(t *testing.T, path string, col color.RGBA, tol int, rects ...[4]int) []int {
	img := decodePNG(t, path)
	out := make([]int, len(rects))
	for i, r := range rects {
		for y := r[1]; y < r[3]; y++ {
			for x := r[0]; x < r[2]; x++ {
				cr, cg, cb, _ := img.At(x, y).RGBA()
				if nearRGB(color.RGBA{uint8(cr >> 8), uint8(cg >> 8), uint8(cb >> 8), 255}, col, tol) {
					out[i]++
				}
			}
		}
	}
	return out
}

func TestHistoryPictures(t *testing.T) {
	dir := historyRun(t)
	const w, h = 960, 540
	rep, err := Run(dir, Options{Width: w, Height: h, Frames: runfolder.FramesNone})
	must(t, err)
	for _, f := range []string{"charts/history_water_cut.png", "maps/breakthrough_error.png", "charts/water_cut.png", "report.html"} {
		if !slices.Contains(rep.Files, f) {
			t.Fatalf("%s not drawn (files %v, notes %v)", f, rep.Files, rep.Notes)
		}
	}
	sum, err := runfolder.ReadSummary(dir)
	must(t, err)
	hw := map[string]runfolder.HistoryWell{}
	for _, x := range sum.History.Wells {
		hw[x.Name] = x
	}
	// The case makes P-N late and P-E early (perm_y > perm in the
	// "observed" reservoir); the test is about the map, so check the case
	// does what it is meant to first.
	late, early := hw["P-N"].BreakthroughErrorDays, hw["P-E"].BreakthroughErrorDays
	if late == nil || early == nil || !(*late > 0) || !(*early < 0) {
		t.Fatalf("breakthrough errors P-N %v, P-E %v: want late and early", late, early)
	}

	t.Run("small multiples: one panel per producer with history", func(t *testing.T) {
		// P-X has no history rows: three panels, the fourth place of a
		// 2x2 grid is empty.
		rects := smallMultiplesGrid(3, w, h)
		if rects[1].Min.Y != rects[0].Min.Y || rects[2].Min.Y == rects[0].Min.Y {
			t.Fatalf("grid %v: want two panels in the first row", rects)
		}
		fourth := rects[2].Add(image.Pt(rects[1].Min.X-rects[0].Min.X, 0))
		var rs [][4]int
		for _, r := range append(rects, fourth) {
			rs = append(rs, [4]int{r.Min.X, r.Min.Y, r.Max.X, r.Max.Y})
		}
		p := filepath.Join(dir, "charts/history_water_cut.png")
		dots := countNear(t, p, smObservedColor, 12, rs...)
		lines := countNear(t, p, smModelColor, 12, rs...)
		for i := range 3 {
			if dots[i] < 100 || lines[i] < 100 {
				t.Errorf("panel %d: %d observed-dot pixels, %d model-line pixels: want a drawn panel", i, dots[i], lines[i])
			}
		}
		if dots[3] != 0 || lines[3] != 0 {
			t.Errorf("fourth place: %d dot and %d line pixels, want none (P-X has no history)", dots[3], lines[3])
		}
	})

	t.Run("error map colours", func(t *testing.T) {
		l, err := NewLayout(sum.Grid.Reservoir(), w, h)
		must(t, err)
		var errs []float64
		for _, x := range sum.History.Wells {
			if x.Type == "producer" && x.BreakthroughErrorDays != nil {
				errs = append(errs, *x.BreakthroughErrorDays)
			}
		}
		sc := errorScale(errs)
		img := decodePNG(t, filepath.Join(dir, "maps/breakthrough_error.png"))
		for _, c := range []struct {
			well string
			x, y float64
			err  float64
		}{{"P-N", 75, 475, *late}, {"P-E", 475, 75, *early}} {
			px, py := l.ToPixel(c.x, c.y)
			// The lower-left corner of the square, clear of the well
			// symbol and of its name.
			half := 30 * l.S
			cr, cg, cb, _ := img.At(int(px-0.7*half), int(py+0.7*half)).RGBA()
			got := color.RGBA{uint8(cr >> 8), uint8(cg >> 8), uint8(cb >> 8), 255}
			want := BreakthroughErrorColors.At(sc.T(c.err))
			if !nearRGB(got, want, 3) {
				t.Errorf("%s (error %g days): pixel %v, want %v", c.well, c.err, got, want)
			}
			// Orange (red above blue) for early, purple (blue above red) for late.
			if (c.err > 0) != (got.B > got.R) {
				t.Errorf("%s (error %g days): pixel %v has the wrong side of the scale", c.well, c.err, got)
			}
		}
	})

	t.Run("report", func(t *testing.T) {
		b, err := os.ReadFile(filepath.Join(dir, "report.html"))
		must(t, err)
		s := string(b)
		if !strings.Contains(s, "Model against history") {
			t.Fatal("report has no history section")
		}
		for _, n := range []string{"P-N", "P-E", "P-F"} {
			x := hw[n]
			row := fmt.Sprintf("<td><b>%s</b></td><td>producer</td><td class=\"n\">%s</td><td class=\"n\">%s</td><td class=\"n\">%s</td><td class=\"n\">%s</td>",
				n, x.ObservedBreakthroughDate, x.ModelBreakthroughDate, signedDays(*x.BreakthroughErrorDays), FormatNumber(*x.WaterCutRMS, 3))
			if !strings.Contains(s, row) {
				t.Errorf("report lacks the row of %s: %s", n, row)
			}
		}
		if !strings.Contains(s, "(2020-01-01 to "+sum.EndDate+")") {
			t.Errorf("report does not give the run's dates")
		}
	})
}

// TestHistoryLeavesOtherPictures: the history changes only the producer
// charts over time and adds its two pictures; with the history taken out
// of the folder (match.csv and summary.json's history object), every other
// picture is the same byte for byte, and the files are those of a run
// without history. The pictures
// are drawn in parallel: one core and three give the same bytes.
func TestHistoryLeavesOtherPictures(t *testing.T) {
	dir := historyRun(t)
	plain := t.TempDir()
	must(t, os.CopyFS(plain, os.DirFS(dir)))
	must(t, os.Remove(filepath.Join(plain, runfolder.MatchFile)))
	b, err := os.ReadFile(filepath.Join(dir, runfolder.SummaryFile))
	must(t, err)
	var m map[string]any
	must(t, json.Unmarshal(b, &m))
	delete(m, "history")
	b, err = json.Marshal(m)
	must(t, err)
	must(t, os.WriteFile(filepath.Join(plain, runfolder.SummaryFile), b, 0o644))
	opt := Options{Width: 640, Height: 360, Frames: runfolder.FramesNone}
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(0))
	runtime.GOMAXPROCS(1)
	a, err := Run(dir, opt)
	must(t, err)
	p, err := Run(plain, opt)
	must(t, err)
	changed := []string{"charts/water_cut.png", "charts/oil_rate.png", "charts/cumulative_oil.png", "report.html"}
	added := []string{"charts/history_water_cut.png", "maps/breakthrough_error.png"}
	var want []string
	for _, f := range a.Files {
		if !slices.Contains(added, f) {
			want = append(want, f)
		}
	}
	if !slices.Equal(p.Files, want) {
		t.Fatalf("files without history %v, want %v", p.Files, want)
	}
	for _, f := range p.Files {
		x, err := os.ReadFile(filepath.Join(dir, f))
		must(t, err)
		y, err := os.ReadFile(filepath.Join(plain, f))
		must(t, err)
		if same := bytes.Equal(x, y); same == slices.Contains(changed, f) {
			t.Errorf("%s: same bytes with and without history: %v", f, same)
		}
	}
	runtime.GOMAXPROCS(3)
	again := t.TempDir()
	must(t, os.CopyFS(again, os.DirFS(dir)))
	c, err := Run(again, opt)
	must(t, err)
	if !slices.Equal(a.Files, c.Files) {
		t.Fatalf("files %v on 3 cores, %v on 1", c.Files, a.Files)
	}
	for _, f := range a.Files {
		x, _ := os.ReadFile(filepath.Join(dir, f))
		y, _ := os.ReadFile(filepath.Join(again, f))
		if !bytes.Equal(x, y) {
			t.Errorf("%s differs between 1 and 3 cores", f)
		}
	}
}

// TestDateTicks: ticks of a date axis fall on the first days of months or
// years, counted in the Gregorian calendar (common practice): 2020 is a
// leap year, so 2020-03-01 is day 60 and 2021-01-01 day 366 from
// 2020-01-01.
func TestDateTicks(t *testing.T) {
	dt, err := newDateTicker("2020-01-01")
	must(t, err)
	for _, c := range []struct {
		name   string
		lo, hi float64
		values []float64
		labels []string
	}{
		{"a leap year, every two months", 0, 366, []float64{0, 60, 121, 182, 244, 305, 366},
			[]string{"2020-01", "2020-03", "2020-05", "2020-07", "2020-09", "2020-11", "2021-01"}},
		{"four years, yearly", 0, 1461, []float64{0, 366, 731, 1096, 1461},
			[]string{"2020", "2021", "2022", "2023", "2024"}},
		{"four months, monthly from February", 40, 160, []float64{60, 91, 121, 152},
			[]string{"2020-03", "2020-04", "2020-05", "2020-06"}},
		{"twenty years, every five", 0, 7305, []float64{0, 1827, 3653, 5479, 7305},
			[]string{"2020", "2025", "2030", "2035", "2040"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			var vs []float64
			var ls []string
			for _, tk := range dt.Ticks(c.lo, c.hi) {
				vs, ls = append(vs, tk.Value), append(ls, tk.Label)
			}
			if !slices.Equal(vs, c.values) || !slices.Equal(ls, c.labels) {
				t.Errorf("ticks %v %v, want %v %v", vs, ls, c.values, c.labels)
			}
		})
	}
	if _, err := newDateTicker("2020-13-01"); err == nil {
		t.Error("a bad start date is accepted")
	}
}

// TestHistoryFVF: match.csv holds surface volumes, producers.csv
// reservoir ones; the factors come from summary.json (here 1.25 and
// 1.02, invented) and the observed values are turned into reservoir
// volumes with them: the reservoir water cut qw Bw / (qo Bo + qw Bw) (the
// definition of the formation volume factor, common practice).
func TestHistoryFVF(t *testing.T) {
	const bo, bw = 1.25, 1.02
	nan := math.NaN()
	d := &histData{bo: 1, bw: 1, rows: map[string][]runfolder.MatchRow{
		"P-1": {{Well: "P-1", Time: 30, ModCumOil: 3000 / bo, ModCumWater: 0, ObsOilRate: 100, ObsWaterRate: 0, ObsWaterCut: 0, ObsCumOil: 3000},
			{Well: "P-1", Time: 61, ModCumOil: 5000 / bo, ModCumWater: 1000 / bw, ObsOilRate: 60, ObsWaterRate: 40, ObsWaterCut: 0.4, ObsCumOil: 4860}},
		"P-2": {{Well: "P-2", Time: 30, ModCumOil: 20 / bo, ModCumWater: nan, ObsOilRate: nan}},
	}, starts: map[string][]float64{"P-1": {0, 30}, "P-2": {0}}}
	d.setFVF(&runfolder.Summary{})
	if d.bo != 1 || d.bw != 1 {
		t.Fatalf("factors without them in the summary %g, %g, want 1, 1", d.bo, d.bw)
	}
	fo, fw := runfolder.Float(bo), runfolder.Float(bw)
	d.setFVF(&runfolder.Summary{OilFVF: &fo, WaterFVF: &fw})
	if d.bo != bo || d.bw != bw {
		t.Fatalf("factors %g, %g, want %g, %g", d.bo, d.bw, bo, bw)
	}
	x, y := d.observed("P-1", "water_cut")
	want := 40 * bw / (60*bo + 40*bw)
	if len(x) != 2 || x[1] != 45.5 || math.Abs(y[1]-want) > 1e-12 || y[0] != 0 {
		t.Errorf("water cut at %v: %v, want %g at 45.5", x, y, want)
	}
	x, y = d.observed("P-1", "cum_oil")
	if x[1] != 61 || math.Abs(y[1]-4860*bo) > 1e-9 {
		t.Errorf("cumulative oil at %v: %v, want %g at 61", x, y, 4860*bo)
	}
}

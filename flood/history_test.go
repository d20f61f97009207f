package flood

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"floodtrace/internal/outdir"
	"floodtrace/reservoir"
	"floodtrace/runfolder"
)

// historyCase is a small two-well case (invented) whose producer is
// rate-controlled with rate changes at month ends, pressure solves at
// every month end of 2020 and 2021 (leap year first), daily reports. extra
// is added at the top level; the case is written to dir.
func historyCase(t *testing.T, dir, extra string) *reservoir.Model {
	t.Helper()
	var ends []string
	for _, d := range monthEnds(24) {
		ends = append(ends, fmt.Sprint(d))
	}
	text := `title: Tessaly history test
units: field
grid: {nx: 20, ny: 10, dx: 50, dy: 50, origin: [0, 0]}
rock: {perm: 200, porosity: 0.22, thickness: 30}
fluids: {water_viscosity: 0.5, oil_viscosity: 2, initial_water_saturation: 0.2, oil_fvf: 1.25, water_fvf: 1.02}
relperm:
  corey: {swc: 0.2, sor: 0.25, krw_max: 0.4, kro_max: 0.9, nw: 2, no: 2}
wells:
  - {name: I-1, type: injector, x: 75, y: 75, rate: 600, max_bhp: 9000}
  - {name: P-1, type: producer, x: 925, y: 425, rate: 600, min_bhp: 50}
schedule:
  - {time: 152, well: P-1, rate: 500}
  - {time: 152, well: I-1, rate: 500}
  - {time: 366, well: P-1, rate: 700}
  - {time: 366, well: I-1, rate: 700}
run: {end: 731, report_every: 1, streamlines: 200, update_times: [` + strings.Join(ends[:len(ends)-1], ", ") + `]}
` + extra
	path := filepath.Join(dir, "case.yaml")
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	m, err := reservoir.Load(path)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// monthEnds returns the day numbers (from 2020-01-01 = day 0) of the
// ends of the first n months of 2020 and 2021: the end of 2020-01-31 is
// day 31, of 2020-02-29 day 60 (Gregorian calendar, common practice).
func monthEnds(n int) []float64 {
	days := []int{31, 29, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31, 31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31}
	var out []float64
	d := 0
	for k := 0; k < n; k++ {
		d += days[k]
		out = append(out, float64(d))
	}
	return out
}

// monthEndDates returns the dates of monthEnds.
func monthEndDates(n int) []string {
	last := []int{31, 29, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31, 31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31}
	var out []string
	for k := 0; k < n; k++ {
		out = append(out, fmt.Sprintf("%d-%02d-%02d", 2020+k/12, k%12+1, last[k]))
	}
	return out
}

// historyFromRun writes the per-period surface volumes of run r (its
// daily reports) over the month ends as a history file, the period end
// given by day number or by date.
func historyFromRun(t *testing.T, r *Result, path string, n int, dates bool) {
	t.Helper()
	m := r.Model
	bo, bw := m.Fluids.Bo(), m.Fluids.Bw()
	var b strings.Builder
	col := "day"
	if dates {
		col = "date"
	}
	fmt.Fprintf(&b, "well,%s,oil,water,injected,bhp\n", col)
	ends, names := monthEnds(n), monthEndDates(n)
	at := func(day float64) int { // report index of day
		for k, tt := range r.Times {
			if math.Abs(tt-day) < 1e-9 {
				return k
			}
		}
		t.Fatalf("no report on day %g", day)
		return -1
	}
	prevO, prevW, prevT := 0.0, 0.0, 0.0
	p := r.Producers[0]
	for k, e := range ends {
		i := at(e)
		label := fmt.Sprint(e)
		if dates {
			label = names[k]
		}
		o, w := p.CumOil[i]-prevO, p.CumWater[i]-prevW
		prevO, prevW = p.CumOil[i], p.CumWater[i]
		// The injector injects its rate of the solve in force.
		inj := 0.0
		for _, x := range r.WellLog {
			if x.Well == "I-1" && x.Time == prevT {
				inj = x.Rate * (e - prevT)
			}
		}
		prevT = e
		fmt.Fprintf(&b, "P-1,%s,%.10g,%.10g,,\nI-1,%s,,,%.10g,\n", label, o/bo, w/bw, label, inj/bw)
	}
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
}

// TestHistoryReproducesRun: a history written from a run's own per-period
// volumes, fed back with drive: rates, gives the same water cuts and
// cumulative volumes within the grouping tolerance, and the rates in force
// (wells.csv) are the history's period by period. A self-consistency
// check: the model must reproduce its own output (common practice for
// history-matching codes).
func TestHistoryReproducesRun(t *testing.T) {
	dir := t.TempDir()
	base := historyCase(t, dir, "start_date: 2020-01-01\n")
	a, err := Run(base, Settings{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	historyFromRun(t, a, filepath.Join(dir, "history.csv"), 24, true)
	m := historyCase(t, dir, "start_date: 2020-01-01\nhistory: {file: history.csv}\n")
	b, err := Run(m, Settings{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	h := b.History
	if h == nil || h.Rows != 48 || h.End != 731 {
		t.Fatalf("history %+v", h)
	}
	// Three rates (600, 500, 700) in both wells: three groups; the case's
	// 24 monthly update times are kept.
	if h.Groups != 3 || h.Solves != 24 {
		t.Errorf("%d groups, %d solves; want 3 and 24", h.Groups, h.Solves)
	}
	pa, pb := a.Producers[0], b.Producers[0]
	worstWC, worstCum := 0.0, 0.0
	for k := range a.Times {
		worstWC = math.Max(worstWC, math.Abs(pa.WaterCut[k]-pb.WaterCut[k]))
		la, lb := pa.CumOil[k]+pa.CumWater[k], pb.CumOil[k]+pb.CumWater[k]
		if la > 0 {
			worstCum = math.Max(worstCum, math.Abs(la-lb)/la)
		}
	}
	t.Logf("largest water-cut difference %.3g, cumulative liquid %.3g (relative)", worstWC, worstCum)
	// Measured: 2e-10 and 1e-11 (rounding of the history's ten digits):
	// the rates are the observed ones exactly.
	if worstWC > 1e-8 || worstCum > 1e-9 {
		t.Errorf("water cut differs by %g, cumulative liquid by %g", worstWC, worstCum)
	}
	// Cumulative water and oil at the end within the tolerance.
	last := len(a.Times) - 1
	for _, c := range [][2]float64{{pa.CumOil[last], pb.CumOil[last]}, {pa.CumWater[last], pb.CumWater[last]}} {
		if math.Abs(c[0]-c[1]) > HistoryTolerance*c[0] {
			t.Errorf("cumulative %g, want %g", c[1], c[0])
		}
	}
	// The rate in force over each period is the observed one.
	spans := wellSpans(b)
	for _, row := range m.History.Rows {
		vol, _, lim := integrate(spans[row.Well], row.Start, row.End)
		obs := nz(row.Oil)*m.Fluids.Bo() + nz(row.Water)*m.Fluids.Bw() + nz(row.Injected)*m.Fluids.Bw()
		if lim || math.Abs(vol-obs) > 1e-6*obs {
			t.Errorf("%s day %g-%g: model %g, observed %g (limit %v)", row.Well, row.Start, row.End, vol, obs, lim)
		}
	}
	for _, x := range b.WellRates() {
		if x.End || x.Time >= h.End {
			continue
		}
		want := 600.0 // the rates of the run the history was taken from
		switch {
		case x.Time >= 366:
			want = 700
		case x.Time >= 152:
			want = 500
		}
		if math.Abs(x.Rate-want) > 1e-6*want {
			t.Errorf("wells.csv %s day %g: rate %g, want %g", x.Well, x.Time, x.Rate, want)
		}
	}
	// match.csv: the model's surface water cut equals the observed.
	for _, mr := range h.Match {
		if mr.Injector {
			continue
		}
		if d := math.Abs(mr.ObsWaterCut - mr.ModWaterCut); d > HistoryTolerance {
			t.Errorf("day %g: observed water cut %g, model %g", mr.End, mr.ObsWaterCut, mr.ModWaterCut)
		}
	}
	if w := h.Wells; len(w) != 2 || math.Abs(w[1].CumOilError) > HistoryTolerance {
		t.Errorf("wells %+v", w)
	}
}

// TestHistoryDatesAndDays: the same history given by dates (month ends,
// a leap February, periods of 28 to 31 days) and by day numbers, with
// event times as dates or numbers, gives identical runs.
func TestHistoryDatesAndDays(t *testing.T) {
	dir := t.TempDir()
	base := historyCase(t, dir, "start_date: 2020-01-01\n")
	a, err := Run(base, Settings{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	d1, d2 := filepath.Join(dir, "days"), filepath.Join(dir, "dates")
	for _, d := range []string{d1, d2} {
		if err := os.Mkdir(d, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	historyFromRun(t, a, filepath.Join(d1, "history.csv"), 18, false)
	historyFromRun(t, a, filepath.Join(d2, "history.csv"), 18, true)
	m1 := historyCase(t, d1, "history: {file: history.csv}\n")
	m2 := historyCase(t, d2, "start_date: 2020-01-01\nhistory: {file: history.csv}\n")
	if !rowsEqual(m1.History.Rows, m2.History.Rows) {
		t.Fatalf("the rows by date and by day differ: %+v\n%+v", m1.History.Rows[:3], m2.History.Rows[:3])
	}
	r1, err := Run(m1, Settings{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	r2, err := Run(m2, Settings{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	for k := range r1.Times {
		if r1.Producers[0].CumWater[k] != r2.Producers[0].CumWater[k] || r1.Producers[0].CumOil[k] != r2.Producers[0].CumOil[k] {
			t.Fatalf("day %g: the runs differ", r1.Times[k])
		}
	}
	// After the history (day 547, 2021-06-30) the case's controls (700)
	// take over: the forecast.
	if h := r1.History.End; h != 547 {
		t.Errorf("history ends on day %g, want 547", h)
	}
	for _, x := range r1.WellRates() {
		if x.Time > 547 && !x.End && math.Abs(x.Rate-700) > 1e-6 {
			t.Errorf("forecast: %s at day %g has rate %g, want the case's 700", x.Well, x.Time, x.Rate)
		}
	}
	if got := r2.Model.Date(547); got != "2021-07-01" {
		t.Errorf("day 547 is %s", got)
	}
	if got := r2.Model.PeriodEndDate(547); got != "2021-06-30" {
		t.Errorf("a period ending on day 547 ends on %s", got)
	}
}

func rowsEqual(a, b []reservoir.HistoryRow) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		x, y := a[i], b[i]
		same := func(u, v float64) bool { return u == v || math.IsNaN(u) && math.IsNaN(v) }
		if x.Well != y.Well || x.Start != y.Start || x.End != y.End || !same(x.Oil, y.Oil) || !same(x.Water, y.Water) || !same(x.Injected, y.Injected) {
			return false
		}
	}
	return true
}

// TestHistoryGrouping: periods whose rates stay within HistoryTolerance of
// their mean share one pressure solve, with the mean rate (the volume of
// the group kept); a larger change, a shut-in or a reopening starts a new
// group.
func TestHistoryGrouping(t *testing.T) {
	m := &reservoir.Model{
		Wells:  []reservoir.Well{{Name: "I-1", Type: reservoir.Injector}, {Name: "P-1", Type: reservoir.Producer}},
		Run:    reservoir.RunSettings{End: 1000},
		Fluids: reservoir.Fluids{OilFVF: 1.2, WaterFVF: 1},
	}
	var rows []reservoir.HistoryRow
	nan := math.NaN()
	// P-1 oil (surface) per 10-day period: 100 102 98 101 | 130 131 | shut | 50
	for k, oil := range []float64{100, 102, 98, 101, 130, 131, 0, 50} {
		s, e := float64(10*k), float64(10*k+10)
		rows = append(rows, reservoir.HistoryRow{Well: "P-1", Start: s, End: e, Oil: oil * 10, Water: 0, Injected: nan, BHP: nan})
		rows = append(rows, reservoir.HistoryRow{Well: "I-1", Start: s, End: e, Oil: nan, Water: nan, Injected: 1200, BHP: nan})
	}
	m.History = &reservoir.History{Drive: reservoir.DriveRates, Rows: rows}
	p := planHistory(m)
	want := [][2]int{{0, 4}, {4, 6}, {6, 7}, {7, 8}}
	if len(p.groups) != len(want) {
		t.Fatalf("groups %v, want %v", p.groups, want)
	}
	for g, w := range want {
		if p.groups[g] != w {
			t.Errorf("group %d = %v, want %v", g, p.groups[g], w)
		}
	}
	// Mean reservoir rate of the first group: (100+102+98+101)/4 * 1.2.
	if got, w := p.rates[0][1], 100.25*1.2; math.Abs(got-w) > 1e-9 {
		t.Errorf("P-1 rate %g, want %g", got, w)
	}
	if p.rates[2][1] != 0 || p.rates[0][0] != 120 {
		t.Errorf("rates %v", p.rates)
	}
}

// TestHistoryControlsAndLimits: with drive: controls the case's own
// controls run over the history (no rate groups), and an injector held at
// its max_bhp is reported with the periods affected.
func TestHistoryControlsAndLimits(t *testing.T) {
	dir := t.TempDir()
	base := historyCase(t, dir, "start_date: 2020-01-01\n")
	a, err := Run(base, Settings{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	historyFromRun(t, a, filepath.Join(dir, "history.csv"), 6, true)
	m := historyCase(t, dir, "start_date: 2020-01-01\nhistory: {file: history.csv, drive: controls}\n")
	m.Schedule = nil
	m.Wells[1].Control, m.Wells[1].BHP = reservoir.BHPControl, 500
	m.Wells[0].MaxBHP = 520 // far below the pressure 600 bbl/day needs
	r, err := Run(m, Settings{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	h := r.History
	if h.Groups != 0 || h.Drive != reservoir.DriveControls {
		t.Errorf("groups %d, drive %s", h.Groups, h.Drive)
	}
	var inj HistoryWell
	for _, w := range h.Wells {
		if w.Name == "I-1" {
			inj = w
		}
	}
	// Six consecutive months at the limit (2020-01-01 to 2020-06-30: day
	// 0 to 182) make one span.
	if len(inj.LimitPeriods) != 1 || inj.LimitPeriods[0] != [2]float64{0, 182} {
		t.Errorf("I-1 limit periods %v, want the one span [0 182] of the 6 months", inj.LimitPeriods)
	}

	// The model injects less than observed: a negative cumulative error.
	if !(inj.CumWaterError < -0.1) {
		t.Errorf("I-1 cumulative water error %g", inj.CumWaterError)
	}
	// Absolute pressures here: the model BHP is the limit it was held at.
	if math.IsNaN(h.Match[1].ModBHP) || math.Abs(h.Match[1].ModBHP-520) > 1e-6 {
		t.Errorf("I-1 model BHP %g, want its limit 520", h.Match[1].ModBHP)
	}
}

// TestHistoryFiles: with start_date every time_days column has a date
// beside it, match.csv has the columns of docs/OUTPUTS.md and one row per
// history row, and summary.json the history object with dates.
func TestHistoryFiles(t *testing.T) {
	dir := t.TempDir()
	base := historyCase(t, dir, "start_date: 2020-01-01\n")
	a, err := Run(base, Settings{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	historyFromRun(t, a, filepath.Join(dir, "history.csv"), 6, true)
	m := historyCase(t, dir, "start_date: 2020-01-01\nhistory: {file: history.csv}\n")
	r, err := Run(m, Settings{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "out")
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
	read := func(name string) []string {
		b, err := os.ReadFile(filepath.Join(out, name))
		if err != nil {
			t.Fatal(err)
		}
		return strings.Split(strings.TrimSpace(string(b)), "\n")
	}
	for _, f := range []struct {
		name string
		cols []string
	}{{runfolder.WellsFile, runfolder.WellsColumns}, {runfolder.ProducersFile, runfolder.ProducersColumns},
		{runfolder.FieldFile, runfolder.FieldColumns}, {runfolder.EffectiveCurvesFile, runfolder.EffectiveCurvesColumns},
		{runfolder.AllocationFile, runfolder.AllocationColumns}} {
		lines := read(f.name)
		cols := f.cols
		if f.name != runfolder.EffectiveCurvesFile && f.name != runfolder.AllocationFile {
			// The case gives formation volume factors: surface columns follow.
			cols = runfolder.WithSurface(cols, "field")
		}
		if lines[0]+"\n" != runfolder.Header(runfolder.WithDate(cols)) || !strings.HasPrefix(lines[0], "time_days,date,") {
			t.Errorf("%s header %q", f.name, lines[0])
		}
		if !strings.HasPrefix(lines[1], "0,2020-01-01,") && !strings.HasPrefix(lines[1], "1,2020-01-02,") {
			t.Errorf("%s first row %q", f.name, lines[1])
		}
	}
	match := read(runfolder.MatchFile)
	if match[0]+"\n" != runfolder.Header(runfolder.MatchColumns) || len(match) != 1+12 {
		t.Errorf("match.csv: header %q, %d lines", match[0], len(match))
	}
	// February 2020 ends on day 60 (leap year).
	if !strings.HasPrefix(match[3], "P-1,2020-02-29,60,") {
		t.Errorf("match.csv row 3 %q", match[3])
	}
	s, err := runfolder.ReadSummary(out)
	if err != nil {
		t.Fatal(err)
	}
	if s.StartDate != "2020-01-01" || s.History == nil || s.History.EndDate != "2020-06-30" || s.History.EndDays != 182 || len(s.History.Wells) != 2 {
		t.Errorf("summary: start %q, history %+v", s.StartDate, s.History)
	}
}

package screen

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"image/color"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"testing"

	"floodtrace/internal/outdir"
	"floodtrace/render"
	"floodtrace/reservoir"
)

// smallSpec is a quick screen: a 24 x 24 heterogeneous model with one
// injector and two producers, a 4 x 4 infill lattice, one layout and one
// pattern, on two realizations made in code.
func smallSpec(t testing.TB) *Spec {
	t.Helper()
	m := reservoir.NewUniform(24, 24, 50, 50, 100, 0.2, 15)
	m.Title = "Skerrow Rise (invented)"
	m.Fluids = reservoir.Fluids{WaterViscosity: 0.5, OilViscosity: 1.5, InitialSw: 0.2}
	m.RelPerm = reservoir.Corey{Swc: 0.2, Sor: 0.2, KrwMax: 0.4, KroMax: 0.9, Nw: 2, No: 2}
	m.Run = reservoir.RunSettings{End: 2000, ReportEvery: 50, Streamlines: 120, PressureUpdates: 1, Snapshots: []float64{2000}}
	g := m.Grid
	for k := range m.PermEast {
		i, j := g.IJ(k)
		v := 100 * math.Exp(0.7*math.Sin(0.45*float64(i))*math.Cos(0.3*float64(j)))
		m.PermEast[k], m.PermNorth[k] = v, v
	}
	for _, w := range []struct {
		name string
		t    reservoir.WellType
		x, y float64
		c    reservoir.Control
		v    float64
	}{
		{"I-1", reservoir.Injector, 325, 325, reservoir.RateControl, 300},
		{"P-1", reservoir.Producer, 875, 875, reservoir.BHPControl, 500},
		{"P-2", reservoir.Producer, 875, 325, reservoir.BHPControl, 500},
	} {
		if err := m.PlaceWell(w.name, w.t, w.x, w.y, w.c, w.v); err != nil {
			t.Fatal(err)
		}
	}
	var reals []Realization
	for r := 0; r < 2; r++ {
		perm := make([]float64, g.N())
		for k := range perm {
			i, j := g.IJ(k)
			perm[k] = 80 * math.Exp(0.9*math.Sin(0.3*float64(i+3*r)+0.5*float64(j)))
		}
		reals = append(reals, Realization{Name: []string{"r1", "r2"}[r], Perm: perm})
	}
	layout := []reservoir.Well{
		{Name: "A", Type: reservoir.Injector, X: 125, Y: 600, Control: reservoir.RateControl, Rate: 400, Radius: 0.3},
		{Name: "B", Type: reservoir.Producer, X: 1075, Y: 600, Control: reservoir.BHPControl, BHP: 400, Radius: 0.3},
	}
	for i := range layout {
		w := &layout[i]
		w.I, w.J, _ = g.Locate(w.X, w.Y)
		w.Cell = g.Index(w.I, w.J)
	}
	return &Spec{
		Base: m, Horizon: 1500, Objective: Value, Streamlines: 100,
		Infill:       &Infill{Type: reservoir.Injector, Control: reservoir.RateControl, Rate: 200, Spacing: [2]float64{300, 300}, MinDistance: 200},
		Layouts:      []Layout{{Name: "pair", Wells: layout}},
		Patterns:     []Pattern{{Kind: FiveSpot, Name: "fs", Spacing: 500, Offset: [2]float64{100, 100}, InjectorRate: 150, ProducerBHP: 500}},
		Realizations: reals,
		Economics:    Economics{OilPrice: 60, WaterCost: 2, InjectionCost: 1, WellCost: 5e5, DiscountRate: 0.1},
	}
}

func mustPlan(t testing.TB, s *Spec) *Plan {
	t.Helper()
	p, err := NewPlan(s)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

func execute(t *testing.T, p *Plan, dir string, s Settings) *Results {
	t.Helper()
	r, err := Execute(context.Background(), p, dir, s)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// fingerprint is the ranking and every run, as written.
func fingerprint(t *testing.T, r *Results, by Statistic) string {
	t.Helper()
	var b bytes.Buffer
	if err := Rank(r, by).WriteCSV(&b); err != nil {
		t.Fatal(err)
	}
	if err := writeRunsCSV(&b, r); err != nil {
		t.Fatal(err)
	}
	return b.String()
}

// TestDeterministicShardsResume checks that results do not depend on the
// number of workers or GOMAXPROCS, that two shards merged give the ranking
// of one whole run, and that a screen interrupted after k records (with a
// torn line after them) resumes to the same result, running only what was
// missing.
func TestDeterministicShardsResume(t *testing.T) {
	p := mustPlan(t, smallSpec(t))
	n := len(p.Candidates)
	if n < 10 {
		t.Fatalf("only %d candidates", n)
	}
	base := t.TempDir()
	whole := execute(t, p, filepath.Join(base, "whole"), Settings{Workers: 2})
	if len(whole.Records) != n {
		t.Fatalf("%d records for %d candidates", len(whole.Records), n)
	}
	for _, rec := range whole.Records {
		for _, run := range rec.Runs {
			if run.Error != "" {
				t.Fatalf("candidate %s failed: %s", rec.Candidate, run.Error)
			}
		}
	}
	want := fingerprint(t, whole, Mean)

	t.Run("workers", func(t *testing.T) {
		for _, w := range []int{1, 4} {
			r := execute(t, p, filepath.Join(base, "w", string(rune('0'+w))), Settings{Workers: w})
			if got := fingerprint(t, r, Mean); got != want {
				t.Errorf("%d workers give other results", w)
			}
		}
		old := runtime.GOMAXPROCS(1)
		r := execute(t, p, filepath.Join(base, "gomaxprocs1"), Settings{})
		runtime.GOMAXPROCS(old)
		if got := fingerprint(t, r, Mean); got != want {
			t.Error("GOMAXPROCS 1 gives other results")
		}
	})

	t.Run("shards", func(t *testing.T) {
		var parts []*Results
		for k := 1; k <= 2; k++ {
			dir := filepath.Join(base, "shard", string(rune('0'+k)))
			r := execute(t, p, dir, Settings{Shard: k, Shards: 2})
			for _, rec := range r.Records {
				if rec.Index%2 != k-1 {
					t.Errorf("shard %d/2 ran candidate %d", k, rec.Index)
				}
			}
			rr, err := ReadResults(dir)
			if err != nil {
				t.Fatal(err)
			}
			parts = append(parts, rr)
		}
		merged, missing, err := Merge(parts...)
		if err != nil {
			t.Fatal(err)
		}
		if len(missing) != 0 {
			t.Fatalf("missing %v", missing)
		}
		if got := fingerprint(t, merged, Mean); got != want {
			t.Errorf("merged shards differ from the whole run:\n%s\nwant\n%s", got, want)
		}
		if fingerprint(t, merged, P10) != fingerprint(t, whole, P10) {
			t.Error("ranked by P10, merged shards differ from the whole run")
		}
		// One shard alone leaves the others missing; a shard twice is
		// refused.
		if _, missing, _ := Merge(parts[0]); len(missing) != n/2 {
			t.Errorf("one shard of two: %d missing, want %d", len(missing), n/2)
		}
		if _, _, err := Merge(parts[0], parts[1], parts[0]); err == nil {
			t.Error("a candidate present twice was accepted")
		}
	})

	t.Run("resume", func(t *testing.T) {
		src, err := os.ReadFile(filepath.Join(base, "whole", ResultsFile))
		if err != nil {
			t.Fatal(err)
		}
		lines := strings.SplitAfter(string(src), "\n")
		const k = 4
		dir := filepath.Join(base, "resume")
		os.MkdirAll(dir, 0o755)
		torn := lines[k][:len(lines[k])/2] // half a record, no newline
		os.WriteFile(filepath.Join(dir, ResultsFile), []byte(strings.Join(lines[:k], "")+torn), 0o644)
		total := 0
		r := execute(t, p, dir, Settings{Workers: 2, Progress: func(done, tot int) { total = tot }})
		if total != (n-k)*2 {
			t.Errorf("resumed screen ran %d runs, want %d", total, (n-k)*2)
		}
		if got := fingerprint(t, r, Mean); got != want {
			t.Error("resumed screen differs from the uninterrupted one")
		}
		rr, err := ReadResults(dir)
		if err != nil {
			t.Fatal(err)
		}
		if len(rr.Records) != n || fingerprint(t, rr, Mean) != want {
			t.Error("the resumed results file differs")
		}
		// Running again does nothing and changes nothing.
		again := execute(t, p, dir, Settings{Progress: func(done, tot int) { t.Error("a finished screen ran again") }})
		if fingerprint(t, again, Mean) != want {
			t.Error("a second resume changed the results")
		}
	})

	t.Run("cancel", func(t *testing.T) {
		dir := filepath.Join(base, "cancel")
		ctx, cancel := context.WithCancel(context.Background())
		_, err := Execute(ctx, p, dir, Settings{Workers: 2, Progress: func(done, tot int) {
			if done == 3 {
				cancel()
			}
		}})
		if !errors.Is(err, context.Canceled) {
			t.Fatalf("cancelled screen returned %v", err)
		}
		part, err := ReadResults(dir)
		if err != nil {
			t.Fatal(err)
		}
		if len(part.Records) == 0 || len(part.Records) >= n {
			t.Errorf("%d records after cancelling, want some but not all", len(part.Records))
		}
		r := execute(t, p, dir, Settings{Workers: 2})
		if fingerprint(t, r, Mean) != want {
			t.Error("screen resumed after cancelling differs")
		}
	})

	t.Run("other spec refused", func(t *testing.T) {
		s2 := smallSpec(t)
		s2.Horizon = 1400
		p2 := mustPlan(t, s2)
		if p2.Hash == p.Hash {
			t.Fatal("a changed horizon keeps the hash")
		}
		_, err := Execute(context.Background(), p2, filepath.Join(base, "whole"), Settings{})
		if !errors.Is(err, ErrOtherSpec) {
			t.Errorf("results of another spec: %v", err)
		}
		s3 := smallSpec(t)
		s3.Realizations[1].Perm[17] *= 1.001
		if mustPlan(t, s3).Hash == p.Hash {
			t.Error("a changed realization keeps the hash")
		}
		if mustPlan(t, smallSpec(t)).Hash != p.Hash {
			t.Error("the same inputs give another hash")
		}
	})
}

func TestResultsFileDamage(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, ResultsFile)
	rec := func(i int) string {
		b, _ := json.Marshal(Record{Spec: "h", Total: 3, Index: i, Candidate: "c", Runs: []RunOutcome{{CumOil: 1}}})
		return string(b) + "\n"
	}
	os.WriteFile(path, []byte(rec(0)+rec(1)+`{"spec":"h","tot`), 0o644)
	recs, good, err := readResultsFile(path)
	if err != nil || len(recs) != 2 || good != int64(len(rec(0)+rec(1))) {
		t.Errorf("torn last line: %d records, valid %d bytes, %v", len(recs), good, err)
	}
	// A complete record without its newline is torn too.
	os.WriteFile(path, []byte(rec(0)+strings.TrimSuffix(rec(1), "\n")), 0o644)
	if recs, _, err := readResultsFile(path); err != nil || len(recs) != 1 {
		t.Errorf("record without newline: %d records, %v", len(recs), err)
	}
	os.WriteFile(path, []byte(rec(0)+"garbage\n"+rec(2)), 0o644)
	if _, _, err := readResultsFile(path); err == nil || !strings.Contains(err.Error(), ":2:") {
		t.Errorf("damaged middle line: %v", err)
	}
}

// TestStreakRanksBelow: with a high-permeability streak through a
// producer, a new injector in the streak ranks below one at the same
// distance outside it: the streak carries its water to the producer early
// and sweeps less, so less oil is produced by the horizon (physics of
// channelling; no published value).
func TestStreakRanksBelow(t *testing.T) {
	m := reservoir.NewUniform(40, 40, 25, 25, 100, 0.2, 20)
	m.Title = "streak"
	g := m.Grid
	for k := range m.PermEast {
		if _, j := g.IJ(k); j >= 14 && j <= 16 {
			m.PermEast[k], m.PermNorth[k] = 3000, 3000
		}
	}
	m.Run = reservoir.RunSettings{End: 1000, ReportEvery: 20, Streamlines: 400, PressureUpdates: 1}
	// The producer in the streak, cell (15, 15).
	if err := m.PlaceWell("P", reservoir.Producer, 387.5, 387.5, reservoir.BHPControl, 500); err != nil {
		t.Fatal(err)
	}
	s := &Spec{Base: m, Horizon: 900, Objective: Oil,
		Infill: &Infill{Type: reservoir.Injector, Control: reservoir.RateControl, Rate: 300, Spacing: [2]float64{250, 250}}}
	p := mustPlan(t, s)
	res := execute(t, p, t.TempDir(), Settings{})
	rk := Rank(res, Mean)
	if len(rk.Failed) > 0 {
		t.Fatalf("failed: %+v", rk.Failed)
	}
	at := func(x, y float64) Row {
		for _, r := range rk.Rows {
			if r.X == x && r.Y == y {
				return r
			}
		}
		t.Fatalf("no node at (%g, %g)", x, y)
		return Row{}
	}
	// Pairs at the same distance from the producer (387.5, 387.5): in
	// the streak (y = 375) and outside it (x = 375).
	for _, pair := range [][4]float64{{625, 375, 375, 625}, {125, 375, 375, 125}} {
		in, out := at(pair[0], pair[1]), at(pair[2], pair[3])
		din := math.Hypot(pair[0]-387.5, pair[1]-387.5)
		dout := math.Hypot(pair[2]-387.5, pair[3]-387.5)
		if math.Abs(din-dout) > 1e-9 {
			t.Fatalf("distances %g and %g differ", din, dout)
		}
		if !(in.Rank > out.Rank) || !(in.Mean < out.Mean) {
			t.Errorf("injector in the streak at (%g,%g): rank %d, oil %.0f; outside at (%g,%g): rank %d, oil %.0f",
				pair[0], pair[1], in.Rank, in.Mean, pair[2], pair[3], out.Rank, out.Mean)
		}
		if !(in.FirstBreakthrough < out.FirstBreakthrough) && !math.IsNaN(in.FirstBreakthrough) {
			t.Errorf("breakthrough in the streak %g days, outside %g days", in.FirstBreakthrough, out.FirstBreakthrough)
		}
		t.Logf("streak (%g,%g): oil %.0f, breakthrough %.0f d; outside (%g,%g): oil %.0f, breakthrough %.0f d",
			pair[0], pair[1], in.Mean, in.FirstBreakthrough, pair[2], pair[3], out.Mean, out.FirstBreakthrough)
	}
}

func TestWriteOutputs(t *testing.T) {
	p := mustPlan(t, smallSpec(t))
	dir := t.TempDir()
	res := execute(t, p, dir, Settings{})
	d, err := outdir.Open(dir, false)
	if err == nil {
		t.Fatal("a folder holding results.jsonl not in its manifest was accepted without force")
	}
	if d, err = outdir.Open(dir, true); err != nil {
		t.Fatal(err)
	}
	rk, err := WriteOutputs(d, p, res, OutputSettings{By: P90, Width: 960, Height: 540})
	if err != nil {
		t.Fatal(err)
	}
	if err := d.Close(); err != nil {
		t.Fatal(err)
	}
	sum, err := ReadSummary(dir)
	if err != nil {
		t.Fatal(err)
	}
	if !sum.Complete || sum.RankedBy != "p90" || sum.Ranked != len(p.Candidates) || len(sum.Pictures) != 3 {
		t.Errorf("summary %+v", sum)
	}
	csv, _ := os.ReadFile(filepath.Join(dir, "ranking.csv"))
	lines := strings.Split(strings.TrimSpace(string(csv)), "\n")
	if lines[0] != RankingHeader || len(lines) != len(p.Candidates)+1 {
		t.Errorf("ranking.csv: %d lines, header %q", len(lines), lines[0])
	}
	// Ranked by P90 (the cautious case), best first.
	for i := 1; i < len(rk.Rows); i++ {
		if rk.Rows[i].P90 > rk.Rows[i-1].P90 {
			t.Errorf("row %d has a higher P90 than row %d", i+1, i)
		}
	}
	// The trade's exceedance convention (common practice in reserves
	// reporting): P90 <= P50 <= P10, in the rows and in ranking.csv's
	// columns (objective_p90, objective_p50, objective_p10), and the two
	// realizations differ, so the check has something to order.
	spread := false
	for i, r := range rk.Rows {
		if !(r.P90 <= r.P50 && r.P50 <= r.P10) {
			t.Errorf("row %d: P90 %g, P50 %g, P10 %g", i+1, r.P90, r.P50, r.P10)
		}
		spread = spread || r.P90 < r.P10
		f := strings.Split(lines[i+1], ",")
		if p90, _ := strconv.ParseFloat(f[5], 64); p90 > r.P50 {
			t.Errorf("ranking.csv row %d: objective_p90 %s above the median", i+1, f[5])
		}
	}
	if !spread {
		t.Error("no candidate has a spread over the realizations")
	}
	checkIncrements(t, p, res, rk, lines, sum)
	f, err := os.Open(filepath.Join(dir, "maps", "objective.png"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatal(err)
	}
	if img.Bounds().Dx() != 960 || img.Bounds().Dy() != 540 {
		t.Errorf("picture %v", img.Bounds())
	}
	// The best infill node is drawn in the brightest colour of the map.
	var best Row
	for _, r := range rk.Rows {
		if r.Kind == KindInfill {
			best = r
			break
		}
	}
	l, err := render.NewLayout(p.Spec.Base.Grid, 960, 540)
	if err != nil {
		t.Fatal(err)
	}
	px, py := l.ToPixel(best.X, best.Y)
	got := color.RGBAModel.Convert(img.At(int(px), int(py))).(color.RGBA)
	if want := objectiveColors.At(1); got != want {
		t.Errorf("best node (%g, %g) drawn in %v, want the top colour %v", best.X, best.Y, got, want)
	}
	for _, name := range sum.Pictures {
		if _, err := os.Stat(filepath.Join(dir, filepath.FromSlash(name))); err != nil {
			t.Error(err)
		}
	}
}

// checkIncrements checks the base row of a ranking and every candidate's
// increments over it by hand from the records: the difference of the
// candidate's and the base case's cumulative oil and water on each
// realization, averaged, and the recovery factor difference in percentage
// points over the model's OOIP (definition of the recovery factor,
// common practice).
func checkIncrements(t *testing.T, p *Plan, res *Results, rk *Ranking, lines []string, sum *Summary) {
	t.Helper()
	if rk.Base == nil || !rk.Base.Base || rk.Base.Candidate != BaseName || rk.Base.Kind != KindBase {
		t.Fatalf("no base row in the ranking: %+v", rk.Base)
	}
	if !sum.Base.Ranked || sum.Base.Rank != rk.Base.Rank || sum.Base.Reason != "" {
		t.Errorf("screen.json base %+v, want ranked at %d", sum.Base, rk.Base.Rank)
	}
	if rk.Base.IncOil != 0 || rk.Base.IncWater != 0 || rk.Base.IncRecovery != 0 {
		t.Errorf("base increments %g, %g, %g; want 0", rk.Base.IncOil, rk.Base.IncWater, rk.Base.IncRecovery)
	}
	header := strings.Split(lines[0], ",")
	col := map[string]int{}
	for i, h := range header {
		col[h] = i
	}
	var base Record
	for _, r := range res.Records {
		if r.Kind == KindBase {
			base = r
		}
	}
	ooip := p.Spec.Base.OOIP()
	bases := 0
	for i, r := range rk.Rows {
		f := strings.Split(lines[i+1], ",")
		if f[col["candidate"]] != r.Candidate || f[col["kind"]] != string(r.Kind) {
			t.Fatalf("ranking.csv row %d: %q, want candidate %s of kind %s", i+1, lines[i+1], r.Candidate, r.Kind)
		}
		if r.Kind == KindBase {
			bases++
			if f[col["incremental_oil"]] != "0" || f[col["incremental_recovery_points"]] != "0" {
				t.Errorf("ranking.csv base row %q: increments not 0", lines[i+1])
			}
		}
		var rec Record
		for _, x := range res.Records {
			if x.Index == r.Index {
				rec = x
			}
		}
		var oil, water, pts float64
		for k, run := range rec.Runs {
			oil += run.CumOil - base.Runs[k].CumOil
			water += run.CumWater - base.Runs[k].CumWater
			pts += 100 * (run.CumOil - base.Runs[k].CumOil) / ooip
		}
		n := float64(len(rec.Runs))
		oil, water, pts = oil/n, water/n, pts/n
		tol := 1e-9 * math.Abs(base.Runs[0].CumOil)
		if math.Abs(r.IncOil-oil) > tol || math.Abs(r.IncWater-water) > tol || math.Abs(r.IncRecovery-pts) > 1e-9 {
			t.Errorf("%s: increments %g, %g, %g points; by hand %g, %g, %g", r.Candidate, r.IncOil, r.IncWater, r.IncRecovery, oil, water, pts)
		}
		// Paired means: the increment is also the difference of the means.
		if math.Abs(r.IncOil-(r.CumOil-rk.Base.CumOil)) > tol {
			t.Errorf("%s: incremental oil %g, cum_oil %g less the base's %g", r.Candidate, r.IncOil, r.CumOil, rk.Base.CumOil)
		}
		if got, _ := strconv.ParseFloat(f[col["incremental_oil"]], 64); math.Abs(got-r.IncOil) > 1e-8*math.Abs(base.Runs[0].CumOil) {
			t.Errorf("ranking.csv %s: incremental_oil %s, want %g", r.Candidate, f[col["incremental_oil"]], r.IncOil)
		}
	}
	if bases != 1 {
		t.Errorf("%d base rows in ranking.csv, want 1", bases)
	}
	// A new injector in the smallSpec's field adds oil for some candidate,
	// so the check compares numbers that differ.
	if rk.Rows[0].Base || !(rk.Rows[0].IncOil > 0) {
		t.Errorf("best row %s adds %g oil over the base", rk.Rows[0].Candidate, rk.Rows[0].IncOil)
	}
	for _, k := range []string{"kind", "incremental_oil", "incremental_water", "incremental_recovery_points"} {
		if _, ok := col[k]; !ok || RankingColumns[k] == "" {
			t.Errorf("column %s missing from ranking.csv or undocumented", k)
		}
	}
}

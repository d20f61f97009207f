package screen

import (
	"encoding/json"
	"fmt"
	"image/png"
	"io"
	"os"
	"path/filepath"
	"regexp"
	"sort"
	"strings"

	"floodtrace/internal/outdir"
	"floodtrace/pressure"
)

// OutputSettings controls WriteOutputs. The zero value ranks by the mean
// and draws 1920x1080 pictures.
type OutputSettings struct {
	By            Statistic
	NoPictures    bool
	Width, Height int
	// Layouts is the number of best layouts drawn (0 = 3).
	Layouts int
	// WriteResults writes results.jsonl through the folder (merge); a
	// screen run appends it in place instead and the folder adopts it.
	WriteResults bool
	// Missing lists candidate indices no part holds (merge).
	Missing  []int
	Pressure pressure.Settings
	Log      func(format string, args ...any)
}

// SummaryFile is the name of the screen folder's summary, written last.
const SummaryFile = "screen.json"

// ReadSummary reads DIR/screen.json, the summary of a finished screen.
func ReadSummary(dir string) (*Summary, error) {
	path := filepath.Join(dir, SummaryFile)
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	var s Summary
	if err := json.Unmarshal(b, &s); err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	return &s, nil
}

// Summary is the content of screen.json, written last.
type Summary struct {
	SpecFile   string            `json:"spec_file,omitempty"`
	BaseCase   string            `json:"base_case,omitempty"`
	SpecHash   string            `json:"spec_hash"`
	Objective  string            `json:"objective"`
	RankedBy   string            `json:"ranked_by"`
	Percentile string            `json:"percentile_convention"`
	Horizon    float64           `json:"horizon_days"`
	Reals      []string          `json:"realizations,omitempty"`
	Candidates int               `json:"candidates"`
	Finished   int               `json:"finished"`
	Ranked     int               `json:"ranked"`
	Complete   bool              `json:"complete"`
	Missing    []string          `json:"missing"`
	Failed     []FailedSummary   `json:"failed"`
	Skipped    map[string]int    `json:"infill_nodes_skipped,omitempty"`
	Dropped    map[string]int    `json:"pattern_points_dropped,omitempty"`
	SkippedC   map[string]int    `json:"candidates_skipped,omitempty"`
	Base       BaseSummary       `json:"base"`
	Best       []string          `json:"best"`
	Pictures   []string          `json:"pictures"`
	Columns    map[string]string `json:"ranking_columns"`
	Warnings   []WarningCount    `json:"warnings"`
	Notes      []string          `json:"notes"`
}

// BaseSummary tells in screen.json whether the base case was ranked (its
// row in ranking.csv has kind base) and, when it was not, why the
// increments are blank.
type BaseSummary struct {
	Ranked bool `json:"ranked"`
	// Rank is the base case's rank (0 when not ranked).
	Rank int `json:"rank,omitempty"`
	// Reason says why the base case has no row: not run (no injector or
	// no producer open before the horizon), failed, or not in the results.
	Reason string `json:"reason,omitempty"`
}

// FailedSummary names a failed candidate and its errors in screen.json.
type FailedSummary struct {
	Candidate string   `json:"candidate"`
	Errors    []string `json:"errors"`
}

// WarningCount is one kind of run warning: the same words with other
// numbers or well names (digits masked), the first message of the kind as
// its example, how many runs gave it, and the candidates that did.
type WarningCount struct {
	Message    string   `json:"message"`
	Runs       int      `json:"runs"`
	Candidates []string `json:"candidates"`
	// CandidatesMore counts candidates beyond the first 50 listed.
	CandidatesMore int `json:"candidates_more,omitempty"`
}

// digitsRE masks the digits of a warning for its kind.
var digitsRE = regexp.MustCompile(`[0-9]+(\.[0-9]+)?(e[-+]?[0-9]+)?`)

// warningKinds counts the run warnings of the results by kind (see
// WarningCount), in candidate order; most frequent first.
func warningKinds(res *Results) []WarningCount {
	idx := map[string]int{}
	var out []WarningCount
	for _, r := range res.Records {
		seen := map[string]bool{}
		for _, run := range r.Runs {
			for _, w := range run.Warnings {
				key := digitsRE.ReplaceAllString(w, "#")
				k, ok := idx[key]
				if !ok {
					k = len(out)
					idx[key] = k
					out = append(out, WarningCount{Message: w, Candidates: []string{}})
				}
				out[k].Runs++
				if !seen[key] {
					seen[key] = true
					if len(out[k].Candidates) < 50 {
						out[k].Candidates = append(out[k].Candidates, r.Candidate)
					} else {
						out[k].CandidatesMore++
					}
				}
			}
		}
	}
	sort.SliceStable(out, func(a, b int) bool { return out[a].Runs > out[b].Runs })
	return out
}

// PercentileConvention states the meaning of P10/P50/P90 in the outputs.
const PercentileConvention = "exceedance convention: Pxx is the value of the objective exceeded with xx% probability over the realizations, so P90 is the low, cautious case (10th percentile) and P10 the high case (90th percentile); P90 <= P50 <= P10 (linear interpolation between order statistics, Hyndman and Fan 1996 definition 7). --rank p90 ranks by the cautious case."

// RankingColumns documents the columns of ranking.csv.
var RankingColumns = map[string]string{
	"rank":                        "1 = best by the ranking statistic (ranked_by); ties go to the earlier candidate",
	"candidate":                   "infill node (node-COL-ROW, counted from the south-west), layout or pattern name",
	"x":                           "x of the new well of an infill candidate (map units); blank for layouts and patterns",
	"y":                           "y of the new well of an infill candidate; blank for layouts and patterns",
	"objective":                   "mean of the objective over the realizations: oil = field cumulative oil at the horizon (reservoir volume); value = discounted cash flow",
	"objective_p90":               "exceeded by 90% of the realizations (their 10th percentile): the low, cautious case",
	"objective_p50":               "median over the realizations",
	"objective_p10":               "exceeded by 10% of the realizations (their 90th percentile): the high case",
	"cum_oil":                     "field cumulative oil at the horizon, mean over the realizations (reservoir volume)",
	"cum_water":                   "field cumulative produced water at the horizon, mean over the realizations (reservoir volume)",
	"first_breakthrough_days":     "first arrival of injected water at any producer, median over the realizations (none = late); blank if after the horizon",
	"kind":                        "base (the base case's wells as they are, ranked with the others), infill, layout or pattern",
	"incremental_oil":             "cum_oil less the base case's, realization by realization, mean over the realizations (reservoir volume); 0 for the base, blank when the base case has no row (see base in screen.json)",
	"incremental_water":           "cum_water less the base case's, realization by realization, mean over the realizations (reservoir volume); blank when the base case has no row",
	"incremental_recovery_points": "recovery factor at the horizon (cumulative oil / OOIP of the model) less the base case's, in percentage points, mean over the realizations; blank when the base case has no row",
}

// WriteOutputs ranks the results and writes ranking.csv, runs.csv, the
// pictures (when p is given and the results are complete: the objective
// map of the infill nodes as maps/objective.png and the best layouts'
// saturation at the horizon as maps/layout_N_NAME.png) and screen.json,
// last. p may be nil (a merge without the spec): no pictures then.
func WriteOutputs(d *outdir.Dir, p *Plan, res *Results, s OutputSettings) (*Ranking, error) {
	logf := s.Log
	if logf == nil {
		logf = func(string, ...any) {}
	}
	rk := Rank(res, s.By)
	if s.WriteResults {
		if err := d.Create(ResultsFile, func(w io.Writer) error { return WriteResults(w, res) }); err != nil {
			return nil, err
		}
	} else {
		d.Adopt(ResultsFile)
	}
	if err := d.Create("ranking.csv", rk.WriteCSV); err != nil {
		return nil, err
	}
	if err := d.Create("runs.csv", func(w io.Writer) error { return writeRunsCSV(w, res) }); err != nil {
		return nil, err
	}
	sum := &Summary{SpecHash: res.Hash, Objective: string(rk.Objective), RankedBy: string(rk.By), Percentile: PercentileConvention,
		Horizon: res.Horizon, Candidates: res.Total, Finished: len(res.Records), Ranked: len(rk.Rows), Columns: RankingColumns,
		Missing: []string{}, Best: []string{}, Failed: []FailedSummary{}, Pictures: []string{}, Warnings: []WarningCount{}, Notes: []string{}}
	sum.Complete = len(res.Records) == res.Total
	sum.Notes = append(sum.Notes, "The value objective is a screening number for comparing candidates, not an investment decision.")
	for _, f := range rk.Failed {
		sum.Failed = append(sum.Failed, FailedSummary{f.Candidate, f.Errors})
	}
	sum.Base = baseSummary(p, res, rk)
	for i := 0; i < len(rk.Rows) && i < 5; i++ {
		sum.Best = append(sum.Best, rk.Rows[i].Candidate)
	}
	// Missing candidates: names when the plan is known.
	missing := s.Missing
	if len(missing) == 0 && !sum.Complete {
		have := map[int]bool{}
		for _, r := range res.Records {
			have[r.Index] = true
		}
		for i := 0; i < res.Total; i++ {
			if !have[i] {
				missing = append(missing, i)
			}
		}
	}
	for n, i := range missing {
		if n == 100 {
			sum.Missing = append(sum.Missing, fmt.Sprintf("... and %d more", len(missing)-100))
			break
		}
		if p != nil && i < len(p.Candidates) {
			sum.Missing = append(sum.Missing, p.Candidates[i].Name)
		} else {
			sum.Missing = append(sum.Missing, fmt.Sprintf("#%d", i))
		}
	}
	// Warnings, counted by kind over the runs, printed and kept.
	sum.Warnings = warningKinds(res)
	for i, w := range sum.Warnings {
		if i == 10 {
			logf("warnings: %d more kind(s) in screen.json", len(sum.Warnings)-10)
			break
		}
		logf("warning (%d run(s), %d candidate(s)): %s", w.Runs, len(w.Candidates)+w.CandidatesMore, w.Message)
	}
	if len(sum.Warnings) > 50 {
		sum.Warnings = sum.Warnings[:50]
	}

	if p != nil {
		if p.Spec.Path != "" {
			if abs, err := filepath.Abs(p.Spec.Path); err == nil {
				sum.SpecFile = abs
			}
		}
		if p.Spec.Base.Path != "" {
			if abs, err := filepath.Abs(p.Spec.Base.Path); err == nil {
				sum.BaseCase = abs
			}
		}
		for _, r := range p.Spec.Realizations {
			sum.Reals = append(sum.Reals, r.Name)
		}
		if len(p.Skipped) > 0 {
			sum.Skipped = map[string]int{}
			for _, sk := range p.Skipped {
				sum.Skipped[sk.Reason]++
			}
		}
		if len(p.Dropped) > 0 {
			sum.Dropped = p.Dropped
		}
		if len(p.SkippedCandidates) > 0 {
			sum.SkippedC = map[string]int{}
			for _, sk := range p.SkippedCandidates {
				sum.SkippedC[sk.Reason]++
			}
		}
		sum.Notes = append(sum.Notes, p.Notes...)
	}

	if p != nil && !s.NoPictures && sum.Complete && p.Hash == res.Hash {
		pics, err := writePictures(d, p, res, rk, s, logf)
		if err != nil {
			return nil, err
		}
		sum.Pictures = pics
	} else if p != nil && !s.NoPictures && !sum.Complete {
		sum.Notes = append(sum.Notes, "Pictures are drawn when every candidate is present (after a merge of all shards).")
	}
	b, err := json.MarshalIndent(sum, "", "  ")
	if err != nil {
		return nil, err
	}
	if err := d.Bytes(SummaryFile, append(b, '\n')); err != nil {
		return nil, err
	}
	return rk, nil
}

func writePictures(d *outdir.Dir, p *Plan, res *Results, rk *Ranking, s OutputSettings, logf func(string, ...any)) ([]string, error) {
	w, h := s.Width, s.Height
	if w <= 0 || h <= 0 {
		w, h = 1920, 1080
	}
	var pics []string
	if p.Spec.Infill != nil {
		hasNode := false
		for _, r := range rk.Rows {
			hasNode = hasNode || r.Kind == KindInfill
		}
		if hasNode {
			logf("pictures: objective map")
			img, err := objectiveMap(p, rk, w, h)
			if err != nil {
				return nil, err
			}
			if err := d.Create("maps/objective.png", func(wr io.Writer) error { return png.Encode(wr, img) }); err != nil {
				return nil, err
			}
			pics = append(pics, "maps/objective.png")
		}
	}
	nl := s.Layouts
	if nl <= 0 {
		nl = 3
	}
	recByIndex := map[int]Record{}
	for _, r := range res.Records {
		recByIndex[r.Index] = r
	}
	drawn := 0
	for _, row := range rk.Rows {
		if drawn >= nl {
			break
		}
		if row.Kind == KindInfill || row.Kind == KindBase {
			continue
		}
		drawn++
		rec := recByIndex[row.Index]
		ri := medianRun(rec, rk.Objective, row.P50)
		realName := rec.Runs[ri].Realization
		if len(p.Spec.Realizations) == 0 {
			ri = -1
		}
		logf("pictures: layout %s (rank %d), re-running realization %s for its saturation map", row.Candidate, row.Rank, realName)
		fr, err := p.RunCandidate(row.Index, ri, s.Pressure)
		if err != nil {
			return nil, fmt.Errorf("layout %s: %w", row.Candidate, err)
		}
		img, err := layoutMap(p, row, realName, fr, w, h)
		if err != nil {
			return nil, err
		}
		name := fmt.Sprintf("maps/layout_%d_%s.png", drawn, fileSafe(row.Candidate))
		if err := d.Create(name, func(wr io.Writer) error { return png.Encode(wr, img) }); err != nil {
			return nil, err
		}
		pics = append(pics, name)
	}
	return pics, nil
}

// baseSummary says whether the base case is ranked and, if not, why.
func baseSummary(p *Plan, res *Results, rk *Ranking) BaseSummary {
	if rk.Base != nil {
		return BaseSummary{Ranked: true, Rank: rk.Base.Rank}
	}
	if p != nil && p.BaseSkipped != "" {
		return BaseSummary{Reason: "the base case was not run: it has " + p.BaseSkipped + " open before the horizon; the increments are blank"}
	}
	for _, f := range rk.Failed {
		if f.Candidate == BaseName && (p == nil || f.Index < len(p.Candidates) && p.Candidates[f.Index].Kind == KindBase) {
			return BaseSummary{Reason: "the base case's run failed (see failed); the increments are blank"}
		}
	}
	for _, r := range res.Records {
		if r.Kind == KindBase {
			return BaseSummary{Reason: "the base case has no usable run; the increments are blank"}
		}
	}
	return BaseSummary{Reason: "the results hold no base case (not run, or in a missing shard); the increments are blank"}
}

func fileSafe(s string) string {
	return strings.Map(func(r rune) rune {
		if r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || r == '-' || r == '_' || r == '.' {
			return r
		}
		return '_'
	}, s)
}

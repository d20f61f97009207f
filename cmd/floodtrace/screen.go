package main

import (
	"context"
	"errors"
	"fmt"
	"os"
	"os/signal"
	"path/filepath"
	"runtime"
	"strings"
	"syscall"
	"time"

	"github.com/schollz/progressbar/v3"
	"github.com/spf13/pflag"
	"golang.org/x/term"

	"floodtrace/internal/hugeheap"
	"floodtrace/internal/outdir"
	"floodtrace/screen"
)

var screenFlags struct {
	out        string
	force      bool
	rank       string
	shard      string
	workers    int
	spec       string
	size       string
	noPictures bool
	quiet      bool
}

func init() {
	register(&command{
		Name:  "screen",
		Usage: "screen SPEC --out DIR [options]  |  screen merge DIR... --out DIR [options]",
		Short: "rank infill wells, layouts and patterns over an ensemble of maps",
		Long: `Screen runs every candidate of a screening spec (a YAML file) on every
permeability realization with the full streamline computation, and ranks the
candidates by their objective: cumulative oil at the horizon or a simple
discounted cash flow. Candidates are new wells on an infill lattice, whole
layouts, and regular patterns (five-spot, inverted nine-spot, direct and
staggered line drive).

Into DIR it writes ranking.csv (rank,candidate,x,y,objective,objective_p90,
objective_p50,objective_p10,cum_oil,cum_water,first_breakthrough_days,kind,
incremental_oil,incremental_water,incremental_recovery_points: the base case is
ranked as candidate "base" of kind base, and every row has its increment over
it, realization by realization; blank when the base case has no injector or no
producer before the horizon and so is not run), runs.csv
(every candidate on every realization), maps/objective.png (the objective at
each infill node: where to drill), maps/layout_N_NAME.png (the best three
layouts' water saturation at the horizon), results.jsonl and screen.json
(last).

The objective is the mean over the realizations; P90/P50/P10 follow the
trade's exceedance convention: P90 is exceeded by 90% of the realizations (the
low, cautious case), P10 by 10% (the high case). --rank p90 ranks by the
cautious case. The value objective
is a screening number, not an investment decision.

Runs go on all cores, one run per core; results do not depend on the number
of cores. Each finished candidate is appended to DIR/results.jsonl: run the
same command again after an interruption and it resumes where it stopped. A
folder holding results of another spec is refused.

--shard K/N runs only the K-th of N round-robin parts of the candidate list
(for job arrays on a cluster); "screen merge" joins the parts' folders into
the ranking a whole run gives, and draws the pictures when it finds the spec
(--spec, or the spec_file recorded in a part's screen.json).

Examples:
  floodtrace screen examples/vardel/screen.yaml --out out/screen
  floodtrace screen spec.yaml --out runs/s --rank p90
  floodtrace screen spec.yaml --out parts/3 --shard 3/8
  floodtrace screen merge parts/1 parts/2 parts/3 parts/4 parts/5 parts/6 parts/7 parts/8 --out runs/all`,
		NArgs: func(n int) bool { return n >= 1 },
		Flags: func(fs *pflag.FlagSet) {
			f := &screenFlags
			fs.StringVarP(&f.out, "out", "o", "", "output folder (required)")
			fs.BoolVar(&f.force, "force", false, "write into a folder that holds other files (they are left alone)")
			fs.StringVar(&f.rank, "rank", "mean", "rank by mean, p90 (the cautious low case: exceeded by 90% of the realizations), p50 or p10 (the high case)")
			fs.StringVar(&f.shard, "shard", "", "run only part K of N of the candidates, as K/N (1-based)")
			fs.IntVar(&f.workers, "workers", 0, "runs at once (default: all cores; results do not depend on it)")
			fs.StringVar(&f.spec, "spec", "", "merge: the spec, to draw the pictures (default: the one recorded in the parts)")
			fs.StringVar(&f.size, "size", "1920x1080", "picture size WxH")
			fs.BoolVar(&f.noPictures, "no-pictures", false, "write data files only")
			fs.BoolVarP(&f.quiet, "quiet", "q", false, "print nothing but errors")
		},
		Run: runScreen,
	})
}

func runScreen(args []string) error {
	f := &screenFlags
	if f.out == "" {
		return usageError{"--out DIR is required"}
	}
	by, err := screen.ParseStatistic(f.rank)
	if err != nil {
		return usageError{err.Error()}
	}
	w, h, err := parseSize(f.size)
	if err != nil {
		return usageError{err.Error()}
	}
	if f.workers < 0 {
		return usageError{"--workers must not be negative"}
	}
	if args[0] == "merge" {
		if f.shard != "" {
			return usageError{"--shard does not apply to merge"}
		}
		if len(args) < 2 {
			return usageError{"merge needs the folders of the parts"}
		}
		return runScreenMerge(args[1:], by, w, h)
	}
	if len(args) != 1 {
		return usageError{"give one spec file (or: screen merge DIR... --out DIR)"}
	}
	if f.spec != "" {
		return usageError{"--spec applies to merge; give the spec as the argument"}
	}
	k, n := 0, 0
	if f.shard != "" {
		if k, n, err = screen.ParseShard(f.shard); err != nil {
			return usageError{err.Error()}
		}
	}
	start := time.Now()
	logf := func(format string, a ...any) {
		if !f.quiet {
			fmt.Fprintf(stderr, "%6.2fs  %s\n", time.Since(start).Seconds(), fmt.Sprintf(format, a...))
		}
	}
	spec, err := screen.LoadSpec(args[0])
	if err != nil {
		return err
	}
	plan, err := screen.NewPlan(spec)
	if err != nil {
		return err
	}
	nr := max(1, len(spec.Realizations))
	logf("spec %s: %d candidate(s) x %d realization(s), horizon %g days, objective %s (hash %s)",
		args[0], len(plan.Candidates), nr, plan.Horizon, objectiveName(spec), plan.Hash)
	if len(plan.Skipped) > 0 {
		logf("infill: %d node(s) skipped: %s", len(plan.Skipped), countReasons(plan.Skipped, func(s screen.SkippedNode) string { return s.Reason }))
	}
	if plan.BaseSkipped != "" {
		logf("base case not run: %s open before the horizon; the ranking has no base row and no increments", plan.BaseSkipped)
	}
	for _, sk := range plan.SkippedCandidates {
		logf("%s %s skipped: %s open before the horizon", sk.Kind, sk.Name, sk.Reason)
	}
	for _, note := range plan.Notes {
		logf("note: %s", note)
	}

	// Make results.jsonl ours in the folder's manifest before any run, so
	// that an interrupted screen can be resumed into the same folder.
	d, err := outdir.Open(f.out, f.force)
	if err != nil {
		return err
	}
	rp := filepath.Join(f.out, screen.ResultsFile)
	rf, err := os.OpenFile(rp, os.O_WRONLY|os.O_APPEND|os.O_CREATE, 0o644)
	if err != nil {
		return err
	}
	rf.Close()
	d.Adopt(screen.ResultsFile)
	if err := d.Close(); err != nil {
		return err
	}

	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	workers := f.workers
	if workers == 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	hugeheap.ForCase(spec.Base.Grid.N() * min(workers, runtime.GOMAXPROCS(0))) // the runs in flight at once
	var bar *progressbar.ProgressBar
	settings := screen.Settings{Workers: workers, Shard: k, Shards: n}
	if !f.quiet && stderr == os.Stderr && isTerminal(os.Stderr) {
		settings.Progress = func(done, total int) {
			if bar == nil {
				bar = progressbar.NewOptions(total, progressbar.OptionSetWriter(os.Stderr),
					progressbar.OptionSetDescription("screening"), progressbar.OptionShowCount(),
					progressbar.OptionSetPredictTime(true), progressbar.OptionSetWidth(30),
					progressbar.OptionThrottle(100*time.Millisecond), progressbar.OptionClearOnFinish())
			}
			bar.Set(done)
		}
	}
	what := "every candidate"
	if n > 0 {
		what = fmt.Sprintf("shard %d/%d (%d candidate(s))", k, n, len(plan.Shard(k, n)))
	}
	if prev, err := screen.ReadResults(f.out); err == nil && prev.Hash == plan.Hash {
		what += fmt.Sprintf(", %d already recorded in %s", len(prev.Records), rp)
	}
	logf("running %s on %d worker(s)", what, workers)
	res, err := screen.Execute(ctx, plan, f.out, settings)
	if bar != nil {
		bar.Finish()
		fmt.Fprintln(stderr)
	}
	if err != nil {
		if errors.Is(err, context.Canceled) {
			got := 0
			if r, rerr := screen.ReadResults(f.out); rerr == nil {
				got = len(r.Records)
			}
			return fmt.Errorf("interrupted: %d of %d candidate(s) are recorded in %s; run the same command again to resume", got, len(plan.Candidates), rp)
		}
		return err
	}
	logf("%d candidate(s) finished; ranking by %s", len(res.Records), by)
	d, err = outdir.Open(f.out, f.force)
	if err != nil {
		return err
	}
	rk, err := screen.WriteOutputs(d, plan, res, screen.OutputSettings{By: by, NoPictures: f.noPictures || n > 0, Width: w, Height: h, Log: logf})
	if err != nil {
		return err
	}
	if err := d.Close(); err != nil {
		return err
	}
	if !f.quiet {
		printRanking(rk, len(res.Records), len(plan.Candidates))
		logf("done: %s", f.out)
	}
	return nil
}

func objectiveName(s *screen.Spec) string {
	if s.Objective == "" {
		return string(screen.Oil)
	}
	return string(s.Objective)
}

// isTerminal reports whether f is a terminal.
func isTerminal(f *os.File) bool {
	return term.IsTerminal(int(f.Fd()))
}

func runScreenMerge(dirs []string, by screen.Statistic, w, h int) error {
	f := &screenFlags
	var parts []*screen.Results
	for _, dir := range dirs {
		r, err := screen.ReadResults(dir)
		if err != nil {
			return err
		}
		parts = append(parts, r)
	}
	merged, missing, err := screen.Merge(parts...)
	if err != nil {
		return err
	}
	// Find the spec, for names and pictures.
	var plan *screen.Plan
	specPath := f.spec
	if specPath == "" {
		for _, dir := range dirs {
			if s, err := screen.ReadSummary(dir); err == nil && s.SpecFile != "" {
				if _, err := os.Stat(s.SpecFile); err == nil {
					specPath = s.SpecFile
					break
				}
			}
		}
	}
	if specPath != "" {
		spec, err := screen.LoadSpec(specPath)
		if err != nil {
			if f.spec != "" {
				return err
			}
		} else if p, err := screen.NewPlan(spec); err == nil && p.Hash == merged.Hash {
			plan = p
		} else if f.spec != "" {
			if err != nil {
				return err
			}
			return fmt.Errorf("%s: this spec (hash %s) is not the one the parts ran (hash %s)", specPath, p.Hash, merged.Hash)
		}
	}
	if len(missing) > 0 {
		var names []string
		for i, m := range missing {
			if i == 20 {
				names = append(names, fmt.Sprintf("... and %d more", len(missing)-20))
				break
			}
			if plan != nil {
				names = append(names, plan.Candidates[m].Name)
			} else {
				names = append(names, fmt.Sprintf("#%d", m))
			}
		}
		return fmt.Errorf("merge: %d of %d candidate(s) missing from the parts: %s; run the missing shards (or resume the interrupted ones) and merge again",
			len(missing), merged.Total, strings.Join(names, ", "))
	}
	if plan == nil && !f.quiet && !f.noPictures {
		fmt.Fprintln(stderr, "note: spec not found (give --spec); writing the ranking without pictures")
	}
	d, err := outdir.Open(f.out, f.force)
	if err != nil {
		return err
	}
	logf := func(format string, a ...any) {
		if !f.quiet {
			fmt.Fprintf(stderr, "%s\n", fmt.Sprintf(format, a...))
		}
	}
	rk, err := screen.WriteOutputs(d, plan, merged, screen.OutputSettings{By: by, NoPictures: f.noPictures, Width: w, Height: h, WriteResults: true, Log: logf})
	if err != nil {
		return err
	}
	if err := d.Close(); err != nil {
		return err
	}
	if !f.quiet {
		printRanking(rk, len(merged.Records), merged.Total)
	}
	return nil
}

func printRanking(rk *screen.Ranking, finished, total int) {
	fmt.Fprintf(stdout, "\n%d of %d candidate(s) finished, %d ranked by the %s of %s", finished, total, len(rk.Rows), rk.By, rk.Objective)
	if len(rk.Failed) > 0 {
		fmt.Fprintf(stdout, ", %d failed (see screen.json)", len(rk.Failed))
	}
	fmt.Fprintln(stdout)
	fmt.Fprintf(stdout, "%4s  %-24s %14s %14s %14s %14s %14s %10s\n", "rank", "candidate", "mean", "P90 (low)", "P10 (high)", "first BT days", "incr. oil", "incr. RF %")
	line := func(r screen.Row) {
		bt := "none"
		if r.FirstBreakthrough == r.FirstBreakthrough {
			bt = fmt.Sprintf("%.0f", r.FirstBreakthrough)
		}
		name := r.Candidate
		if r.Base {
			name += " (base case)"
		}
		inc, pts := "", ""
		if r.IncOil == r.IncOil {
			inc = fmt.Sprintf("%.5g", r.IncOil)
		}
		if r.IncRecovery == r.IncRecovery {
			pts = fmt.Sprintf("%+.2f", r.IncRecovery)
		}
		fmt.Fprintf(stdout, "%4d  %-24s %14.5g %14.5g %14.5g %14s %14s %10s\n", r.Rank, name, r.Mean, r.P90, r.P10, bt, inc, pts)
	}
	for i, r := range rk.Rows {
		if i == 10 {
			fmt.Fprintf(stdout, "  ... %d more in ranking.csv\n", len(rk.Rows)-10)
			if rk.Base != nil && rk.Base.Rank > 10 {
				line(*rk.Base)
			}
			break
		}
		line(r)
	}
	if rk.Base == nil {
		fmt.Fprintln(stdout, "no base case row (see base in screen.json): increments blank")
	}
	for _, fl := range rk.Failed {
		fmt.Fprintf(stderr, "warning: candidate %s failed: %s\n", fl.Candidate, strings.Join(fl.Errors, "; "))
	}
}

// countReasons counts items by reason, in order of first appearance:
// "3 inactive, 2 too close".
func countReasons[T any](items []T, reason func(T) string) string {
	var order []string
	n := map[string]int{}
	for _, it := range items {
		r := reason(it)
		if n[r] == 0 {
			order = append(order, r)
		}
		n[r]++
	}
	parts := make([]string, len(order))
	for i, r := range order {
		parts[i] = fmt.Sprintf("%d %s", n[r], r)
	}
	return strings.Join(parts, ", ")
}

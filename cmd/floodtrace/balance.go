package main

import (
	"fmt"
	"math"
	"time"

	"github.com/spf13/pflag"

	"floodtrace/balance"
	"floodtrace/internal/hugeheap"
	"floodtrace/internal/outdir"
	"floodtrace/reservoir"
)

var balanceFlags struct {
	out         string
	horizon     float64
	objective   string
	total       string
	force       bool
	streamlines int
	workers     int
	fromStart   bool
	pictures    string
	size        string
	quiet       bool
}

func init() {
	register(&command{
		Name:  "balance",
		Usage: "balance CASE --out DIR [--horizon DAYS] [--objective oil|value] [--total same|free]",
		Short: "recommend injector rates that recover more oil with the same water",
		Long: `Balance shares the injection among the case's injectors: it forecasts the case
to the horizon (run.end by default) at the current rates, measures each
injector-producer pair's efficiency (the producer's oil attributed to the
injector over the water it sends there, from the streamlines), and proposes new
rates by the efficiency-weighted reallocation of Thiele and Batycky (2006) and
by a finite-difference gradient of the recovered oil through the flood engine
(one forecast per injector, in parallel). Every proposal is forecast and kept
only when it recovers more oil than the best rates so far; the search repeats
while it improves.

Rate-controlled injectors are adjusted within their min_rate and max_rate (a
tenth and three times the current rate where the case gives none); an injector
that reaches its max_bhp in the forecast is held at the rate it takes there.
The total injection stays the same unless --total free. Producers whose oil is
below 0.05 of the water reaching them by the horizon at the current rates are
flagged with the injectors that feed
them (candidates for a rate cut, a shut-in or a conformance job).

--objective value balances for the discounted value of the case's value block
(value: {oil_price, water_cost, injection_cost, discount_rate}) instead of the
oil. With a history the forecasts run the history as a run does and the rates
apply from its end; the horizon must be after it (--from-start plans from day 0
on the case's controls instead, without the history: faster). A producer's max_rate (its
liquid limit on bhp control) holds in every forecast.

DIR receives balance.csv, balance.json, balance_forecast.csv,
case_balanced.yaml (the case as written with the recommended rates, ready to
run) and pictures.

Examples:
  floodtrace balance examples/vardel/case.yaml --out out/vardel-balance
  floodtrace balance case.yaml --out runs/balance --horizon 1825
  floodtrace balance case.yaml --out runs/balance-free --total free`,
		NArgs: exactly(1),
		Flags: func(fs *pflag.FlagSet) {
			fs.StringVarP(&balanceFlags.out, "out", "o", "", "output folder (required)")
			fs.Float64Var(&balanceFlags.horizon, "horizon", 0, "forecast horizon in days (default: the case's run.end)")
			fs.StringVar(&balanceFlags.objective, "objective", "oil", "oil (oil recovered by the horizon) or value (discounted value of the case's value block)")
			fs.StringVar(&balanceFlags.total, "total", "same", "same (hold the total injection) or free (let it change within the limits)")
			fs.BoolVar(&balanceFlags.force, "force", false, "write into a folder that holds other files (they are left alone)")
			fs.BoolVar(&balanceFlags.fromStart, "from-start", false, "plan from day 0 on the case's own controls, without its production history (faster; for a flood being planned)")
			fs.IntVar(&balanceFlags.streamlines, "streamlines", 0, "number of streamlines (default: the case's run.streamlines)")
			fs.IntVar(&balanceFlags.workers, "workers", 0, "forecasts run at once (default: all cores; results do not depend on it)")
			fs.StringVar(&balanceFlags.pictures, "pictures", "all", "all or none")
			fs.StringVar(&balanceFlags.size, "size", "1600x1000", "picture size WxH")
			fs.BoolVarP(&balanceFlags.quiet, "quiet", "q", false, "print nothing but errors")
		},
		Run: runBalance,
	})
}

func runBalance(args []string) error {
	f := balanceFlags
	if f.out == "" {
		return usageError{"--out DIR is required"}
	}
	if f.objective != "oil" && f.objective != "value" {
		return usageError{fmt.Sprintf("--objective must be oil or value, not %q", f.objective)}
	}
	if f.total != "same" && f.total != "free" {
		return usageError{fmt.Sprintf("--total must be same or free, not %q", f.total)}
	}
	if f.pictures != "all" && f.pictures != "none" {
		return usageError{fmt.Sprintf("--pictures must be all or none, not %q", f.pictures)}
	}
	if f.horizon < 0 || math.IsNaN(f.horizon) {
		return usageError{fmt.Sprintf("--horizon must be a positive number of days, not %g", f.horizon)}
	}
	w, h, err := parseSize(f.size)
	if err != nil {
		return usageError{err.Error()}
	}
	start := time.Now()
	logf := func(format string, a ...any) {
		if !f.quiet {
			fmt.Fprintf(stderr, "%6.2fs  %s\n", time.Since(start).Seconds(), fmt.Sprintf(format, a...))
		}
	}
	m, err := reservoir.Load(args[0])
	if err != nil {
		return err
	}
	hugeheap.ForCase(m.Grid.N())
	if m.History != nil && f.fromStart {
		logf("--from-start: the case's history (%s) is not used; balance forecasts from day 0 on the case's controls", m.History.File)
		m.History = nil
	}
	s := balance.Settings{Horizon: f.horizon, Objective: balance.Objective(f.objective), FreeTotal: f.total == "free", Workers: f.workers, Log: logf}
	s.Flood.Streamlines = f.streamlines
	res, err := balance.Balance(m, s)
	if err != nil {
		return err
	}
	d, err := outdir.Open(f.out, f.force)
	if err != nil {
		return err
	}
	if err := res.Write(d, f.out); err != nil {
		return err
	}
	if f.pictures == "all" {
		files, err := drawBalance(f.out, res, w, h)
		if err != nil {
			return fmt.Errorf("drawing pictures: %w", err)
		}
		d.Adopt(files...)
	}
	if err := d.Close(); err != nil {
		return err
	}
	if !f.quiet {
		printBalance(res)
		logf("done: %d forecasts", res.Forecasts)
	}
	return nil
}

func printBalance(r *balance.Result) {
	_, _, _, rate, _, vol := r.Model.Units.Labels()
	fmt.Fprintf(stdout, "\n%s: balance over %g days (objective %s)\n", r.Model.Title, r.Horizon, r.Objective)
	fmt.Fprintf(stdout, "%-10s %12s %12s %10s %10s %10s  %s\n", "injector", "rate now", "recommended", "change", "eff now", "eff rec", "limit")
	fmt.Fprintf(stdout, "%-10s %12s %12s %10s %10s %10s\n", "", rate, rate, "", "", "")
	for _, in := range r.Injectors {
		fmt.Fprintf(stdout, "%-10s %12.1f %12.1f %+10.1f %10.3f %10.3f  %s\n", in.Name, in.RateNow, in.RateRecommended, in.RateRecommended-in.RateNow,
			in.EfficiencyNow, in.EfficiencyRecommended, in.Limit)
	}
	what, amount := objectiveWords(r, vol)
	gain := r.Recommended.Objective - r.Now.Objective
	if r.Improved {
		fmt.Fprintf(stdout, "%s: %s now, %.0f recommended (%+.0f%s); total injection %.1f -> %.1f %s\n", what,
			amount(r.Now.Objective), r.Recommended.Objective, gain, percent(r.Now.Objective, r.Recommended.Objective), r.TotalNow, r.TotalRecommended, rate)
	} else {
		fmt.Fprintf(stdout, "no rates found that beat the current ones (%s: %s); keep the current rates\n", what, amount(r.Now.Objective))
	}
	for _, p := range r.Recommended.AtMaxRate {
		fmt.Fprintf(stdout, "producer %s is held at its max_rate (liquid limit) in the recommended forecast\n", p)
	}
	for _, p := range r.Flagged {
		fmt.Fprintf(stdout, "FLAG: producer %s mostly cycles water (oil %.3f of the water reaching it), fed by %v: a candidate for a rate cut, a shut-in or a conformance job\n", p.Name, p.Efficiency, p.Injectors)
	}
}

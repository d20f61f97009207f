package screen

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
)

// Statistic names what the ranking sorts by.
type Statistic string

// Ranking statistics, in the trade's exceedance convention: P90 is the
// cautious low case (exceeded with 90% probability, the 10th percentile),
// P10 the high case (the 90th percentile); see percentile.
const (
	Mean Statistic = "mean"
	P10  Statistic = "p10"
	P50  Statistic = "p50"
	P90  Statistic = "p90"
)

// ParseStatistic reads mean, p10, p50 or p90 (case-insensitive).
func ParseStatistic(s string) (Statistic, error) {
	switch st := Statistic(strings.ToLower(s)); st {
	case Mean, P10, P50, P90:
		return st, nil
	}
	return "", fmt.Errorf("rank by %q: use mean, p90 (the cautious low case), p50 or p10 (the high case)", s)
}

// percentile returns the p-th percentile (0 <= p <= 100) of the values by
// linear interpolation between order statistics: with the values sorted
// ascending as x[0..n-1] and h = (n-1)p/100, the result is
// x[floor h] + (h - floor h)(x[floor h + 1] - x[floor h]) (definition 7 of
// Hyndman and Fan 1996, "Sample quantiles in statistical packages", The
// American Statistician 50(4)). So Percentile(v, 10) is the low value
// exceeded by about 90% of the realizations. +Inf values are allowed; NaN
// is returned for no values.
func percentile(values []float64, p float64) float64 {
	n := len(values)
	if n == 0 {
		return math.NaN()
	}
	x := append([]float64(nil), values...)
	sort.Float64s(x)
	h := float64(n-1) * p / 100
	lo := int(math.Floor(h))
	if lo < 0 {
		return x[0]
	}
	if lo >= n-1 {
		return x[n-1]
	}
	frac := h - float64(lo)
	if frac == 0 || x[lo] == x[lo+1] {
		return x[lo]
	}
	return x[lo] + frac*(x[lo+1]-x[lo])
}

// Row is one ranked candidate.
type Row struct {
	Rank      int
	Index     int
	Candidate string
	Kind      Kind
	X, Y      float64 // the new well of an infill candidate; NaN otherwise
	// Objective statistics over the realizations.
	Mean, P10, P50, P90 float64
	// CumOil and CumWater are means over the realizations.
	CumOil, CumWater float64
	// FirstBreakthrough is the median first breakthrough (days); NaN when
	// the median is beyond the horizon.
	FirstBreakthrough float64
	Realizations      int
	// Base marks the row of the base case (Kind KindBase).
	Base bool
	// IncOil and IncWater are the mean over the realizations of the
	// candidate's cumulative oil and water less the base case's on the
	// same realization; IncRecovery is the mean of the recovery factor
	// difference at the horizon in percentage points (100 x IncOil /
	// OOIP). NaN when the base case was not run or failed.
	IncOil, IncWater, IncRecovery float64
}

// Failed is a candidate with at least one failed run.
type Failed struct {
	Index     int
	Candidate string
	Errors    []string // "realization: error"
}

// Ranking is the ordered list of candidates.
type Ranking struct {
	Objective Objective
	By        Statistic
	Rows      []Row
	Failed    []Failed
	// Base is the base case's row, nil when it was not run, failed or is
	// missing from the results (the increments are then NaN).
	Base *Row
}

// Rank orders the candidates of r by the statistic (Mean when empty),
// best first; ties go to the lower candidate index. Candidates with a
// failed run are listed in Failed, not ranked. The base case (Kind
// KindBase) is ranked with the others and marked; every row gets its
// increments over it, realization by realization (see Row).
func Rank(r *Results, by Statistic) *Ranking {
	if by == "" {
		by = Mean
	}
	obj := r.Objective
	if obj == "" {
		obj = Oil
	}
	rk := &Ranking{Objective: obj, By: by}
	// The base case's runs by realization, when it finished without error.
	var base map[string]RunOutcome
	for _, rec := range r.Records {
		if rec.Kind != KindBase || len(rec.Runs) == 0 {
			continue
		}
		base = map[string]RunOutcome{}
		for _, run := range rec.Runs {
			if run.Error != "" {
				base = nil
				break
			}
			base[run.Realization] = run
		}
	}
	for _, rec := range r.Records {
		var errs []string
		for _, run := range rec.Runs {
			if run.Error != "" {
				errs = append(errs, run.Realization+": "+run.Error)
			}
		}
		if len(errs) > 0 || len(rec.Runs) == 0 {
			if len(rec.Runs) == 0 {
				errs = append(errs, "no run")
			}
			rk.Failed = append(rk.Failed, Failed{Index: rec.Index, Candidate: rec.Candidate, Errors: errs})
			continue
		}
		n := len(rec.Runs)
		obs := make([]float64, n)
		bts := make([]float64, n)
		row := Row{Index: rec.Index, Candidate: rec.Candidate, Kind: rec.Kind, X: math.NaN(), Y: math.NaN(), Realizations: n,
			Base: rec.Kind == KindBase, IncOil: math.NaN(), IncWater: math.NaN(), IncRecovery: math.NaN()}
		if rec.X != nil && rec.Y != nil {
			row.X, row.Y = *rec.X, *rec.Y
		}
		for i, run := range rec.Runs {
			obs[i] = run.Objective(obj)
			row.Mean += obs[i]
			row.CumOil += run.CumOil
			row.CumWater += run.CumWater
			bts[i] = math.Inf(1)
			if run.FirstBreakthrough != nil {
				bts[i] = *run.FirstBreakthrough
			}
		}
		row.IncOil, row.IncWater, row.IncRecovery = increments(rec.Runs, base)
		row.Mean /= float64(n)
		row.CumOil /= float64(n)
		row.CumWater /= float64(n)
		// Exceedance convention (common practice in reserves and resource
		// reporting): Pxx is exceeded with xx% probability.
		row.P90, row.P50, row.P10 = percentile(obs, 10), percentile(obs, 50), percentile(obs, 90)
		row.FirstBreakthrough = percentile(bts, 50)
		if math.IsInf(row.FirstBreakthrough, 1) || row.FirstBreakthrough > r.Horizon {
			row.FirstBreakthrough = math.NaN()
		}
		rk.Rows = append(rk.Rows, row)
	}
	key := func(r Row) float64 {
		switch by {
		case P10:
			return r.P10
		case P50:
			return r.P50
		case P90:
			return r.P90
		}
		return r.Mean
	}
	sort.SliceStable(rk.Rows, func(a, b int) bool {
		ka, kb := key(rk.Rows[a]), key(rk.Rows[b])
		if ka != kb {
			return ka > kb
		}
		return rk.Rows[a].Index < rk.Rows[b].Index
	})
	for i := range rk.Rows {
		rk.Rows[i].Rank = i + 1
		if rk.Rows[i].Base {
			rk.Base = &rk.Rows[i]
		}
	}
	return rk
}

// increments returns the means over the runs of cumulative oil and water
// less the base case's run on the same realization, and of the recovery
// factor difference in percentage points; NaN when base is nil or lacks a
// realization (and NaN recovery points when a run has no OOIP).
func increments(runs []RunOutcome, base map[string]RunOutcome) (oil, water, points float64) {
	if base == nil {
		return math.NaN(), math.NaN(), math.NaN()
	}
	for _, run := range runs {
		b, ok := base[run.Realization]
		if !ok {
			return math.NaN(), math.NaN(), math.NaN()
		}
		d := run.CumOil - b.CumOil
		oil += d
		water += run.CumWater - b.CumWater
		if run.OOIP > 0 {
			points += 100 * d / run.OOIP
		} else {
			points = math.NaN()
		}
	}
	n := float64(len(runs))
	return oil / n, water / n, points / n
}

// RankingHeader is the header line of ranking.csv.
const RankingHeader = "rank,candidate,x,y,objective,objective_p90,objective_p50,objective_p10,cum_oil,cum_water,first_breakthrough_days,kind,incremental_oil,incremental_water,incremental_recovery_points"

// WriteCSV writes the ranking as ranking.csv (columns in the package
// documentation; numbers with 10 significant digits, blank for none).
func (rk *Ranking) WriteCSV(w io.Writer) error {
	bw := bufio.NewWriter(w)
	bw.WriteString(RankingHeader + "\n")
	for _, r := range rk.Rows {
		fmt.Fprintf(bw, "%d,%s,%s,%s,%s,%s,%s,%s,%s,%s,%s,%s,%s,%s,%s\n", r.Rank, csvText(r.Candidate), num(r.X), num(r.Y),
			num(r.Mean), num(r.P90), num(r.P50), num(r.P10), num(r.CumOil), num(r.CumWater), num(r.FirstBreakthrough),
			r.Kind, num(r.IncOil), num(r.IncWater), num(r.IncRecovery))
	}
	return bw.Flush()
}

// writeRunsCSV writes every run of every candidate (runs.csv):
// candidate,kind,realization,objective,cum_oil,cum_water,cum_injected,value,first_breakthrough_days,error.
func writeRunsCSV(w io.Writer, r *Results) error {
	obj := r.Objective
	if obj == "" {
		obj = Oil
	}
	bw := bufio.NewWriter(w)
	bw.WriteString("candidate,kind,realization,objective,cum_oil,cum_water,cum_injected,value,first_breakthrough_days,error\n")
	for _, rec := range r.Records {
		for _, run := range rec.Runs {
			bt := math.NaN()
			if run.FirstBreakthrough != nil {
				bt = *run.FirstBreakthrough
			}
			ob := math.NaN()
			if run.Error == "" {
				ob = run.Objective(obj)
			}
			fmt.Fprintf(bw, "%s,%s,%s,%s,%s,%s,%s,%s,%s,%s\n", csvText(rec.Candidate), rec.Kind, csvText(run.Realization), num(ob),
				num(run.CumOil), num(run.CumWater), num(run.CumInjected), num(run.Value), num(bt), csvText(run.Error))
		}
	}
	return bw.Flush()
}

func num(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return ""
	}
	return strconv.FormatFloat(v, 'g', 10, 64)
}

// csvText quotes a field when it holds a comma, a quote or a line break
// (RFC 4180).
func csvText(s string) string {
	if !strings.ContainsAny(s, ",\"\n\r") {
		return s
	}
	return `"` + strings.ReplaceAll(s, `"`, `""`) + `"`
}

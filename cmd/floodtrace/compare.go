package main

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strings"

	"github.com/spf13/pflag"

	"floodtrace/flood"
	"floodtrace/internal/outdir"
	"floodtrace/render"
	"floodtrace/runfolder"
)

var compareFlags struct {
	out  string
	size string
}

func init() {
	register(&command{
		Name:  "compare",
		Usage: "compare DIR_A DIR_B [--out FILE]",
		Short: "compare the producer curves of two finished runs",
		Long: `Compare reads two finished runs (their producers.csv and summary.json) and
prints, for every producer found in both, the root-mean-square difference of
the water cuts and the difference of the water breakthrough times (B - A, in
days). The RMS difference is taken on the union of both runs' report times,
within the span both runs cover, each curve interpolated linearly.

It also draws both water-cut curves of every producer in one chart, a colour
per producer, run A solid and run B dashed, written to FILE (compare.png in
the current folder by default; .svg for a vector picture).

When both runs have the same production history (the same observed values in
their match.csv), the chart also shows the observed water cuts as dots, and a
second table gives each producer's observed breakthrough and both runs'
breakthrough errors and water-cut RMS against the history.

Typical uses: fixed against updated streamlines, streamlines against the grid
engine, two layouts or two relative-permeability choices on the same wells.

Examples:
  floodtrace run case.yaml --out runs/fixed
  floodtrace run case.yaml --out runs/grid --engine grid
  floodtrace compare runs/fixed runs/grid
  floodtrace compare runs/fixed runs/updated --out charts/fixed-vs-updated.png`,
		NArgs: exactly(2),
		Flags: func(fs *pflag.FlagSet) {
			fs.StringVarP(&compareFlags.out, "out", "o", "compare.png", "chart file (.png or .svg)")
			fs.StringVar(&compareFlags.size, "size", "1600x1000", "chart size WxH in pixels")
		},
		Run: runCompare,
	})
}

func runCompare(args []string) error {
	w, h, err := parseSize(compareFlags.size)
	if err != nil {
		return usageError{err.Error()}
	}
	format := strings.TrimPrefix(strings.ToLower(filepath.Ext(compareFlags.out)), ".")
	if format != "png" && format != "svg" {
		return usageError{fmt.Sprintf("--out must name a .png or .svg file, not %q", compareFlags.out)}
	}
	a, err := runfolder.ReadRunCurves(args[0])
	if err != nil {
		return err
	}
	b, err := runfolder.ReadRunCurves(args[1])
	if err != nil {
		return err
	}
	c := flood.Compare(a, b)
	printComparison(stdout, c)
	shared := runfolder.SameObserved(a.Match, b.Match)
	if shared {
		printSharedHistory(stdout, c)
	}
	if len(c.Producers) == 0 {
		return fmt.Errorf("the runs have no producer in common")
	}
	var chart bytes.Buffer
	if err := render.WriteChart(&chart, comparisonChart(c, shared), w, h, format); err != nil {
		return fmt.Errorf("drawing the chart: %w", err)
	}
	if err := outdir.WriteFile(compareFlags.out, func(out io.Writer) error {
		_, err := out.Write(chart.Bytes())
		return err
	}); err != nil {
		return err
	}
	fmt.Fprintf(stdout, "chart: %s\n", compareFlags.out)
	return nil
}

func printComparison(w io.Writer, c *flood.Comparison) {
	fmt.Fprintf(w, "A: %s: %s, %s\n", c.A.Dir, c.A.Title, c.A.Setup)
	fmt.Fprintf(w, "B: %s: %s, %s\n\n", c.B.Dir, c.B.Title, c.B.Setup)
	fmt.Fprintf(w, "%-12s %11s %7s %11s %11s %9s\n", "producer", "RMS water", "points", "water BT A", "water BT B", "BT B - A")
	fmt.Fprintf(w, "%-12s %11s %7s %11s %11s %9s\n", "", "cut diff", "", "days", "days", "days")
	for _, p := range c.Producers {
		fmt.Fprintf(w, "%-12s %11s %7d %11s %11s %9s\n", p.Name, fmtOpt(p.RMS, "%.4f"), p.Points,
			fmtOpt(p.BreakthroughA, "%.0f"), fmtOpt(p.BreakthroughB, "%.0f"), fmtOpt(p.BreakthroughDiff, "%+.0f"))
	}
	fmt.Fprintf(w, "%-12s %11s\n", "all", fmtOpt(c.RMS, "%.4f"))
	if len(c.OnlyA) > 0 {
		fmt.Fprintf(w, "only in A: %s\n", strings.Join(c.OnlyA, ", "))
	}
	if len(c.OnlyB) > 0 {
		fmt.Fprintf(w, "only in B: %s\n", strings.Join(c.OnlyB, ", "))
	}
}

func fmtOpt(v float64, format string) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "none"
	}
	return fmt.Sprintf(format, v)
}

// comparisonChart is the chart of every producer's two water-cut
// curves: one colour per producer, run A solid and run B dashed. With
// history (the runs share it), the observed water cuts are dots in the
// producer's colour, at the middle of each history period. Runs with the
// same start_date get calendar dates on the time axis.
func comparisonChart(c *flood.Comparison, history bool) render.Chart {
	pairs := make([]render.Pair, len(c.Producers))
	for i, pc := range c.Producers {
		pairs[i] = render.Pair{Name: pc.Name, AX: pc.A.Time, AY: pc.A.WaterCut, BX: pc.B.Time, BY: pc.B.WaterCut}
	}
	ch := render.Chart{
		Title:    "Water cut of two runs by producer",
		Subtitle: fmt.Sprintf("A = %s (solid) · B = %s (dashed)", label(c.A), label(c.B)),
		XLabel:   "Time (days)", YLabel: "Water cut (fraction)", LegendTitle: "Producer",
		Series: render.PairSeries(pairs, "run A", "run B"),
		YMin:   0, YMax: 1,
	}
	if c.A.StartDate != "" && c.A.StartDate == c.B.StartDate {
		ch.XLabel, ch.StartDate = "Date", c.A.StartDate
	}
	if !history {
		return ch
	}
	ch.Subtitle += " · dots: observed (the history both runs share)"
	for i, pc := range c.Producers {
		col, _ := render.SeriesStyle(i)
		var x, y []float64
		prev := 0.0
		for _, m := range c.A.Match {
			if m.Well != pc.Name {
				continue
			}
			x, y = append(x, (prev+m.Time)/2), append(y, m.ObsWaterCut)
			prev = m.Time
		}
		ch.Series = append(ch.Series, render.Series{Name: pc.Name, X: x, Y: y, Points: true, Style: &render.LineStyle{Color: col}, NoLegend: true})
	}
	ch.Series = append(ch.Series, render.Series{Name: "Observed (surface volumes)", Points: true})
	return ch
}

// printSharedHistory prints, when both runs have the same history, each
// producer's observed breakthrough and both runs' water-cut RMS against
// the history (summary.json).
func printSharedHistory(w io.Writer, c *flood.Comparison) {
	find := func(h *runfolder.History, name string) *runfolder.HistoryWell {
		for i := range h.Wells {
			if h.Wells[i].Name == name {
				return &h.Wells[i]
			}
		}
		return nil
	}
	opt := func(p *float64, format string) string {
		if p == nil {
			return "none"
		}
		return fmtOpt(*p, format)
	}
	fmt.Fprintf(w, "\nboth runs have the same history (%d rows of match.csv):\n", len(c.A.Match))
	fmt.Fprintf(w, "%-12s %11s %11s %11s %11s %11s\n", "producer", "observed BT", "BT error A", "BT error B", "WC RMS A", "WC RMS B")
	fmt.Fprintf(w, "%-12s %11s %11s %11s %11s %11s\n", "", "days", "days", "days", "", "")
	for _, p := range c.Producers {
		ha, hb := find(c.A.History, p.Name), find(c.B.History, p.Name)
		if ha == nil || hb == nil {
			continue
		}
		fmt.Fprintf(w, "%-12s %11s %11s %11s %11s %11s\n", p.Name, opt(ha.ObservedBreakthroughDays, "%.0f"),
			opt(ha.BreakthroughErrorDays, "%+.0f"), opt(hb.BreakthroughErrorDays, "%+.0f"), opt(ha.WaterCutRMS, "%.4f"), opt(hb.WaterCutRMS, "%.4f"))
	}
}

func label(rc *runfolder.RunCurves) string {
	engine, _, _ := strings.Cut(rc.Setup, " (")
	return fmt.Sprintf("%s [%s]", filepath.Base(filepath.Clean(rc.Dir)), engine)
}

package main

import (
	"cmp"
	"fmt"
	"math"
	"slices"

	"floodtrace/flood"
	"floodtrace/reservoir"
)

// printHistory prints the match of a run with its history: per producer
// the observed and model water breakthrough and the water-cut RMS, worst
// (largest RMS) first, then the field.
func printHistory(r *flood.Result) {
	h := r.History
	if h == nil {
		return
	}
	m := r.Model
	end := fmt.Sprintf("day %g", h.End)
	if d := m.PeriodEndDate(h.End); d != "" {
		end += " (" + d + ")"
	}
	fmt.Fprintf(stdout, "\nhistory to %s, drive %s: %d rows, %s in the history window (%s, tolerance %g)\n",
		end, h.Drive, h.Rows, count(h.Solves, "pressure solve"), count(h.Groups, "rate group"), flood.HistoryTolerance)
	fmt.Fprintf(stdout, "%-10s %12s %12s %10s %10s %10s\n", "producer", "observed BT", "model BT", "BT error", "WC RMS", "cum oil")
	fmt.Fprintf(stdout, "%-10s %12s %12s %10s %10s %10s\n", "", "days", "days", "days", "", "error")
	var ws []flood.HistoryWell
	for _, w := range h.Wells {
		if w.Type == reservoir.Producer {
			ws = append(ws, w)
		}
	}
	// Worst first: the largest water-cut RMS; wells without one last, by name.
	slices.SortStableFunc(ws, func(a, b flood.HistoryWell) int {
		an, bn := math.IsNaN(a.WaterCutRMS), math.IsNaN(b.WaterCutRMS)
		switch {
		case an && bn:
			return cmp.Compare(a.Name, b.Name)
		case an:
			return 1
		case bn:
			return -1
		}
		return cmp.Compare(b.WaterCutRMS, a.WaterCutRMS)
	})
	row := func(w flood.HistoryWell) {
		fmt.Fprintf(stdout, "%-10s %12s %12s %10s %10s %10s\n", w.Name, days(w.ObservedBreakthrough), days(w.ModelBreakthrough),
			signedDays(w.BreakthroughError), fixed(w.WaterCutRMS, "%.3f"), fixed(w.CumOilError, "%+.1f%%", 100))
	}
	for _, w := range ws {
		row(w)
	}
	row(h.Field)
}

func signedDays(v float64) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	return fmt.Sprintf("%+.0f", v)
}

// fixed formats v with format (after multiplying by scale[0], if given),
// or "n/a" when v is not defined.
func fixed(v float64, format string, scale ...float64) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	if len(scale) > 0 {
		v *= scale[0]
	}
	return fmt.Sprintf(format, v)
}

// count writes n with the noun, plural when n is not 1.
func count(n int, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	return fmt.Sprintf("%d %ss", n, noun)
}

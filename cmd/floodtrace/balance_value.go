package main

import (
	"fmt"

	"floodtrace/balance"
)

// objectiveWords describes the objective of a balance for the printout
// and the report: what it measures ("oil at day 1200", "oil from the end
// of the history (day 365) to day 1200", "value at day 1200, discounted
// to day 0") and how to print an amount of it (reservoir volume with its
// unit, or a value in the currency of the value block).
func objectiveWords(r *balance.Result, vol string) (what string, amount func(float64) string) {
	amount = func(x float64) string { return fmt.Sprintf("%.0f %s", x, vol) }
	if r.Objective == balance.Value {
		amount = func(x float64) string { return fmt.Sprintf("%.0f", x) }
		if r.HistoryEnd > 0 {
			return fmt.Sprintf("value from the end of the history (day %g) to day %g, discounted to day %g", r.HistoryEnd, r.Horizon, r.HistoryEnd), amount
		}
		return fmt.Sprintf("value at day %g, discounted to day 0", r.Horizon), amount
	}
	if r.HistoryEnd > 0 {
		return fmt.Sprintf("oil from the end of the history (day %g) to day %g", r.HistoryEnd, r.Horizon), amount
	}
	return fmt.Sprintf("oil at day %g", r.Horizon), amount
}

// percent is the change of the objective in percent, or "" when the
// current objective is not positive (a value may be negative).
func percent(now, rec float64) string {
	if !(now > 0) {
		return ""
	}
	return fmt.Sprintf(", %+.2f%%", 100*(rec-now)/now)
}

// signed puts a plus sign before a formatted amount that has no minus.
func signed(a string) string {
	if len(a) > 0 && a[0] == '-' {
		return a
	}
	return "+" + a
}

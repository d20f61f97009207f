package screen

import (
	"fmt"
	"math"

	"floodtrace/flood"
	"floodtrace/reservoir"
)

// RunOutcome is what a screen keeps of one run (one candidate on one
// realization). Volumes are reservoir volumes at the horizon.
type RunOutcome struct {
	Realization string  `json:"realization"`
	CumOil      float64 `json:"cum_oil"`
	CumWater    float64 `json:"cum_water"`
	CumInjected float64 `json:"cum_injected"`
	// OOIP is the model's oil originally in place (reservoir volume), the
	// denominator of the recovery factor.
	OOIP float64 `json:"ooip"`
	// Value is the discounted cash flow of the spec's Economics (0
	// prices give 0 less the well cost).
	Value float64 `json:"value"`
	// FirstBreakthrough is the first arrival of injected water at any
	// producer, days; nil when none arrives before the horizon.
	FirstBreakthrough *float64 `json:"first_breakthrough_days"`
	Warnings          []string `json:"warnings,omitempty"`
	// Error is set when the run failed; the other fields are then zero.
	Error string `json:"error,omitempty"`
}

// Objective returns the run's value of objective o.
func (r RunOutcome) Objective(o Objective) float64 {
	if o == Value {
		return r.Value
	}
	return r.CumOil
}

// discountFactor is reservoir.DiscountFactor: the present worth of one
// unit received t days from now at an annual discount rate.
func discountFactor(rate, t float64) float64 { return reservoir.DiscountFactor(rate, t) }

// cashFlow is e.CashFlow (reservoir.Economics.CashFlow): the discounted
// cash flow of a run from its cumulative curves at the report times, less
// e.WellCost per new well.
func cashFlow(times, cumOil, cumWater, cumInjected []float64, e Economics, newWells int) (float64, error) {
	return e.CashFlow(times, cumOil, cumWater, cumInjected, newWells)
}

// summarize reduces a finished run to its outcome.
func summarize(r *flood.Result, e Economics, newWells int) (RunOutcome, error) {
	n := len(r.Times)
	if n == 0 || len(r.FieldCumOil) != n || len(r.FieldCumWater) != n || len(r.PVI) != n {
		return RunOutcome{}, fmt.Errorf("run has %d report times and curves of other lengths", n)
	}
	inj := make([]float64, n)
	for k := range inj {
		inj[k] = r.PVI[k] * r.PoreVolume
	}
	v, err := cashFlow(r.Times, r.FieldCumOil, r.FieldCumWater, inj, e, newWells)
	if err != nil {
		return RunOutcome{}, err
	}
	out := RunOutcome{CumOil: r.FieldCumOil[n-1], CumWater: r.FieldCumWater[n-1], CumInjected: inj[n-1], OOIP: r.OOIP, Value: v}
	bt := math.Inf(1)
	for _, p := range r.Producers {
		if !math.IsNaN(p.Breakthrough) {
			bt = math.Min(bt, p.Breakthrough)
		}
	}
	if !math.IsInf(bt, 1) {
		out.FirstBreakthrough = &bt
	}
	for _, x := range []float64{out.CumOil, out.CumWater, out.CumInjected, out.Value} {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return RunOutcome{}, fmt.Errorf("run gave a non-finite result (cum oil %g, cum water %g, injected %g, value %g)",
				out.CumOil, out.CumWater, out.CumInjected, out.Value)
		}
	}
	out.Warnings = r.Warnings
	return out, nil
}

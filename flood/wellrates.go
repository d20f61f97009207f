package flood

import (
	"math"
	"sort"

	"floodtrace/reservoir"
)

// WellRate is one row of wells.csv: a well's control, rates and BHP at a
// pressure solve, or at the end of the run.
type WellRate struct {
	WellRecord
	// Oil and Water split Rate (the liquid rate, reservoir volume per day):
	// for a producer by the water cut reported at or before Time (0 before
	// the first report; at the end of the run, the last report's oil and
	// water rates); an injector injects water only.
	Oil, Water float64
	// End marks the row of the rates in force at the end of the run.
	End bool
}

// WellRates returns the rows of wells.csv: the well log (one row per well
// per pressure solve), then one row per well with the rates in force at
// the end of the run, so a reader sees where each well ended as well as
// where it started.
func (r *Result) WellRates() []WellRate {
	prod := map[string]int{}
	for i, p := range r.Producers {
		prod[p.Name] = i
	}
	split := func(x WellRecord) (oil, water float64) {
		if x.Type != reservoir.Producer {
			return 0, x.Rate
		}
		i, ok := prod[x.Well]
		if !ok {
			return x.Rate, 0
		}
		// The last report at or before the solve.
		k := sort.SearchFloat64s(r.Times, x.Time+1e-9) - 1
		wc := 0.0
		if k >= 0 && k < len(r.Producers[i].WaterCut) && !math.IsNaN(r.Producers[i].WaterCut[k]) {
			wc = r.Producers[i].WaterCut[k]
		}
		return x.Rate * (1 - wc), x.Rate * wc
	}
	// A producer shut in at its economic limit shows control ShutLimit
	// from that day while it stays shut.
	shutLimit := func(x *WellRecord) {
		if i, ok := prod[x.Well]; ok && r.Producers[i].Limit != "" && x.Time >= r.Producers[i].LimitDay && x.Rate == 0 {
			x.Control = ShutLimit
		}
	}
	out := make([]WellRate, 0, len(r.WellLog)+len(r.Model.Wells))
	last := map[string]int{}
	var order []string
	for _, x := range r.WellLog {
		oil, water := split(x)
		if _, seen := last[x.Well]; !seen {
			order = append(order, x.Well)
		}
		last[x.Well] = len(out)
		shutLimit(&x)
		out = append(out, WellRate{WellRecord: x, Oil: oil, Water: water})
	}
	if len(r.Times) == 0 {
		return out
	}
	end, nt := r.Times[len(r.Times)-1], len(r.Times)
	for _, name := range order {
		x := out[last[name]]
		x.Time, x.End = end, true
		if i, ok := prod[name]; ok && x.Type == reservoir.Producer && len(r.Producers[i].OilRate) == nt {
			x.Oil, x.Water = r.Producers[i].OilRate[nt-1], r.Producers[i].WaterRate[nt-1]
			x.Rate = x.Oil + x.Water
		}
		shutLimit(&x.WellRecord)
		out = append(out, x)
	}
	return out
}

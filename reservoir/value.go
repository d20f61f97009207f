package reservoir

import (
	"fmt"
	"math"

	"gopkg.in/yaml.v3"

	"floodtrace/internal/yamldoc"
)

// Economics prices a flood for a value objective: the value block of a
// case (value:, read by Load for floodtrace balance) and of a screening
// spec (package screen). Prices and costs are per unit of reservoir volume
// of the case (bbl or m3), like every volume of a run.
type Economics struct {
	OilPrice      float64 // per unit of oil produced
	WaterCost     float64 // per unit of water produced (handling)
	InjectionCost float64 // per unit of water injected
	WellCost      float64 // per new well (screening only; a case has none)
	DiscountRate  float64 // per year, e.g. 0.1
}

// EconomicsKeys are the keys of a case's value block; a screening spec
// also takes well_cost.
var EconomicsKeys = []string{"oil_price", "water_cost", "injection_cost", "discount_rate"}

// EconomicsProblem returns what is wrong with value v of key (one of
// EconomicsKeys or well_cost) as a phrase such as "must not be
// negative", or "" when v is accepted: prices and costs not negative, the
// discount rate in [0, 10) per year.
func EconomicsProblem(key string, v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "is not a finite number"
	}
	if key == "discount_rate" {
		if v >= 0 && v < 10 {
			return ""
		}
		return "must be in [0, 10) per year (0.1 is 10%)"
	}
	if v >= 0 {
		return ""
	}
	return "must not be negative"
}

// DiscountFactor is (1+rate)^(-t/365.25): the present worth of one unit
// received t days from now at an annual discount rate (end-of-period
// discounting with a year of 365.25 days; common practice).
func DiscountFactor(rate, t float64) float64 {
	return math.Pow(1+rate, -t/365.25)
}

// CashFlow returns the discounted cash flow of a run from its cumulative
// curves at the report times (days): for each report interval the oil,
// produced water and injected water of the interval are priced
//
//	e.OilPrice*oil - e.WaterCost*water - e.InjectionCost*injected
//
// and discounted by DiscountFactor at the end of the interval, and
// e.WellCost is subtracted per new well at time 0. A simple discounted
// cash flow (common practice): no taxes, royalties, operating costs per
// well or price changes. The slices must have equal lengths.
func (e Economics) CashFlow(times, cumOil, cumWater, cumInjected []float64, newWells int) (float64, error) {
	n := len(times)
	if len(cumOil) != n || len(cumWater) != n || len(cumInjected) != n {
		return 0, fmt.Errorf("cash flow: %d times but %d, %d and %d cumulative values", n, len(cumOil), len(cumWater), len(cumInjected))
	}
	v := -e.WellCost * float64(newWells)
	var t0, o0, w0, i0 float64
	for k := 0; k < n; k++ {
		if times[k] < t0 {
			return 0, fmt.Errorf("cash flow: report times decrease at %g days", times[k])
		}
		net := e.OilPrice*(cumOil[k]-o0) - e.WaterCost*(cumWater[k]-w0) - e.InjectionCost*(cumInjected[k]-i0)
		v += net * DiscountFactor(e.DiscountRate, times[k])
		t0, o0, w0, i0 = times[k], cumOil[k], cumWater[k], cumInjected[k]
	}
	return v, nil
}

// readValue reads a case's value: {oil_price, water_cost, injection_cost,
// discount_rate} block (floodtrace balance --objective value).
func (d *decoder) readValue(m *Model, top *section) {
	if n := yamldoc.Deref(top.vals["value"]); n != nil && n.Kind == yaml.MappingNode {
		for i := 0; i+1 < len(n.Content); i += 2 {
			if n.Content[i].Value == "well_cost" {
				d.fail(nil, n.Content[i], "value.well_cost: a case's value block prices a flood of its own wells (balance drills none); well_cost belongs in a screening spec: remove it")
				return
			}
		}
	}
	s := d.section(top.vals["value"], "value", "", EconomicsKeys, nil)
	if s == nil {
		return
	}
	check := func(key string) func(float64) string {
		return func(v float64) string { return EconomicsProblem(key, v) }
	}
	e := &Economics{
		OilPrice:      d.num(s, "oil_price", 0, check("oil_price")),
		WaterCost:     d.num(s, "water_cost", 0, check("water_cost")),
		InjectionCost: d.num(s, "injection_cost", 0, check("injection_cost")),
		DiscountRate:  d.num(s, "discount_rate", 0, check("discount_rate")),
	}
	if !s.has("oil_price") {
		d.fail(s, s.node, "value: give oil_price (the value of a unit of oil produced); water_cost, injection_cost and discount_rate default to 0")
		return
	}
	if e.OilPrice == 0 {
		d.fail(s, s.vals["oil_price"], "value.oil_price = 0: the value would not reward oil; give a positive price")
		return
	}
	m.Value = e
}

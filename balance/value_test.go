package balance

import (
	"math"
	"testing"

	"floodtrace/reservoir"
)

// TestForecastValueIsOilAtUnitPrice: with an oil price of 1 and no costs
// or discounting, the discounted cash flow telescopes to the oil
// recovered (arithmetic of the cash flow, common practice), from day 0
// and from a day between report times (linear interpolation).
func TestForecastValueIsOilAtUnitPrice(t *testing.T) {
	m := thief(t)
	fc := &forecaster{m: m, s: Settings{Horizon: m.Run.End}, adj: []int{0, 1}, inj: []Injector{{Name: "I-1", Well: 0}, {Name: "I-2", Well: 1}}}
	f, err := fc.run([]float64{100, 100})
	if err != nil {
		t.Fatal(err)
	}
	r := f.Run
	n := len(r.Times)
	for _, from := range []float64{0, 250, 300} {
		v, err := ForecastValue(r, reservoir.Economics{OilPrice: 1}, from)
		if err != nil {
			t.Fatal(err)
		}
		want := r.FieldCumOil[n-1] - at(r.Times, r.FieldCumOil, from)
		if math.Abs(v-want) > 1e-9*want {
			t.Errorf("from day %g: value %g, oil %g", from, v, want)
		}
	}
	// Discounting at 10 % a year lowers the value of the same oil, and
	// a water cost lowers it by at most the cost of the water produced.
	v0, _ := ForecastValue(r, reservoir.Economics{OilPrice: 1}, 0)
	vd, _ := ForecastValue(r, reservoir.Economics{OilPrice: 1, DiscountRate: 0.1}, 0)
	vw, _ := ForecastValue(r, reservoir.Economics{OilPrice: 1, WaterCost: 0.5}, 0)
	if !(vd < v0) || !(vd > v0*reservoir.DiscountFactor(0.1, m.Run.End)) {
		t.Errorf("discounted value %g not between %g and %g", vd, v0*reservoir.DiscountFactor(0.1, m.Run.End), v0)
	}
	if math.Abs(v0-vw-0.5*r.FieldCumWater[n-1]) > 1e-9*v0 {
		t.Errorf("water cost: value %g, want %g less 0.5 x %g", vw, v0, r.FieldCumWater[n-1])
	}
}

// TestValueObjectivePenalisesWater: with the total free, balancing for
// oil pushes more water in (more throughput, more oil), while a value
// that makes produced water cost as much as oil is worth cuts the thief
// injector, whose water cycles through the streak to P-1 (Thiele and
// Batycky 2006: injection efficiency is what water is worth), and
// injects less in total than the oil balance does.
func TestValueObjectivePenalisesWater(t *testing.T) {
	m := thief(t)
	oil, err := Balance(m, Settings{FreeTotal: true})
	if err != nil {
		t.Fatal(err)
	}
	// Invented prices of the common order (common practice): oil 60 per
	// bbl, produced water handling 2, injection 0.5, 10 % a year.
	m.Value = &reservoir.Economics{OilPrice: 60, WaterCost: 2, InjectionCost: 0.5, DiscountRate: 0.1}
	val, err := Balance(m, Settings{FreeTotal: true, Objective: Value})
	if err != nil {
		t.Fatal(err)
	}
	o1, v1 := oil.Injectors[0], val.Injectors[0]
	t.Logf("oil: total %.1f -> %.1f, I-1 %.1f, I-2 %.1f; value: total %.1f -> %.1f, I-1 %.1f, I-2 %.1f, value %.0f -> %.0f",
		oil.TotalNow, oil.TotalRecommended, o1.RateRecommended, oil.Injectors[1].RateRecommended,
		val.TotalNow, val.TotalRecommended, v1.RateRecommended, val.Injectors[1].RateRecommended, val.Now.Objective, val.Recommended.Objective)
	if !(oil.TotalRecommended > oil.TotalNow) {
		t.Errorf("oil balance with a free total: total %g -> %g, want more water", oil.TotalNow, oil.TotalRecommended)
	}
	if !val.Improved || !(val.Recommended.Objective > val.Now.Objective) {
		t.Fatalf("value balance found nothing better: %g -> %g", val.Now.Objective, val.Recommended.Objective)
	}
	if !(v1.RateRecommended < v1.RateNow) || !(v1.RateRecommended < o1.RateRecommended) {
		t.Errorf("value balance: thief I-1 %g -> %g (oil balance %g): want it cut, and below the oil balance's", v1.RateNow, v1.RateRecommended, o1.RateRecommended)
	}
	// The water it keeps goes to I-2, which sweeps the matrix: measured
	// I-1 at its min_rate 20, I-2 at 78.
	if v2 := val.Injectors[1]; !(v2.RateRecommended > 2*v1.RateRecommended) || v1.Limit != "min_rate" {
		t.Errorf("value balance: I-1 %g (limit %q), I-2 %g: want the thief at its min_rate and I-2 well above it", v1.RateRecommended, v1.Limit, v2.RateRecommended)
	}
	if !(val.TotalRecommended < oil.TotalRecommended) {
		t.Errorf("value balance injects %g in total, the oil balance %g: a water cost should inject less", val.TotalRecommended, oil.TotalRecommended)
	}
	// The recommended rates are worth more than the oil balance's rates
	// at this price (the search maximised the value, not the oil).
	fc := &forecaster{m: m, s: Settings{Horizon: m.Run.End, Objective: Value}, adj: []int{0, 1}, inj: val.Injectors}
	f, err := fc.run([]float64{o1.RateRecommended, oil.Injectors[1].RateRecommended})
	if err != nil {
		t.Fatal(err)
	}
	if !(val.Recommended.Objective > f.Objective) {
		t.Errorf("value of the value balance %g not above the value %g of the oil balance's rates", val.Recommended.Objective, f.Objective)
	}
}

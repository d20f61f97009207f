package screen

import (
	"math"
	"testing"

	"floodtrace/flood"
)

// TestCashFlowAnnuity: a constant yearly net cash flow C over n years,
// discounted at the end of each year at rate r, is worth
// C (1 - (1+r)^-n) / r (the present worth of a uniform series, the
// annuity formula of engineering economics; common practice).
func TestCashFlowAnnuity(t *testing.T) {
	const n, r = 10, 0.1
	const oilPerYear, waterPerYear, injPerYear = 1000.0, 300.0, 1500.0
	e := Economics{OilPrice: 70, WaterCost: 2, InjectionCost: 1, WellCost: 3.5e6, DiscountRate: r}
	var times, oil, water, inj []float64
	for k := 1; k <= n; k++ {
		times = append(times, 365.25*float64(k))
		oil = append(oil, oilPerYear*float64(k))
		water = append(water, waterPerYear*float64(k))
		inj = append(inj, injPerYear*float64(k))
	}
	c := 70*oilPerYear - 2*waterPerYear - 1*injPerYear
	want := c*(1-math.Pow(1+r, -n))/r - 2*3.5e6
	got, err := cashFlow(times, oil, water, inj, e, 2)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(got-want) > 1e-9*math.Abs(want) {
		t.Errorf("cash flow %.6f, want %.6f", got, want)
	}
	// Without discounting the cash flow is the plain sum.
	e.DiscountRate = 0
	got, _ = cashFlow(times, oil, water, inj, e, 0)
	if want := c * n; math.Abs(got-want) > 1e-9*want {
		t.Errorf("undiscounted %g, want %g", got, want)
	}
	// The report interval does not matter without discounting: one
	// interval gives the same.
	got1, _ := cashFlow(times[n-1:], oil[n-1:], water[n-1:], inj[n-1:], e, 0)
	if math.Abs(got1-got) > 1e-9*got {
		t.Errorf("one interval %g, ten intervals %g", got1, got)
	}
	if _, err := cashFlow(times, oil[:3], water, inj, e, 0); err == nil {
		t.Error("mismatched lengths accepted")
	}
}

func TestDiscountFactor(t *testing.T) {
	// One year at 10%: 1/1.1; two years: 1/1.21 (definition).
	for _, c := range []struct{ r, t, want float64 }{{0.1, 365.25, 1 / 1.1}, {0.1, 730.5, 1 / 1.21}, {0.25, 0, 1}, {0, 1000, 1}} {
		if got := discountFactor(c.r, c.t); math.Abs(got-c.want) > 1e-14 {
			t.Errorf("DiscountFactor(%g, %g) = %.15g, want %.15g", c.r, c.t, got, c.want)
		}
	}
}

// TestPercentile checks definition 7 of Hyndman and Fan (1996) on worked
// values: for 1..5, h = 4p, so P10 = 1.4, P50 = 3, P90 = 4.6; for
// {1, 2, 3, 4, 10}, P90 = 4 + 0.6*(10-4) = 7.6.
func TestPercentile(t *testing.T) {
	for _, c := range []struct {
		v    []float64
		p    float64
		want float64
	}{
		{[]float64{5, 3, 1, 4, 2}, 10, 1.4},
		{[]float64{1, 2, 3, 4, 5}, 50, 3},
		{[]float64{1, 2, 3, 4, 5}, 90, 4.6},
		{[]float64{1, 2, 3, 4, 10}, 90, 7.6},
		{[]float64{7}, 10, 7},
		{[]float64{2, 4}, 0, 2},
		{[]float64{2, 4}, 100, 4},
		{[]float64{1, math.Inf(1)}, 0, 1},
		{[]float64{math.Inf(1), math.Inf(1), 3}, 50, math.Inf(1)},
	} {
		if got := percentile(c.v, c.p); math.Abs(got-c.want) > 1e-12 && got != c.want {
			t.Errorf("Percentile(%v, %g) = %g, want %g", c.v, c.p, got, c.want)
		}
	}
	if !math.IsNaN(percentile(nil, 50)) {
		t.Error("percentile of nothing is not NaN")
	}
}

func TestSummarize(t *testing.T) {
	r := &flood.Result{
		Times: []float64{365.25, 730.5}, PVI: []float64{0.1, 0.2}, PoreVolume: 1e5,
		FieldCumOil: []float64{8000, 15000}, FieldCumWater: []float64{2000, 5000},
		Producers: []flood.Producer{{Breakthrough: math.NaN()}, {Breakthrough: 400}, {Breakthrough: 250}},
	}
	e := Economics{OilPrice: 50, WaterCost: 1, InjectionCost: 0.5, WellCost: 1e5, DiscountRate: 0.1}
	out, err := summarize(r, e, 1)
	if err != nil {
		t.Fatal(err)
	}
	// Year 1: 50*8000 - 2000 - 0.5*10000 = 393000, discounted by 1.1;
	// year 2: 50*7000 - 3000 - 0.5*10000 = 342000, by 1.21.
	want := 393000/1.1 + 342000/1.21 - 1e5
	if math.Abs(out.Value-want) > 1e-6 {
		t.Errorf("value %g, want %g", out.Value, want)
	}
	if out.CumOil != 15000 || out.CumWater != 5000 || out.CumInjected != 20000 {
		t.Errorf("outcome %+v", out)
	}
	if out.FirstBreakthrough == nil || *out.FirstBreakthrough != 250 {
		t.Errorf("first breakthrough %v, want 250", out.FirstBreakthrough)
	}
	r.FieldCumOil[1] = math.NaN()
	if _, err := summarize(r, e, 1); err == nil {
		t.Error("a NaN result was accepted")
	}
}

package reservoir

import (
	"math"
	"strings"
	"testing"
)

const valueBase = `units: field
grid: {nx: 10, ny: 8, dx: 100, dy: 100}
rock: {perm: 150, porosity: 0.2, thickness: 25}
fluids: {water_viscosity: 0.5, oil_viscosity: 3, initial_water_saturation: 0.2}
relperm:
  corey: {swc: 0.2, sor: 0.25, krw_max: 0.35, kro_max: 0.9, nw: 2.5, no: 2}
wells:
  - {name: I-1, type: injector, x: 150, y: 150, rate: 1000}
  - {name: P-1, type: producer, x: 850, y: 650, bhp: 800}
`

func TestValueBlock(t *testing.T) {
	for _, c := range []struct {
		name, value string
		want        *Economics
		err         string
	}{
		{"none", "", nil, ""},
		{"full", "value: {oil_price: 60, water_cost: 2, injection_cost: 0.5, discount_rate: 0.1}\n", &Economics{OilPrice: 60, WaterCost: 2, InjectionCost: 0.5, DiscountRate: 0.1}, ""},
		{"price only", "value: {oil_price: 45}\n", &Economics{OilPrice: 45}, ""},
		{"zero price", "value: {oil_price: 0}\n", nil, "case.yaml:10: value.oil_price = 0"},
		{"negative injection", "value: {oil_price: 60, injection_cost: -1}\n", nil, "value.injection_cost = -1 must not be negative"},
		{"not a mapping", "value: 60\n", nil, "value must be a mapping"},
	} {
		m, err := Parse("case.yaml", []byte(valueBase+c.value))
		if c.err != "" {
			if err == nil || !strings.Contains(err.Error(), c.err) {
				t.Errorf("%s: error %v, want %q", c.name, err, c.err)
			}
			continue
		}
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if (m.Value == nil) != (c.want == nil) || m.Value != nil && *m.Value != *c.want {
			t.Errorf("%s: value %+v, want %+v", c.name, m.Value, c.want)
		}
	}
}

// TestEconomicsCashFlow: one interval of a year at 10 % is worth 1/1.1
// of its net (end-of-period discounting, common practice).
func TestEconomicsCashFlow(t *testing.T) {
	e := Economics{OilPrice: 50, WaterCost: 2, InjectionCost: 1, DiscountRate: 0.1}
	v, err := e.CashFlow([]float64{365.25}, []float64{100}, []float64{40}, []float64{150}, 0)
	if err != nil {
		t.Fatal(err)
	}
	if want := (50*100 - 2*40 - 1*150) / 1.1; math.Abs(v-want) > 1e-9*want {
		t.Errorf("cash flow %g, want %g", v, want)
	}
}

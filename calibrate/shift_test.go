package calibrate

import (
	"math"
	"testing"
)

// TestGeneralizedShift recovers the delay of a curve that is a shifted
// copy of the model's (He, Datta-Gupta and Yoon 2002: the generalized
// travel time of a pure shift is the shift itself).
func TestGeneralizedShift(t *testing.T) {
	curve := func(t float64) float64 { // a water-cut rise after day 300 (invented)
		if t < 300 {
			return 0
		}
		return 0.9 * (1 - math.Exp(-(t-300)/250))
	}
	var mt, mwc []float64
	for d := 0.0; d <= 3000; d += 5 {
		mt, mwc = append(mt, d), append(mwc, curve(d))
	}
	for _, c := range []struct {
		name  string
		delay float64
	}{{"later", 137}, {"earlier", -88}, {"none", 0}} {
		t.Run(c.name, func(t *testing.T) {
			var ot, owc []float64
			for d := 15.0; d <= 1500; d += 30 {
				ot, owc = append(ot, d), append(owc, curve(d-c.delay))
			}
			got := generalizedShift(ot, owc, mt, mwc, 1500)
			// Grid step 1500/400 = 3.75 days, refined by a parabola:
			// measured within 0.5 day.
			if math.Abs(got-c.delay) > 1.5 {
				t.Errorf("shift %g, want %g", got, c.delay)
			}
		})
	}
	flat := make([]float64, len(mt))
	if s := generalizedShift([]float64{100, 200}, []float64{0.3, 0.5}, mt, flat, 1500); !math.IsNaN(s) {
		t.Errorf("flat model curve: shift %g, want NaN", s)
	}
}

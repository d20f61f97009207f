package reservoir

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestPowerMatchesPow checks the exponent-2 shortcut of Corey against the
// standard library's math.Pow, bit for bit, on random saturations over
// [0, 1] and on small values down to the cut-off, and other exponents.
func TestPowerMatchesPow(t *testing.T) {
	r := rand.New(rand.NewPCG(19, 2))
	for i := range 200_000 {
		x := r.Float64()
		if i%2 == 0 {
			x = math.Ldexp(x, -r.IntN(520))
		}
		for _, n := range []float64{1, 1.5, 2, 3, 4} {
			if got, want := power(x, n), math.Pow(x, n); got != want {
				t.Fatalf("power(%g, %g) = %g, math.Pow gives %g", x, n, got, want)
			}
		}
	}
	for _, x := range []float64{0, 1, 1e-150, 1.0000000001e-150, 0.5, 1 - 0x1p-53} {
		if got, want := power(x, 2), math.Pow(x, 2); got != want {
			t.Errorf("power(%g, 2) = %g, math.Pow gives %g", x, got, want)
		}
	}
}

package streamline

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestSumOver checks the register-held running sums of the flux fitting
// against adding to the slot in memory line by line: the same additions
// in the same order, so the same bits, whether the slots come in runs,
// alternate or come back after other slots.
func TestSumOver(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for _, tc := range []struct {
		name  string
		slots int
		run   int // mean run length of one slot
	}{
		{"one slot", 1, 1},
		{"runs", 5, 40},
		{"alternating", 3, 1},
		{"returning runs", 9, 6},
	} {
		t.Run(tc.name, func(t *testing.T) {
			const n = 2000
			into, by := make([]int32, n), make([]int32, n)
			flux := make([]float64, n)
			cur := int32(0)
			for i := range n {
				if rng.IntN(tc.run) == 0 {
					cur = int32(rng.IntN(tc.slots))
				}
				into[i], by[i] = cur, int32(rng.IntN(4))
				flux[i] = math.Exp(rng.NormFloat64() * 3)
			}
			fac := []float64{0.3, 1, 1.7e3, 1 / 3.0}
			start := make([]float64, tc.slots)
			for g := range start {
				start[g] = rng.Float64()
			}
			// The reference: into memory, one line at a time.
			want, wantFlux := append([]float64(nil), start...), append([]float64(nil), flux...)
			for i := range wantFlux {
				wantFlux[i] *= fac[by[i]]
				want[into[i]] += wantFlux[i]
			}
			got := append([]float64(nil), start...)
			sumOver(got, into, flux, fac, by)
			for g := range want {
				if math.Float64bits(got[g]) != math.Float64bits(want[g]) {
					t.Errorf("slot %d: sum %v, want %v (bit for bit)", g, got[g], want[g])
				}
			}
			for i := range flux {
				if math.Float64bits(flux[i]) != math.Float64bits(wantFlux[i]) {
					t.Fatalf("line %d: flux %v, want %v", i, flux[i], wantFlux[i])
				}
			}
		})
	}
	sumOver(nil, nil, nil, nil, nil) // no lines: nothing to do
}

package pressure

import (
	"math"
	"strings"
	"testing"

	"floodtrace/reservoir"
)

// TestProducerMaxRate: in the symmetric five-spot each producer makes a
// quarter of the injection (symmetry, common practice); a liquid limit of
// 150 on P-1 holds it there and the other three share the rest equally
// (continuity of incompressible flow and the symmetry of the three),
// a limit above its share changes nothing, and the last BHP producer of
// the region is not held (it must produce what is injected).
func TestProducerMaxRate(t *testing.T) {
	m := fiveSpot(t, 21, 1000)
	m.Wells[1].MaxRate = 150
	sol, err := Solve(Input{Model: m}, Settings{Tol: 1e-12})
	if err != nil {
		t.Fatal(err)
	}
	p1 := sol.Wells[1]
	if !p1.AtMaxRate || p1.Control != reservoir.RateControl || math.Abs(-p1.Q-150) > 1e-9 || !(p1.BHP > 1000) {
		t.Errorf("P-1: %+v; want held at 150 on rate control with its BHP above 1000", p1)
	}
	// P-2 (south-east) and P-3 (north-west) are mirror images across the
	// diagonal through P-1; P-4 is farther from the capped corner.
	if d := sol.Wells[2].Q - sol.Wells[3].Q; math.Abs(d) > 1e-8*1000 {
		t.Errorf("P-2 %g and P-3 %g differ", sol.Wells[2].Q, sol.Wells[3].Q)
	}
	prod := 0.0
	for _, w := range sol.Wells[1:] {
		prod -= w.Q
	}
	if math.Abs(prod-1000) > 1e-8*1000 {
		t.Errorf("production %g, injection 1000", prod)
	}
	if len(sol.Warnings) != 1 || !strings.Contains(sol.Warnings[0], "P-1: max_rate 150 reached") {
		t.Errorf("warnings %q", sol.Warnings)
	}
	// Above its share of 250: no change.
	m.Wells[1].MaxRate = 300
	sol, err = Solve(Input{Model: m}, Settings{Tol: 1e-12})
	if err != nil || sol.Wells[1].AtMaxRate || math.Abs(-sol.Wells[1].Q-250) > 1e-8*250 {
		t.Errorf("limit above the share: %+v, %v", sol.Wells[1], err)
	}
	// Every producer limited below the injection: the last one on BHP
	// control is not held and a warning says so.
	for i := 1; i < 5; i++ {
		m.Wells[i].MaxRate = 100
	}
	sol, err = Solve(Input{Model: m}, Settings{Tol: 1e-12})
	if err != nil {
		t.Fatal(err)
	}
	held, prod := 0, 0.0
	for _, w := range sol.Wells[1:] {
		prod -= w.Q
		if w.AtMaxRate {
			held++
		}
	}
	if held != 3 || math.Abs(prod-1000) > 1e-8*1000 || !strings.Contains(strings.Join(sol.Warnings, "\n"), "last well on BHP control") {
		t.Errorf("all limited: %d held, production %g, warnings %q", held, prod, sol.Warnings)
	}
}

package verify

import "testing"

// TestProblems runs every built-in benchmark problem, as `floodtrace
// verify` does, and fails on any failed check.
func TestProblems(t *testing.T) {
	for _, p := range All() {
		t.Run(p.Name(), func(t *testing.T) {
			cs, err := p.Run()
			if err != nil {
				t.Fatal(err)
			}
			if len(cs) == 0 {
				t.Fatal("no checks")
			}
			for _, c := range cs {
				t.Logf("%-40s ref %-12.6g got %-12.6g tol %s  (%s)", c.Quantity, c.Reference, c.Computed, c.TolString(), c.Source)
				if !c.Pass {
					t.Errorf("%s: %s = %g, reference %g (%s), tolerance %s", c.Problem, c.Quantity, c.Computed, c.Reference, c.Source, c.TolString())
				}
			}
		})
	}
}

// TestCheckCanFail makes sure a wrong value fails.
func TestCheckCanFail(t *testing.T) {
	if c := check("x", "q", "s", 1, 1.1, 0.05, true); c.Pass {
		t.Error("a 10% error passed a 5% tolerance")
	}
	if c := check("x", "q", "s", 0, 0.2, 0.1, false); c.Pass {
		t.Error("an absolute error of 0.2 passed a 0.1 tolerance")
	}
}

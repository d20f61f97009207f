package verify

import (
	"bytes"
	"math"
	"strings"
	"testing"
)

// TestProblems runs every built-in benchmark problem, as `floodtrace
// verify` does, and fails on any failed check. It logs each check's error
// beside its tolerance (the tolerances are a few times the errors measured
// when they were set; see docs/VERIFICATION.md).
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
				e := math.Abs(c.Computed - c.Reference)
				if c.Relative {
					e /= math.Abs(c.Reference)
				}
				t.Logf("%-40s ref %-12.6g got %-12.6g error %-9.2e tol %s  (%s)", c.Quantity, c.Reference, c.Computed, e, c.TolString(), c.Source)
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

// TestWellIndexCheckCanFail: a skin of 0.05 changes the well's BHP by
// 141.2*q*mu/(k*h)*0.05, about 0.9% of the drawdown to 10 cells, the
// effect of a 5% error in the equivalent radius. The well-index check must
// catch it, while the equivalent radius, fitted to block pressures only,
// must not move.
func TestWellIndexCheckCanFail(t *testing.T) {
	cs, err := PeacemanSquare{Skin: 0.05}.Run()
	if err != nil {
		t.Fatal(err)
	}
	if len(cs) != 2 {
		t.Fatalf("%d checks, want 2", len(cs))
	}
	if !cs[0].Pass {
		t.Errorf("equivalent radius %g failed with a skin, which it does not see", cs[0].Computed)
	}
	if cs[1].Pass {
		t.Errorf("well index: BHP - p = %g passed against %g with a skin of 0.05", cs[1].Computed, cs[1].Reference)
	}
}

// TestKinds: the engine comparison is the one cross-check; every other
// built-in problem is checked against an outside value.
func TestKinds(t *testing.T) {
	for _, p := range All() {
		want := KindReference
		if p.Name() == "engine-agreement" {
			want = KindCrossCheck
		}
		if got := KindOf(p); got != want {
			t.Errorf("%s: kind %q, want %q", p.Name(), got, want)
		}
	}
}

// TestWriteTable: references first under their heading, cross-checks in a
// part of their own under theirs, a failed run shown with its error.
func TestWriteTable(t *testing.T) {
	cs := []Check{
		{Problem: "x-cross", Kind: KindCrossCheck, Quantity: "q3", Source: "s3", Reference: 0, Computed: 0.01, Tolerance: 0.05, Pass: true},
		{Problem: "a-ref", Kind: KindReference, Quantity: "q1", Source: "s1", Reference: 1, Computed: 1, Tolerance: 1e-8, Relative: true, Pass: true},
		{Problem: "b-ref", Kind: KindReference, Quantity: "run", Error: "boom", Reference: math.NaN(), Computed: math.NaN()},
	}
	var b bytes.Buffer
	if err := WriteTable(&b, cs); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	t.Logf("\n%s", out)
	iRef, iCross := strings.Index(out, HeadingReference), strings.Index(out, HeadingCrossCheck)
	ia, ib, ix := strings.Index(out, "a-ref"), strings.Index(out, "b-ref"), strings.Index(out, "x-cross")
	if iRef != 0 || !(iRef < ia && ia < ib && ib < iCross && iCross < ix) {
		t.Errorf("sections out of order (headings at %d, %d; rows at %d, %d, %d):\n%s", iRef, iCross, ia, ib, ix, out)
	}
	if !strings.Contains(out, "FAIL: boom") || strings.Count(out, "problem  ") != 2 {
		t.Errorf("want the error row and one header per part:\n%s", out)
	}
	b.Reset()
	if err := WriteTable(&b, cs[1:2]); err != nil {
		t.Fatal(err)
	}
	if strings.Contains(b.String(), HeadingCrossCheck) {
		t.Errorf("a table without cross-checks has their heading:\n%s", b.String())
	}
}

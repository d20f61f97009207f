package verify

import (
	"fmt"
	"io"
	"math"
	"text/tabwriter"
)

// The kinds of check (Check.Kind).
const (
	// KindReference is a check against a published or closed-form value.
	KindReference = "reference"
	// KindCrossCheck is a check of floodtrace against itself, such as two
	// of its engines that share the pressure solver, the well model and
	// the bookkeeping: it finds disagreements, but it is not a
	// verification against an outside value.
	KindCrossCheck = "cross-check"
)

// Check is one compared quantity of a problem.
type Check struct {
	Problem string `json:"problem"`
	// Kind is KindReference or KindCrossCheck.
	Kind      string  `json:"kind"`
	Quantity  string  `json:"quantity"`
	Reference float64 `json:"reference"`
	Source    string  `json:"source"`
	Computed  float64 `json:"computed"`
	// Tolerance is relative when Relative is set, absolute otherwise.
	Tolerance float64 `json:"tolerance"`
	Relative  bool    `json:"relative_tolerance"`
	Pass      bool    `json:"pass"`
	Error     string  `json:"error,omitempty"`
}

// Problem is a benchmark problem.
type Problem interface {
	// Name is a short identifier.
	Name() string
	// Run computes the problem and returns its checks.
	Run() ([]Check, error)
}

// CrossChecker is implemented by the problems whose checks compare
// floodtrace with itself (KindCrossCheck); the others are references.
type CrossChecker interface {
	// CrossCheck reports whether the problem is a cross-check.
	CrossCheck() bool
}

// KindOf returns the kind of the checks of a problem.
func KindOf(p Problem) string {
	if c, ok := p.(CrossChecker); ok && c.CrossCheck() {
		return KindCrossCheck
	}
	return KindReference
}

// All returns the built-in problems in their reporting order.
func All() []Problem {
	return []Problem{
		Darcy1D{},
		PeacemanSquare{},
		PeacemanAnisotropic{},
		Doublet{},
		FiveSpotSweep{N: 101},
		WelgeFront{},
		ChannelOutlet{},
		TwoChannelLorenz{},
		EngineAgreement{},
	}
}

// RunAll runs every problem and sets the kind of its checks; a problem
// that fails to run gives one failed check holding the error.
func RunAll(ps []Problem) []Check {
	var out []Check
	for _, p := range ps {
		kind := KindOf(p)
		cs, err := p.Run()
		if err != nil {
			out = append(out, Check{Problem: p.Name(), Kind: kind, Quantity: "run", Error: err.Error(), Reference: math.NaN(), Computed: math.NaN()})
			continue
		}
		for i := range cs {
			cs[i].Kind = kind
		}
		out = append(out, cs...)
	}
	return out
}

// Section headings of the table written by WriteTable.
const (
	HeadingReference  = "Checks against published or closed-form values"
	HeadingCrossCheck = "Cross-checks: floodtrace against itself, not against an outside value"
)

// WriteTable writes the checks as the table of `floodtrace verify`: the
// checks against published or closed-form values first, then the
// cross-checks, each part under its heading and in the order given; a part
// with no checks is left out.
func WriteTable(w io.Writer, cs []Check) error {
	first := true
	for _, sec := range []struct{ kind, heading string }{{KindReference, HeadingReference}, {KindCrossCheck, HeadingCrossCheck}} {
		var part []Check
		for _, c := range cs {
			if (c.Kind == KindCrossCheck) == (sec.kind == KindCrossCheck) {
				part = append(part, c)
			}
		}
		if len(part) == 0 {
			continue
		}
		if !first {
			if _, err := fmt.Fprintln(w); err != nil {
				return err
			}
		}
		first = false
		if _, err := fmt.Fprintf(w, "%s\n\n", sec.heading); err != nil {
			return err
		}
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "problem\tquantity\treference\tsource\tcomputed\ttolerance\tresult")
		for _, c := range part {
			if c.Error != "" {
				fmt.Fprintf(tw, "%s\t%s\t\t\t\t\tFAIL: %s\n", c.Problem, c.Quantity, c.Error)
				continue
			}
			res := "pass"
			if !c.Pass {
				res = "FAIL"
			}
			fmt.Fprintf(tw, "%s\t%s\t%.6g\t%s\t%.6g\t%s\t%s\n", c.Problem, c.Quantity, c.Reference, c.Source, c.Computed, c.TolString(), res)
		}
		if err := tw.Flush(); err != nil {
			return err
		}
	}
	return nil
}

func check(problem, quantity, source string, ref, got, tol float64, relative bool) Check {
	c := Check{Problem: problem, Kind: KindReference, Quantity: quantity, Reference: ref, Source: source, Computed: got, Tolerance: tol, Relative: relative}
	d := math.Abs(got - ref)
	if relative {
		d /= math.Abs(ref)
	}
	c.Pass = d <= tol && !math.IsNaN(got)
	return c
}

// TolString formats a check's tolerance for the table.
func (c Check) TolString() string {
	if c.Relative {
		return fmt.Sprintf("%.0e rel", c.Tolerance)
	}
	return fmt.Sprintf("%.0e abs", c.Tolerance)
}

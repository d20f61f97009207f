package verify

import (
	"fmt"
	"math"
)

// Check is one compared quantity of a problem.
type Check struct {
	Problem   string  `json:"problem"`
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

// RunAll runs every problem; a problem that fails to run gives one failed
// check holding the error.
func RunAll(ps []Problem) []Check {
	var out []Check
	for _, p := range ps {
		cs, err := p.Run()
		if err != nil {
			out = append(out, Check{Problem: p.Name(), Quantity: "run", Error: err.Error(), Reference: math.NaN(), Computed: math.NaN()})
			continue
		}
		out = append(out, cs...)
	}
	return out
}

func check(problem, quantity, source string, ref, got, tol float64, relative bool) Check {
	c := Check{Problem: problem, Quantity: quantity, Reference: ref, Source: source, Computed: got, Tolerance: tol, Relative: relative}
	d := math.Abs(got - ref)
	if relative {
		d /= math.Abs(ref)
	}
	c.Pass = d <= tol && !math.IsNaN(got)
	return c
}

// String formats a check's tolerance for the table.
func (c Check) TolString() string {
	if c.Relative {
		return fmt.Sprintf("%.0e rel", c.Tolerance)
	}
	return fmt.Sprintf("%.0e abs", c.Tolerance)
}

package flood

import (
	"fmt"
	"math"

	"floodtrace/pressure"
	"floodtrace/reservoir"
)

// UnphysicalError is a result that breaks a physical invariant every run
// must keep: an injector that produces, a producer that injects, a
// negative bottom-hole pressure where pressures are absolute, negative
// cumulative volumes. It is floodtrace's fault, never the input's (the
// pressure solver shuts wells that would flow against their type), and
// the command line reports it as an internal error (exit code 3) instead
// of writing impossible output.
type UnphysicalError struct {
	Engine string // streamline or grid
	Msg    string // what broke, naming the well and the time
}

func (e *UnphysicalError) Error() string {
	return fmt.Sprintf("flood: internal check failed (%s engine): %s", e.Engine, e.Msg)
}

// checkSolve checks the wells of one pressure solution at day t: no open
// injector produces, no open producer injects, and no BHP is negative
// outside regions whose pressures are relative (pressure.WellResult
// Relative).
func checkSolve(engine Engine, sol *pressure.Solution, t float64) error {
	for _, w := range sol.Wells {
		bad := func(format string, a ...any) error {
			return &UnphysicalError{Engine: engine.String(), Msg: fmt.Sprintf("well %s at day %g: ", w.Name, t) + fmt.Sprintf(format, a...)}
		}
		if w.Shut {
			continue
		}
		if w.Type == reservoir.Injector && w.Q < 0 {
			return bad("the injector produces %g", -w.Q)
		}
		if w.Type == reservoir.Producer && w.Q > 0 {
			return bad("the producer injects %g", w.Q)
		}
		if !w.Relative && w.BHP < 0 {
			return bad("negative bottom-hole pressure %g", w.BHP)
		}
	}
	return nil
}

// checkResult checks the totals of a finished run: pore volumes injected,
// the injectors' cumulative injection and the producers' cumulative oil and
// water are never negative (beyond 1e-9 of the pore volume, round-off).
func checkResult(r *Result) error {
	tol := 1e-9 * r.PoreVolume
	bad := func(format string, a ...any) error {
		return &UnphysicalError{Engine: r.Engine.String(), Msg: fmt.Sprintf(format, a...)}
	}
	for k, v := range r.PVI {
		if v*r.PoreVolume < -tol || math.IsNaN(v) {
			return bad("pore volumes injected %g at day %g", v, r.Times[k])
		}
	}
	for _, in := range r.Injectors {
		if in.CumWater < -tol || in.Rate < 0 {
			return bad("injector %s: cumulative injection %g, rate %g", in.Name, in.CumWater, in.Rate)
		}
	}
	for _, p := range r.Producers {
		if p.Rate < 0 {
			return bad("producer %s: rate %g (it injects)", p.Name, p.Rate)
		}
		for k := range p.CumOil {
			if p.CumOil[k] < -tol || p.CumWater[k] < -tol {
				return bad("producer %s at day %g: cumulative oil %g, water %g", p.Name, r.Times[k], p.CumOil[k], p.CumWater[k])
			}
		}
	}
	return nil
}

package main

import (
	"encoding/json"
	"fmt"
	"math"
	"strings"
	"text/tabwriter"

	"github.com/spf13/pflag"

	"floodtrace/verify"
)

var verifyFlags struct {
	json bool
	only string
}

func init() {
	register(&command{
		Name:  "verify",
		Usage: "verify [--json] [--only NAME,...]",
		Short: "run the built-in benchmark problems against published results",
		Long: `Verify runs floodtrace's built-in benchmark problems through the same code as a
user's case and compares each result with its published or closed-form value:
Darcy's law, Peaceman's well-block radius (1978, 1983), superposition of radial
flow for a doublet, the five-spot sweep at breakthrough (Craig 1971 after
Muskat), the Welge front saturation, the Buckley-Leverett outlet water cut, the
Lorenz coefficient of two sealed channels, and the agreement of the streamline
and grid engines. It prints one row per check and exits with code 1 if any
check fails.

Examples:
  floodtrace verify
  floodtrace verify --json > verify.json
  floodtrace verify --only doublet,welge-front`,
		NArgs: exactly(0),
		Flags: func(fs *pflag.FlagSet) {
			fs.BoolVar(&verifyFlags.json, "json", false, "print the checks as JSON")
			fs.StringVar(&verifyFlags.only, "only", "", "comma-separated problem names to run")
		},
		Run: runVerify,
	})
}

func runVerify(args []string) error {
	ps := verify.All()
	if verifyFlags.only != "" {
		want := map[string]bool{}
		for _, n := range strings.Split(verifyFlags.only, ",") {
			want[strings.TrimSpace(n)] = true
		}
		var sel []verify.Problem
		for _, p := range ps {
			if want[p.Name()] {
				sel = append(sel, p)
				delete(want, p.Name())
			}
		}
		for n := range want {
			var names []string
			for _, p := range ps {
				names = append(names, p.Name())
			}
			return usageError{fmt.Sprintf("no problem named %q (problems: %s)", n, strings.Join(names, ", "))}
		}
		ps = sel
	}
	cs := verify.RunAll(ps)
	failed := 0
	for _, c := range cs {
		if !c.Pass {
			failed++
		}
	}
	if verifyFlags.json {
		type out struct {
			Checks []verify.Check `json:"checks"`
			Failed int            `json:"failed"`
		}
		for i := range cs { // JSON has no NaN
			if math.IsNaN(cs[i].Reference) {
				cs[i].Reference = 0
			}
			if math.IsNaN(cs[i].Computed) {
				cs[i].Computed = 0
			}
		}
		b, err := json.MarshalIndent(out{cs, failed}, "", "  ")
		if err != nil {
			return internalError{err}
		}
		fmt.Fprintln(stdout, string(b))
	} else {
		tw := tabwriter.NewWriter(stdout, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "problem\tquantity\treference\tsource\tcomputed\ttolerance\tresult")
		for _, c := range cs {
			res := "pass"
			if !c.Pass {
				res = "FAIL"
			}
			if c.Error != "" {
				fmt.Fprintf(tw, "%s\t%s\t\t\t\t\tFAIL: %s\n", c.Problem, c.Quantity, c.Error)
				continue
			}
			fmt.Fprintf(tw, "%s\t%s\t%.6g\t%s\t%.6g\t%s\t%s\n", c.Problem, c.Quantity, c.Reference, c.Source, c.Computed, c.TolString(), res)
		}
		tw.Flush()
		fmt.Fprintf(stdout, "\n%d of %d checks passed\n", len(cs)-failed, len(cs))
	}
	if failed > 0 {
		return fmt.Errorf("%d check(s) failed", failed)
	}
	return nil
}

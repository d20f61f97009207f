package main

import (
	"encoding/json"
	"fmt"
	"math"
	"strings"

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
Darcy's law, Peaceman's well-block radius (1978, 1983) and the well's BHP
against steady radial flow, superposition of radial flow for a doublet, the
five-spot sweep at breakthrough (Craig 1971 after Muskat), the Welge front
saturation, the Buckley-Leverett outlet water cut and the Lorenz coefficient of
two sealed channels. A second part of the table holds cross-checks, which
compare floodtrace with itself (the streamline and grid engines share the
pressure solver and the well model) and so verify nothing on their own; in
--json each check has a "kind", "reference" or "cross-check". It prints one row
per check and exits with code 1 if any check fails.

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
		if err := verify.WriteTable(stdout, cs); err != nil {
			return internalError{err}
		}
		fmt.Fprintf(stdout, "\n%d of %d checks passed\n", len(cs)-failed, len(cs))
	}
	if failed > 0 {
		return fmt.Errorf("%d check(s) failed", failed)
	}
	return nil
}

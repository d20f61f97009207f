package main

import (
	"fmt"

	"floodtrace/reservoir"
)

func init() {
	register(&command{
		Name:  "check",
		Usage: "check CASE",
		Short: "validate a case and describe the model",
		Long: `Check reads and validates a case file and its maps without running it, and
prints a short description: cells, active cells, pore volume, OOIP, the wells
with their cells and controls, and an estimate of the memory a run needs.
Every problem is reported with the file and the line, row and column, cell or
well that caused it, and exit code 1.

Examples:
  floodtrace check examples/vardel/case.yaml`,
		NArgs: exactly(1),
		Run: func(args []string) error {
			m, err := reservoir.Load(args[0])
			if err != nil {
				return err
			}
			fmt.Fprint(stdout, reservoir.Describe(m))
			return nil
		},
	})
}

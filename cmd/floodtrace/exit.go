package main

import (
	"errors"

	"floodtrace/flood"
	"floodtrace/internal/outdir"
	"floodtrace/pressure"
)

// exitFor is the one place that says whose fault an error is, and so its
// exit code and the first words of its message:
//
//   - 3, internal error: a failure of floodtrace on input that passed
//     validation (a pressure-solver breakdown, *pressure.SolverError; a
//     result that breaks the physics, *flood.UnphysicalError; a panic);
//     the message asks for a report;
//   - 4, the outputs could not be written (*outdir.WriteError: a full
//     disk, a folder without write permission); not a problem of the input;
//   - 1, everything else: bad input (reservoir's *InputError, *WellError
//     and ErrorList, screen's *SpecError, synth's *SettingsError, a folder
//     that is not a finished run) or a refusal (a folder holding other
//     files); the message names the file and the line, cell or well.
//
// Usage errors (2) are told apart before, where the flags are parsed.
func exitFor(err error) (code int, msg string) {
	var ie internalError
	var se *pressure.SolverError
	var fe *flood.UnphysicalError
	var we *outdir.WriteError
	switch {
	case errors.As(err, &ie) || errors.As(err, &se) || errors.As(err, &fe):
		return exitInternal, "internal error: " + err.Error() + "\nplease report this with the case file and the command line"
	case errors.As(err, &we):
		return exitWrite, err.Error() + "\n(the outputs could not be written: check the free space and permissions of the output folder; the input is not at fault)"
	}
	return exitInput, err.Error()
}

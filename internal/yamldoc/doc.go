// Package yamldoc is the one YAML reading layer under floodtrace's case
// files (package reservoir) and screening specs (package screen): it
// parses a single document, follows aliases, reads numbers, and checks a
// mapping against the keys allowed at its place, with one set of rules
// for both file kinds:
//
//   - an alias is followed at most MaxAliasDepth times;
//   - a key with no value (YAML null) is a key without a value: Has
//     reports false and a reader that needs a value says so;
//   - a number may be written plain or quoted ("150" reads as 150), as
//     YAML integers in other bases (0x1f) and with digit separators
//     (1_000); infinities, NaN and values out of float64 range are refused.
//
// Problems come back as values with the node (so the line) and what is
// wrong; each caller turns them into its own error type, which names the
// file.
package yamldoc

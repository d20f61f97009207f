// Package verify holds floodtrace's built-in benchmark problems: small
// cases with a published or closed-form answer, run through the same code
// as a user's case. `floodtrace verify` prints them as a table and the
// unit tests run the same problems.
//
// Each problem is a type whose doc comment names its source, in the manner
// of gonum's optimize/functions test problems.
package verify

// Package parallel splits work into pieces and runs them on several
// goroutines, in the one way every floodtrace package uses, so that the
// promise "results do not depend on the number of cores" is kept in one
// place.
//
// The rule for callers: a function run on index i (or on the piece
// [lo, hi)) writes only to slots that index or piece owns, or to scratch
// owned by its worker; any reduction across pieces is done afterwards, in
// piece order. Then which goroutine takes which piece, and when, changes
// nothing in the result. Piece boundaries that a result does depend on
// (a sum made per piece, for example) are given by the caller as a fixed
// count, never derived from the core count.
//
// Bands writes text formatted in parallel to one writer in order.
package parallel

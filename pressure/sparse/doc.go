// Package sparse holds the sparse linear algebra of the pressure solve: a
// compressed sparse row matrix, preconditioned conjugate gradients and
// preconditioners that can be swapped through a one-method interface.
//
// All reductions run in a fixed order, so results do not depend on the
// number of cores.
package sparse

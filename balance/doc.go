// Package balance recommends how to share the injection among the
// injectors of a case: new injector rates that increase the oil recovered
// (or another objective) over a horizon, at the same total injection or
// within the injectors' limits, each recommendation checked by a forecast
// through package flood and offered only when it beats the current rates.
//
// The evidence is the well-pair efficiency of the streamlines (Thiele and
// Batycky 2006): which injector feeds which producer, with how much water,
// and how much of the producer's oil is attributed to it. Two methods
// propose new rates, the efficiency-weighted reallocation of Thiele and
// Batycky (2006) and a finite-difference gradient of the objective
// through the flood engine (one forecast per injector, run in parallel);
// the better of the two, if it beats the best rates so far, is kept, and
// the search repeats while it improves.
//
// The objective is the oil recovered by the horizon or the discounted
// value of the case's value block (reservoir.Economics). With a
// production history every forecast runs the history as a run does and
// the rates apply from its end. A producer's liquid limit (max_rate)
// holds in every forecast, since the pressure solve honours it.
//
// The package reads no command line and draws nothing: cmd/floodtrace
// parses the flags and render draws the pictures from the data of Result.
package balance

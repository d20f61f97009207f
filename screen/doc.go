// Package screen ranks candidate well placements and layouts of a
// waterflood: new wells on an infill lattice, whole well lists, and the
// regular patterns of the trade (five-spot, inverted nine-spot, direct and
// staggered line drive), each run with the full streamline computation of
// package flood on every permeability realization of an ensemble.
//
// A screen is described by a spec (LoadSpec), expanded into a Plan (the
// candidate list and a hash of every input), executed on all cores
// (Execute) with one line per finished candidate appended to
// results.jsonl, so an interrupted screen resumes where it stopped, and
// ranked (Rank) from those lines. Shards (disjoint round-robin parts of
// the candidate list) run anywhere and merge into the ranking a whole run
// gives.
//
// Objectives. "oil" is the field cumulative oil at the horizon. "value" is
// a simple discounted cash flow (common practice): the sum over report
// intervals of oil_price*oil - water_cost*produced water -
// injection_cost*injected water, each discounted by (1+r)^(-t/365.25) at
// the end of its interval, minus well_cost per new well. It is a screening
// number, not an investment decision.
//
// Percentiles. Over the realizations, the objective of a candidate is
// summarised by its mean and its P90, P50 and P10 in the trade's
// exceedance convention (common practice in reserves and resource
// reporting): Pxx is the value exceeded with xx% probability, so P90 is
// the low, cautious case (the 10th percentile of the values) and P10 the
// high case (the 90th percentile); P90 <= P50 <= P10. Percentiles use
// linear interpolation between order statistics (definition 7 of Hyndman
// and Fan 1996). Ranking by P90 ranks by the cautious case.
//
// ranking.csv columns: rank; candidate (its name); x,y (the new well of an
// infill candidate, blank for layouts and patterns); objective (the mean
// over realizations); objective_p90, objective_p50, objective_p10 (low to high);
// cum_oil and cum_water (field cumulative oil and produced water at the
// horizon, means over realizations); first_breakthrough_days (the first
// arrival of injected water at any producer, the median over realizations
// counting "none before the horizon" as late; blank when that median is
// beyond the horizon); kind (base, infill, layout or pattern);
// incremental_oil and incremental_water (the candidate's cumulative oil and
// water less the base case's on the same realization, means over
// realizations); incremental_recovery_points (the recovery factor at the
// horizon, cumulative oil over the model's OOIP, less the base case's, in
// percentage points). The increments are 0 on the base row and blank when
// the base case has no row.
//
// The base case. The base case's own wells are candidate 0, named "base"
// and of kind "base" (no new well, no well cost), run on every realization
// and ranked with the others, so the ranking shows what each candidate
// adds. A base case with no injector or no producer open before the
// horizon is not run (Plan.BaseSkipped); screen.json's base entry then
// says why the increments are blank. The objective map does not draw it.
package screen

// Package flood runs a waterflood over time: it solves the pressure field,
// traces streamlines, carries the Buckley-Leverett solution along them and
// collects the results a decision needs: per-producer water cut, oil and
// water rates and cumulative volumes, exact breakthrough times, the dynamic
// curve of each producer (its water cut against the average water
// saturation of the volume that drains to it), saturation maps, well-pair
// allocation and flow diagnostics. It also writes the run's output files.
package flood

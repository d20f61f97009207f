package main

import (
	"fmt"
	"time"

	"github.com/spf13/pflag"

	"floodtrace/calibrate"
	"floodtrace/internal/hugeheap"
	"floodtrace/internal/outdir"
	"floodtrace/reservoir"
	"floodtrace/screen"
)

var calibrateFlags struct {
	out         string
	iterations  int
	force       bool
	streamlines int
	workers     int
	pictures    string
	size        string
	quiet       bool
	ensemble    bool
	shard       string
}

func init() {
	register(&command{
		Name:  "calibrate",
		Usage: "calibrate CASE --out DIR [--iterations N]  |  calibrate SPEC --ensemble --out DIR [--shard K/N]  |  calibrate merge DIR... --out DIR",
		Short: "adjust the permeability map to the production history",
		Long: `Calibrate adjusts the case's permeability (perm and perm_y together, one
multiplier per cell) so that the model's water arrives at each producer when the
history says it did, staying as close to the given map as the data allow. The
method is the generalized travel-time inversion (He, Datta-Gupta and Yoon 2002;
Vasco, Yoon and Datta-Gupta 1999): per producer the time shift that best aligns
the model water-cut curve with the observed one, its sensitivity to each cell's
log-permeability from the time of flight of the streamlines reaching the
producer, and a damped, smoothed least-squares update solved by LSQR (Paige and
Saunders 1982). Each step is halved until the misfit does not rise.

The case needs a history; its calibration: block (all keys optional) sets
iterations, damping, smoothness, min_multiplier, max_multiplier,
keep_near_wells with radius, and wells.

DIR receives perm_calibrated.asc (and perm_y_calibrated.asc when the case gives
rock.perm_y), case_calibrated.yaml (ready for floodtrace run), calibration.csv,
calibration.json and pictures: the given and calibrated maps, the change (a
diverging scale centred on 1, with the streamlines), the misfit against
iteration and each producer's water cut observed, with the given map and
calibrated; and report.html, one page with the misfit before and after per
producer and the pictures.

--ensemble reads the argument as a screening spec and calibrates its base case
on each of its realizations (the base case's history and calibration: block,
the realization's permeability), one subfolder of DIR per realization (named
after the map file) and calibration_ensemble.csv with the misfit before and
after of each. --shard K/N calibrates only the K-th of N round-robin parts of
the realization list (the rule of screen --shard); "calibrate merge" joins the
parts' folders into the folder one unsharded run writes.

Examples:
  floodtrace calibrate case.yaml --out runs/calibrated
  floodtrace calibrate screen.yaml --ensemble --out parts/2 --shard 2/4
  floodtrace calibrate merge parts/1 parts/2 parts/3 parts/4 --out runs/ensemble
  floodtrace calibrate case.yaml --out runs/calibrated --iterations 10`,
		NArgs: func(n int) bool { return n >= 1 },
		Flags: func(fs *pflag.FlagSet) {
			fs.StringVarP(&calibrateFlags.out, "out", "o", "", "output folder (required)")
			fs.IntVar(&calibrateFlags.iterations, "iterations", 0, "most iterations (default: calibration.iterations of the case, else 5)")
			fs.BoolVar(&calibrateFlags.force, "force", false, "write into a folder that holds other files (they are left alone)")
			fs.IntVar(&calibrateFlags.streamlines, "streamlines", 0, "number of streamlines (default: the case's run.streamlines)")
			fs.IntVar(&calibrateFlags.workers, "workers", 0, "threads of each forward run (default: all cores; results do not depend on it)")
			fs.StringVar(&calibrateFlags.pictures, "pictures", "all", "all or none")
			fs.StringVar(&calibrateFlags.size, "size", "1600x1000", "picture size WxH")
			fs.BoolVarP(&calibrateFlags.quiet, "quiet", "q", false, "print nothing but errors")
			fs.BoolVar(&calibrateFlags.ensemble, "ensemble", false, "the argument is a screening spec: calibrate on each of its realizations")
			fs.StringVar(&calibrateFlags.shard, "shard", "", "with --ensemble: calibrate only part K of N of the realizations, as K/N (1-based)")
		},
		Run: runCalibrate,
	})
}

func runCalibrate(args []string) error {
	f := calibrateFlags
	if f.out == "" {
		return usageError{"--out DIR is required"}
	}
	if f.iterations < 0 || f.iterations > 1000 {
		return usageError{fmt.Sprintf("--iterations must be between 1 and 1000 (0: the case's), not %d", f.iterations)}
	}
	if f.pictures != "all" && f.pictures != "none" {
		return usageError{fmt.Sprintf("--pictures must be all or none, not %q", f.pictures)}
	}
	w, h, err := parseSize(f.size)
	if err != nil {
		return usageError{err.Error()}
	}
	if args[0] == "merge" && !f.ensemble {
		if f.shard != "" {
			return usageError{"--shard does not apply to merge"}
		}
		if len(args) < 2 {
			return usageError{"merge needs the folders of the parts"}
		}
		return runCalibrateMerge(args[1:])
	}
	if len(args) != 1 {
		return usageError{"give one case file (or: calibrate merge DIR... --out DIR)"}
	}
	k, n := 0, 0
	if f.shard != "" {
		if !f.ensemble {
			return usageError{"--shard applies to --ensemble"}
		}
		if k, n, err = screen.ParseShard(f.shard); err != nil {
			return usageError{err.Error()}
		}
	}
	start := time.Now()
	logf := func(format string, a ...any) {
		if !f.quiet {
			fmt.Fprintf(stderr, "%6.2fs  %s\n", time.Since(start).Seconds(), fmt.Sprintf(format, a...))
		}
	}
	if f.ensemble {
		return runCalibrateEnsemble(args[0], k, n, w, h, logf)
	}
	m, err := reservoir.Load(args[0])
	if err != nil {
		return err
	}
	hugeheap.ForCase(m.Grid.N())
	res, err := calibrate.Calibrate(m, calibrate.Options{Iterations: f.iterations, Workers: f.workers, Streamlines: f.streamlines, Log: logf})
	if err != nil {
		return err
	}
	d, err := outdir.Open(f.out, f.force)
	if err != nil {
		return err
	}
	if err := res.Write(d, f.out); err != nil {
		return err
	}
	if f.pictures == "all" {
		files, err := drawCalibration(f.out, res, m.PermEast, w, h)
		if err != nil {
			return fmt.Errorf("drawing pictures: %w", err)
		}
		d.Adopt(files...)
	}
	if err := d.Close(); err != nil {
		return err
	}
	if !f.quiet {
		printCalibration(res)
	}
	return nil
}

func printCalibration(r *calibrate.Result) {
	first, last := r.Iterations[0], r.Iterations[len(r.Iterations)-1]
	fmt.Fprintf(stdout, "\n%s: calibrated in %d iteration(s), %d forward runs, %.1f s\n", r.Calibrated.Title, len(r.Iterations)-1, r.ForwardRuns, last.Seconds)
	fmt.Fprintf(stdout, "travel-time misfit %.1f -> %.1f days; water-cut RMS %.3f -> %.3f\n", first.TravelTimeMisfit, last.TravelTimeMisfit, first.WaterCutRMS, last.WaterCutRMS)
	fmt.Fprintf(stdout, "%-10s %12s %12s %10s %10s\n", "producer", "shift before", "shift after", "wc before", "wc after")
	for _, p := range r.Producers {
		fmt.Fprintf(stdout, "%-10s %12.1f %12.1f %10.3f %10.3f\n", p.Name, p.ShiftBefore, p.ShiftAfter, p.WaterCutRMSBefore, p.WaterCutRMSAfter)
	}
	s := r.Summary()
	fmt.Fprintf(stdout, "the data constrain %d cells (%.0f%% of the active cells); multipliers %.3g to %.3g\n",
		s.Constrained.Cells, 100*float64(s.Constrained.Fraction), float64(s.Constrained.MinMultiplier), float64(s.Constrained.MaxMultiplier))
	for _, w := range r.Warnings {
		fmt.Fprintf(stdout, "WARNING: %s\n", w)
	}
}

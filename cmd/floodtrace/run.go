package main

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/spf13/pflag"

	"floodtrace/flood"
	"floodtrace/internal/hugeheap"
	"floodtrace/internal/outdir"
	"floodtrace/render"
	"floodtrace/reservoir"
	"floodtrace/runfolder"
)

var runFlags struct {
	rasters     string
	out         string
	force       bool
	streamlines int
	workers     int
	size        string
	format      string
	noPictures  bool
	pictures    string
	frames      framesValue
	data        string
	quiet       bool
	engine      string
	updates     int
}

func init() {
	register(&command{
		Name:  "run",
		Usage: "run CASE --out DIR [options]",
		Short: "run a waterflood case and write curves, maps and a report",
		Long: `Run solves the pressure field of the case, traces streamlines between injectors
and producers, carries the Buckley-Leverett solution along them and writes,
into the output folder: per-producer water-cut and rate curves, breakthrough
times, well-pair allocation, flow diagnostics, saturation maps, pictures and
a one-file report (see docs/OUTPUTS.md).

The output folder is created if needed. A folder that holds files floodtrace
did not write is refused unless --force is given. summary.json is written
last: a folder without it holds an unfinished run.

Examples:
  floodtrace run examples/vardel/case.yaml --out out/vardel
  floodtrace run case.yaml --out runs/base --streamlines 4000 --size 1280x720
  floodtrace run case.yaml --out runs/quick --pictures none
  floodtrace run case.yaml --out runs/nogif --frames none
  floodtrace run case.yaml --out runs/fast --pictures minimal
  floodtrace run case.yaml --out runs/gis --pictures minimal --data tof,streamlines
  floodtrace run case.yaml --out runs/tables --pictures none --data tables
  floodtrace run case.yaml --out runs/updated --updates 20
  floodtrace run case.yaml --out runs/grid --engine grid`,
		NArgs: exactly(1),
		Flags: func(fs *pflag.FlagSet) {
			fs.StringVarP(&runFlags.out, "out", "o", "", "output folder (required)")
			fs.BoolVar(&runFlags.force, "force", false, "write into a folder that holds other files (they are left alone)")
			fs.IntVar(&runFlags.streamlines, "streamlines", 0, "number of streamlines (default: the case's run.streamlines)")
			fs.StringVar(&runFlags.engine, "engine", "streamline", "streamline (fixed or updated streamlines) or grid (cell-based IMPES reference)")
			fs.IntVar(&runFlags.updates, "updates", 0, "pressure solves over the run, overriding run.pressure_updates (1 = fixed streamlines)")
			fs.IntVar(&runFlags.workers, "workers", 0, "goroutines for tracing (default: all cores; results do not depend on it)")
			fs.StringVar(&runFlags.size, "size", "1920x1080", "picture size WxH")
			fs.StringVar(&runFlags.format, "format", "png", "chart format: png or svg")
			fs.StringVar(&runFlags.rasters, "rasters", runfolder.RastersASC, "raster format: asc (GIS ASCII grids) or tif (GeoTIFF: float32, Deflate, tiled)")
			runFlags.frames = framesValue(runfolder.FramesAuto)
			// --data chooses the rasters and polylines written beside the
			// tables (runfolder.Data; docs/OUTPUTS.md, "Choosing the data
			// files"). auto is all of them, except with --pictures minimal:
			// the snapshots only, from which its one picture is drawn.
			fs.StringVar(&runFlags.data, "data", "auto", "data files beside the tables: auto (all; with --pictures minimal only the snapshots), all, tables, or a list of "+strings.Join(runfolder.DataGroupNames(), ","))
			fs.Var(&runFlags.frames, "frames", "saturation maps kept for the animation: auto (up to 40, fewer on very large grids; none with --pictures minimal, which draws no animation), none, or a count from 1 to 1000")

			// --pictures minimal draws one map: the saturation at the last
			// snapshot (maps/saturation_<day>.png), without the other maps,
			// the charts, the animation or report.html. The tables are the
			// same as with --pictures all; --data auto then writes only the
			// snapshot rasters and --frames auto keeps no frames/ (say
			// --data all or --frames N for more).
			fs.StringVar(&runFlags.pictures, "pictures", "all", "all, minimal (only the last saturation map) or none (data files only; --no-pictures is an alias of none)")
			// --no-pictures is kept, hidden, as an alias of --pictures none.
			fs.BoolVar(&runFlags.noPictures, "no-pictures", false, "alias of --pictures none")
			_ = fs.MarkHidden("no-pictures")
			fs.BoolVarP(&runFlags.quiet, "quiet", "q", false, "print nothing but errors")
		},
		Run: runRun,
	})
}

func runRun(args []string) error {
	if runFlags.out == "" {
		return usageError{"--out DIR is required"}
	}
	w, h, err := parseSize(runFlags.size)
	if err != nil {
		return usageError{err.Error()}
	}
	if runFlags.format != "png" && runFlags.format != "svg" {
		return usageError{fmt.Sprintf("--format must be png or svg, not %q", runFlags.format)}
	}
	if runFlags.rasters != runfolder.RastersASC && runFlags.rasters != runfolder.RastersTIF {
		return usageError{fmt.Sprintf("--rasters must be asc or tif, not %q", runFlags.rasters)}
	}
	if runFlags.noPictures {
		if runFlags.pictures != "all" && runFlags.pictures != "none" {
			return usageError{fmt.Sprintf("--no-pictures (an alias of --pictures none) contradicts --pictures %s", runFlags.pictures)}
		}
		runFlags.pictures = "none"
	}
	if runFlags.pictures != "all" && runFlags.pictures != "minimal" && runFlags.pictures != "none" {
		return usageError{fmt.Sprintf("--pictures must be all, minimal or none, not %q", runFlags.pictures)}
	}
	if runFlags.pictures == "minimal" && runFlags.frames == runfolder.FramesAuto {
		// The frames feed the animation only, which minimal does not
		// draw: at a million cells they are 8 maps over every segment
		// and 70 MB of text (docs/PERFORMANCE.md).
		runFlags.frames = runfolder.FramesNone
	}
	data := runfolder.DataAll
	if runFlags.data == "auto" {
		if runFlags.pictures == "minimal" {
			// The one picture is drawn from the last snapshot: the other
			// rasters and the polylines are 120 MB of text at a million
			// cells that nobody asked for (docs/PERFORMANCE.md).
			data = runfolder.DataMinimal
		}
	} else if data, err = runfolder.ParseData(runFlags.data); err != nil {
		return usageError{"--data: " + err.Error()}
	}
	engine, ok := engineFlags[runFlags.engine]
	if !ok {
		return usageError{fmt.Sprintf("--engine must be streamline or grid, not %q", runFlags.engine)}
	}
	if runFlags.updates < 0 {
		return usageError{fmt.Sprintf("--updates must be positive, not %d", runFlags.updates)}
	}
	start := time.Now()
	logf := func(format string, a ...any) {
		if !runFlags.quiet {
			fmt.Fprintf(stderr, "%6.2fs  %s\n", time.Since(start).Seconds(), fmt.Sprintf(format, a...))
		}
	}
	m, err := reservoir.Load(args[0])
	if err != nil {
		return err
	}
	logf("case %s: %d x %d cells, %d wells", args[0], m.Grid.NX, m.Grid.NY, len(m.Wells))
	hugeheap.ForCase(m.Grid.N())
	if runFlags.updates > 0 {
		m.Run.PressureUpdates, m.Run.UpdateTimes = runFlags.updates, nil
	}
	d, err := outdir.Open(runFlags.out, runFlags.force)
	if err != nil {
		return err
	}
	res, err := flood.Run(m, flood.Settings{Streamlines: runFlags.streamlines, Workers: runFlags.workers, Log: logf, Engine: engine, Frames: int(runFlags.frames),
		NoPaths: !data.Has(runfolder.DataStreamlines)})
	if err != nil {
		return err
	}
	res.Rasters = runFlags.rasters
	res.Omit = runfolder.DataAll &^ data
	logf("writing %s", runFlags.out)
	if err := res.WriteData(d); err != nil {
		return err
	}
	// The pictures and the report take the summary in memory: summary.json
	// is written last, so a folder without it is an unfinished run.
	summary := res.Summary()
	summaryJSON, err := summary.Encode()
	if err != nil {
		return internalError{err}
	}
	if runFlags.pictures != "none" {
		if runFlags.pictures == "minimal" {
			logf("drawing the last saturation map")
		} else {
			logf("drawing maps, charts and the report")
		}
		rep, err := render.Run(runFlags.out, render.Options{Width: w, Height: h, Format: runFlags.format, Minimal: runFlags.pictures == "minimal", Summary: summary, Omit: res.Omit})
		if err != nil {
			return fmt.Errorf("drawing pictures: %w", err)
		}
		d.Adopt(rep.Files...)
		for _, n := range rep.Notes {
			logf("note: %s", n)
		}
	}
	if err := d.Bytes(runfolder.SummaryFile, summaryJSON); err != nil {
		return err
	}
	if err := d.Close(); err != nil {
		return err
	}
	if !runFlags.quiet {
		printRunSummary(res)
		logf("done")
	}
	return nil
}

func parseSize(s string) (int, int, error) {
	var w, h int
	if _, err := fmt.Sscanf(strings.ToLower(s), "%dx%d", &w, &h); err != nil || w < 200 || h < 150 || w > 10000 || h > 10000 {
		return 0, 0, fmt.Errorf("--size must be WxH with 200 <= W, H <= 10000 (got %q)", s)
	}
	return w, h, nil
}

func printRunSummary(r *flood.Result) {
	_, _, _, rate, _, vol := r.Model.Units.Labels()
	last := len(r.Times) - 1
	fmt.Fprintf(stdout, "\n%s: %g days, %.3f pore volumes injected\n", r.Model.Title, r.Times[last], r.PVI[last])
	limits := slices.ContainsFunc(r.Producers, func(p flood.Producer) bool { return p.Limit != "" })
	head, units := "", ""
	if limits {
		head, units = fmt.Sprintf(" %-22s", "shut at limit"), fmt.Sprintf(" %-22s", "day (limit)")
	}
	fmt.Fprintf(stdout, "%-10s %12s %12s %10s %14s %14s%s\n", "producer", "tracer BT", "water BT", "final WC", "cum oil", "cum water", head)
	fmt.Fprintf(stdout, "%-10s %12s %12s %10s %14s %14s%s\n", "", "days", "days", "", vol, vol, units)
	for _, p := range r.Producers {
		lim := ""
		if limits {
			lim = fmt.Sprintf(" %-22s", "-")
			if p.Limit != "" {
				lim = fmt.Sprintf(" %-22s", fmt.Sprintf("%g (%s)", p.LimitDay, p.Limit))
			}
		}
		fmt.Fprintf(stdout, "%-10s %12s %12s %10.3f %14.4g %14.4g%s\n", p.Name, days(p.TracerBreakthrough), days(p.Breakthrough),
			p.WaterCut[last], p.CumOil[last], p.CumWater[last], lim)
	}
	if r.FieldLimitDay > 0 {
		fmt.Fprintf(stdout, "the run ended on day %g: the field water cut reached run.field_max_water_cut %g\n", r.FieldLimitDay, r.Model.Run.FieldMaxWaterCut)
	}
	lorenz := "n/a (no flow)"
	if !math.IsNaN(r.Lorenz) {
		lorenz = fmt.Sprintf("%.3f", r.Lorenz)
	}
	fmt.Fprintf(stdout, "field recovery %.1f%% of OOIP, water cut %.3f, Lorenz coefficient %s, mass balance error %.1e\n",
		100*r.RecoveryFactor[last], r.FieldWaterCut[last], lorenz, r.MassBalanceError)
	_, _, _, _, pres, _ := r.Model.Units.Labels()
	fmt.Fprintf(stdout, "\nwells at the end of the run (day %g); rates in %s, reservoir volumes\n", r.Times[last], rate)
	cw := 8 // control column: "shut_limit" widens it
	if limits {
		cw = len(flood.ShutLimit)
	}
	fmt.Fprintf(stdout, "%-10s %-9s %-*s %12s %12s %12s %10s\n", "well", "type", cw, "control", "liquid rate", "oil rate", "water rate", "BHP "+pres)
	for _, x := range r.WellRates() {
		if x.End {
			fmt.Fprintf(stdout, "%-10s %-9s %-*s %12.1f %12.1f %12.1f %10.1f\n", x.Well, x.Type, cw, x.Control, x.Rate, x.Oil, x.Water, x.BHP)
		}
	}
	for _, in := range r.Injectors {
		if in.MaxBHPReached && in.Rate == 0 && in.CumWater == 0 {
			fmt.Fprintf(stdout, "CAUTION: injector %s reached its max_bhp (fracture or permit limit) and injects nothing: the limit is below the pressure it must overcome (see the warnings)\n", in.Name)
		} else if in.MaxBHPReached {
			fmt.Fprintf(stdout, "CAUTION: injector %s reached its max_bhp (fracture or permit limit) and runs at that pressure at %.4g %s; check the limit against local regulations\n", in.Name, in.Rate, rate)
		}
	}
	printHistory(r)
	for _, w := range r.Warnings {
		fmt.Fprintf(stderr, "warning: %s\n", w)
	}
}

func days(v float64) string {
	if math.IsNaN(v) {
		return "none"
	}
	return fmt.Sprintf("%.0f", v)
}

// framesValue is the --frames flag of run and render: auto, none or a
// count from 1 to 1000, held as the animation-frame count of the settings
// (runfolder.FramesAuto, runfolder.FramesNone or the count). 0 is refused:
// it is not a count of frames and read as none or as all in the past.
type framesValue int

func (f *framesValue) String() string {
	switch {
	case *f == runfolder.FramesAuto:
		return "auto"
	case *f < 0:
		return "none"
	}
	return strconv.Itoa(int(*f))
}

func (f *framesValue) Set(s string) error {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "auto":
		*f = runfolder.FramesAuto
		return nil
	case "none":
		*f = runfolder.FramesNone
		return nil
	}
	n, err := strconv.Atoi(s)
	if err == nil && n == 0 {
		return fmt.Errorf("0 is not a count of frames: say none for no frames, auto to let floodtrace choose")
	}
	if err != nil || n < 1 || n > 1000 {
		return fmt.Errorf("want auto, none or a count from 1 to 1000, not %q", s)
	}
	*f = framesValue(n)
	return nil
}

func (f *framesValue) Type() string { return "auto|none|N" }

// engineFlags maps the values of --engine to the engines.
var engineFlags = map[string]flood.Engine{"streamline": flood.EngineStreamline, "grid": flood.EngineGrid}

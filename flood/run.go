package flood

import (
	"errors"
	"fmt"
	"math"
	"runtime"

	"floodtrace/pressure"
	"floodtrace/reservoir"
	"floodtrace/runfolder"
	"floodtrace/streamline"
	"floodtrace/transport"
)

// Settings controls a run. The zero value runs the case as its file says,
// on all cores, with the default pressure solver.
type Settings struct {
	// Streamlines overrides the case's run.streamlines when > 0.
	Streamlines int
	// Workers is the number of goroutines for tracing; 0 = all cores.
	// Results do not depend on it.
	Workers int
	// NoPaths keeps no streamline polylines (streamline.Line.Path): for a
	// run that writes no streamlines.geojson (Result.Omit holds
	// runfolder.DataStreamlines). The zero value keeps them.
	NoPaths bool
	// Frames is how many saturation maps to keep for the animation
	// (runfolder.FramesAuto, the zero value: up to 40, fewer on very large
	// grids; runfolder.FramesNone or any negative value: none; N > 0: N).
	Frames int
	// Pressure configures the pressure solve.
	Pressure pressure.Settings
	// Log, when set, receives one line per stage.
	Log func(format string, args ...any)
	// Engine selects the engine; the zero value is EngineStreamline.
	Engine Engine
	// Updates tunes the pressure-update mode of the streamline engine
	// (used when the case needs updates; see RunUpdates). The zero value
	// is the default.
	Updates UpdateOptions
	// Grid tunes the grid engine (EngineGrid). The zero value is the
	// default.
	Grid GridOptions
}

// GravityUpdates is the number of evenly spaced pressure solves of a case
// with depth (rock.depth) that gives no run.pressure_updates or
// run.update_times, merged with the change times of its schedule and
// history: gravity moves water across the streamlines, so they must
// follow, between the well changes too.
const GravityUpdates = 20

// Snapshot is a saturation map at one time.
type Snapshot struct {
	Time float64 // days
	PVI  float64
	Sw   []float64 // per cell; NaN for inactive cells
}

// Producer holds one producer's results at the report times.
type Producer struct {
	Name string
	Well int // index in Model.Wells
	// Rate is the total liquid rate from the pressure solve (positive).
	Rate float64
	// WaterCut, OilRate, WaterRate, CumOil and CumWater are given at each
	// report time.
	WaterCut, OilRate, WaterRate, CumOil, CumWater []float64
	// AvgSw is the average water saturation of the pore volume that drains
	// to the producer, at each report time: with WaterCut it is the
	// producer's dynamic curve.
	AvgSw []float64
	// TracerBreakthrough is the smallest time of flight to the producer and
	// Breakthrough the first arrival of injected water, in days; NaN when
	// there is none within the run (or no streamline reaches the producer).
	TracerBreakthrough, Breakthrough float64
	// DrainedVolume is the pore volume that drains to the producer.
	DrainedVolume float64
	// Limit is the economic limit the producer reached (LimitWaterCut or
	// LimitOilRate; "" none) and LimitDay the report day it did, from
	// which it is shut in.
	Limit    string
	LimitDay float64
}

// Injector holds one injector's totals.
type Injector struct {
	Name          string
	Well          int
	Rate          float64
	CumWater      float64
	MaxBHPReached bool
}

// WellRecord is one row of the well log: a well's control, rate and BHP at
// a pressure solve.
type WellRecord struct {
	Time    float64
	Well    string
	Type    reservoir.WellType
	Control reservoir.Control
	Rate    float64 // positive
	BHP     float64
	// Limit is true when the solve held a rate-controlled well at its BHP
	// limit; Relative when its pressures are relative (every well of its
	// region rate-controlled, see pressure.WellResult).
	Limit, Relative bool
}

// Result is a finished run.
type Result struct {
	Model  *reservoir.Model
	Engine Engine
	// Rasters is the format WriteData writes the rasters in:
	// runfolder.RastersASC (or "") for GIS ASCII grids,
	// runfolder.RastersTIF for GeoTIFF.
	Rasters string
	// Omit is the set of data groups WriteData leaves out (the --data
	// flag: runfolder.Data); the zero value writes every file.
	Omit runfolder.Data
	// Pressure is the first pressure solution and Trace its streamlines.
	// In a fixed-streamline run the lines' Cells and Tau are released once
	// mapped (the run keeps them in its own flat arrays); Path, fluxes,
	// wells, the cell maps and the allocation remain.
	Pressure *pressure.Solution
	Trace    *streamline.Result
	// Allocation holds the well-pair allocation of every set of
	// streamlines the run traced: one block per pressure solve that was
	// traced (and per schedule event), in time order; a fixed-streamline
	// run has one block, at day 0.
	Allocation []AllocationBlock
	// Times are the report times in days and PVI the pore volumes
	// injected at each.
	Times, PVI []float64
	Producers  []Producer
	Injectors  []Injector
	// Field totals at the report times.
	FieldWaterCut, FieldOilRate, FieldWaterRate, FieldCumOil, FieldCumWater, RecoveryFactor []float64
	Snapshots                                                                               []Snapshot
	Frames                                                                                  []Snapshot
	WellLog                                                                                 []WellRecord
	// Phi and F sample the F-Phi curve; TD and Sweep the sweep efficiency
	// against dimensionless time.
	Phi, F, TD, Sweep []float64
	Lorenz            float64
	PoreVolume        float64
	OOIP              float64
	// MassBalanceError is (injected - produced - change of water in
	// place) / injected at the end of the run.
	MassBalanceError float64
	Solves           int
	Iterations       int
	RelResidual      float64
	StreamlineCount  int
	// FieldLimitDay is the day the economic limits ended the run (the
	// last report time): the field water cut reached
	// run.field_max_water_cut, or every producer was shut in at its
	// limit; 0 when they did not.
	FieldLimitDay float64
	// History compares the run with the case's production history; nil
	// without one.
	History *HistoryResult
	// Warnings are messages for the user: the case's own (Model.Warnings)
	// first, then those of the run.
	Warnings []string
}

// reportTimes returns the report times of a run: every reportEvery days
// up to end, with end itself always included.
func reportTimes(end, reportEvery float64) []float64 {
	if reportEvery <= 0 || reportEvery > end {
		reportEvery = end
	}
	var ts []float64
	for k := 1; ; k++ {
		t := float64(k) * reportEvery
		if t >= end*(1-1e-12) {
			break
		}
		ts = append(ts, t)
	}
	return append(ts, end)
}

// Run runs the case with fixed streamlines: one pressure solve at the
// initial mobility, one set of streamlines, and the exact Buckley-Leverett
// solution along each (Buckley and Leverett 1942; Welge 1952), mapped to
// producers and to cells.
func Run(m *reservoir.Model, s Settings) (*Result, error) {
	logf := s.Log
	if logf == nil {
		logf = func(string, ...any) {}
	}
	if m.Run.End <= 0 {
		return nil, errors.New("run.end must be positive")
	}
	switch s.Engine {
	case EngineStreamline:
	case EngineGrid:
		return RunGrid(m, s, s.Grid)
	default:
		return nil, fmt.Errorf("unknown engine %v (want EngineStreamline or EngineGrid)", s.Engine)
	}
	// Events and openings after the end change nothing, not even the mode.
	// RunUpdates drops them again and warns.
	mm, late := withinRun(m)
	if mm.HasGravity() && mm.Run.PressureUpdates <= 1 && len(mm.Run.UpdateTimes) == 0 {
		// Water slumps and the total velocity follows it: a case with
		// depth runs with pressure updates unless it asks for some, and
		// with them between its schedule's or history's changes too (the
		// slumping goes on while the wells hold their rates).
		c := *m
		c.Run.PressureUpdates = GravityUpdates
		logf("the case has a depth: %d pressure updates besides its well changes (fixed streamlines cannot carry gravity; set run.pressure_updates above 1 or run.update_times to choose)", GravityUpdates)
		return RunUpdates(&c, s, s.Updates)
	}
	if needsUpdates(mm) || mm.History != nil {
		return RunUpdates(m, s, s.Updates)
	}
	orig := m
	m = mm
	// From here the case has no schedule event and no late well (they send
	// it to pressure updates above).
	r := &Result{Model: m, Engine: EngineStreamline, PoreVolume: m.TotalPoreVolume(), OOIP: m.OOIP(),
		Warnings: append([]string(nil), m.Warnings...)}
	r.Warnings = append(r.Warnings, late...)
	ff := transport.NewFracFlow(m.RelPerm, m.Fluids.WaterViscosity, m.Fluids.OilViscosity)
	if mr := ff.EndpointMobilityRatio(); mr > 2 {
		r.Warnings = append(r.Warnings, fmt.Sprintf("end-point mobility ratio is %.2g (above 2): fixed streamlines assume the velocity field does not change; use pressure updates (run.pressure_updates) for a better estimate", mr))
	}

	logf("pressure: solving %d cells", m.Grid.N())
	sol, err := pressure.Solve(pressure.Input{Model: m}, s.Pressure)
	if err != nil {
		return nil, err
	}
	if m.Grid.N() >= largeGrid {
		// The solver's multigrid hierarchy (hundreds of megabytes on a
		// million cells) is garbage now: collect it so tracing reuses that
		// memory instead of touching new pages (docs/PERFORMANCE.md).
		runtime.GC()
	}
	if err := checkSolve(EngineStreamline, sol, 0); err != nil {
		return nil, err
	}
	r.Pressure = sol
	r.Solves, r.Iterations, r.RelResidual = 1, sol.Iterations, sol.RelResidual
	r.Warnings = append(r.Warnings, sol.Warnings...)
	for _, w := range sol.Wells {
		rate := math.Abs(w.Q)
		r.WellLog = append(r.WellLog, WellRecord{Time: 0, Well: w.Name, Type: w.Type, Control: w.Control, Rate: rate, BHP: w.BHP})
	}

	count := m.Run.Streamlines
	if s.Streamlines > 0 {
		count = s.Streamlines
	}
	logf("streamlines: tracing %d", count)
	field := Field(m, sol)
	tr, err := streamline.Trace(field, streamline.Settings{Count: count, Workers: s.Workers, KeepPaths: !s.NoPaths, MaxPathPoints: MaxPathPoints})
	if err != nil {
		return nil, err
	}
	r.Trace = tr
	r.StreamlineCount = len(tr.Lines)
	r.Warnings = append(r.Warnings, tr.Warnings...)
	if m.Grid.N() >= largeGrid {
		// The tracer's garbage (its grown storage, cell-map scratch, fill
		// lines it did not keep) is collected before the diagnostics and
		// the transport allocate theirs.
		runtime.GC()
	}

	pv := field.PoreVolume // m.PoreVolumes(), made once (8 MB on a million cells)
	r.setDiagnostics(tr, pv)

	logf("transport: Buckley-Leverett along %d streamlines", len(tr.Lines))
	swi := m.Fluids.InitialSw
	_, sor := m.RelPerm.Endpoints()
	sol1d, err := transport.NewRiemann(ff, swi, 1-sor)
	if err != nil {
		return nil, fmt.Errorf("fractional flow: %w", err)
	}
	if m.Grid.N() >= largeGrid {
		// The diagnostics' garbage (the sorted cells, the full F-Phi
		// curve) is collected before the transport allocates.
		runtime.GC()
	}
	// The lines' cell lists become the segments of lines, without a copy.
	lines, err := newFixedLineSet(tr, pv)
	if err != nil {
		return nil, err
	}
	r.Allocation = append(r.Allocation, AllocationBlock{Time: 0, Pairs: tr.Pairs, PoreVolumes: tr.PairVolumes(lines.seg)})
	if lines.uncovered > 0 {
		r.Warnings = append(r.Warnings, fmt.Sprintf("%d active cell(s) carry flow but no streamline crosses them; they keep their initial saturation", lines.uncovered))
	}
	r.fixedTransport(m, sol, lines, newBLTable(sol1d, ff), s)
	if m.HasProducerLimits() {
		if day, well := r.fixedLimits(); day >= 0 {
			// A shut-in changes the streamlines of the other wells: as for
			// a scheduled one, the run is made with pressure updates.
			logf("limits: producer %s reaches its economic limit on day %g; running with pressure updates", well, day)
			ru, err := RunUpdates(orig, s, s.Updates)
			if err != nil {
				return nil, err
			}
			ru.Warnings = append(ru.Warnings, fmt.Sprintf("producer %s reaches its economic limit with fixed streamlines (on day %g): the run uses pressure updates to honour the shut-in, as for a scheduled one", well, day))
			return ru, nil
		}
	}
	if err := checkResult(r); err != nil {
		return nil, err
	}
	return r, nil
}

// largeGrid is the cell count from which a run collects garbage between
// stages to keep its peak memory down.
const largeGrid = 250_000

// MaxPathPoints is the most points kept per streamline polyline, for the
// pictures and streamlines.geojson.
const MaxPathPoints = 400

// Field builds the streamline tracer's input from a pressure solution.
func Field(m *reservoir.Model, sol *pressure.Solution) *streamline.Field {
	f := &streamline.Field{
		Grid:       m.Grid,
		PoreVolume: m.PoreVolumes(),
		Active:     m.Active,
		FluxX:      sol.FluxX,
		FluxY:      sol.FluxY,
	}
	for _, w := range sol.Wells {
		q := w.Q
		if w.Shut {
			q = 0
		}
		f.Wells = append(f.Wells, streamline.Well{Name: w.Name, Cell: w.Cell, Q: q})
	}
	return f
}

// diagnosticSamples is the number of points of the F-Phi curve in
// f_phi.csv.
const diagnosticSamples = 101

// setDiagnostics records the F-Phi curve, Lorenz coefficient and sweep
// efficiency of the run's first streamlines.
func (r *Result) setDiagnostics(tr *streamline.Result, pv []float64) {
	d := tr.Diagnostics(pv, diagnosticSamples)
	r.Phi, r.F, r.TD, r.Sweep, r.Lorenz = d.Phi, d.F, d.TD, d.Ev, d.Lorenz
}

// AllocationBlock is the well-pair allocation of one set of streamlines:
// the day of the pressure solve they were traced on, the pairs
// (streamline.Pair: rates and fractions) and their pore volumes from the
// rescaled time of flight (same order).
type AllocationBlock struct {
	Time        float64
	Pairs       []streamline.Pair
	PoreVolumes []float64
}

package flood

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strconv"

	"floodtrace/internal/outdir"
	"floodtrace/reservoir"
	"floodtrace/runfolder"
)

// Summary returns the run's summary.json (runfolder.Summary).
func (r *Result) Summary() *runfolder.Summary {
	m := r.Model
	length, _, _, rate, pres, vol := m.Units.Labels()
	F := func(v float64) runfolder.Float { return runfolder.Float(v) }
	s := &runfolder.Summary{Title: m.Title, Units: string(m.Units), Engine: r.Engine.String(), EndDays: F(m.Run.End),
		UnitLabels: runfolder.UnitLabels{Length: length, Rate: rate, Volume: vol, Pressure: pres},
		Grid:       runfolder.Grid{NX: m.Grid.NX, NY: m.Grid.NY, DX: F(m.Grid.DX), DY: F(m.Grid.DY), X0: F(m.Grid.X0), Y0: F(m.Grid.Y0)},
		PoreVolume: F(r.PoreVolume), OOIP: F(r.OOIP), LorenzCoefficient: runfolder.Opt(r.Lorenz), MassBalanceError: F(r.MassBalanceError),
		Streamlines: r.StreamlineCount, PressureSolver: runfolder.Solver{Iterations: r.Iterations, RelativeResidual: F(r.RelResidual), Solves: r.Solves},
		Warnings: append([]string{}, r.Warnings...), Wells: []runfolder.Well{}, Faults: []runfolder.Fault{},
		Producers: []runfolder.Producer{}, Injectors: []runfolder.Injector{}, Snapshots: []runfolder.Snapshot{}}
	if m.HasGravity() {
		lo, hi, _ := m.DipRange()
		s.Gravity = &runfolder.Gravity{GravityNumber: runfolder.Opt(m.GravityNumber()), DipMinDegrees: F(lo), DipMaxDegrees: F(hi),
			WaterDensity: F(m.Fluids.WaterDensity), OilDensity: F(m.Fluids.OilDensity)}
	}
	if m.Path != "" {
		if abs, err := filepath.Abs(m.Path); err == nil {
			s.CaseFile = abs
		}
	}
	for _, w := range m.Wells {
		s.Wells = append(s.Wells, runfolder.Well{Name: w.Name, Type: string(w.Type), X: F(w.X), Y: F(w.Y), I: w.I, J: w.J})
	}
	for _, f := range m.Faults {
		tr := make([][2]runfolder.Float, len(f.Trace))
		for i, p := range f.Trace {
			tr[i] = [2]runfolder.Float{F(p[0]), F(p[1])}
		}
		if f.Trace == nil {
			tr = nil
		}
		s.Faults = append(s.Faults, runfolder.Fault{Name: f.Name, Trace: tr})
	}
	injRate := 0.0
	for _, in := range r.Injectors {
		injRate += in.Rate
		s.Injectors = append(s.Injectors, runfolder.Injector{Name: in.Name, CumWater: F(in.CumWater), MaxBHPReached: in.MaxBHPReached})
	}
	// PVI at any time: interpolated on the report times (injection rates
	// may change with pressure updates and schedule events); beyond the
	// last report time, extrapolated at the final injection rate.
	pvi := func(t float64) float64 {
		if math.IsNaN(t) || len(r.Times) == 0 {
			return injRate * t / r.PoreVolume
		}
		last := len(r.Times) - 1
		if t > r.Times[last] {
			return r.PVI[last] + injRate*(t-r.Times[last])/r.PoreVolume
		}
		return Interpolate(append([]float64{0}, r.Times...), append([]float64{0}, r.PVI...), t)
	}
	last := len(r.Times) - 1
	for _, p := range r.Producers {
		sp := runfolder.Producer{Name: p.Name, TracerBreakthroughDays: runfolder.Opt(p.TracerBreakthrough), TracerBreakthroughPVI: runfolder.Opt(pvi(p.TracerBreakthrough)),
			BreakthroughDays: runfolder.Opt(p.Breakthrough), BreakthroughPVI: runfolder.Opt(pvi(p.Breakthrough))}
		if last >= 0 {
			sp.FinalWaterCut, sp.CumOil, sp.CumWater = F(p.WaterCut[last]), F(p.CumOil[last]), F(p.CumWater[last])
		}
		if p.Limit != "" {
			sp.Limit, sp.LimitDays = p.Limit, runfolder.Opt(p.LimitDay)
		}
		s.Producers = append(s.Producers, sp)
	}
	if last >= 0 {
		s.Field = runfolder.Field{FinalPVI: F(r.PVI[last]), FinalRecoveryFactor: F(r.RecoveryFactor[last]), FinalWaterCut: F(r.FieldWaterCut[last]),
			FinalCumOil: F(r.FieldCumOil[last]), FinalCumWater: F(r.FieldCumWater[last])}
	}
	if r.FieldLimitDay > 0 {
		s.FieldLimitDays = runfolder.Opt(r.FieldLimitDay)
		s.EndDays = F(r.FieldLimitDay)
	}
	for _, sn := range r.Snapshots {
		file := "" // not written (Omit)
		if !r.Omit.Has(runfolder.DataSnapshots) {
			file = runfolder.RasterName(runfolder.SnapshotName(sn.Time), r.Rasters)
		}
		s.Snapshots = append(s.Snapshots, runfolder.Snapshot{TimeDays: F(sn.Time), PVI: F(sn.PVI), File: file, Date: m.Date(sn.Time)})
	}
	if !m.StartDate.IsZero() {
		s.StartDate, s.EndDate = m.Date(0), m.Date(m.Run.End)
	}
	if surfaceOutputs(m) {
		bo, bw := m.Fluids.Bo(), m.Fluids.Bw()
		P := func(v float64) *runfolder.Float { f := runfolder.Float(v); return &f }
		s.UnitLabels.SurfaceVolume = runfolder.SurfaceUnit(string(m.Units))
		s.OOIPSurface = P(r.OOIP / bo)
		s.OilFVF, s.WaterFVF = P(bo), P(bw)
		for i := range s.Producers {
			s.Producers[i].CumOilSurface, s.Producers[i].CumWaterSurface = P(float64(s.Producers[i].CumOil)/bo), P(float64(s.Producers[i].CumWater)/bw)
		}
		for i := range s.Injectors {
			s.Injectors[i].CumWaterSurface = P(float64(s.Injectors[i].CumWater) / bw)
		}
		if last >= 0 {
			s.Field.FinalCumOilSurface, s.Field.FinalCumWaterSurface = P(float64(s.Field.FinalCumOil)/bo), P(float64(s.Field.FinalCumWater)/bw)
		}
	}
	s.History = r.historySummary()
	return s
}

// surfaceOutputs reports whether the outputs of a run of m carry surface
// volumes beside the reservoir ones: when the case gives a formation
// volume factor (fluids.oil_fvf or fluids.water_fvf, even 1), or a model
// built in code sets one other than 1. Without one the files are as
// before.
func surfaceOutputs(m *reservoir.Model) bool {
	f := m.Fluids
	return f.FVFGiven || f.OilFVF > 0 && f.OilFVF != 1 || f.WaterFVF > 0 && f.WaterFVF != 1
}

// WriteData writes the data files of the run (all but summary.json and
// the pictures) into d: the tables, and the rasters and polylines of the
// groups not in r.Omit.
func (r *Result) WriteData(d *outdir.Dir) error {
	m := r.Model
	want := func(g runfolder.Data) bool { return !r.Omit.Has(g) }
	// With start_date every time_days column has a date column beside it.
	dated := !m.StartDate.IsZero()
	surface := surfaceOutputs(m)
	bo, bw := m.Fluids.Bo(), m.Fluids.Bw()
	units := string(m.Units)
	// hdr gives the header of a file; with surface volumes, scols is
	// followed by the surface forms of its volume and rate columns.
	shdr := func(cols []string) string {
		if surface {
			cols = runfolder.WithSurface(cols, units)
		}
		if dated {
			cols = runfolder.WithDate(cols)
		}
		return runfolder.Header(cols)
	}
	// surf writes the surface forms of oil and water volumes (and their
	// sum, when liquid) at the end of a row.
	surf := func(w *bufio.Writer, liquid bool, oil, water float64) {
		if !surface {
			return
		}
		if liquid {
			w.WriteString("," + runfolder.Num(oil/bo+water/bw))
		}
		w.WriteString("," + runfolder.Num(oil/bo) + "," + runfolder.Num(water/bw))
	}
	hdr := func(cols []string) string {
		if dated {
			cols = runfolder.WithDate(cols)
		}
		return runfolder.Header(cols)
	}
	day := func(t float64) string {
		if dated {
			return runfolder.Num(t) + "," + m.Date(t)
		}
		return runfolder.Num(t)
	}
	csv := func(name string, body func(w *bufio.Writer)) error {
		return d.Create(name, func(w io.Writer) error {
			bw := bufio.NewWriter(w)
			body(bw)
			return bw.Flush()
		})
	}
	if err := csv(runfolder.WellsFile, func(w *bufio.Writer) {
		w.WriteString(shdr(runfolder.WellsColumns))
		for _, x := range r.WellRates() {
			fmt.Fprintf(w, "%s,%s,%s,%s,%s,%s,%s,%s", day(x.Time), x.Well, x.Type, x.Control, runfolder.Num(x.Rate),
				runfolder.Num(x.Oil), runfolder.Num(x.Water), runfolder.Num(x.BHP))
			surf(w, true, x.Oil, x.Water)
			w.WriteByte('\n')
		}
	}); err != nil {
		return err
	}
	if err := csv(runfolder.ProducersFile, func(w *bufio.Writer) {
		w.WriteString(shdr(runfolder.ProducersColumns))
		for k, t := range r.Times {
			for _, p := range r.Producers {
				fmt.Fprintf(w, "%s,%s,%s,%s,%s,%s,%s,%s", day(t), runfolder.Num(r.PVI[k]), p.Name, runfolder.Num(p.WaterCut[k]), runfolder.Num(p.OilRate[k]),
					runfolder.Num(p.WaterRate[k]), runfolder.Num(p.CumOil[k]), runfolder.Num(p.CumWater[k]))
				surf(w, false, p.OilRate[k], p.WaterRate[k])
				surf(w, false, p.CumOil[k], p.CumWater[k])
				w.WriteByte('\n')
			}
		}
	}); err != nil {
		return err
	}
	if err := csv(runfolder.FieldFile, func(w *bufio.Writer) {
		w.WriteString(shdr(runfolder.FieldColumns))
		for k, t := range r.Times {
			fmt.Fprintf(w, "%s,%s,%s,%s,%s,%s,%s,%s", day(t), runfolder.Num(r.PVI[k]), runfolder.Num(r.FieldWaterCut[k]), runfolder.Num(r.FieldOilRate[k]),
				runfolder.Num(r.FieldWaterRate[k]), runfolder.Num(r.FieldCumOil[k]), runfolder.Num(r.FieldCumWater[k]), runfolder.Num(r.RecoveryFactor[k]))
			surf(w, false, r.FieldOilRate[k], r.FieldWaterRate[k])
			surf(w, false, r.FieldCumOil[k], r.FieldCumWater[k])
			w.WriteByte('\n')
		}
	}); err != nil {
		return err
	}
	if err := csv(runfolder.EffectiveCurvesFile, func(w *bufio.Writer) {
		w.WriteString(hdr(runfolder.EffectiveCurvesColumns))
		for k, t := range r.Times {
			for _, p := range r.Producers {
				fmt.Fprintf(w, "%s,%s,%s,%s\n", day(t), p.Name, runfolder.Num(p.AvgSw[k]), runfolder.Num(p.WaterCut[k]))
			}
		}
	}); err != nil {
		return err
	}
	if r.Trace != nil {
		if err := csv(runfolder.AllocationFile, func(w *bufio.Writer) {
			w.WriteString(hdr(runfolder.AllocationColumns))
			for _, b := range r.Allocation {
				for k, p := range b.Pairs {
					pv := p.PoreVolume
					if k < len(b.PoreVolumes) {
						pv = b.PoreVolumes[k]
					}
					fmt.Fprintf(w, "%s,%s,%s,%s,%s,%s,%s\n", day(b.Time), m.Wells[p.Injector].Name, m.Wells[p.Producer].Name, runfolder.Num(p.Rate),
						runfolder.Num(p.FractionOfInjector), runfolder.Num(p.FractionOfProducer), runfolder.Num(pv))
				}
			}
		}); err != nil {
			return err
		}
	}
	if len(r.Allocation) > 0 {
		e := r.Efficiencies(r.RunWindow())
		// With formation volume factors, the rates' surface forms follow
		// (the injected water and the attributed oil).
		pairCols, injCols := runfolder.PairsColumns, runfolder.InjectorsColumns
		if surface {
			pairCols, injCols = runfolder.WithSurface(pairCols, units), runfolder.WithSurface(injCols, units)
		}
		if err := csv(runfolder.PairsFile, func(w *bufio.Writer) {
			w.WriteString(runfolder.Header(pairCols))
			for _, p := range e.Pairs {
				fmt.Fprintf(w, "%s,%s,%s,%s,%s", p.Injector, p.Producer, runfolder.Num(p.WaterRate), runfolder.Num(p.AttributedOil), runfolder.Num(p.Efficiency))
				if surface {
					fmt.Fprintf(w, ",%s,%s", runfolder.Num(p.WaterRate/bw), runfolder.Num(p.AttributedOil/bo))
				}
				w.WriteByte('\n')
			}
		}); err != nil {
			return err
		}
		if err := csv(runfolder.InjectorsFile, func(w *bufio.Writer) {
			w.WriteString(runfolder.Header(injCols))
			for _, in := range e.Injectors {
				fmt.Fprintf(w, "%s,%s,%s,%s", in.Name, runfolder.Num(in.Rate), runfolder.Num(in.Efficiency), runfolder.Num(in.AttributedOil))
				if surface {
					fmt.Fprintf(w, ",%s,%s", runfolder.Num(in.Rate/bw), runfolder.Num(in.AttributedOil/bo))
				}
				w.WriteByte('\n')
			}
		}); err != nil {
			return err
		}
	}
	if h := r.History; h != nil {
		if err := csv(runfolder.MatchFile, func(w *bufio.Writer) {
			w.WriteString(runfolder.Header(runfolder.MatchColumns))
			for _, x := range h.Match {
				fmt.Fprintf(w, "%s,%s,%s", x.Well, m.PeriodEndDate(x.End), runfolder.Num(x.End))
				for _, v := range []float64{x.ObsWaterCut, x.ModWaterCut, x.ObsOilRate, x.ModOilRate, x.ObsWaterRate, x.ModWaterRate,
					x.ObsCumOil, x.ModCumOil, x.ObsCumWater, x.ModCumWater, x.ObsBHP, x.ModBHP} {
					w.WriteByte(',')
					if !math.IsNaN(v) && !math.IsInf(v, 0) {
						w.WriteString(runfolder.Num(v))
					}
				}
				w.WriteByte('\n')
			}
		}); err != nil {
			return err
		}
	}
	// The F-Phi curve and the sweep curve have different lengths: one
	// file each, each with its own header.
	pairs := func(name string, cols []string, x, y []float64) error {
		return d.Create(name, func(w io.Writer) error {
			if _, err := io.WriteString(w, runfolder.Header(cols)); err != nil {
				return err
			}
			return runfolder.WriteBands(w, min(len(x), len(y)), 8192, func(lo, hi int, buf []byte) []byte {
				for k := lo; k < hi; k++ {
					buf = runfolder.AppendNum(buf, x[k])
					buf = append(buf, ',')
					buf = runfolder.AppendNum(buf, y[k])
					buf = append(buf, '\n')
				}
				return buf
			})
		})
	}
	if err := pairs(runfolder.FPhiFile, runfolder.FPhiColumns, r.Phi, r.F); err != nil {
		return err
	}
	td, sweep := sweepRows(r.TD, r.Sweep)
	if err := pairs(runfolder.SweepFile, runfolder.SweepColumns, td, sweep); err != nil {
		return err
	}
	raster := func(name string, v []float64) error {
		name = runfolder.RasterName(name, r.Rasters)
		var err error
		if r.Rasters == runfolder.RastersTIF {
			err = d.Create(name, func(w io.Writer) error {
				return runfolder.WriteRasterTIF(w, m.Grid, v, m.Active, m.CRS.EPSG)
			})
		} else {
			err = d.Create(name, func(w io.Writer) error {
				return runfolder.WriteRaster(w, m.Grid, v, m.Active)
			})
		}
		if err != nil || m.CRS.WKT == "" {
			return err
		}
		return d.Bytes(runfolder.PRJName(name), []byte(m.CRS.WKT+"\n"))
	}
	if r.Pressure != nil && want(runfolder.DataPressure) {
		if err := raster(runfolder.PressureFile, r.Pressure.P); err != nil {
			return err
		}
	}
	if m.DepthFile != "" && m.Depth != nil && want(runfolder.DataDepth) {
		if err := raster(runfolder.DepthFile, m.Depth); err != nil {
			return err
		}
	}
	if r.Trace != nil {
		if want(runfolder.DataTOF) {
			if err := raster(runfolder.TOFFile, r.Trace.TOF); err != nil {
				return err
			}
			if err := raster(runfolder.ProducerTOFFile, r.Trace.BackTOF); err != nil {
				return err
			}
		}
		if want(runfolder.DataPartitions) {
			for name, part := range map[string][]int{runfolder.InjectorPartFile: r.Trace.InjectorPartition, runfolder.ProducerPartFile: r.Trace.ProducerPartition} {
				v := make([]float64, len(part))
				for k, p := range part {
					v[k] = float64(p + 1)
				}
				if err := raster(name, v); err != nil {
					return err
				}
			}
		}
		if want(runfolder.DataStreamlines) {
			if err := d.Create(runfolder.StreamlinesFile, r.writeGeoJSON); err != nil {
				return err
			}
		}
	}
	if want(runfolder.DataSnapshots) {
		for _, sn := range r.Snapshots {
			if err := raster(runfolder.SnapshotName(sn.Time), sn.Sw); err != nil {
				return err
			}
		}
	}
	for _, sn := range r.Frames {
		if err := raster(runfolder.FramesDir+"/"+runfolder.SnapshotName(sn.Time), sn.Sw); err != nil {
			return err
		}
	}
	return nil
}

// SweepRows is the most rows sweep.csv holds as the curve is computed
// (one per distinct travel time, so up to one per cell); a longer curve
// is written thinned to within SweepTolerance (thinCurve), so that a
// million-cell run writes a few hundred rows instead of a million, and a
// small case's file is unchanged.
const (
	SweepRows      = 10000
	SweepTolerance = 1e-6
)

// sweepRows returns the rows of sweep.csv: the curve itself up to
// SweepRows points, else the points thinCurve keeps within
// SweepTolerance of the sweep efficiency.
func sweepRows(td, ev []float64) ([]float64, []float64) {
	n := min(len(td), len(ev))
	if n <= SweepRows {
		return td[:n], ev[:n]
	}
	keep := thinCurve(td, ev, SweepTolerance)
	x, y := make([]float64, len(keep)), make([]float64, len(keep))
	for i, k := range keep {
		x[i], y[i] = td[k], ev[k]
	}
	return x, y
}

// PathPoints is the most points streamlines.geojson holds as traced (in
// all its polylines, each already cut to MaxPathPoints); above it every
// polyline is thinned to within PathTolerance cells (the smaller cell
// side) of its traced points: 4.3 million points become 1.8 million at a
// million cells, and small cases are written whole.
const (
	PathPoints    = 1_000_000
	PathTolerance = 0.1
)

// WriteSummary writes summary.json; call it last.
func (r *Result) WriteSummary(d *outdir.Dir) error {
	b, err := r.Summary().Encode()
	if err != nil {
		return err
	}
	return d.Bytes(runfolder.SummaryFile, b)
}

func (r *Result) writeGeoJSON(w io.Writer) error {
	m := r.Model
	head := `{"type":"FeatureCollection",`
	if m.CRS.EPSG > 0 {
		// The named-CRS member of the 2008 GeoJSON specification (Butler
		// et al., 2008), which GIS programs still read.
		head += `"crs":{"type":"name","properties":{"name":"urn:ogc:def:crs:EPSG::` + strconv.Itoa(m.CRS.EPSG) + `"}},`
	}
	if _, err := io.WriteString(w, head+`"features":[`); err != nil {
		return err
	}
	name := func(buf []byte, i int) []byte {
		if i < 0 || i >= len(m.Wells) {
			return append(buf, "null"...)
		}
		return strconv.AppendQuote(buf, m.Wells[i].Name)
	}
	lines := r.Trace.Lines
	// Large sets of polylines are thinned to within PathTolerance cells
	// of the traced points (thinPath); small ones are written whole.
	points := 0
	for i := range lines {
		points += len(lines[i].Path)
	}
	tol := -1.0
	if points > PathPoints {
		tol = PathTolerance * math.Min(m.Grid.DX, m.Grid.DY)
	}
	first := len(lines) // the first line written has no comma before it
	for i := range lines {
		if len(lines[i].Path) >= 2 {
			first = i
			break
		}
	}
	err := runfolder.WriteBands(w, len(lines), 64, func(lo, hi int, buf []byte) []byte {
		var idx []int
		for i := lo; i < hi; i++ {
			l := &lines[i]
			if len(l.Path) < 2 {
				continue
			}
			if i != first {
				buf = append(buf, ',')
			}
			buf = append(buf, "\n{\"type\":\"Feature\",\"properties\":{\"injector\":"...)
			buf = name(buf, l.Injector)
			buf = append(buf, ",\"producer\":"...)
			buf = name(buf, l.Producer)
			buf = append(buf, ",\"flux\":"...)
			buf = runfolder.AppendJSONNum(buf, l.Flux)
			buf = append(buf, ",\"tof_days\":"...)
			buf = runfolder.AppendJSONNum(buf, l.TotalTau)
			buf = append(buf, "},\"geometry\":{\"type\":\"LineString\",\"coordinates\":["...)
			path, np := l.Path, len(l.Path)
			if tol >= 0 {
				idx = thinPath(path, tol, idx)
				np = len(idx)
			}
			for k := range np {
				p := path[k]
				if tol >= 0 {
					p = path[idx[k]]
				}
				if k > 0 {
					buf = append(buf, ',')
				}
				buf = append(buf, '[')
				buf = runfolder.AppendFixed(buf, p[0], 2)
				buf = append(buf, ',')
				buf = runfolder.AppendFixed(buf, p[1], 2)
				buf = append(buf, ']')
			}
			buf = append(buf, "]}}"...)
		}
		return buf
	})
	if err != nil {
		return err
	}
	_, err = io.WriteString(w, "\n]}\n")
	return err
}

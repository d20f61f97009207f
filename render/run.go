package render

import (
	"bytes"
	"fmt"
	"html/template"
	"image"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"floodtrace/internal/outdir"
	"floodtrace/internal/parallel"
	"floodtrace/runfolder"
)

// Options controls Run. The zero value draws 1920x1080 maps and PNG
// charts, a 960x540 animation of every frame.
type Options struct {
	// Width and Height of maps and charts in pixels; 0 means 1920x1080.
	Width, Height int
	// Format of the charts: "png" (default) or "svg". Maps are PNG.
	Format string
	// Frames is the number of animation frames, chosen evenly among the
	// saved ones (runfolder.FramesAuto, the zero value: all of them;
	// runfolder.FramesNone or any negative value: no animation).
	Frames int
	// GIFWidth and GIFHeight size the animation; 0 means half the map
	// size (960x540 by default).
	GIFWidth, GIFHeight int
	// Minimal draws one picture only: the saturation map of the last
	// snapshot, with its colour scale taken from the snapshots alone (the
	// animation frames are not read). No other map, chart, animation or
	// report is drawn.
	Minimal bool
	// Summary, when set, is the run's summary, used instead of reading
	// summary.json: a run draws its pictures before it writes
	// summary.json, which marks the folder as finished.
	Summary *runfolder.Summary
	// Omit lists the data groups the run did not write (run --data): the
	// pictures drawn from them are left out even if a file of their name
	// is in the folder, from an earlier run. The zero value omits none.
	Omit runfolder.Data
}

// Report lists what Run wrote.
type Report struct {
	Dir   string
	Files []string // paths relative to Dir, in the order written
	Notes []string // pictures not drawn, and why
}

func (r *Report) note(format string, a ...any) { r.Notes = append(r.Notes, fmt.Sprintf(format, a...)) }

// resolve fills the defaults of o and checks it.
func (o Options) resolve() (Options, error) {
	if o.Width == 0 && o.Height == 0 {
		o.Width, o.Height = DefaultWidth, DefaultHeight
	}
	if err := checkSize(o.Width, o.Height); err != nil {
		return o, err
	}
	if o.Format == "" {
		o.Format = "png"
	}
	o.Format = strings.ToLower(o.Format)
	if o.Format != "png" && o.Format != "svg" {
		return o, fmt.Errorf("render: chart format %q, want png or svg", o.Format)
	}
	if o.GIFWidth == 0 && o.GIFHeight == 0 {
		o.GIFWidth, o.GIFHeight = max(MinSide, o.Width/2), max(MinSide, o.Height/2)
	}
	if err := checkSize(o.GIFWidth, o.GIFHeight); err != nil {
		return o, fmt.Errorf("render: animation: %w", err)
	}
	return o, nil
}

// run holds what Run reads once and shares between pictures.
type run struct {
	dir    string
	opt    Options
	sum    *runfolder.Summary
	scene  Scene
	rep    *Report
	field  *Table    // field.csv, for PVI at a given day
	hist   *histData // match.csv and the summary's history; nil without
	satSc  Scale
	tofSc  Scale
	charts []figure
	maps   []figure
	gif    string
	// pics are the pictures the steps prepared, drawn together by
	// drawPictures.
	pics []picture
	// embedded holds the drawn pictures as report src attributes, by
	// path (see embed).
	embedded map[string]template.HTMLAttr
	// the raster read last (see readASC)
	lastPath string
	lastVals []float64
}

// figure is a written picture with its caption, for the report.
type figure struct {
	File, Caption string
}

// Run draws every picture of the finished run in dir and writes
// report.html: maps/ (saturation snapshots, streamlines, time of flight,
// partitions, pressure), charts/, saturation.gif. Pictures whose input
// file is absent are skipped and listed in Report.Notes; a missing or
// unreadable summary.json, or a malformed input file, is an error.
func Run(dir string, opt Options) (*Report, error) {
	opt, err := opt.resolve()
	if err != nil {
		return nil, err
	}
	sum := opt.Summary
	if sum == nil {
		if sum, err = runfolder.ReadSummary(dir); err != nil {
			return nil, fmt.Errorf("render: %w", err)
		}
	}
	if err := sum.Check(filepath.Join(dir, runfolder.SummaryFile)); err != nil {
		return nil, fmt.Errorf("render: %w", err)
	}
	r := &run{dir: dir, opt: opt, sum: sum, rep: &Report{Dir: dir}}
	if err := r.prepare(); err != nil {
		return nil, err
	}
	for _, sub := range []string{runfolder.MapsDir, runfolder.ChartsDir} {
		if err := os.MkdirAll(filepath.Join(dir, sub), 0o755); err != nil {
			return nil, fmt.Errorf("render: %w", err)
		}
	}
	steps := []func() error{r.saturationMaps, r.streamlineMap, r.tofMap, r.partitionMaps, r.pressureMap, r.errorMap, r.drawCharts, r.animation}
	if opt.Minimal {
		steps = []func() error{r.saturationMaps}
	}
	// The steps read their inputs in order and prepare the pictures;
	// drawPictures draws them in parallel; the report embeds them all.
	for _, step := range steps {
		if err := step(); err != nil {
			return r.rep, err
		}
	}
	if err := r.drawPictures(); err != nil {
		return r.rep, err
	}
	if !opt.Minimal {
		if err := r.report(); err != nil {
			return r.rep, err
		}
	}
	return r.rep, nil
}

// pictureKind says where the report shows a picture.
type pictureKind int

const (
	mapPicture pictureKind = iota
	chartPicture
	animationPicture
)

// picture is one file of the run's pictures: a step prepares it (reads
// its inputs, in order) and drawPictures draws and writes it.
type picture struct {
	kind    pictureKind
	rel     string // path relative to the run folder
	caption string
	// draw returns the encoded file. It may run on any goroutine at the
	// same time as the other pictures' draw: it reads only what the step
	// gave it and the run's shared, read-only scene and scales, and keeps
	// its own font faces.
	draw func() ([]byte, error)
}

// addMap prepares a map picture drawn by draw and encoded as PNG.
func (r *run) addMap(rel, caption, input string, draw func() (*image.RGBA, error)) {
	r.pics = append(r.pics, picture{kind: mapPicture, rel: rel, caption: caption, draw: func() ([]byte, error) {
		img, err := draw()
		if err != nil {
			return nil, fmt.Errorf("render: %s: %w", input, err)
		}
		defer recycle(img)
		return encodePNG(rel, img)
	}})
}

// drawPictures draws the prepared pictures on up to GOMAXPROCS goroutines
// and writes each to its file, then records them in the order the steps
// prepared them, so that the report and Report.Files do not depend on the
// core count. The first error in that order is returned.
func (r *run) drawPictures() error {
	errs := make([]error, len(r.pics))
	srcs := make([]template.HTMLAttr, len(r.pics))
	// The animation, the longest and itself parallel, starts first, so
	// that its serial encoding overlaps the other pictures.
	order := make([]int, 0, len(r.pics))
	for pass := range 2 {
		for i, p := range r.pics {
			if (p.kind == animationPicture) == (pass == 0) {
				order = append(order, i)
			}
		}
	}
	parallel.Each(len(order), 0, 1, func(_, k int) {
		i := order[k]
		p := r.pics[i]
		b, err := p.draw()
		if err == nil {
			err = writeFileAtomic(filepath.Join(r.dir, p.rel), b)
		}
		if err == nil && !r.opt.Minimal {
			srcs[i] = embed(p.rel, b) // for the report
		}
		errs[i] = err
	})
	for i, p := range r.pics {
		if errs[i] != nil {
			return errs[i]
		}
		r.rep.Files = append(r.rep.Files, p.rel)
		if srcs[i] != "" {
			if r.embedded == nil {
				r.embedded = map[string]template.HTMLAttr{}
			}
			r.embedded[p.rel] = srcs[i]
		}
		switch p.kind {
		case mapPicture:
			r.maps = append(r.maps, figure{p.rel, p.caption})
		case chartPicture:
			r.charts = append(r.charts, figure{p.rel, p.caption})
		case animationPicture:
			r.gif = p.rel
		}
	}
	r.pics = nil
	return nil
}

// readASC reads a raster of the run's grid, keeping the last one read:
// prepare and the saturation maps read the same snapshot.
func (r *run) readASC(path string) ([]float64, error) {
	if path == r.lastPath && r.lastVals != nil {
		return r.lastVals, nil
	}
	v, err := readASC(path, r.scene.Grid)
	if err != nil {
		return nil, err
	}
	r.lastPath, r.lastVals = path, v
	return v, nil
}

func exists(p string) bool { _, err := os.Stat(p); return err == nil }

// raster returns the path of the run-folder raster name of data group g
// (runfolder.FindRaster), or "" when the run left g out (Options.Omit):
// a file of that name would be left from an earlier run.
func (r *run) raster(g runfolder.Data, name string) string {
	if r.opt.Omit.Has(g) {
		return ""
	}
	return runfolder.FindRaster(r.dir, name)
}

// prepare builds the scene (active cells from the rasters) and the shared
// colour scales.
func (r *run) prepare() error {
	s := r.sum
	g := s.Grid.Reservoir()
	title := s.Title
	if title == "" {
		title = "floodtrace run"
	}
	r.scene = Scene{Title: title, Grid: g, LengthUnit: s.UnitLabels.Length}
	for _, w := range s.Wells {
		r.scene.Wells = append(r.scene.Wells, WellMark{Name: w.Name, X: float64(w.X), Y: float64(w.Y), Injector: w.Type == "injector"})
	}
	for _, f := range s.Faults {
		tr := make([][2]float64, len(f.Trace))
		for i, p := range f.Trace {
			tr[i] = [2]float64{float64(p[0]), float64(p[1])}
		}
		r.scene.Faults = append(r.scene.Faults, tr)
		r.scene.FaultNames = append(r.scene.FaultNames, f.Name)
	}
	if p := filepath.Join(r.dir, runfolder.FieldFile); exists(p) {
		t, err := readTable(p)
		if err != nil {
			return err
		}
		r.field = t
	}
	if !r.opt.Minimal {
		if err := r.loadHistory(); err != nil {
			return err
		}
	}
	// Active cells: finite in any of the rasters that hold every active
	// cell (saturation, time of flight, pressure).
	var active []bool
	sat0 := r.snapshotFiles()
	var candidates []string
	if r.opt.Minimal && len(sat0) > 0 {
		sat0 = sat0[len(sat0)-1:]
	}
	if len(sat0) > 0 {
		candidates = append(candidates, sat0[0].Path)
	}
	candidates = append(candidates, r.raster(runfolder.DataTOF, runfolder.TOFFile), r.raster(runfolder.DataPressure, runfolder.PressureFile))
	for i, p := range candidates {
		if !exists(p) {
			continue
		}
		if i > 0 && r.opt.Minimal && len(sat0) > 0 && !slices.Contains(active, false) {
			// The others can only add cells the snapshot lacks.
			break
		}
		v, err := r.readASC(p)
		if err != nil {
			return err
		}
		if active == nil {
			active = make([]bool, len(v))
		}
		for k, x := range v {
			if !math.IsNaN(x) {
				active[k] = true
			}
		}
	}
	r.scene.Active = active

	// One saturation scale for every snapshot and frame.
	lo, hi := math.Inf(1), math.Inf(-1)
	files := sat0
	if !r.opt.Minimal {
		files = append(files, r.frameFiles()...)
	}
	for _, f := range files {
		v, err := r.readASC(f.Path)
		if err != nil {
			return err
		}
		for _, x := range v {
			if !math.IsNaN(x) {
				lo, hi = math.Min(lo, x), math.Max(hi, x)
			}
		}
	}
	r.satSc = Scale{Label: "Water saturation", Unit: "fraction of pore volume", Map: &SaturationColors}
	if lo <= hi {
		r.satSc.Min = math.Max(0, math.Floor(lo/0.05+1e-9)*0.05)
		r.satSc.Max = math.Min(1, math.Ceil(hi/0.05-1e-9)*0.05)
		if r.satSc.Max <= r.satSc.Min {
			r.satSc.Min, r.satSc.Max = 0, 1
		}
	} else {
		// No saturation map in the folder (run --data without
		// snapshots): the maps drawn over the saturation show none, on
		// the full scale.
		r.satSc.Min, r.satSc.Max = 0, 1
	}

	if r.opt.Minimal {
		return nil
	}
	if err := r.readStructure(); err != nil {
		return err
	}

	// Time of flight: stagnant corners reach huge values, so the scale
	// spans the 1st to 99th percentiles and the bar shows the clipping.
	r.tofSc = Scale{Label: "Time of flight", Unit: "days from injection, log scale", Log: true, Map: &TimeOfFlightColors}
	if p := r.raster(runfolder.DataTOF, runfolder.TOFFile); exists(p) {
		v, err := readASC(p, g)
		if err != nil {
			return err
		}
		r.tofSc = logScale(r.tofSc, v, active)
	}
	return nil
}

// logScale sets a log scale from the 1st to the 99th percentile of the
// positive values, rounded outwards to 1, 2 or 5 times a power of ten.
func logScale(sc Scale, v []float64, active []bool) Scale {
	lo, hi, _, _, ok := robustRange(v, active, 0.01, 0.99, true)
	if !ok {
		return sc
	}
	sc.Min, sc.Max = niceLogFloor(lo), niceLogCeil(hi)
	if sc.Max <= sc.Min {
		sc.Max = sc.Min * 10
	}
	for k, x := range v {
		if active != nil && !active[k] || !(x > 0) || math.IsInf(x, 0) {
			continue
		}
		sc.ExtendMin = sc.ExtendMin || x < sc.Min
		sc.ExtendMax = sc.ExtendMax || x > sc.Max
	}
	return sc
}

// niceLogFloor and niceLogCeil round to 1, 2 or 5 times a power of ten.
func niceLogFloor(v float64) float64 {
	p := math.Pow(10, math.Floor(math.Log10(v)))
	for _, m := range []float64{5, 2, 1} {
		if m*p <= v*(1+1e-12) {
			return m * p
		}
	}
	return p
}

func niceLogCeil(v float64) float64 {
	p := math.Pow(10, math.Floor(math.Log10(v)))
	for _, m := range []float64{1, 2, 5, 10} {
		if m*p >= v*(1-1e-12) {
			return m * p
		}
	}
	return 10 * p
}

// snapshotFiles lists the saturation snapshots of the summary that were
// written (a snapshot whose file is empty was not), or, when the summary
// lists none, the saturation_<day>.asc files in the folder.
func (r *run) snapshotFiles() []frameFile {
	var out []frameFile
	for _, s := range r.sum.Snapshots {
		name := s.File
		if name == "" {
			// Not written (run --data without snapshots): a file of that
			// name would be left from an earlier run in the folder.
			continue
		}
		p := filepath.Join(r.dir, filepath.Base(name))
		if exists(p) {
			out = append(out, frameFile{Day: float64(s.TimeDays), Path: p, Name: strings.TrimSuffix(filepath.Base(name), filepath.Ext(name))})
		}
	}
	if len(r.sum.Snapshots) == 0 {
		out = listDays(r.dir)
	}
	return out
}

func (r *run) frameFiles() []frameFile {
	return listDays(filepath.Join(r.dir, runfolder.FramesDir))
}

// pviAt returns the pore volumes injected at a day as the run folder
// records it: a snapshot's own value in the summary, else the field.csv
// row of that day (animation frames are taken at report times); NaN when
// neither has it. Nothing is interpolated.
func (r *run) pviAt(day float64) float64 {
	for _, s := range r.sum.Snapshots {
		if float64(s.TimeDays) == day && s.PVI > 0 {
			return float64(s.PVI)
		}
	}
	t := r.field
	if t == nil || !t.Has("time_days") || !t.Has("pvi") {
		return math.NaN()
	}
	label := runfolder.DayLabel(day)
	for i := range t.Rows {
		if d := t.Num(i, "time_days"); d == day || runfolder.DayLabel(d) == label {
			return t.Num(i, "pvi")
		}
	}
	return math.NaN()
}

// timeLabel writes a day of the run as timeLabel does, with its date
// when the summary has start_date: "day 366 (2021-01-01) · 0.21 PVI".
func (r *run) timeLabel(day float64) string {
	l := timeLabel(day, r.pviAt(day))
	if d := r.dateSuffix(day, ""); d != "" {
		head, tail, _ := strings.Cut(l, " · ")
		l = head + d
		if tail != "" {
			l += " · " + tail
		}
	}
	return l
}

// timeLabel writes "day 365 · 0.21 PVI".
func timeLabel(day, pvi float64) string {
	s := "day " + FormatNumber(day, decimalsForDay(day))
	if !math.IsNaN(pvi) {
		d := 2
		if pvi < 0.1 {
			d = 3
		}
		s += " · " + FormatNumber(pvi, d) + " PVI"
	}
	return s
}

func decimalsForDay(d float64) int {
	if d == math.Trunc(d) {
		return 0
	}
	return 1
}

// pngEncoder favours speed: a 1920x1080 map encodes in about a third of
// the time of the default level, for files about a fifth larger.
var pngEncoder = png.Encoder{CompressionLevel: png.BestSpeed}

// encodePNG encodes the picture of file rel.
func encodePNG(rel string, img image.Image) ([]byte, error) {
	var b bytes.Buffer
	if err := writePNG(&b, img); err != nil {
		return nil, fmt.Errorf("render: encoding %s: %w", rel, err)
	}
	return b.Bytes(), nil
}

func (r *run) saturationMaps() error {
	files := r.snapshotFiles()
	if len(files) == 0 {
		r.rep.note("no saturation snapshot: no saturation maps")
		return nil
	}
	if r.opt.Minimal {
		files = files[len(files)-1:]
	}
	for _, f := range files {
		v, err := r.readASC(f.Path)
		if err != nil {
			return err
		}
		s := r.scene
		s.Subtitle = "Water saturation · " + r.timeLabel(f.Day)
		rel := filepath.Join(runfolder.MapsDir, f.Name+".png")
		sc, w, h := r.satSc, r.opt.Width, r.opt.Height
		r.addMap(rel, "Water saturation at "+r.timeLabel(f.Day)+".", f.Path, func() (*image.RGBA, error) {
			return DrawField(s, v, sc, w, h)
		})
	}
	return nil
}

func (r *run) streamlineMap() error {
	p := filepath.Join(r.dir, runfolder.StreamlinesFile)
	if r.opt.Omit.Has(runfolder.DataStreamlines) || !exists(p) {
		r.rep.note("streamlines.geojson missing: no streamline map")
		return nil
	}
	// The lines are read with the drawing, in parallel with the other
	// pictures.
	s, w, h := r.scene, r.opt.Width, r.opt.Height
	rel := filepath.Join(runfolder.MapsDir, "streamlines.png")
	r.pics = append(r.pics, picture{kind: mapPicture, rel: rel,
		caption: "Streamlines from injectors to producers, coloured by their total time of flight (log scale).",
		draw: func() ([]byte, error) {
			lines, err := readStreamlines(p)
			if err != nil {
				return nil, err
			}
			tot := make([]float64, len(lines))
			for i, l := range lines {
				tot[i] = l.TotalTOF
			}
			sc := logScale(Scale{Label: "Total time of flight", Unit: "days, injector to producer, log scale", Log: true, Map: &TimeOfFlightColors}, tot, nil)
			s.Subtitle = fmt.Sprintf("Streamlines coloured by total time of flight, injector to producer · %s lines", FormatNumber(float64(len(lines)), 0))
			img, err := drawStreamlines(s, lines, sc, w, h)
			if err != nil {
				return nil, fmt.Errorf("render: %s: %w", p, err)
			}
			defer recycle(img)
			return encodePNG(rel, img)
		}})
	return nil
}

func (r *run) tofMap() error {
	p := r.raster(runfolder.DataTOF, runfolder.TOFFile)
	if !exists(p) {
		r.rep.note("tof.asc missing: no time-of-flight map")
		return nil
	}
	v, err := readASC(p, r.scene.Grid)
	if err != nil {
		return err
	}
	if _, _, _, _, ok := robustRange(v, r.scene.Active, 0, 1, true); !ok {
		r.rep.note("tof.asc holds no finite time of flight (nothing flows): no time-of-flight map")
		return nil
	}
	s := r.scene
	s.Subtitle = "Time of flight from the injectors · first pressure solve"
	sc, w, h := r.tofSc, r.opt.Width, r.opt.Height
	r.addMap(filepath.Join(runfolder.MapsDir, "tof.png"),
		"Time of flight from the injectors: days for injected water to reach each cell (log scale).", p,
		func() (*image.RGBA, error) { return DrawField(s, v, sc, w, h) })
	return nil
}

func (r *run) partitionMaps() error {
	names := make([]string, len(r.sum.Wells))
	for i, w := range r.sum.Wells {
		names[i] = w.Name
	}
	for _, pm := range []struct{ file, title, sub, caption string }{
		{"injector_partition", "Injector partition", "Injector partition · which injector floods each cell", "Injector partition: the injector whose water reaches each cell first."},
		{"producer_partition", "Producer partition", "Producer partition · which producer drains each cell", "Producer partition: the producer each cell drains to."},
	} {
		p := r.raster(runfolder.DataPartitions, pm.file+".asc")
		if !exists(p) {
			r.rep.note("%s.asc missing: no %s map", pm.file, strings.ToLower(pm.title))
			continue
		}
		v, err := readASC(p, r.scene.Grid)
		if err != nil {
			return err
		}
		part := make([]int, len(v))
		for k, x := range v {
			if math.IsNaN(x) {
				continue
			}
			if x != math.Trunc(x) || x < 0 || x > float64(len(names)) {
				return fmt.Errorf("render: %s: cell %d holds %v, not a well index 0..%d", p, k, x, len(names))
			}
			part[k] = int(x)
		}
		s := r.scene
		s.Subtitle = pm.sub
		title, w, h := pm.title, r.opt.Width, r.opt.Height
		r.addMap(filepath.Join(runfolder.MapsDir, pm.file+".png"), pm.caption, p, func() (*image.RGBA, error) {
			return drawPartition(s, part, names, title, w, h)
		})
	}
	return nil
}

func (r *run) pressureMap() error {
	p := r.raster(runfolder.DataPressure, runfolder.PressureFile)
	if !exists(p) {
		r.rep.note("pressure.asc missing: no pressure map")
		return nil
	}
	v, err := readASC(p, r.scene.Grid)
	if err != nil {
		return err
	}
	sc := Scale{Label: "Pressure", Unit: r.sum.UnitLabels.Pressure, Map: &PressureColors}
	sc, err = sc.Resolve(v, r.scene.Active)
	if err != nil {
		r.rep.note("pressure.asc has no value: no pressure map")
		return nil
	}
	_, step := linearTicks(sc.Min, sc.Max, 6)
	if step > 0 {
		sc.Min = math.Floor(sc.Min/step+1e-9) * step
		sc.Max = math.Ceil(sc.Max/step-1e-9) * step
	}
	s := r.scene
	s.Subtitle = "Pressure · first solve"
	w, h := r.opt.Width, r.opt.Height
	r.addMap(filepath.Join(runfolder.MapsDir, "pressure.png"), "Pressure at the first solve ("+r.sum.UnitLabels.Pressure+").", p,
		func() (*image.RGBA, error) { return DrawField(s, v, sc, w, h) })
	return nil
}

// writeFileAtomic writes data under a temporary name in the target folder
// and renames it into place (internal/outdir.WriteFile).
func writeFileAtomic(path string, data []byte) error {
	if err := outdir.WriteFile(path, func(w io.Writer) error { _, err := w.Write(data); return err }); err != nil {
		return fmt.Errorf("render: %w", err)
	}
	return nil
}

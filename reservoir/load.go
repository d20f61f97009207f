package reservoir

import (
	"bytes"
	"cmp"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"time"
	"unicode/utf8"

	"gopkg.in/yaml.v3"

	"floodtrace/internal/yamldoc"
)

// MaxCaseBytes is the largest case file Load reads (16 MiB).
const MaxCaseBytes = 16 << 20

// Loader reads case files. Its zero value uses the defaults.
type Loader struct {
	// MaxCells is the largest grid accepted; 0 means MaxCells (50 million
	// cells). Larger grids are refused before any allocation.
	MaxCells int
	// PartialWells accepts a case with no injector or no producer open
	// before the end of the run. A waterflood needs both, so a run refuses
	// such a case; a screening base case may lack them when the candidates
	// supply them (the first injectors of a field on primary production).
	PartialWells bool
}

// Load reads and validates the case file at path with the default
// settings; see Loader.Load.
func Load(path string) (*Model, error) { return Loader{}.Load(path) }

// Parse validates a case held in data as if read from path (map and table
// paths are relative to the directory of path); see Loader.Load.
func Parse(path string, data []byte) (*Model, error) { return Loader{}.Parse(path, data) }

// Load reads and validates the case file at path (YAML; the schema is in
// DESIGN.md section 4) and the maps and tables it names, and returns the
// model. Every problem is reported with the file and the line (and for
// maps the row and column, for wells the well name and the cell): the
// error is an *InputError, a *WellError, or an ErrorList of them when one
// pass finds several. All such errors are problems of the input.
//
// Cells are inactive where the active map is 0 or NODATA; a NODATA value
// of a rock map in a cell the active map marks active is an error. Without
// an active map, cells where any map holds NODATA are inactive, with a
// warning counting them. Property arrays hold zero in inactive cells.
// Every physical value is checked against its range in Limits: refused
// outside the accepted range, and a warning (Model.Warnings) outside the
// usual one. Wells go into the
// cell that holds their point (Grid.Locate). Messages name cells as
// "cell (i=12, j=7)", counted from 0 at the south-west corner, i east and j
// north.
//
// Defaults: perm_y = perm; initial_water_saturation = the connate water
// saturation of the relative permeability; well radius 0.3 ft or 0.1 m,
// skin 0, open from day 0; run end 3650 days, report_every = end/120
// rounded to whole days, 2000 streamlines, one pressure solve and a single
// snapshot at the end. With update_times, PressureUpdates counts the solve
// at time 0 and one at each listed time.
func (l Loader) Load(path string) (*Model, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, openError(path, err)
	}
	defer f.Close()
	if st, err := f.Stat(); err == nil && st.IsDir() {
		return nil, &InputError{Path: path, Msg: "is a directory, not a case file"}
	}
	data, err := io.ReadAll(io.LimitReader(f, MaxCaseBytes+1))
	if err != nil {
		return nil, &InputError{Path: path, Msg: "reading: " + err.Error(), Err: err}
	}
	if len(data) > MaxCaseBytes {
		return nil, &InputError{Path: path, Err: ErrTooLarge, Msg: fmt.Sprintf("case file larger than %d bytes", MaxCaseBytes)}
	}
	return l.Parse(path, data)
}

// Parse is Load for a case already in memory; path names it in messages
// and locates the maps.
func (l Loader) Parse(path string, data []byte) (*Model, error) {
	d := &decoder{path: path, dir: filepath.Dir(path), maxCells: l.MaxCells, partialWells: l.PartialWells}
	if d.maxCells <= 0 {
		d.maxCells = MaxCells
	}
	return d.decode(data)
}

// decoder holds the state of one case being loaded.
type decoder struct {
	path     string
	dir      string
	maxCells int
	// partialWells: see Loader.PartialWells.
	partialWells bool
	errs         collector
	units        UnitSystem // of the case, once read
	warns        []string   // warnings, in the order found
	start        time.Time  // start_date (day 0), zero when not given
	calib        *calibrationNodes
}

// propSpec is a rock property given as a number or a map path.
type propSpec struct {
	key   string // "perm", "perm_y", ...
	node  *yaml.Node
	isMap bool
	value float64
	path  string // display path of the map (joined to the case directory)
}

// rawCase is the result of the first pass: everything read from the YAML,
// nothing allocated per cell.
type rawCase struct {
	m         *Model
	grid      *Grid
	gridNode  *yaml.Node // the grid key
	gridFrom  string     // where the grid comes from, for messages
	rockLine  int        // line of the rock key
	props     []propSpec // perm, perm_y, porosity, thickness, active (if given)
	hasSwi    bool
	swiNode   *yaml.Node
	relNode   *yaml.Node
	wellsNode *yaml.Node
	// fluidsNode is the fluids section and densityNodes its density
	// values, for the gravity checks (checkGravity).
	fluidsNode   *yaml.Node
	densityNodes []*yaml.Node
	depthNode    *yaml.Node // rock.depth, if given
}

// parseYAML returns the root of the single YAML document in data
// (internal/yamldoc, which corrects yaml.v3's line numbers: parser errors
// come zero-based, tab errors at the scalar before the tab, unknown
// anchors with no line).
func (d *decoder) parseYAML(data []byte) (*yaml.Node, error) {
	root, perr := yamldoc.Parse(data)
	switch {
	case perr == nil:
		return root, nil
	case perr.Empty:
		return nil, &InputError{Path: d.path, Msg: "empty case file"}
	case perr.Multiple:
		return nil, &InputError{Path: d.path, Line: perr.Line, Msg: "more than one YAML document (a second '---'); a case file holds one"}
	}
	return nil, &InputError{Path: d.path, Line: perr.Line, Msg: perr.Msg, Err: perr.Err}
}

func (d *decoder) decode(data []byte) (*Model, error) {
	if len(bytes.TrimSpace(data)) == 0 {
		return nil, &InputError{Path: d.path, Msg: "empty case file"}
	}
	if i := bytes.IndexByte(data, 0); i >= 0 || !utf8.Valid(data) {
		if i < 0 {
			i = firstInvalidUTF8(data)
		}
		return nil, &InputError{Path: d.path, Line: 1 + bytes.Count(data[:i], []byte("\n")),
			Msg: fmt.Sprintf("not a text file (binary data at byte %d); a case file is YAML text", i)}
	}
	root, err := d.parseYAML(data)
	if err != nil {
		return nil, err
	}
	rc := d.firstPass(root)
	if err := d.errs.err(); err != nil {
		return nil, err
	}
	m := rc.m
	d.resolveGrid(rc)
	if err := d.errs.err(); err != nil {
		return nil, err
	}
	d.loadRock(rc)
	if err := d.errs.err(); err != nil {
		return nil, err
	}
	d.checkGravity(rc)
	if err := d.errs.err(); err != nil {
		return nil, err
	}
	d.placeWells(m, rc.wellsNode.Line)
	if err := d.errs.err(); err != nil {
		return nil, err
	}
	d.checkWellRadii(m)
	d.applyFaults(m)
	d.checkSchedule(m, rc.wellsNode)
	if err := d.errs.err(); err != nil {
		return nil, err
	}
	if err := d.loadHistory(m); err != nil {
		return nil, err
	}
	if err := d.checkCalibration(m); err != nil {
		return nil, err
	}
	m.Warnings = d.warns
	return m, nil
}

func firstInvalidUTF8(b []byte) int {
	for i := 0; i < len(b); {
		r, n := utf8.DecodeRune(b[i:])
		if r == utf8.RuneError && n <= 1 {
			return i
		}
		i += n
	}
	return len(b)
}

var topKeys = []string{"title", "units", "grid", "rock", "fluids", "relperm", "wells", "faults", "schedule", "run", "crs", "start_date", "history", "calibration", "value"}

// firstPass reads every section of the YAML into the model without
// touching map files or allocating per-cell arrays (except the relative
// permeability table, which is small).
func (d *decoder) firstPass(root *yaml.Node) *rawCase {
	m := &Model{Path: d.path}
	rc := &rawCase{m: m}
	top := d.section(root, "", "", topKeys, []string{"units", "rock", "fluids", "relperm", "wells"})
	if top == nil {
		return rc
	}
	m.Title = d.str(top, "title")
	if m.Title == "" {
		m.Title = strings.TrimSuffix(filepath.Base(d.path), filepath.Ext(d.path))
	}
	if top.has("units") {
		u := d.str(top, "units")
		switch UnitSystem(u) {
		case Field, Metric:
			m.Units = UnitSystem(u)
		default:
			msg := fmt.Sprintf("units %q: must be field or metric", u)
			if s, ok := nearest(u, []string{"field", "metric"}); ok {
				msg += fmt.Sprintf("; did you mean %q?", s)
			}
			d.fail(top, top.vals["units"], "%s", msg)
		}
	}
	if m.Units == "" {
		m.Units = Field // for defaults while the other sections are read
	}
	d.units = m.Units
	if top.has("crs") {
		v := top.vals["crs"]
		if c, ok := ParseEPSG(v.Value); ok && v.Kind == yaml.ScalarNode {
			m.CRS = CRS{EPSG: c, From: fmt.Sprintf("%s:%d", d.path, v.Line)}
		} else {
			d.fail(top, v, "crs must be EPSG:n with n from 1 to 32766 (the map coordinates' EPSG code), found %s", yamldoc.Describe(v))
		}
	}
	d.readStartDate(m, top)
	d.readRun(m, top)
	if top.has("grid") {
		rc.gridNode = top.keys["grid"]
		rc.grid = d.readGrid(top.vals["grid"], top.keys["grid"].Line)
	}
	if top.vals["rock"] != nil {
		rc.rockLine = top.keys["rock"].Line
		d.readRock(rc, top.vals["rock"])
	}
	if top.vals["fluids"] != nil {
		d.readFluids(rc, top.vals["fluids"])
	}
	if top.vals["relperm"] != nil {
		rc.relNode = top.vals["relperm"]
		m.RelPerm = d.readRelPerm(top.vals["relperm"])
	}
	if m.RelPerm != nil && m.Fluids.WaterViscosity > 0 {
		swc, sor := m.RelPerm.Endpoints()
		if !rc.hasSwi {
			m.Fluids.InitialSw = swc
		} else if m.Fluids.InitialSw < swc-1e-12 {
			d.fail(nil, rc.swiNode, "fluids.initial_water_saturation = %g is below the connate water saturation %g of the relative permeability", m.Fluids.InitialSw, swc)
		} else if m.Fluids.InitialSw >= 1-sor {
			d.fail(nil, rc.swiNode, "fluids.initial_water_saturation = %g leaves no movable oil (1 - sor = %g)", m.Fluids.InitialSw, 1-sor)
		} else if mo := 1 - sor - m.Fluids.InitialSw; Limits[limMobileOil].unusual(d.units, mo) != "" {
			d.warnAt(nil, rc.swiNode, "fluids.initial_water_saturation = %g leaves only %.3g of movable oil saturation (1 - sor - swi); the flood recovers little", m.Fluids.InitialSw, mo)
		}
	}
	if top.vals["wells"] != nil {
		rc.wellsNode = top.keys["wells"]
		d.readListOrFile(top, "wells", func() { d.readWells(m, top) }, func(src string) {
			for i := range m.Wells {
				m.Wells[i].Source = src
			}
		})
	}
	if top.has("faults") {
		d.readListOrFile(top, "faults", func() { d.readFaults(m, top) }, func(src string) {
			for i := range m.Faults {
				m.Faults[i].Source = src
			}
		})
	}
	if top.has("schedule") {
		d.readSchedule(m, top)
	}
	if top.has("history") {
		d.readHistorySpec(m, top)
	}
	if top.has("calibration") {
		d.readCalibration(m, top)
	}
	if top.has("value") {
		d.readValue(m, top)
	}
	return rc
}

func (d *decoder) readRun(m *Model, top *section) {
	r := RunSettings{End: 3650, Streamlines: 2000, PressureUpdates: 1}
	var s *section
	if top.vals["run"] != nil {
		s = d.section(top.vals["run"], "run", "", []string{"end", "report_every", "snapshots", "streamlines", "pressure_updates", "update_times", "max_water_cut", "min_oil_rate", "field_max_water_cut"}, nil)
	}
	r.End = d.when(s, "end", r.End, limEnd)
	r.MaxWaterCut = d.limited(s, "max_water_cut", 0, limWaterCut, nil)
	r.MinOilRate = d.limited(s, "min_oil_rate", 0, limOilRate, nil)
	r.FieldMaxWaterCut = d.limited(s, "field_max_water_cut", 0, limWaterCut, nil)
	r.ReportEvery = math.Max(math.Round(r.End/120), math.Min(1, r.End))
	r.ReportEvery = d.num(s, "report_every", r.ReportEvery, func(v float64) string {
		switch {
		case !(v > 0):
			return "is not positive"
		case v > r.End:
			return fmt.Sprintf("is longer than the run (end = %g)", r.End)
		case r.End/v > 1e6:
			return "gives more than a million report times"
		}
		return ""
	})
	before := d.nErrs()
	r.Streamlines = int(d.integer(s, "streamlines", int64(r.Streamlines), 1, int64(Limits[limStreamlines].Field.Hi)))
	if s.has("streamlines") && d.nErrs() == before {
		d.usual(s, s.vals["streamlines"], s.label("streamlines"), float64(r.Streamlines), limStreamlines)
	}
	if s.has("pressure_updates") && s.has("update_times") {
		d.fail(s, s.keys["update_times"], "run: give pressure_updates or update_times, not both")
	}
	r.PressureUpdates = int(d.integer(s, "pressure_updates", 1, 1, 100_000))
	if s.has("update_times") {
		ts, nodes := d.times(s, "update_times")
		for i, t := range ts {
			switch {
			case !(t > 0 && t < r.End):
				d.fail(s, nodes[i], "run.update_times: %g is not inside the run (0, %g); the solve at time 0 is always made", t, r.End)
			case i > 0 && !(t > ts[i-1]):
				d.fail(s, nodes[i], "run.update_times: %g does not increase (previous %g)", t, ts[i-1])
			}
		}
		if len(ts) > 100_000 {
			d.fail(s, s.vals["update_times"], "run.update_times: more than 100000 times")
		}
		r.UpdateTimes = ts
		r.PressureUpdates = 1 + len(ts)
	}
	r.Snapshots = []float64{r.End}
	if s.has("snapshots") {
		ts, nodes := d.times(s, "snapshots")
		for i, t := range ts {
			if !(t >= 0 && t <= r.End) {
				d.fail(s, nodes[i], "run.snapshots: %g is outside the run [0, %g]", t, r.End)
			}
		}
		if len(ts) > 10_000 {
			d.fail(s, s.vals["snapshots"], "run.snapshots: more than 10000 times")
		}
		if !slices.IsSorted(ts) {
			d.warnAt(s, s.vals["snapshots"], "run.snapshots are not in increasing order; they are taken sorted")
		}
		slices.Sort(ts)
		var dups []string
		for i := 1; i < len(ts); i++ {
			if ts[i] == ts[i-1] && (i < 2 || ts[i-1] != ts[i-2]) {
				dups = append(dups, fmt.Sprintf("%g", ts[i]))
			}
		}
		if len(dups) > 0 {
			d.warnAt(s, s.vals["snapshots"], "run.snapshots gives %s more than once; each time is taken once", strings.Join(dups, ", "))
		}
		r.Snapshots = slices.Compact(ts)
	}
	m.Run = r
}

func (d *decoder) readGrid(n *yaml.Node, keyLine int) *Grid {
	s := d.section(n, "grid", "", []string{"nx", "ny", "dx", "dy", "origin"}, []string{"nx", "ny", "dx", "dy"})
	if s == nil {
		return nil
	}
	nerr := len(d.errs.errs)
	nx := d.integer(s, "nx", 0, 1, math.MaxInt32)
	ny := d.integer(s, "ny", 0, 1, math.MaxInt32)
	g := &Grid{DX: d.limited(s, "dx", 0, limDX, nil), DY: d.limited(s, "dy", 0, limDX, nil)}
	if s.has("origin") {
		o, nodes := d.numbers(s, "origin")
		if len(nodes) == len(s.vals["origin"].Content) && len(o) != 2 {
			d.fail(s, s.vals["origin"], "grid.origin must be [x0, y0], found %d numbers", len(o))
		} else if len(o) == 2 {
			g.X0, g.Y0 = o[0], o[1]
		}
	}
	if len(d.errs.errs) > nerr || d.errs.dropped > 0 {
		return nil
	}
	if err := checkSize(d.path, keyLine, nx, ny, d.maxCells); err != nil {
		d.errs.add(err)
		return nil
	}
	g.NX, g.NY = int(nx), int(ny)
	d.cellCountWarning(d.path, keyLine, *g)
	return g
}

var rockKeys = []string{"perm", "perm_y", "porosity", "thickness", "active", "depth"}

func (d *decoder) readRock(rc *rawCase, n *yaml.Node) {
	s := d.section(n, "rock", "", rockKeys, []string{"perm", "porosity", "thickness"})
	if s == nil {
		return
	}
	for _, k := range rockKeys {
		if _, ok := s.vals[k]; !ok {
			continue
		}
		v := s.vals[k]
		p := propSpec{key: k, node: v}
		if v.Kind != yaml.ScalarNode || v.Tag == "!!null" {
			d.fail(s, v, "rock.%s must be a number or the path of a map file, found %s", k, yamldoc.Describe(v))
			continue
		}
		if k == "active" {
			p.isMap = true
		} else if x, msg := yamldoc.Number(v); msg == "" {
			p.value = x
		} else if v.Tag == "!!int" || v.Tag == "!!float" {
			d.fail(s, v, "rock.%s %s", k, msg)
			continue
		} else {
			p.isMap = true
		}
		if p.isMap {
			if strings.TrimSpace(v.Value) == "" {
				d.fail(s, v, "rock.%s: empty map path", k)
				continue
			}
			p.path = d.rel(v.Value)
		} else if m := propCheck(d.units, k, p.value); m != "" {
			d.fail(s, v, "rock.%s = %s %s", k, v.Value, m)
			continue
		} else if lim, ok := propLimit(k); ok {
			d.usual(s, v, "rock."+k, p.value, lim)
		}
		if k == "depth" {
			rc.depthNode = v
		}
		rc.props = append(rc.props, p)
	}
}

// rel joins a path from the case file to the case file's directory.
func (d *decoder) rel(p string) string {
	if filepath.IsAbs(p) {
		return p
	}
	return filepath.Join(d.dir, filepath.FromSlash(p))
}

// propLimit returns the index in Limits of a rock property.
func propLimit(key string) (int, bool) {
	switch key {
	case "perm", "perm_y":
		return limPerm, true
	case "porosity":
		return limPorosity, true
	case "thickness":
		return limThickness, true
	case "depth":
		return limDepth, true
	}
	return 0, false
}

// propCheck validates a property value of an active cell: "" or a phrase
// such as "is not positive".
func propCheck(u UnitSystem, key string, v float64) string {
	if lim, ok := propLimit(key); ok {
		return Limits[lim].refuse(u, v)
	}
	return ""
}

// propUnusual returns "" or a phrase for a warning about a property value
// of an active cell.
func propUnusual(u UnitSystem, key string, v float64) string {
	if lim, ok := propLimit(key); ok {
		return Limits[lim].unusual(u, v)
	}
	return ""
}

func (d *decoder) readFluids(rc *rawCase, n *yaml.Node) {
	s := d.section(n, "fluids", "", []string{"water_viscosity", "oil_viscosity", "initial_water_saturation", "oil_fvf", "water_fvf", "water_density", "oil_density"},
		[]string{"water_viscosity", "oil_viscosity"})
	if s == nil {
		return
	}
	f := &rc.m.Fluids
	f.WaterViscosity = d.limited(s, "water_viscosity", 0, limWaterVisc, nil)
	f.OilViscosity = d.limited(s, "oil_viscosity", 0, limOilVisc, nil)
	if s.has("initial_water_saturation") {
		rc.hasSwi = true
		rc.swiNode = s.vals["initial_water_saturation"]
		f.InitialSw = d.num(s, "initial_water_saturation", 0, inRange(0, 1, false, true))
	}
	f.OilFVF = d.num(s, "oil_fvf", 1, fvfCheck)
	f.WaterFVF = d.num(s, "water_fvf", 1, fvfCheck)
	for _, k := range []string{"water_density", "oil_density"} {
		if s.has(k) {
			rc.densityNodes = append(rc.densityNodes, s.vals[k])
		}
	}
	f.WaterDensity = d.limited(s, "water_density", 0, limDensity, nil)
	f.OilDensity = d.limited(s, "oil_density", 0, limDensity, nil)
	rc.fluidsNode = s.node
	f.FVFGiven = s.has("oil_fvf") || s.has("water_fvf")
}

func (d *decoder) readRelPerm(n *yaml.Node) RelPerm {
	s := d.section(n, "relperm", "", []string{"corey", "table"}, nil)
	if s == nil {
		return nil
	}
	switch {
	case s.has("corey") && s.has("table"):
		d.fail(s, s.keys["table"], "relperm: give corey or table, not both")
		return nil
	case s.has("corey"):
		keys := []string{"swc", "sor", "krw_max", "kro_max", "nw", "no"}
		c := d.section(s.vals["corey"], "relperm.corey", "", keys, keys)
		if c == nil {
			return nil
		}
		nerr := len(d.errs.errs)
		frac := inRange(0, 1, false, true)
		maxv := inRange(0, 1, true, false)
		expo := func(v float64) string {
			if v >= 1 && v <= 20 {
				return ""
			}
			return "is outside [1, 20] (Corey exponents below 1 make the curves infinitely steep at the end points)"
		}
		cr := Corey{
			Swc: d.num(c, "swc", 0, frac), Sor: d.num(c, "sor", 0, frac),
			KrwMax: d.num(c, "krw_max", 1, maxv), KroMax: d.num(c, "kro_max", 1, maxv),
			Nw: d.num(c, "nw", 2, expo), No: d.num(c, "no", 2, expo),
		}
		if len(d.errs.errs) > nerr {
			return nil
		}
		if cr.Swc+cr.Sor >= 1 {
			d.fail(c, c.vals["sor"], "relperm.corey: swc + sor = %g leaves no mobile range; it must be below 1", cr.Swc+cr.Sor)
			return nil
		}
		for _, u := range []struct {
			key string
			v   float64
			lim int
		}{{"swc", cr.Swc, limSatEnd}, {"sor", cr.Sor, limSatEnd}, {"krw_max", cr.KrwMax, limKrMax}, {"kro_max", cr.KroMax, limKrMax}, {"nw", cr.Nw, limCoreyExp}, {"no", cr.No, limCoreyExp}} {
			if c.has(u.key) {
				d.usual(c, c.vals[u.key], "relperm.corey."+u.key, u.v, u.lim)
			}
		}
		d.mobileRangeWarning(c, c.vals["sor"], "relperm.corey", cr.Swc, cr.Sor)
		return cr
	case s.has("table"):
		p := d.str(s, "table")
		if p == "" {
			d.fail(s, s.vals["table"], "relperm.table: empty path")
			return nil
		}
		t, err := ReadTable(d.rel(p))
		if err != nil {
			var ie *InputError
			if errors.As(err, &ie) && errors.Is(err, os.ErrNotExist) {
				d.fail(s, s.vals["table"], "relperm.table: file not found: %s", ie.Path)
			} else {
				d.errs.add(err)
			}
			return nil
		}
		swc, sor := t.Endpoints()
		d.mobileRangeWarning(s, s.vals["table"], "relperm.table "+t.Source, swc, sor)
		return t
	default:
		d.fail(s, s.node, "relperm: give corey: {swc, sor, krw_max, kro_max, nw, no} or table: path of a CSV file with columns sw,krw,kro")
		return nil
	}
}

var wellKeys = []string{"name", "type", "x", "y", "rate", "bhp", "max_bhp", "min_bhp", "min_rate", "max_rate", "radius", "skin", "open", "max_water_cut", "min_oil_rate"}

func (d *decoder) readWells(m *Model, top *section) {
	items := d.list(top, "wells")
	if top.has("wells") && len(items) == 0 && top.vals["wells"].Kind == yaml.SequenceNode {
		d.fail(top, top.keys["wells"], "wells: the list is empty; a case needs at least one injector and one producer")
		return
	}
	if !top.has("wells") {
		d.fail(top, top.keys["wells"], "wells: the list is empty; a case needs at least one injector and one producer")
		return
	}
	first := map[string]int{} // lower-case name -> line
	for idx, it := range items {
		label := fmt.Sprintf("wells[%d]", idx+1)
		name := ""
		if it.Kind == yaml.MappingNode {
			for i := 0; i+1 < len(it.Content); i += 2 {
				if it.Content[i].Value == "name" {
					if v := yamldoc.Deref(it.Content[i+1]); v.Kind == yaml.ScalarNode {
						name = strings.TrimSpace(v.Value)
					}
				}
			}
		}
		// Problems of a named well are *WellErrors naming it; those of an
		// unnamed one are *InputErrors naming its position in the list.
		s := d.section(it, label, name, wellKeys, []string{"name", "type", "x", "y"})
		if s == nil {
			continue
		}
		w := Well{Name: name, Line: it.Line, Radius: m.Units.DefaultWellRadius()}
		if s.has("name") && name == "" {
			d.fail(s, s.vals["name"], "the name is empty")
		}
		if name != "" {
			if l, dup := first[strings.ToLower(name)]; dup {
				d.fail(s, s.vals["name"], "duplicate well name (also on line %d); names must differ, ignoring case", l)
			} else {
				first[strings.ToLower(name)] = it.Line
			}
		}
		if s.has("type") {
			t := d.str(s, "type")
			switch WellType(t) {
			case Injector, Producer:
				w.Type = WellType(t)
			default:
				msg := fmt.Sprintf("type %q must be injector or producer", t)
				if sg, ok := nearest(t, []string{"injector", "producer"}); ok {
					msg += fmt.Sprintf("; did you mean %q?", sg)
				}
				d.fail(s, s.vals["type"], "%s", msg)
			}
		}
		w.X = d.num(s, "x", 0, nil)
		w.Y = d.num(s, "y", 0, nil)
		hasRate, hasBHP := s.has("rate"), s.has("bhp")
		switch {
		case hasRate && hasBHP:
			d.fail(s, s.keys["bhp"], "gives both rate and bhp; a well has one control (a limit goes in max_bhp or min_bhp)")
		case !hasRate && !hasBHP:
			d.fail(s, it, "has no control: give rate or bhp")
		case hasRate:
			w.Control = RateControl
			w.Rate = d.limited(s, "rate", 0, limRate, positiveRate)
		default:
			w.Control = BHPControl
			w.BHP = d.limited(s, "bhp", 0, limBHP, nil)
		}
		if s.has("max_bhp") {
			if w.Type == Producer {
				d.fail(s, s.keys["max_bhp"], "max_bhp is an injector limit; a producer takes min_bhp")
			}
			w.MaxBHP = d.limited(s, "max_bhp", 0, limBHP, nil)
			if w.Control == BHPControl && w.BHP > 0 && w.MaxBHP > 0 && w.BHP > w.MaxBHP {
				d.fail(s, s.vals["bhp"], "bhp = %g is above its max_bhp %g", w.BHP, w.MaxBHP)
			}
		}
		if s.has("min_bhp") {
			if w.Type == Injector {
				d.fail(s, s.keys["min_bhp"], "min_bhp is a producer limit; an injector takes max_bhp")
			}
			w.MinBHP = d.limited(s, "min_bhp", 0, limBHP, nil)
			if w.Control == BHPControl && w.BHP > 0 && w.MinBHP > 0 && w.BHP < w.MinBHP {
				d.fail(s, s.vals["bhp"], "bhp = %g is below its min_bhp %g", w.BHP, w.MinBHP)
			}
		}
		for _, k := range []string{"max_water_cut", "min_oil_rate"} {
			if s.has(k) && w.Type == Injector {
				d.fail(s, s.keys[k], "%s is a producer limit; an injector has none", k)
			}
		}
		w.MaxWaterCut = d.limited(s, "max_water_cut", 0, limWaterCut, nil)
		w.MinOilRate = d.limited(s, "min_oil_rate", 0, limOilRate, nil)
		d.readRateLimits(s, &w)
		w.Radius = d.limited(s, "radius", w.Radius, limRadius, nil)
		w.Skin = d.limited(s, "skin", 0, limSkin, nil)
		w.Open = d.when(s, "open", 0, limTime)
		m.Wells = append(m.Wells, w)
	}
}

// readRateLimits reads an injector's min_rate and max_rate, the range
// floodtrace balance may set its rate in: both within the accepted rate
// range, min_rate not above max_rate, and a rate control inside them; and
// a BHP-controlled producer's max_rate, its liquid limit.
func (d *decoder) readRateLimits(s *section, w *Well) {
	if !s.has("min_rate") && !s.has("max_rate") {
		return
	}
	if w.Type == Producer {
		// A producer's max_rate is its liquid limit (reservoir volume per
		// day), honoured by every pressure solve while it is on BHP
		// control.
		switch {
		case s.has("min_rate"):
			d.fail(s, s.keys["min_rate"], "min_rate is an injector limit (the range floodtrace balance may set the injection rate in); a producer takes max_rate, its liquid limit")
		case w.Control == RateControl:
			d.fail(s, s.keys["max_rate"], "max_rate is the liquid limit of a producer on bhp control; this producer is on rate control: its rate already is its production")
		default:
			w.MaxRate = d.limited(s, "max_rate", 0, limRate, positiveRate)
		}
		return
	}
	before := d.nErrs()
	w.MinRate = d.limited(s, "min_rate", 0, limRate, positiveRate)
	w.MaxRate = d.limited(s, "max_rate", 0, limRate, positiveRate)
	if d.nErrs() != before {
		return
	}
	if w.MinRate > 0 && w.MaxRate > 0 && w.MinRate > w.MaxRate {
		d.fail(s, s.vals["min_rate"], "min_rate = %g is above max_rate = %g", w.MinRate, w.MaxRate)
		return
	}
	if w.Control == RateControl && w.Rate > 0 {
		if w.MinRate > 0 && w.Rate < w.MinRate {
			d.fail(s, s.vals["rate"], "rate = %g is below its min_rate %g", w.Rate, w.MinRate)
		}
		if w.MaxRate > 0 && w.Rate > w.MaxRate {
			d.fail(s, s.vals["rate"], "rate = %g is above its max_rate %g", w.Rate, w.MaxRate)
		}
	}
}

func (d *decoder) readFaults(m *Model, top *section) {
	seen := map[string]int{}
	for idx, it := range d.list(top, "faults") {
		label := fmt.Sprintf("faults[%d]", idx+1)
		s := d.section(it, label, "", []string{"name", "trace", "multiplier"}, []string{"trace", "multiplier"})
		if s == nil {
			continue
		}
		f := Fault{Name: d.str(s, "name"), Line: it.Line}
		if f.Name == "" {
			f.Name = fmt.Sprintf("fault %d", idx+1)
		} else if l, dup := seen[f.Name]; dup {
			d.fail(s, s.vals["name"], "fault %q: duplicate name (also on line %d)", f.Name, l)
		} else {
			seen[f.Name] = it.Line
		}
		before := d.nErrs()
		f.Multiplier = d.num(s, "multiplier", 1, func(v float64) string { return Limits[limFaultMult].refuse(d.units, v) })
		if s.has("multiplier") && d.nErrs() == before && f.Multiplier > 1 {
			d.warnAt(s, s.vals["multiplier"], "fault %q: multiplier %g is above 1: the fault is a conduit that raises the transmissibility of the faces it crosses", f.Name, f.Multiplier)
		}
		bad := 0
		for _, p := range d.list(s, "trace") {
			if p.Kind != yaml.SequenceNode || len(p.Content) != 2 {
				d.fail(s, p, "fault %q: each trace point must be [x, y], found %s", f.Name, yamldoc.Describe(p))
				bad++
				continue
			}
			x, mx := yamldoc.Number(yamldoc.Deref(p.Content[0]))
			y, my := yamldoc.Number(yamldoc.Deref(p.Content[1]))
			if mx != "" || my != "" {
				d.fail(s, p, "fault %q: trace point coordinate %s", f.Name, strings.TrimSpace(mx+" "+my))
				bad++
				continue
			}
			f.Trace = append(f.Trace, [2]float64{x, y})
		}
		if s.has("trace") && s.vals["trace"].Kind == yaml.SequenceNode && bad == 0 && len(f.Trace) < 2 {
			d.fail(s, s.vals["trace"], "fault %q: the trace needs at least two points", f.Name)
		}
		m.Faults = append(m.Faults, f)
	}
}

var eventKeys = []string{"time", "well", "rate", "bhp", "shut", "reopen", "convert"}

func (d *decoder) readSchedule(m *Model, top *section) {
	names := make([]string, len(m.Wells))
	for i, w := range m.Wells {
		names[i] = w.Name
	}
	for idx, it := range d.list(top, "schedule") {
		label := fmt.Sprintf("schedule[%d]", idx+1)
		s := d.section(it, label, "", eventKeys, []string{"time", "well"})
		if s == nil {
			continue
		}
		e := Event{Rate: math.NaN(), BHP: math.NaN(), Line: it.Line}
		e.Time = d.when(s, "time", 0, limTime)
		e.Well = d.str(s, "well")
		if s.has("well") && m.WellIndex(e.Well) < 0 {
			msg := fmt.Sprintf("schedule: unknown well %q", e.Well)
			if sg, ok := nearest(e.Well, names); ok {
				msg += fmt.Sprintf("; did you mean %q?", sg)
			}
			d.fail(s, s.vals["well"], "%s", msg)
		}
		if s.has("rate") {
			e.Rate = d.limited(s, "rate", math.NaN(), limRate, positiveRate)
		}
		if s.has("bhp") {
			e.BHP = d.limited(s, "bhp", math.NaN(), limBHP, nil)
		}
		if s.has("shut") {
			e.Shut = d.boolean(s, "shut")
			if !e.Shut {
				d.fail(s, s.vals["shut"], "schedule: shut: false changes nothing; use reopen: true")
			}
		}
		if s.has("reopen") {
			e.Reopen = d.boolean(s, "reopen")
			if !e.Reopen {
				d.fail(s, s.vals["reopen"], "schedule: reopen: false changes nothing; use shut: true")
			}
		}
		if s.has("convert") {
			c := d.str(s, "convert")
			if c != string(Injector) && c != string(Producer) {
				d.fail(s, s.vals["convert"], "schedule: convert %q must be injector or producer", c)
			}
			e.Convert = WellType(c)
		}
		nControl := 0
		for _, k := range []string{"rate", "bhp"} {
			if s.has(k) {
				nControl++
			}
		}
		switch {
		case nControl == 2:
			d.fail(s, s.keys["bhp"], "schedule: an event gives rate or bhp, not both")
		case (s.has("shut") || s.has("reopen")) && (nControl > 0 || s.has("convert") || (s.has("shut") && s.has("reopen"))):
			d.fail(s, it, "schedule: shut and reopen stand alone in an event (one change per event)")
		case nControl == 0 && !s.has("shut") && !s.has("reopen") && !s.has("convert"):
			d.fail(s, it, "schedule: the event changes nothing; give rate, bhp, shut: true, reopen: true or convert")
		}
		m.Schedule = append(m.Schedule, e)
	}
	SortEvents(m.Schedule)
}

// SortEvents sorts schedule events by time, keeping the order of events
// at the same time (the case file's order, which decides between them).
func SortEvents(evs []Event) {
	slices.SortStableFunc(evs, func(a, b Event) int { return cmp.Compare(a.Time, b.Time) })
}

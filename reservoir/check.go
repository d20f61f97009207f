package reservoir

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"slices"

	"floodtrace/internal/geotiff"

	"gopkg.in/yaml.v3"
)

// resolveGrid sets the model grid from the case or, without a grid
// section, from the header of the first rock map that is a GIS ASCII
// raster.
func (d *decoder) resolveGrid(rc *rawCase) {
	m := rc.m
	if rc.grid != nil {
		m.Grid = *rc.grid
		rc.gridFrom = fmt.Sprintf("from %s:%d", d.path, rc.gridNode.Line)
		return
	}
	for _, p := range rc.props {
		if !p.isMap {
			continue
		}
		f, err := os.Open(p.path)
		if err != nil {
			d.mapOpenError(p, err)
			return
		}
		br := bufio.NewReader(f)
		head, _ := br.Peek(4096)
		tiff := geotiff.IsTIFF(head) || isTIFFPath(p.path)
		if !tiff && !sniffRaster(head) {
			f.Close()
			continue
		}
		var h *Raster
		if tiff {
			var data []byte
			if data, err = io.ReadAll(br); err == nil {
				h, _, err = parseTIFF(data, p.path, d.maxCells)
			} else {
				err = &InputError{Path: p.path, Msg: "reading: " + err.Error(), Err: err}
			}
		} else {
			h, err = readRasterHeader(newLineReader(br, p.path, false), d.maxCells)
		}
		f.Close()
		if err != nil {
			d.errs.add(err)
			return
		}
		for _, c := range []struct {
			name string
			v    float64
		}{{"cellsize (dx)", h.Grid.DX}, {"cellsize (dy)", h.Grid.DY}} {
			if msg := Limits[limDX].refuse(d.units, c.v); msg != "" {
				d.errs.add(&InputError{Path: p.path, Msg: fmt.Sprintf("raster header %s = %g %s", c.name, c.v, msg)})
				return
			}
			if msg := Limits[limDX].unusual(d.units, c.v); msg != "" {
				d.warns = append(d.warns, (&InputError{Path: p.path, Msg: fmt.Sprintf("raster header %s = %g %s; check the value and its unit", c.name, c.v, msg)}).Error())
			}
		}
		m.Grid = h.Grid
		rc.gridFrom = "from the header of " + p.path
		d.cellCountWarning(p.path, 0, m.Grid)
		return
	}
	d.errs.add(&InputError{Path: d.path, Line: rc.rockLine, Msg: "no grid: the case has no grid section and none of the rock maps is a GIS ASCII raster or a GeoTIFF whose header could define it"})
}

func (d *decoder) mapOpenError(p propSpec, err error) {
	if errors.Is(err, os.ErrNotExist) {
		d.errs.add(&InputError{Path: d.path, Line: p.node.Line, Msg: fmt.Sprintf("rock.%s: map file not found: %s", p.key, p.path), Err: err})
		return
	}
	d.errs.add(openError(p.path, err))
}

// loadRock reads the rock maps, builds the property arrays and the active
// flags, and validates the values of the active cells.
func (d *decoder) loadRock(rc *rawCase) {
	m := rc.m
	g := m.Grid
	n := g.N()
	type loaded struct {
		vals []float64
		used bool
	}
	cache := map[string]*loaded{}
	arrays := map[string][]float64{}
	for _, p := range rc.props {
		if !p.isMap {
			arrays[p.key] = fill(n, p.value)
			continue
		}
		l, ok := cache[p.path]
		if !ok {
			var vals []float64
			var err error
			if p.key == "active" && isGeoJSONPath(p.path) {
				var data []byte
				if data, err = os.ReadFile(p.path); err == nil {
					vals, err = ReadOutline(data, p.path, g)
				}
			} else if isTIFFPath(p.path) {
				var epsg int
				vals, epsg, err = readTIFFMapFile(p.path, &g, rc.gridFrom, d.maxCells)
				if err == nil && !m.CRS.Known() && epsg > 0 {
					m.CRS = CRS{EPSG: epsg, From: p.path}
				}
			} else {
				vals, _, err = readMapFile(p.path, &g, rc.gridFrom, d.maxCells)
			}
			if err != nil {
				if errors.Is(err, os.ErrNotExist) {
					d.mapOpenError(p, err)
				} else {
					d.errs.add(err)
				}
				continue
			}
			l = &loaded{vals: vals}
			cache[p.path] = l
			if m.CRS.WKT == "" && !isGeoJSONPath(p.path) {
				if c, ok := readPRJ(p.path); ok && (m.CRS.EPSG == 0 || m.CRS.EPSG == c.EPSG) {
					m.CRS = c
				}
			}
		}
		if l.used {
			arrays[p.key] = append([]float64(nil), l.vals...)
		} else {
			arrays[p.key] = l.vals
			l.used = true
		}
	}
	if !d.errs.ok() {
		return
	}
	// With an active map, the cells it marks active (not 0 and not
	// NODATA) must have a value in every property map; without one, a
	// NODATA value makes its cell inactive, and a warning counts them.
	active := make([]bool, n)
	for k := range active {
		active[k] = true
	}
	explicit := false
	for _, p := range rc.props {
		if p.key != "active" {
			continue
		}
		explicit = true
		for k, v := range arrays[p.key] {
			if math.IsNaN(v) || v == 0 {
				active[k] = false
			}
		}
	}
	// firstBad scans the active cells of a in file order (north row
	// first, so that the cell named is the first one the user meets in
	// the file) and returns the first cell where bad holds and the count.
	firstBad := func(a []float64, bad func(float64) bool) (first, count int) {
		first = -1
		for j := g.NY - 1; j >= 0; j-- {
			for k := j * g.NX; k < (j+1)*g.NX; k++ {
				if active[k] && bad(a[k]) {
					if first < 0 {
						first = k
					}
					count++
				}
			}
		}
		return first, count
	}
	more := func(count int) string {
		switch {
		case count == 2:
			return " (and 1 more cell)"
		case count > 2:
			return fmt.Sprintf(" (and %d more cells)", count-1)
		}
		return ""
	}
	at := func(p propSpec, k int, msg string) *InputError {
		i, j := g.IJ(k)
		return &InputError{Path: p.path, Row: g.NY - j, Col: i + 1, Msg: msg}
	}
	for _, p := range rc.props {
		if !p.isMap || p.key == "active" {
			continue
		}
		a := arrays[p.key]
		first, count := firstBad(a, math.IsNaN)
		if first < 0 {
			continue
		}
		if p.key == "depth" {
			// The depth map does not define the reservoir: the other
			// maps do (props are in rockKeys order, depth last, so the
			// active cells are final here).
			d.errs.add(at(p, first, fmt.Sprintf("depth is NODATA in an active cell%s; give the depth of every active cell or mark the cell inactive in the active map (or NODATA in the rock maps)",
				more(count))))
			continue
		}
		if explicit {
			d.errs.add(at(p, first, fmt.Sprintf("%s is NODATA in a cell the active map marks active%s; give a value there or mark the cell 0 in the active map",
				propName(p.key), more(count))))
			continue
		}
		for k, v := range a {
			if math.IsNaN(v) {
				active[k] = false
			}
		}
		d.warns = append(d.warns, (&InputError{Path: p.path, Msg: fmt.Sprintf(
			"%d of %d cells are NODATA in this %s map and became inactive (the case gives no active map)", count, n, propName(p.key))}).Error())
	}
	// Validate the values of the active cells, one message per property
	// naming the first bad cell and counting the others; then warn, the
	// same way, about values outside their usual range.
	for _, p := range rc.props {
		if !p.isMap || p.key == "active" {
			continue
		}
		a := arrays[p.key]
		if first, count := firstBad(a, func(v float64) bool { return !math.IsNaN(v) && propCheck(m.Units, p.key, v) != "" }); first >= 0 {
			d.errs.add(at(p, first, fmt.Sprintf("%s %g %s in an active cell%s; mark cells outside the reservoir with NODATA or 0 in the active map",
				propName(p.key), a[first], propCheck(m.Units, p.key, a[first]), more(count))))
			continue
		}
		if first, count := firstBad(a, func(v float64) bool { return !math.IsNaN(v) && propUnusual(m.Units, p.key, v) != "" }); first >= 0 {
			d.warns = append(d.warns, at(p, first, fmt.Sprintf("%s %g %s in an active cell%s; check the values and their unit",
				propName(p.key), a[first], propUnusual(m.Units, p.key, a[first]), more(count))).Error())
		}
	}
	nActive := 0
	for _, a := range active {
		if a {
			nActive++
		}
	}
	if nActive == 0 {
		d.errs.add(&InputError{Path: d.path, Line: rc.rockLine, Msg: "no active cells: the active map is 0 or some map is NODATA everywhere"})
	}
	if !d.errs.ok() {
		return
	}
	m.PermEast = arrays["perm"]
	if py, ok := arrays["perm_y"]; ok {
		m.PermNorth = py
	} else {
		m.PermNorth = append([]float64(nil), m.PermEast...)
	}
	m.Porosity = arrays["porosity"]
	m.Thickness = arrays["thickness"]
	m.Active = active
	m.Depth = arrays["depth"]
	for _, p := range rc.props {
		if p.key == "depth" && p.isMap {
			m.DepthFile = p.path
		}
	}
	for _, a := range [][]float64{m.PermEast, m.PermNorth, m.Porosity, m.Thickness, m.Depth} {
		for k := range a {
			if !active[k] {
				a[k] = 0
			}
		}
	}
}

func propName(key string) string {
	switch key {
	case "perm":
		return "permeability"
	case "perm_y":
		return "permeability in y"
	}
	return key
}

// placeWells puts every well into its cell and checks the layout.
func (d *decoder) placeWells(m *Model, wellsLine int) {
	g := m.Grid
	byCell := map[int]int{}
	nInj, nProd := 0, 0
	for n := range m.Wells {
		w := &m.Wells[n]
		i, j, ok := g.Locate(w.X, w.Y)
		if !ok {
			d.errs.add(&WellError{Path: d.srcPath(w.Source), Line: w.Line, Well: w.Name, Msg: fmt.Sprintf(
				"point (%g, %g) lies outside the grid (x from %g to %g, y from %g to %g)",
				w.X, w.Y, g.X0, g.X0+g.Width(), g.Y0, g.Y0+g.Height())})
			continue
		}
		w.I, w.J, w.Cell = i, j, g.Index(i, j)
		if !m.Active[w.Cell] {
			d.errs.add(&WellError{Path: d.srcPath(w.Source), Line: w.Line, Well: w.Name, Msg: fmt.Sprintf(
				"point (%g, %g) lies in inactive %s (outside the reservoir or NODATA in a map; cells counted from 0 at the south-west corner)",
				w.X, w.Y, CellLabel(i, j))})
			continue
		}
		if o, dup := byCell[w.Cell]; dup {
			ow := m.Wells[o]
			d.errs.add(&WellError{Path: d.srcPath(w.Source), Line: w.Line, Well: w.Name, Msg: fmt.Sprintf(
				"shares %s with well %s (line %d); one well per cell (cells counted from 0 at the south-west corner)",
				CellLabel(i, j), ow.Name, ow.Line)})
			continue
		}
		byCell[w.Cell] = n
		if w.Open < m.Run.End {
			switch w.Type {
			case Injector:
				nInj++
			case Producer:
				nProd++
			}
		}
	}
	if !d.errs.ok() {
		return
	}
	if nInj == 0 && !d.partialWells {
		d.errs.add(&InputError{Path: d.path, Line: wellsLine, Msg: "no injector: a waterflood needs at least one injector open before the end of the run"})
	}
	if nProd == 0 && !d.partialWells {
		d.errs.add(&InputError{Path: d.path, Line: wellsLine, Msg: "no producer: a waterflood needs at least one producer open before the end of the run"})
	}
}

// peacemanRadius is the equivalent well-block radius of Peaceman (1983,
// SPE Journal 23(3), 531-543) for an anisotropic rectangular cell:
//
//	ro = 0.28 sqrt(sqrt(ky/kx) dx^2 + sqrt(kx/ky) dy^2) / ((ky/kx)^1/4 + (kx/ky)^1/4)
//
// which reduces to 0.198 dx for a square isotropic cell (Peaceman 1978).
func peacemanRadius(kx, ky, dx, dy float64) float64 {
	r := ky / kx
	return 0.28 * math.Sqrt(math.Sqrt(r)*dx*dx+math.Sqrt(1/r)*dy*dy) / (math.Pow(r, 0.25) + math.Pow(1/r, 0.25))
}

// checkWellRadii refuses wells whose radius and skin give a non-positive
// Peaceman denominator ln(ro/rw) + s.
func (d *decoder) checkWellRadii(m *Model) {
	length, _, _, _, _, _ := m.Units.Labels()
	for _, w := range m.Wells {
		ro := peacemanRadius(m.PermEast[w.Cell], m.PermNorth[w.Cell], m.Grid.DX, m.Grid.DY)
		if den := math.Log(ro/w.Radius) + w.Skin; !(den > 0) {
			d.errs.add(&WellError{Path: d.srcPath(w.Source), Line: w.Line, Well: w.Name, Msg: fmt.Sprintf(
				"radius %g %s with skin %g gives ln(ro/rw) + skin = %.3g <= 0 for the Peaceman equivalent radius ro = %.3g %s of %s; use a smaller radius or skin, or larger cells",
				w.Radius, length, w.Skin, den, ro, length, CellLabel(w.I, w.J))})
		}
	}
}

// applyFaults fills the face multipliers and refuses faults that cross no
// face.
func (d *decoder) applyFaults(m *Model) {
	counts := m.ApplyFaults()
	g := m.Grid
	for n, f := range m.Faults {
		if counts[n] == 0 {
			d.errs.add(&InputError{Path: d.srcPath(f.Source), Line: f.Line, Msg: fmt.Sprintf(
				"fault %q crosses no face between two cells (the grid spans x from %g to %g, y from %g to %g)",
				f.Name, g.X0, g.X0+g.Width(), g.Y0, g.Y0+g.Height())})
		}
	}
}

// checkSchedule plays the well openings and the schedule through the run
// and refuses conversions to the same type and, whenever every open well
// is rate-controlled, rates that do not balance (an incompressible model
// has no solution then).
func (d *decoder) checkSchedule(m *Model, wellsKey *yaml.Node) {
	type state struct {
		typ     WellType
		ctl     Control
		rate    float64
		opened  bool
		shut    bool
		openDay float64
	}
	st := make([]state, len(m.Wells))
	for i, w := range m.Wells {
		st[i] = state{typ: w.Type, ctl: w.Control, rate: w.Rate, openDay: w.Open, opened: w.Open == 0}
	}
	// Times at which something changes: 0, openings and events.
	times := []float64{0}
	for _, w := range m.Wells {
		if w.Open > 0 && w.Open <= m.Run.End {
			times = append(times, w.Open)
		}
	}
	for _, e := range m.Schedule {
		if e.Time <= m.Run.End {
			times = append(times, e.Time)
		}
	}
	slices.Sort(times)
	times = slices.Compact(times)
	next := 0 // next schedule event (m.Schedule is sorted by time)
	_, _, _, rateUnit, _, _ := m.Units.Labels()
	for _, t := range times {
		line := 0
		if wellsKey != nil {
			line = wellsKey.Line
		}
		for i, w := range m.Wells {
			if !st[i].opened && w.Open <= t {
				st[i].opened = true
				if t > 0 {
					line = w.Line
				}
			}
		}
		for ; next < len(m.Schedule) && m.Schedule[next].Time <= t; next++ {
			e := m.Schedule[next]
			line = e.Line
			i := m.WellIndex(e.Well)
			s := &st[i]
			switch {
			case e.Shut:
				s.shut = true
			case e.Reopen:
				s.shut, s.opened = false, true
			}
			if e.Convert != "" {
				if e.Convert == s.typ {
					d.errs.add(&InputError{Path: d.path, Line: e.Line, Msg: fmt.Sprintf(
						"schedule: well %s is already a %s at day %g", e.Well, e.Convert, e.Time)})
				}
				s.typ = e.Convert
			}
			if !math.IsNaN(e.Rate) {
				s.ctl, s.rate = RateControl, e.Rate
			}
			if !math.IsNaN(e.BHP) {
				s.ctl = BHPControl
			}
		}
		anyOpen, anyBHP := false, false
		inj, prod := 0.0, 0.0
		for _, s := range st {
			if !s.opened || s.shut {
				continue
			}
			anyOpen = true
			if s.ctl == BHPControl {
				anyBHP = true
			} else if s.typ == Injector {
				inj += s.rate
			} else {
				prod += s.rate
			}
		}
		if !anyOpen || anyBHP {
			continue
		}
		if math.Abs(inj-prod) > 1e-9*math.Max(inj, prod) {
			when := "at the start"
			if t > 0 {
				when = fmt.Sprintf("from day %g", t)
			}
			d.errs.add(&InputError{Path: d.path, Line: line, Msg: fmt.Sprintf(
				"unbalanced rates %s: every open well is rate-controlled and the injectors take %g %s while the producers give %g %s; an incompressible model needs equal totals, or one well on BHP control",
				when, inj, rateUnit, prod, rateUnit)})
			return
		}
	}
}

package screen

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"unicode/utf8"

	"gopkg.in/yaml.v3"

	"floodtrace/internal/yamldoc"
	"floodtrace/reservoir"
)

// Objective names what a screen maximises.
type Objective string

// The objectives.
const (
	// Oil is the field cumulative oil at the horizon (reservoir volumes).
	Oil Objective = "oil"
	// Value is the discounted cash flow of Economics.
	Value Objective = "value"
)

// Spec is a screening study: a base case, the candidates, an optional
// ensemble of permeability maps and the objective. Build one with
// LoadSpec or in code; NewPlan expands it into candidates.
type Spec struct {
	// Path is the spec file, for messages ("" when built in code).
	Path string
	// Base is the base case. Candidates copy it and change its wells (and
	// its permeability, per realization).
	Base *reservoir.Model
	// Horizon replaces the base case's run.end (days); 0 keeps it. The
	// report interval is scaled with it and the only snapshot is the
	// horizon.
	Horizon float64
	// Objective is Oil (the default when empty) or Value.
	Objective Objective
	// Streamlines overrides the base case's run.streamlines when > 0.
	Streamlines int
	// Infill, Layouts and Patterns are the candidates; at least one must
	// give some.
	Infill   *Infill
	Layouts  []Layout
	Patterns []Pattern
	// Realizations each replace the base permeability; none means the
	// base case alone.
	Realizations []Realization
	// Economics prices the Value objective.
	Economics Economics
}

// Infill is a lattice of single new wells: one candidate per node.
type Infill struct {
	Type    reservoir.WellType
	Control reservoir.Control
	// Rate or BHP is the control value; MaxBHP (injector) and MinBHP
	// (producer) are optional limits; Radius 0 means the default of the
	// unit system.
	Rate, BHP, MaxBHP, MinBHP, Radius, Skin float64
	// Spacing is the distance between nodes along x and y; the first node
	// is half a spacing from the south-west corner of the grid.
	Spacing [2]float64
	// MinDistance is the smallest distance from a node to an existing
	// well; closer nodes are skipped.
	MinDistance float64
	Line        int
}

// Layout is a whole well list that replaces the base case's wells.
type Layout struct {
	Name  string
	Wells []reservoir.Well
	Line  int
}

// Realization is one permeability map of an ensemble.
type Realization struct {
	Name string    // file name, for the outputs
	Path string    // where it was read
	Perm []float64 // one value per cell (the x permeability)
}

// Economics are the user's numbers for the Value objective (the type of
// a case's value block, reservoir.Economics, with WellCost per new well).
// Prices are per unit of reservoir volume of the case (bbl or m3).
type Economics = reservoir.Economics

var (
	topKeys     = []string{"base", "horizon", "objective", "streamlines", "candidates", "realizations", "value"}
	candKeys    = []string{"infill", "layouts", "patterns"}
	infillKeys  = []string{"type", "rate", "bhp", "max_bhp", "min_bhp", "radius", "skin", "spacing", "min_distance"}
	layoutKeys  = []string{"name", "wells"}
	wellKeys    = []string{"name", "type", "x", "y", "rate", "bhp", "max_bhp", "min_bhp", "radius", "skin", "open"}
	patternKeys = []string{"kind", "name", "spacing", "row_spacing", "rotation", "offset", "injector_rate", "injector_max_bhp", "producer_bhp"}
	valueKeys   = []string{"oil_price", "water_cost", "injection_cost", "well_cost", "discount_rate"}
)

// MaxSpecBytes is the largest spec file LoadSpec reads.
const MaxSpecBytes = 4 << 20

// LoadSpec reads a screening spec (YAML), the base case it names and the
// realization maps; paths in the spec are relative to the spec file.
// Problems are reported as *SpecError naming the file and the line, or as
// the base case's own errors.
func LoadSpec(path string) (*Spec, error) {
	f, err := os.Open(path)
	if err != nil {
		msg := "cannot open: " + err.Error()
		if errors.Is(err, fs.ErrNotExist) {
			msg = "file not found"
		}
		return nil, &SpecError{Path: path, Msg: msg, Err: err}
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, MaxSpecBytes+1))
	if err != nil {
		return nil, &SpecError{Path: path, Msg: "reading: " + err.Error(), Err: err}
	}
	if len(data) > MaxSpecBytes {
		return nil, &SpecError{Path: path, Msg: fmt.Sprintf("larger than %d bytes; a spec is a short YAML file", MaxSpecBytes)}
	}
	return ParseSpec(path, data)
}

// ParseSpec is LoadSpec for a spec already in memory; path names it in
// messages and locates the files it names.
func ParseSpec(path string, data []byte) (spec *Spec, err error) {
	p := &yparser{path: path}
	if !utf8.Valid(data) || bytes.IndexByte(data, 0) >= 0 {
		return nil, &SpecError{Path: path, Msg: "not a text file; a spec is YAML text"}
	}
	root, err := parseYAML(path, data)
	if err != nil {
		return nil, err
	}
	s := &Spec{Path: path}
	dir := filepath.Dir(path)
	rel := func(q string) string {
		if filepath.IsAbs(q) {
			return q
		}
		return filepath.Join(dir, filepath.FromSlash(q))
	}
	top := p.mapping(root, "", topKeys, []string{"base", "candidates"})
	if !p.ok() {
		return nil, p.err
	}
	// Scalars first, so that the candidates can be checked against the
	// base case afterwards.
	s.Horizon = p.number(top, "horizon", 0, func(v float64) string {
		if v > 0 && v <= 1e5 {
			return ""
		}
		return fmt.Sprintf("= %g days must be in (0, 100000]", v)
	})
	if top.has("objective") {
		o := p.str(top, "objective")
		switch Objective(o) {
		case Oil, Value:
			s.Objective = Objective(o)
		default:
			p.failf(top.vals["objective"], "objective %q must be oil or value; did you mean %q?", o, nearest(o, []string{"oil", "value"}))
		}
	}
	s.Streamlines = p.integer(top, "streamlines", 0, 1, 1_000_000)
	if top.has("value") {
		v := p.mapping(top.vals["value"], "value", valueKeys, nil)
		check := func(key string) func(float64) string {
			return func(x float64) string {
				if m := reservoir.EconomicsProblem(key, x); m != "" {
					return fmt.Sprintf("= %g %s", x, m)
				}
				return ""
			}
		}
		s.Economics = Economics{
			OilPrice:      p.number(v, "oil_price", 0, check("oil_price")),
			WaterCost:     p.number(v, "water_cost", 0, check("water_cost")),
			InjectionCost: p.number(v, "injection_cost", 0, check("injection_cost")),
			WellCost:      p.number(v, "well_cost", 0, check("well_cost")),
			DiscountRate:  p.number(v, "discount_rate", 0, check("discount_rate")),
		}
		if p.ok() && s.Objective == Value && !v.has("oil_price") {
			p.failf(v.node, "value: objective value needs oil_price")
		}
	} else if p.ok() && s.Objective == Value {
		p.failf(top.keys["objective"], "objective value needs a value: {oil_price, water_cost, injection_cost, well_cost, discount_rate} section")
	}
	if !p.ok() {
		return nil, p.err
	}

	// The base case.
	baseNode := top.vals["base"]
	bp := p.str(top, "base")
	if p.ok() && bp == "" {
		p.failf(baseNode, "base: empty path; give the case file")
	}
	if !p.ok() {
		return nil, p.err
	}
	// The base case may lack injectors or producers (a field on primary
	// production, before its first injectors): NewPlan skips a candidate
	// that still leaves the field without one.
	base, err := reservoir.Loader{PartialWells: true}.Load(rel(bp))
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) {
			return nil, &SpecError{Path: path, Line: baseNode.Line, Msg: "base case not found: " + rel(bp), Err: err}
		}
		return nil, fmt.Errorf("%s:%d: base case: %w", path, baseNode.Line, err)
	}
	// Screening plans from day 0 on the base case's own controls: a
	// production history of the base case (for reviewing the flood) is not
	// used (its wells have no rows for the candidates' new wells).
	base.History = nil
	s.Base = base

	// Realizations.
	if top.has("realizations") {
		s.Realizations, err = readRealizations(p, top.vals["realizations"], dir, base)
		if err != nil {
			return nil, err
		}
	}

	// Candidates.
	c := p.mapping(top.vals["candidates"], "candidates", candKeys, nil)
	if p.ok() && len(c.vals) == 0 {
		p.failf(c.node, "candidates: give infill, layouts or patterns")
	}
	if c.has("infill") {
		s.Infill = readInfill(p, c.vals["infill"], base)
	}
	for i, it := range p.list(c, "layouts") {
		if l := readLayout(p, it, i, base); l != nil {
			if l.Name == BaseName {
				p.failf(it, "layout name %q is kept for the base case, which is ranked with the candidates; rename the layout", l.Name)
			}
			for _, o := range s.Layouts {
				if strings.EqualFold(o.Name, l.Name) {
					p.failf(it, "layout name %q is used twice (also on line %d)", l.Name, o.Line)
				}
			}
			s.Layouts = append(s.Layouts, *l)
		}
	}
	for i, it := range p.list(c, "patterns") {
		if pt := readPattern(p, it, i); pt != nil {
			if pt.Name == BaseName {
				p.failf(it, "pattern name %q is kept for the base case, which is ranked with the candidates; rename the pattern", pt.Name)
			}
			s.Patterns = append(s.Patterns, *pt)
		}
	}
	if c.has("layouts") && p.ok() && len(s.Layouts) == 0 {
		p.failf(c.vals["layouts"], "candidates.layouts: the list is empty")
	}
	if c.has("patterns") && p.ok() && len(s.Patterns) == 0 {
		p.failf(c.vals["patterns"], "candidates.patterns: the list is empty")
	}
	if !p.ok() {
		return nil, p.err
	}
	return s, nil
}

// parseYAML returns the root of the single YAML document in data.
func parseYAML(path string, data []byte) (*yaml.Node, error) {
	root, perr := yamldoc.Parse(data)
	switch {
	case perr == nil:
		return root, nil
	case perr.Empty:
		return nil, &SpecError{Path: path, Msg: "empty spec"}
	case perr.Multiple:
		return nil, &SpecError{Path: path, Line: perr.Line, Msg: "more than one YAML document; a spec holds one"}
	}
	return nil, &SpecError{Path: path, Line: perr.Line, Msg: perr.Msg, Err: perr.Err}
}

func parseType(p *yparser, m *ymap) reservoir.WellType {
	t := p.str(m, "type")
	switch reservoir.WellType(t) {
	case reservoir.Injector, reservoir.Producer:
		return reservoir.WellType(t)
	}
	if p.ok() {
		p.failf(m.vals["type"], "%s %q must be injector or producer; did you mean %q?", m.label("type"), t,
			nearest(t, []string{"injector", "producer"}))
	}
	return ""
}

// control reads rate or bhp (exactly one) and the optional limits.
func readControl(p *yparser, m *ymap, t reservoir.WellType) (c reservoir.Control, rate, bhp, maxBHP, minBHP float64) {
	switch {
	case m.has("rate") && m.has("bhp"):
		p.failf(m.keys["bhp"], "%s: give rate or bhp, not both (a limit goes in max_bhp or min_bhp)", m.where)
	case m.has("rate"):
		c, rate = reservoir.RateControl, p.number(m, "rate", 0, positive)
	case m.has("bhp"):
		c, bhp = reservoir.BHPControl, p.number(m, "bhp", 0, positive)
	default:
		p.failf(m.node, "%s: no control; give rate or bhp", m.where)
	}
	if m.has("max_bhp") {
		if t == reservoir.Producer {
			p.failf(m.keys["max_bhp"], "%s: max_bhp is an injector limit; a producer takes min_bhp", m.where)
		}
		maxBHP = p.number(m, "max_bhp", 0, positive)
		if c == reservoir.BHPControl && bhp > maxBHP {
			p.failf(m.vals["bhp"], "%s: bhp = %g is above max_bhp %g", m.where, bhp, maxBHP)
		}
	}
	if m.has("min_bhp") {
		if t == reservoir.Injector {
			p.failf(m.keys["min_bhp"], "%s: min_bhp is a producer limit; an injector takes max_bhp", m.where)
		}
		minBHP = p.number(m, "min_bhp", 0, positive)
		if c == reservoir.BHPControl && bhp < minBHP {
			p.failf(m.vals["bhp"], "%s: bhp = %g is below min_bhp %g", m.where, bhp, minBHP)
		}
	}
	return
}

func readInfill(p *yparser, n *yaml.Node, base *reservoir.Model) *Infill {
	m := p.mapping(n, "candidates.infill", infillKeys, []string{"type", "spacing"})
	if !p.ok() {
		return nil
	}
	in := &Infill{Line: m.node.Line}
	in.Type = parseType(p, m)
	in.Control, in.Rate, in.BHP, in.MaxBHP, in.MinBHP = readControl(p, m, in.Type)
	in.Radius = p.number(m, "radius", 0, positive)
	in.Skin = p.number(m, "skin", 0, nil)
	in.Spacing = p.pair(m, "spacing", [2]float64{}, positive)
	in.MinDistance = p.number(m, "min_distance", 0, nonNegative)
	if p.ok() {
		g := base.Grid
		if in.Spacing[0] < g.DX || in.Spacing[1] < g.DY {
			p.failf(m.vals["spacing"], "candidates.infill.spacing [%g, %g] is finer than the cells (%g x %g); nodes would share cells",
				in.Spacing[0], in.Spacing[1], g.DX, g.DY)
		} else if nx, ny := g.Width()/in.Spacing[0], g.Height()/in.Spacing[1]; nx*ny > 1e6 {
			p.failf(m.vals["spacing"], "candidates.infill.spacing gives %.0f nodes; more than a million", nx*ny)
		}
	}
	if !p.ok() {
		return nil
	}
	return in
}

func readLayout(p *yparser, n *yaml.Node, idx int, base *reservoir.Model) *Layout {
	where := fmt.Sprintf("candidates.layouts[%d]", idx+1)
	m := p.mapping(n, where, layoutKeys, []string{"name", "wells"})
	if !p.ok() {
		return nil
	}
	l := &Layout{Name: p.str(m, "name"), Line: m.node.Line}
	if p.ok() && !validName(l.Name) {
		p.failf(m.vals["name"], "%s: name %q must be 1-60 letters, digits, '-', '_' or '.'", where, l.Name)
	}
	items := p.list(m, "wells")
	if p.ok() && len(items) == 0 {
		p.failf(m.vals["wells"], "%s: the well list is empty", where)
	}
	names := map[string]int{}
	for i, it := range items {
		w := readWell(p, it, fmt.Sprintf("%s.wells[%d]", where, i+1), base)
		if !p.ok() {
			return nil
		}
		if line, dup := names[strings.ToLower(w.Name)]; dup {
			p.failf(it, "layout %s: well name %q is used twice (also on line %d)", l.Name, w.Name, line)
			return nil
		}
		names[strings.ToLower(w.Name)] = it.Line
		l.Wells = append(l.Wells, w)
	}
	if err := checkLayout(base, l.Wells); err != "" {
		p.failf(m.node, "layout %s: %s", l.Name, err)
	}
	if !p.ok() {
		return nil
	}
	return l
}

func validName(s string) bool {
	if s == "" || len(s) > 60 {
		return false
	}
	for _, r := range s {
		if !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || r == '-' || r == '_' || r == '.') {
			return false
		}
	}
	return true
}

// readWell reads one well with the case file's schema and places it in
// its cell with the loader's rules.
func readWell(p *yparser, n *yaml.Node, where string, base *reservoir.Model) reservoir.Well {
	m := p.mapping(n, where, wellKeys, []string{"name", "type", "x", "y"})
	if !p.ok() {
		return reservoir.Well{}
	}
	w := reservoir.Well{Name: p.str(m, "name"), Line: m.node.Line, Radius: base.Units.DefaultWellRadius()}
	if p.ok() && w.Name == "" {
		p.failf(m.vals["name"], "%s: the name is empty", where)
	}
	w.Type = parseType(p, m)
	w.X = p.number(m, "x", 0, nil)
	w.Y = p.number(m, "y", 0, nil)
	w.Control, w.Rate, w.BHP, w.MaxBHP, w.MinBHP = readControl(p, m, w.Type)
	w.Radius = p.number(m, "radius", w.Radius, positive)
	w.Skin = p.number(m, "skin", 0, nil)
	w.Open = p.number(m, "open", 0, nonNegative)
	if !p.ok() {
		return w
	}
	g := base.Grid
	i, j, ok := g.Locate(w.X, w.Y)
	if !ok {
		p.failf(m.node, "well %s: point (%g, %g) lies outside the grid (x from %g to %g, y from %g to %g)",
			w.Name, w.X, w.Y, g.X0, g.X0+g.Width(), g.Y0, g.Y0+g.Height())
		return w
	}
	w.I, w.J, w.Cell = i, j, g.Index(i, j)
	if !base.Active[w.Cell] {
		p.failf(m.node, "well %s: point (%g, %g) lies in inactive %s", w.Name, w.X, w.Y, reservoir.CellLabel(i, j))
		return w
	}
	if msg := peacemanCheck(base, w); msg != "" {
		p.failf(m.node, "well %s: %s", w.Name, msg)
	}
	return w
}

// checkLayout checks a well list: one well per cell, an injector and a
// producer.
func checkLayout(base *reservoir.Model, wells []reservoir.Well) string {
	byCell := map[int]string{}
	nInj, nProd := 0, 0
	for _, w := range wells {
		if o, dup := byCell[w.Cell]; dup {
			i, j := base.Grid.IJ(w.Cell)
			return fmt.Sprintf("wells %s and %s share %s; one well per cell", o, w.Name, reservoir.CellLabel(i, j))
		}
		byCell[w.Cell] = w.Name
		if w.Type == reservoir.Injector {
			nInj++
		} else {
			nProd++
		}
	}
	switch {
	case nInj == 0:
		return "no injector; a waterflood layout needs at least one"
	case nProd == 0:
		return "no producer; a waterflood layout needs at least one"
	}
	return ""
}

// peacemanCheck refuses a well whose Peaceman (1983) denominator
// ln(ro/rw) + skin is not positive.
func peacemanCheck(m *reservoir.Model, w reservoir.Well) string {
	kx, ky := m.PermEast[w.Cell], m.PermNorth[w.Cell]
	if !(kx > 0 && ky > 0) {
		return ""
	}
	g := m.Grid
	r := ky / kx
	ro := 0.28 * math.Sqrt(math.Sqrt(r)*g.DX*g.DX+math.Sqrt(1/r)*g.DY*g.DY) / (math.Pow(r, 0.25) + math.Pow(1/r, 0.25))
	if d := math.Log(ro/w.Radius) + w.Skin; !(d > 0) {
		return fmt.Sprintf("ln(ro/rw) + skin = %.3g is not positive (Peaceman radius %.3g, radius %g, skin %g): the well index would be infinite or negative",
			d, ro, w.Radius, w.Skin)
	}
	return ""
}

func readPattern(p *yparser, n *yaml.Node, idx int) *Pattern {
	where := fmt.Sprintf("candidates.patterns[%d]", idx+1)
	m := p.mapping(n, where, patternKeys, []string{"kind", "spacing", "injector_rate", "producer_bhp"})
	if !p.ok() {
		return nil
	}
	pt := &Pattern{Line: m.node.Line}
	k := p.str(m, "kind")
	norm := strings.NewReplacer("_", "-", " ", "-").Replace(strings.ToLower(k))
	if !contains(patternNames, norm) {
		p.failf(m.vals["kind"], "%s: kind %q is not a pattern; did you mean %q? (kinds: %s)", where, k, nearest(norm, patternNames), strings.Join(patternNames, ", "))
		return nil
	}
	pt.Kind = PatternKind(norm)
	pt.Name = p.str(m, "name")
	if pt.Name == "" {
		pt.Name = fmt.Sprintf("%s-%d", pt.Kind, idx+1)
	}
	if p.ok() && !validName(pt.Name) {
		p.failf(m.vals["name"], "%s: name %q must be 1-60 letters, digits, '-', '_' or '.'", where, pt.Name)
	}
	pt.Spacing = p.number(m, "spacing", 0, positive)
	if m.has("row_spacing") && pt.Kind != DirectLineDrive && pt.Kind != StaggeredLineDrive {
		p.failf(m.keys["row_spacing"], "%s: row_spacing applies to line drives only", where)
	}
	pt.RowSpacing = p.number(m, "row_spacing", 0, positive)
	pt.Rotation = p.number(m, "rotation", 0, nil)
	pt.Offset = p.pair(m, "offset", [2]float64{}, nil)
	pt.InjectorRate = p.number(m, "injector_rate", 0, positive)
	pt.InjectorMaxBHP = p.number(m, "injector_max_bhp", 0, positive)
	pt.ProducerBHP = p.number(m, "producer_bhp", 0, positive)
	if !p.ok() {
		return nil
	}
	return pt
}

// readRealizations expands the glob patterns (relative to the spec) and
// reads each map on the base grid.
func readRealizations(p *yparser, n *yaml.Node, dir string, base *reservoir.Model) ([]Realization, error) {
	var pats []*yaml.Node
	switch n.Kind {
	case yaml.ScalarNode:
		pats = []*yaml.Node{n}
	case yaml.SequenceNode:
		for _, c := range n.Content {
			pats = append(pats, yamldoc.Deref(c))
		}
	default:
		p.failf(n, "realizations must be a list of file patterns, found %s", yamldoc.Describe(n))
		return nil, p.err
	}
	seen := map[string]bool{}
	var files []string
	for _, pn := range pats {
		if pn.Kind != yaml.ScalarNode || pn.Tag == "!!null" || strings.TrimSpace(pn.Value) == "" {
			p.failf(pn, "realizations: each item is a file pattern such as maps/perm_*.asc, found %s", yamldoc.Describe(pn))
			return nil, p.err
		}
		pat := filepath.FromSlash(strings.TrimSpace(pn.Value))
		if !filepath.IsAbs(pat) {
			pat = filepath.Join(dir, pat)
		}
		matches, err := filepath.Glob(pat)
		if err != nil {
			p.failf(pn, "realizations: bad pattern %q: %v", pn.Value, err)
			return nil, p.err
		}
		if len(matches) == 0 {
			p.failf(pn, "realizations: no file matches %s", pat)
			return nil, p.err
		}
		sort.Slice(matches, func(a, b int) bool { return naturalLess(matches[a], matches[b]) })
		for _, f := range matches {
			if st, err := os.Stat(f); err == nil && st.IsDir() {
				continue
			}
			if !seen[f] {
				seen[f] = true
				files = append(files, f)
			}
		}
	}
	if len(files) > 10000 {
		p.failf(n, "realizations: %d files; at most 10000", len(files))
		return nil, p.err
	}
	g := base.Grid
	out := make([]Realization, 0, len(files))
	names := map[string]string{}
	for _, f := range files {
		vals, _, err := reservoir.ReadMap(f, &g)
		if err != nil {
			return nil, fmt.Errorf("%s:%d: realization: %w", p.path, n.Line, err)
		}
		for k, v := range vals {
			if !base.Active[k] {
				vals[k] = 0
				continue
			}
			if !(v > 0) || math.IsInf(v, 0) {
				i, j := g.IJ(k)
				what := fmt.Sprintf("%g", v)
				if math.IsNaN(v) {
					what = "NODATA"
				}
				return nil, &SpecError{Path: f, Msg: fmt.Sprintf("permeability %s in active %s (row %d, column %d of the file); a realization needs a positive value in every active cell of the base case",
					what, reservoir.CellLabel(i, j), g.NY-j, i+1)}
			}
		}
		name := filepath.Base(f)
		if o, dup := names[name]; dup {
			return nil, &SpecError{Path: p.path, Line: n.Line, Msg: fmt.Sprintf("realizations %s and %s have the same file name; the outputs name realizations by file name", o, f)}
		}
		names[name] = f
		out = append(out, Realization{Name: name, Path: f, Perm: vals})
	}
	return out, nil
}

// naturalLess orders strings with embedded numbers by value: perm_2
// before perm_10.
func naturalLess(a, b string) bool {
	for a != "" && b != "" {
		da, db := digitPrefix(a), digitPrefix(b)
		if da > 0 && db > 0 {
			na, nb := strings.TrimLeft(a[:da], "0"), strings.TrimLeft(b[:db], "0")
			if len(na) != len(nb) {
				return len(na) < len(nb)
			}
			if na != nb {
				return na < nb
			}
			a, b = a[da:], b[db:]
			continue
		}
		if a[0] != b[0] {
			return a[0] < b[0]
		}
		a, b = a[1:], b[1:]
	}
	return len(a) < len(b)
}

func digitPrefix(s string) int {
	i := 0
	for i < len(s) && s[i] >= '0' && s[i] <= '9' {
		i++
	}
	return i
}

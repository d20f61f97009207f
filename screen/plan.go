package screen

import (
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"errors"
	"fmt"
	"hash"
	"math"
	"slices"

	"floodtrace/reservoir"
)

// Kind tells infill nodes from whole layouts.
type Kind string

// Candidate kinds.
const (
	KindInfill  Kind = "infill"
	KindLayout  Kind = "layout"
	KindPattern Kind = "pattern"
	// KindBase is the base case itself, run and ranked with the others
	// so that every candidate has its increment over it.
	KindBase Kind = "base"
)

// BaseName is the candidate name of the base case.
const BaseName = "base"

// Candidate is one thing to try: a well list run on every realization.
type Candidate struct {
	Index int
	Name  string
	Kind  Kind
	// X and Y place the new well of an infill candidate; NaN otherwise.
	X, Y float64
	// Wells is the full well list of the run (for infill: the base wells
	// and the new one, last).
	Wells []reservoir.Well
	// NewWells is the number of wells paid for: 1 for infill, every well
	// of a layout or pattern, 0 for the base case.
	NewWells int
}

// SkippedNode is an infill lattice node that gives no candidate.
type SkippedNode struct {
	X, Y float64
	// Reason is "inactive" (outside the reservoir), "too close" (to a
	// well), "bad well index", or "no injector" / "no producer" (the base
	// case with the new well still lacks one open before the horizon).
	Reason string
}

// SkippedCandidate is a layout or pattern that gives no run: with it the
// field still has no injector or no producer open before the horizon.
type SkippedCandidate struct {
	Name   string
	Kind   Kind
	Reason string // "no injector" or "no producer"
}

// missingRole says what a well list lacks for a waterflood over the
// horizon: "no injector", "no producer", or "" when it has both open
// before the horizon.
func missingRole(wells []reservoir.Well, horizon float64) string {
	inj, prod := false, false
	for _, w := range wells {
		if w.Open >= horizon {
			continue
		}
		switch w.Type {
		case reservoir.Injector:
			inj = true
		case reservoir.Producer:
			prod = true
		}
	}
	switch {
	case !inj:
		return "no injector"
	case !prod:
		return "no producer"
	}
	return ""
}

// Plan is a spec expanded into its candidates, with the hash of every
// input that the results depend on.
type Plan struct {
	Spec       *Spec
	Candidates []Candidate
	// Skipped lists the infill nodes that were skipped.
	Skipped []SkippedNode
	// SkippedCandidates lists the layouts and patterns that were skipped.
	SkippedCandidates []SkippedCandidate
	// BaseSkipped says why the base case is not a candidate ("no
	// injector" or "no producer" open before the horizon); "" when it is
	// (then it is candidate 0).
	BaseSkipped string
	// Dropped counts pattern points dropped (inactive cell, cell taken).
	Dropped map[string]int
	// Horizon is the run end in days (the spec's or the base case's).
	Horizon float64
	// Hash identifies the inputs: base case, candidates, realizations,
	// horizon, streamlines, objective and economics.
	Hash string
	// Notes are remarks for the user (schedule events dropped, for
	// example).
	Notes []string
}

// MaxCandidates bounds the candidate list of a plan.
const MaxCandidates = 1_000_000

// NewPlan expands the spec into its candidates in a fixed order: the base
// case (named BaseName, when it has an injector and a producer open before
// the horizon; otherwise Plan.BaseSkipped says why not), infill nodes
// (south to north, west to east), then layouts, then patterns, in the
// order of the spec.
func NewPlan(s *Spec) (*Plan, error) {
	if s == nil || s.Base == nil {
		return nil, errors.New("screen: the spec has no base case")
	}
	b := s.Base
	if len(b.PermEast) != b.Grid.N() || len(b.Active) != b.Grid.N() {
		return nil, errors.New("screen: the base case's arrays do not match its grid")
	}
	for _, r := range s.Realizations {
		if len(r.Perm) != b.Grid.N() {
			return nil, fmt.Errorf("screen: realization %s has %d values for %d cells", r.Name, len(r.Perm), b.Grid.N())
		}
	}
	switch s.Objective {
	case "", Oil, Value:
	default:
		return nil, fmt.Errorf("screen: unknown objective %q", s.Objective)
	}
	p := &Plan{Spec: s, Horizon: s.Horizon, Dropped: map[string]int{}}
	if p.Horizon <= 0 {
		p.Horizon = b.Run.End
	}
	if !(p.Horizon > 0) {
		return nil, errors.New("screen: no horizon (the spec gives none and the base case's run.end is not positive)")
	}
	if why := missingRole(b.Wells, p.Horizon); why != "" {
		p.BaseSkipped = why
	} else {
		p.add(Candidate{Name: BaseName, Kind: KindBase, X: math.NaN(), Y: math.NaN(), Wells: slices.Clone(b.Wells)})
	}
	if s.Infill != nil {
		if err := p.addInfill(*s.Infill); err != nil {
			return nil, err
		}
	}
	for _, l := range s.Layouts {
		if msg := checkLayout(b, l.Wells); msg != "" {
			return nil, fmt.Errorf("screen: layout %s: %s", l.Name, msg)
		}
		if why := missingRole(l.Wells, p.Horizon); why != "" {
			p.SkippedCandidates = append(p.SkippedCandidates, SkippedCandidate{Name: l.Name, Kind: KindLayout, Reason: why})
			continue
		}
		p.add(Candidate{Name: l.Name, Kind: KindLayout, X: math.NaN(), Y: math.NaN(), Wells: slices.Clone(l.Wells), NewWells: len(l.Wells)})
	}
	for _, pt := range s.Patterns {
		wells, dropped, err := pt.Layout(b)
		if err != nil {
			if s.Path != "" && pt.Line > 0 {
				return nil, &SpecError{Path: s.Path, Line: pt.Line, Msg: err.Error(), Err: err}
			}
			return nil, fmt.Errorf("screen: %w", err)
		}
		p.Dropped[pt.Name] = dropped
		if why := missingRole(wells, p.Horizon); why != "" {
			p.SkippedCandidates = append(p.SkippedCandidates, SkippedCandidate{Name: pt.Name, Kind: KindPattern, Reason: why})
			continue
		}
		p.add(Candidate{Name: pt.Name, Kind: KindPattern, X: math.NaN(), Y: math.NaN(), Wells: wells, NewWells: len(wells)})
	}
	for _, c := range p.Candidates {
		if c.Kind == KindInfill || c.Kind == KindBase || len(b.Schedule) == 0 {
			continue
		}
		dropped := 0
		for _, ev := range b.Schedule {
			if !slices.ContainsFunc(c.Wells, func(w reservoir.Well) bool { return w.Name == ev.Well }) {
				dropped++
			}
		}
		if dropped > 0 {
			p.Notes = append(p.Notes, fmt.Sprintf("%s %s: %d schedule event(s) of the base case name wells it does not have; they are left out", c.Kind, c.Name, dropped))
		}
	}
	if len(p.Candidates) == 0 || len(p.Candidates) == 1 && p.Candidates[0].Kind == KindBase {
		if len(p.SkippedCandidates) > 0 || len(p.Skipped) > 0 {
			return nil, errors.New("screen: no candidate: every infill node, layout and pattern was skipped (see the reasons counted in the log); a waterflood needs an injector and a producer open before the horizon")
		}
		return nil, errors.New("screen: no candidate: every infill node was skipped and no layout or pattern is given")
	}
	if len(p.Candidates) > MaxCandidates {
		return nil, fmt.Errorf("screen: %d candidates; at most %d", len(p.Candidates), MaxCandidates)
	}
	seen := map[string]bool{}
	for _, c := range p.Candidates {
		if seen[c.Name] && c.Name == BaseName {
			return nil, fmt.Errorf("screen: %s %q: the name %q is kept for the base case; rename it", c.Kind, c.Name, BaseName)
		}
		if seen[c.Name] {
			return nil, fmt.Errorf("screen: two candidates are named %q; names must differ", c.Name)
		}
		seen[c.Name] = true
	}
	p.Hash = p.hash()
	return p, nil
}

func (p *Plan) add(c Candidate) {
	c.Index = len(p.Candidates)
	p.Candidates = append(p.Candidates, c)
}

// infillNodes returns the lattice nodes of spacing (sx, sy) over grid g:
// the first node half a spacing from the south-west corner, then every
// spacing while inside the grid; south to north, west to east.
func infillNodes(g reservoir.Grid, sx, sy float64) (xs, ys []float64) {
	for y := g.Y0 + sy/2; y < g.Y0+g.Height(); y += sy {
		ys = append(ys, y)
	}
	for x := g.X0 + sx/2; x < g.X0+g.Width(); x += sx {
		xs = append(xs, x)
	}
	return xs, ys
}

func (p *Plan) addInfill(in Infill) error {
	b := p.Spec.Base
	g := b.Grid
	if !(in.Spacing[0] > 0 && in.Spacing[1] > 0) {
		return errors.New("screen: infill spacing must be positive")
	}
	if in.Type != reservoir.Injector && in.Type != reservoir.Producer {
		return fmt.Errorf("screen: infill type %q must be injector or producer", in.Type)
	}
	xs, ys := infillNodes(g, in.Spacing[0], in.Spacing[1])
	if float64(len(xs))*float64(len(ys)) > MaxCandidates {
		return fmt.Errorf("screen: the infill lattice has %d x %d nodes; at most %d", len(xs), len(ys), MaxCandidates)
	}
	wx, wy := len(fmt.Sprint(len(xs))), len(fmt.Sprint(len(ys)))
	radius := in.Radius
	if radius <= 0 {
		radius = b.Units.DefaultWellRadius()
	}
	for jn, y := range ys {
		for in2, x := range xs {
			i, j, ok := g.Locate(x, y)
			if !ok {
				continue
			}
			k := g.Index(i, j)
			if !b.Active[k] {
				p.Skipped = append(p.Skipped, SkippedNode{X: x, Y: y, Reason: "inactive"})
				continue
			}
			close := false
			for _, w := range b.Wells {
				if w.Cell == k || math.Hypot(w.X-x, w.Y-y) < in.MinDistance {
					close = true
					break
				}
			}
			if close {
				p.Skipped = append(p.Skipped, SkippedNode{X: x, Y: y, Reason: "too close"})
				continue
			}
			name := fmt.Sprintf("node-%0*d-%0*d", wx, in2+1, wy, jn+1)
			w := reservoir.Well{Name: name, Type: in.Type, X: x, Y: y, I: i, J: j, Cell: k, Control: in.Control,
				Rate: in.Rate, BHP: in.BHP, MaxBHP: in.MaxBHP, MinBHP: in.MinBHP, Radius: radius, Skin: in.Skin}
			if peacemanCheck(b, w) != "" {
				p.Skipped = append(p.Skipped, SkippedNode{X: x, Y: y, Reason: "bad well index"})
				continue
			}
			wells := append(slices.Clone(b.Wells), w)
			if why := missingRole(wells, p.Horizon); why != "" {
				p.Skipped = append(p.Skipped, SkippedNode{X: x, Y: y, Reason: why})
				continue
			}
			p.add(Candidate{Name: name, Kind: KindInfill, X: x, Y: y, Wells: wells, NewWells: 1})
		}
	}
	return nil
}

// hash digests everything the results depend on, in a fixed binary form,
// so that shards made on different machines from the same inputs agree
// and any change of input is caught.
func (p *Plan) hash() string {
	h := sha256.New()
	s := p.Spec
	b := s.Base
	w := hasher{h}
	w.str("floodtrace screen v1")
	w.f(p.Horizon)
	w.str(string(objectiveOf(s)))
	w.i(s.Streamlines)
	e := s.Economics
	w.f(e.OilPrice, e.WaterCost, e.InjectionCost, e.WellCost, e.DiscountRate)
	g := b.Grid
	w.str(string(b.Units))
	w.i(g.NX, g.NY)
	w.f(g.DX, g.DY, g.X0, g.Y0)
	w.fs(b.PermEast)
	w.fs(b.PermNorth)
	w.fs(b.Porosity)
	w.fs(b.Thickness)
	w.fs(b.TransMultX)
	w.fs(b.TransMultY)
	for _, a := range b.Active {
		if a {
			h.Write([]byte{1})
		} else {
			h.Write([]byte{0})
		}
	}
	w.f(b.Fluids.WaterViscosity, b.Fluids.OilViscosity, b.Fluids.InitialSw)
	if b.RelPerm != nil {
		swc, sor := b.RelPerm.Endpoints()
		w.f(swc, sor)
		for k := 0; k <= 200; k++ {
			sw := float64(k) / 200
			w.f(b.RelPerm.Krw(sw), b.RelPerm.Kro(sw))
		}
	}
	r := b.Run
	w.f(r.End, r.ReportEvery)
	w.i(r.Streamlines, r.PressureUpdates)
	w.f(r.UpdateTimes...)
	w.i(len(b.Schedule))
	for _, ev := range b.Schedule {
		w.str(ev.Well)
		w.f(ev.Time, ev.Rate, ev.BHP)
		w.str(fmt.Sprint(ev.Shut, ev.Reopen, ev.Convert))
	}
	w.i(len(p.Candidates))
	for _, c := range p.Candidates {
		w.str(c.Name)
		w.str(string(c.Kind))
		w.i(c.NewWells)
		w.wells(c.Wells)
	}
	w.i(len(s.Realizations))
	for _, rz := range s.Realizations {
		w.str(rz.Name)
		w.fs(rz.Perm)
	}
	return hex.EncodeToString(h.Sum(nil))[:20]
}

type hasher struct{ h hash.Hash }

func (w hasher) str(s string) {
	w.i(len(s))
	w.h.Write([]byte(s))
}

func (w hasher) i(v ...int) {
	var b [8]byte
	for _, x := range v {
		binary.LittleEndian.PutUint64(b[:], uint64(int64(x)))
		w.h.Write(b[:])
	}
}

func (w hasher) f(v ...float64) {
	var b [8]byte
	for _, x := range v {
		if math.IsNaN(x) {
			x = math.NaN() // one NaN pattern
		}
		binary.LittleEndian.PutUint64(b[:], math.Float64bits(x))
		w.h.Write(b[:])
	}
}

func (w hasher) fs(v []float64) {
	w.i(len(v))
	buf := make([]byte, 8*len(v))
	for k, x := range v {
		binary.LittleEndian.PutUint64(buf[8*k:], math.Float64bits(x))
	}
	w.h.Write(buf)
}

func (w hasher) wells(ws []reservoir.Well) {
	w.i(len(ws))
	for _, x := range ws {
		w.str(x.Name)
		w.str(string(x.Type))
		w.str(string(x.Control))
		w.i(x.Cell)
		w.f(x.X, x.Y, x.Rate, x.BHP, x.MaxBHP, x.MinBHP, x.Radius, x.Skin, x.Open)
		w.str(fmt.Sprint(x.Shut))
	}
}

func objectiveOf(s *Spec) Objective {
	if s.Objective == "" {
		return Oil
	}
	return s.Objective
}

// Shard returns the indices of the k-th (1-based) of n disjoint parts of
// the candidate list, taken round-robin: candidates k-1, k-1+n, ...
func (p *Plan) Shard(k, n int) []int { return ShardIndices(k, n, len(p.Candidates)) }

// ShardIndices returns the indices of the k-th (1-based) of n disjoint
// round-robin parts of a list of count items: k-1, k-1+n, ... (n <= 0:
// the whole list). The parts 1/n to n/n cover every index once. Screening
// shards its candidates with it, calibrating an ensemble its realizations.
func ShardIndices(k, n, count int) []int {
	if n <= 0 {
		k, n = 1, 1
	}
	var idx []int
	for i := k - 1; i < count; i += n {
		idx = append(idx, i)
	}
	return idx
}

// ParseShard reads "K/N" with 1 <= K <= N.
func ParseShard(s string) (k, n int, err error) {
	if _, err := fmt.Sscanf(s, "%d/%d", &k, &n); err != nil || fmt.Sprintf("%d/%d", k, n) != s {
		return 0, 0, fmt.Errorf("shard %q: write K/N, for example 3/8", s)
	}
	if n < 1 || k < 1 || k > n {
		return 0, 0, fmt.Errorf("shard %q: need 1 <= K <= N", s)
	}
	return k, n, nil
}

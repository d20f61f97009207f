package screen

import (
	"errors"
	"fmt"
	"image"
	"image/color"
	"math"

	"floodtrace/flood"
	"floodtrace/render"
	"floodtrace/reservoir"
)

// objectiveColors runs from dark blue-violet (low objective) through teal
// and green to bright yellow (high); anchors chosen for this map and
// re-spaced to equal Oklab steps by render.NewColormap (Ottosson 2020;
// Kovesi 2015). The bright end marks where to drill.
var objectiveColors = mustMap("objective", "#2d1b5e", "#2b4f8f", "#1f8a8a", "#5cb85c", "#f2e34b")

// permGreys shades the permeability under the candidate markers: pale
// (low) to mid grey (high), so that the coloured markers stand out.
var permGreys = mustMap("permeability (grey)", "#f7f7f5", "#8a8a86")

func mustMap(name string, hexes ...string) render.Colormap {
	cs := make([]color.RGBA, len(hexes))
	for i, h := range hexes {
		c, err := render.ParseHex(h)
		if err != nil {
			panic(err)
		}
		cs[i] = c
	}
	m, err := render.NewColormap(name, cs, 256)
	if err != nil {
		panic(err)
	}
	return m
}

// baseScene is the scene of the base case with the given wells.
func baseScene(m *reservoir.Model, wells []reservoir.Well, subtitle string) render.Scene {
	length, _, _, _, _, _ := m.Units.Labels()
	s := render.Scene{Title: m.Title, Subtitle: subtitle, Grid: m.Grid, Active: m.Active, LengthUnit: length}
	for _, w := range wells {
		s.Wells = append(s.Wells, render.WellMark{Name: w.Name, X: w.X, Y: w.Y, Injector: w.Type == reservoir.Injector})
	}
	for _, f := range m.Faults {
		s.Faults = append(s.Faults, f.Trace)
		s.FaultNames = append(s.FaultNames, f.Name)
	}
	return s
}

func objectiveLabel(o Objective, m *reservoir.Model) (label, unit string) {
	_, _, _, _, _, vol := m.Units.Labels()
	if o == Value {
		return "Value", "discounted cash flow, currency"
	}
	return "Cumulative oil", vol + " at the horizon"
}

// objectiveMap draws the objective of each infill node over the base
// permeability (grey, log scale): a square per node coloured by the
// ranking statistic, the three best outlined and numbered, skipped nodes
// as small hollow squares and failed ones as crosses, with the objective's
// colour bar, a key of the markers and a small permeability bar in the
// legend panel. screen hands render the markers and labels
// (render.DrawFieldOverlay); render draws every pixel.
func objectiveMap(p *Plan, rk *Ranking, w, h int) (*image.RGBA, error) {
	if p.Spec.Infill == nil {
		return nil, errors.New("screen: the plan has no infill lattice")
	}
	b := p.Spec.Base
	in := p.Spec.Infill
	stat := rk.By
	type node struct {
		x, y, v float64
		rank    int
	}
	var nodes []node
	for _, r := range rk.Rows {
		if r.Kind != KindInfill {
			continue
		}
		v := statOf(r, stat)
		nodes = append(nodes, node{r.X, r.Y, v, 0})
	}
	if len(nodes) == 0 {
		return nil, errors.New("screen: no ranked infill node to draw")
	}
	best := 0
	for i := range rk.Rows {
		if rk.Rows[i].Kind == KindInfill && best < 3 {
			best++
			for k := range nodes {
				if nodes[k].x == rk.Rows[i].X && nodes[k].y == rk.Rows[i].Y {
					nodes[k].rank = best
				}
			}
		}
	}
	label, unit := objectiveLabel(rk.Objective, b)
	statName := "mean"
	if stat != Mean {
		statName = string(stat)
		statName = "P" + statName[1:]
	}
	nr := max(1, len(p.Spec.Realizations))
	sub := fmt.Sprintf("Where to drill: one new %s per node, %s of %s over %d realization(s), day %s", in.Type, statName,
		lower(label), nr, render.FormatNumber(p.Horizon, 0))
	scene := baseScene(b, b.Wells, sub)
	nSkip := len(p.Skipped)
	scene.Note = fmt.Sprintf("%d nodes ranked, %d skipped · grey: permeability", len(nodes), nSkip)
	permSc := render.Scale{Label: "Permeability", Unit: "", Log: true, Map: &permGreys}
	perm := make([]float64, len(b.PermEast))
	for k, v := range b.PermEast {
		perm[k] = v
		if !b.Active[k] || !(v > 0) {
			perm[k] = math.NaN()
		}
	}
	permSc, err := permSc.Resolve(perm, b.Active)
	if err != nil {
		return nil, err
	}
	ov := render.Overlay{
		// Squares of about a third of the lattice spacing.
		Size:       0.18 * math.Min(in.Spacing[0], in.Spacing[1]),
		Scale:      render.Scale{Label: label + " (" + statName + ")", Unit: unit, Map: &objectiveColors},
		FieldLabel: "Permeability (grey, log scale)",
		Keys: []render.MarkerKey{{Label: "Node, coloured by " + lower(label), Shape: render.MarkValue},
			{Label: fmt.Sprintf("Best %d, numbered", min(3, len(nodes))), Ranked: true}},
	}
	skipped := false
	for _, sk := range p.Skipped {
		if sk.Reason == "inactive" {
			continue
		}
		skipped = true
		ov.Markers = append(ov.Markers, render.Marker{X: sk.X, Y: sk.Y, Shape: render.MarkHollow})
	}
	if skipped {
		ov.Keys = append(ov.Keys, render.MarkerKey{Label: "Skipped node", Shape: render.MarkHollow})
	}
	failed := false
	for _, f := range rk.Failed {
		if f.Index < 0 || f.Index >= len(p.Candidates) || p.Candidates[f.Index].Kind != KindInfill {
			continue
		}
		failed = true
		ov.Markers = append(ov.Markers, render.Marker{X: p.Candidates[f.Index].X, Y: p.Candidates[f.Index].Y, Shape: render.MarkCross})
	}
	if failed {
		ov.Keys = append(ov.Keys, render.MarkerKey{Label: "Failed run", Shape: render.MarkCross})
	}
	for _, n := range nodes {
		ov.Markers = append(ov.Markers, render.Marker{X: n.x, Y: n.y, Shape: render.MarkValue, Value: n.v, Rank: n.rank})
	}
	return render.DrawFieldOverlay(scene, perm, permSc, ov, w, h)
}

func lower(s string) string {
	if s == "" {
		return s
	}
	r := []rune(s)
	if r[0] >= 'A' && r[0] <= 'Z' {
		r[0] += 'a' - 'A'
	}
	return string(r)
}

func statOf(r Row, by Statistic) float64 {
	switch by {
	case P10:
		return r.P10
	case P50:
		return r.P50
	case P90:
		return r.P90
	}
	return r.Mean
}

// medianRun returns the realization whose objective is nearest the
// candidate's P50 (the lowest index on ties).
func medianRun(rec Record, obj Objective, p50 float64) int {
	best, bd := 0, math.Inf(1)
	for i, r := range rec.Runs {
		if d := math.Abs(r.Objective(obj) - p50); d < bd {
			best, bd = i, d
		}
	}
	return best
}

// layoutMap draws a layout or pattern candidate's water saturation at the
// horizon from a finished run, with its wells.
func layoutMap(p *Plan, row Row, realization string, res *flood.Result, w, h int) (*image.RGBA, error) {
	if len(res.Snapshots) == 0 {
		return nil, errors.New("screen: the run kept no saturation map")
	}
	sn := res.Snapshots[len(res.Snapshots)-1]
	m := res.Model
	c := p.Candidates[row.Index]
	sub := fmt.Sprintf("#%d %s %s: water saturation at day %s", row.Rank, c.Kind, c.Name, render.FormatNumber(sn.Time, 0))
	if len(p.Spec.Realizations) > 0 {
		sub += " · realization " + realization + " (nearest its P50)"
	}
	scene := baseScene(m, c.Wells, sub)
	label, _ := objectiveLabel(objectiveOf(p.Spec), m)
	scene.Note = fmt.Sprintf("%s: mean %s, P90 (low) %s, P10 (high) %s", label, render.FormatNumber(row.Mean, 0), render.FormatNumber(row.P90, 0), render.FormatNumber(row.P10, 0))
	_, sor := m.RelPerm.Endpoints()
	sc := render.Scale{Label: "Water saturation", Unit: "fraction of pore volume", Min: m.Fluids.InitialSw, Max: 1 - sor}
	return render.DrawField(scene, sn.Sw, sc, w, h)
}

package screen

import (
	"errors"
	"fmt"
	"image"
	"image/color"
	"math"
	"sync"

	"github.com/fogleman/gg"
	"github.com/golang/freetype/truetype"
	"golang.org/x/image/font"
	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/goregular"

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

var (
	ink     = color.RGBA{31, 35, 40, 255}
	inkSoft = color.RGBA{91, 100, 112, 255}
	white   = color.RGBA{255, 255, 255, 255}
	failRed = color.RGBA{178, 34, 34, 255}
)

var (
	fontOnce          sync.Once
	fontReg, fontBold *truetype.Font
	fontErr           error
)

func face(bold bool, px float64) (font.Face, error) {
	fontOnce.Do(func() {
		if fontReg, fontErr = truetype.Parse(goregular.TTF); fontErr == nil {
			fontBold, fontErr = truetype.Parse(gobold.TTF)
		}
	})
	if fontErr != nil {
		return nil, fontErr
	}
	f := fontReg
	if bold {
		f = fontBold
	}
	return truetype.NewFace(f, &truetype.Options{Size: math.Max(7, px), DPI: 72}), nil
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

// ObjectiveMap draws the objective of each infill node over the base
// permeability (grey, log scale): a square per node coloured by the
// ranking statistic, the three best outlined and numbered, skipped nodes
// as small hollow squares and failed ones as crosses, with the objective's
// colour bar and a small permeability bar in the legend panel.
func ObjectiveMap(p *Plan, rk *Ranking, w, h int) (*image.RGBA, error) {
	if p.Spec.Infill == nil {
		return nil, errors.New("screen: the plan has no infill lattice")
	}
	b := p.Spec.Base
	in := p.Spec.Infill
	stat := rk.By
	var vals []float64
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
		vals = append(vals, v)
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
	img, err := render.DrawField(scene, perm, permSc, w, h)
	if err != nil {
		return nil, err
	}
	l, err := render.NewLayout(b.Grid, w, h)
	if err != nil {
		return nil, err
	}
	osc, err := render.Scale{Label: label, Map: &objectiveColors}.Resolve(vals, nil)
	if err != nil {
		return nil, err
	}
	dc := gg.NewContextForRGBA(img)
	s := l.S
	// Node markers: squares of about a third of the lattice spacing.
	ppu := l.PixelsPerUnit
	half := math.Max(4*s, math.Min(14*s, 0.18*math.Min(in.Spacing[0], in.Spacing[1])*ppu))
	dc.Push()
	dc.DrawRectangle(float64(l.Map.Min.X), float64(l.Map.Min.Y), float64(l.Map.Dx()), float64(l.Map.Dy()))
	dc.Clip()
	for _, sk := range p.Skipped {
		if sk.Reason == "inactive" {
			continue
		}
		x, y := l.ToPixel(sk.X, sk.Y)
		dc.SetColor(inkSoft)
		dc.SetLineWidth(math.Max(1, 1.2*s))
		dc.DrawRectangle(x-half*0.5, y-half*0.5, half, half)
		dc.Stroke()
	}
	for _, f := range rk.Failed {
		if f.Index < 0 || f.Index >= len(p.Candidates) || p.Candidates[f.Index].Kind != KindInfill {
			continue
		}
		x, y := l.ToPixel(p.Candidates[f.Index].X, p.Candidates[f.Index].Y)
		dc.SetColor(failRed)
		dc.SetLineWidth(math.Max(1.5, 2.5*s))
		dc.DrawLine(x-half*0.7, y-half*0.7, x+half*0.7, y+half*0.7)
		dc.DrawLine(x-half*0.7, y+half*0.7, x+half*0.7, y-half*0.7)
		dc.Stroke()
	}
	for _, n := range nodes {
		x, y := l.ToPixel(n.x, n.y)
		dc.SetColor(objectiveColors.At(osc.T(n.v)))
		dc.DrawRectangle(x-half, y-half, 2*half, 2*half)
		dc.FillPreserve()
		dc.SetColor(ink)
		dc.SetLineWidth(math.Max(1, 1.3*s))
		dc.Stroke()
	}
	dc.Pop()
	dc.ResetClip() // gg keeps the clip mask across Pop
	rankFace, err := face(true, math.Max(9, 20*s))
	if err != nil {
		return nil, err
	}
	for _, n := range nodes {
		if n.rank == 0 {
			continue
		}
		x, y := l.ToPixel(n.x, n.y)
		dc.SetColor(ink)
		dc.SetLineWidth(math.Max(1.5, 3*s))
		dc.DrawRectangle(x-half-4*s, y-half-4*s, 2*half+8*s, 2*half+8*s)
		dc.Stroke()
		dc.SetFontFace(rankFace)
		lab := fmt.Sprint(n.rank)
		tx, ty := x+half+8*s, y-half-4*s
		for _, d := range [][2]float64{{-1, 0}, {1, 0}, {0, -1}, {0, 1}, {-1, -1}, {1, 1}, {-1, 1}, {1, -1}} {
			dc.SetColor(white)
			dc.DrawStringAnchored(lab, tx+d[0]*2*s, ty+d[1]*2*s, 0, 0.5)
		}
		dc.SetColor(ink)
		dc.DrawStringAnchored(lab, tx, ty, 0, 0.5)
	}
	if err := objectivePanel(dc, img, l, osc, label+" ("+statName+")", unit, permSc, scene); err != nil {
		return nil, err
	}
	return img, nil
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

// objectivePanel replaces the permeability colour bar that DrawField put
// in the legend panel by the objective's bar, and draws a small
// horizontal permeability bar below the symbol legend when there is room.
func objectivePanel(dc *gg.Context, img *image.RGBA, l render.Layout, osc render.Scale, label, unit string, permSc render.Scale, scene render.Scene) error {
	s := l.S
	p, bar := l.Panel, l.Bar
	// Clear the heading and the bar with its tick labels.
	clearTo := bar.Max.Y + int(math.Round(26*s))
	for y := p.Min.Y; y < clearTo && y < img.Bounds().Max.Y; y++ {
		for x := p.Min.X; x < p.Max.X; x++ {
			img.SetRGBA(x, y, white)
		}
	}
	hf, err := face(true, math.Max(10, 24*s))
	if err != nil {
		return err
	}
	uf, err := face(false, math.Max(8, 19*s))
	if err != nil {
		return err
	}
	dc.SetFontFace(hf)
	dc.SetColor(ink)
	dc.DrawString(fit(dc, label, float64(p.Dx())), float64(p.Min.X), float64(p.Min.Y)+24*s)
	dc.SetFontFace(uf)
	dc.SetColor(inkSoft)
	dc.DrawString(fit(dc, unit, float64(p.Dx())), float64(p.Min.X), float64(p.Min.Y)+54*s)
	colourBar(dc, img, bar, osc, uf, s, true)

	// The permeability bar, horizontal, under the symbol legend.
	entries := 0
	inj, prod := false, false
	for _, w := range scene.Wells {
		inj = inj || w.Injector
		prod = prod || !w.Injector
	}
	for _, b := range []bool{inj, prod, len(scene.Faults) > 0} {
		if b {
			entries++
		}
	}
	for _, a := range scene.Active {
		if !a {
			entries++
			break
		}
	}
	y0 := float64(bar.Max.Y) + 56*s + float64(entries)*math.Max(30*s, 38*s) + 4*s
	need := 96 * s
	northTop := float64(p.Max.Y) - 100*s
	if y0+need > northTop {
		return nil
	}
	dc.SetFontFace(uf)
	dc.SetColor(ink)
	dc.DrawString("Permeability (grey, log scale)", float64(p.Min.X), y0+18*s)
	hb := image.Rect(p.Min.X+int(4*s), int(y0+30*s), p.Min.X+int(math.Min(float64(p.Dx())-40*s, 300*s)), int(y0+48*s))
	colourBar(dc, img, hb, permSc, uf, s, false)
	return nil
}

// colourBar fills rect with the scale's colours (vertical: smallest at
// the bottom; horizontal: smallest at the left) and labels nice ticks.
func colourBar(dc *gg.Context, img *image.RGBA, r image.Rectangle, sc render.Scale, f font.Face, s float64, vertical bool) {
	cm := sc.Map
	if vertical {
		n := max(r.Dy()-1, 1)
		for y := r.Min.Y; y < r.Max.Y; y++ {
			c := cm.At(float64(r.Max.Y-1-y) / float64(n))
			for x := r.Min.X; x < r.Max.X; x++ {
				img.SetRGBA(x, y, c)
			}
		}
	} else {
		n := max(r.Dx()-1, 1)
		for x := r.Min.X; x < r.Max.X; x++ {
			c := cm.At(float64(x-r.Min.X) / float64(n))
			for y := r.Min.Y; y < r.Max.Y; y++ {
				img.SetRGBA(x, y, c)
			}
		}
	}
	dc.SetColor(ink)
	dc.SetLineWidth(math.Max(1, 1.2*s))
	dc.DrawRectangle(float64(r.Min.X)-0.5, float64(r.Min.Y)-0.5, float64(r.Dx())+1, float64(r.Dy())+1)
	dc.Stroke()
	var ticks []float64
	dec := 0
	if sc.Log {
		ticks = render.LogTicks(sc.Min, sc.Max)
	} else {
		var step float64
		nt := 6
		if !vertical {
			nt = 4
		}
		ticks, step = render.LinearTicks(sc.Min, sc.Max, nt)
		if step > 0 {
			dec = max(0, int(math.Ceil(-math.Log10(step)-1e-9)))
		}
	}
	dc.SetFontFace(f)
	last, lastY := math.Inf(-1), math.Inf(1)
	for _, v := range ticks {
		t := sc.T(v)
		lab := render.FormatNumber(v, dec)
		if sc.Log && v < 1 {
			lab = fmt.Sprintf("%.3g", v)
		}
		dc.SetColor(ink)
		if vertical {
			y := float64(r.Max.Y-1) - t*float64(max(r.Dy()-1, 1)) + 0.5
			dc.DrawLine(float64(r.Max.X), y, float64(r.Max.X)+9*s, y)
			dc.Stroke()
			if lastY-y < 22*s {
				continue
			}
			dc.DrawStringAnchored(lab, float64(r.Max.X)+14*s, y, 0, 0.35)
			lastY = y
		} else {
			x := float64(r.Min.X) + t*float64(max(r.Dx()-1, 1)) + 0.5
			dc.DrawLine(x, float64(r.Max.Y), x, float64(r.Max.Y)+7*s)
			dc.Stroke()
			w, _ := dc.MeasureString(lab)
			if x-w/2 < last+6*s {
				continue
			}
			dc.DrawStringAnchored(lab, x, float64(r.Max.Y)+9*s, 0.5, 1)
			last = x + w/2
		}
	}
}

// fit shortens s with an ellipsis to fit maxW pixels.
func fit(dc *gg.Context, s string, maxW float64) string {
	if w, _ := dc.MeasureString(s); w <= maxW {
		return s
	}
	r := []rune(s)
	for len(r) > 1 {
		r = r[:len(r)-1]
		if w, _ := dc.MeasureString(string(r) + "…"); w <= maxW {
			return string(r) + "…"
		}
	}
	return "…"
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

// LayoutMap draws a layout or pattern candidate's water saturation at the
// horizon from a finished run, with its wells.
func LayoutMap(p *Plan, row Row, realization string, res *flood.Result, w, h int) (*image.RGBA, error) {
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
	scene.Note = fmt.Sprintf("%s: mean %s, P10 %s, P90 %s", label, render.FormatNumber(row.Mean, 0), render.FormatNumber(row.P10, 0), render.FormatNumber(row.P90, 0))
	_, sor := m.RelPerm.Endpoints()
	sc := render.Scale{Label: "Water saturation", Unit: "fraction of pore volume", Min: m.Fluids.InitialSw, Max: 1 - sor}
	return render.DrawField(scene, sn.Sw, sc, w, h)
}

package render

import (
	"fmt"
	"image"
	"image/color"
	"math"
	"sort"

	"floodtrace/internal/parallel"
)

// Polyline is a streamline in map coordinates. TOF, when it has one value
// per point, colours each segment by its own time of flight; otherwise the
// whole line takes the colour of TotalTOF.
type Polyline struct {
	X, Y     []float64
	TOF      []float64 // optional, days, one per point
	TotalTOF float64   // days from injector to producer
	Flux     float64
	Injector string
	Producer string
}

// cellColours computes one colour per cell: inactive cells grey, NaN
// values transparent (drawn hatched).
func cellColours(s Scene, values []float64, sc Scale) []color.RGBA {
	cm := sc.colormap()
	col := make([]color.RGBA, len(values))
	// Each cell's colour is its own: large grids are coloured in pieces
	// in parallel (a million cells take about 20 ms on one core).
	pieces := 1
	if len(values) >= 1<<16 {
		pieces = 16
	}
	parallel.Pieces(len(values), pieces, 0, func(_, lo, hi int) {
		for k := lo; k < hi; k++ {
			switch v := values[k]; {
			case s.Active != nil && !s.Active[k]:
				col[k] = colInactive
			case math.IsNaN(v):
				col[k] = color.RGBA{}
			default:
				col[k] = cm.At(sc.T(v))
			}
		}
	})
	return col
}

// DrawField draws a cell property as a w x h map: the values fill the
// cells (nearest cell per pixel), then the reservoir outline, faults,
// wells, the title block, the colour bar of sc, the symbol legend, a
// north arrow and a scale bar. NaN values are drawn hatched as "no
// value"; inactive cells light grey.
func DrawField(s Scene, values []float64, sc Scale, w, h int) (*image.RGBA, error) {
	return drawField(s, values, sc, nil, w, h)
}

// drawField is DrawField with an optional overlay of markers and its
// legend (DrawFieldOverlay; ov's scale already resolved).
func drawField(s Scene, values []float64, sc Scale, ov *Overlay, w, h int) (*image.RGBA, error) {
	if err := checkScene(s); err != nil {
		return nil, err
	}
	if len(values) != s.Grid.N() {
		return nil, fmt.Errorf("render: %d values for a %dx%d grid", len(values), s.Grid.NX, s.Grid.NY)
	}
	sc, err := sc.Resolve(values, s.Active)
	if err != nil {
		return nil, err
	}
	c, err := newMapCanvas(s, w, h)
	if err != nil {
		return nil, err
	}
	c.fillCells(cellColours(s, values, sc))
	c.fieldDecoration(sc, ov, hasNoData(s, values))
	return c.img, nil
}

// hasNoData reports whether an active cell holds NaN (drawn hatched, with
// a legend entry).
func hasNoData(s Scene, values []float64) bool {
	for k, v := range values {
		if (s.Active == nil || s.Active[k]) && math.IsNaN(v) {
			return true
		}
	}
	return false
}

// fieldDecoration draws everything of a field map but the cells: the
// outline, faults, markers of ov, wells and labels over the map, the title
// block, the legend and the north arrow and scale bar.
func (c *mapCanvas) fieldDecoration(sc Scale, ov *Overlay, noDataCells bool) {
	c.depthContours()
	c.outline()
	c.faults(false)
	if ov != nil {
		c.markers(ov)
	}
	c.wells()
	c.faultLabels()
	c.contourLabels()
	c.header()
	noData := ""
	if noDataCells {
		noData = "No value (no flow)"
	}
	if ov != nil {
		c.overlayLegend(ov, sc, noData)
		c.northAndScale()
		return
	}
	c.panelHeading(sc.Label, sc.Unit)
	c.colourBar(sc)
	c.symbolLegend(float64(c.l.Bar.Max.Y)+56*c.l.S, c.standardEntries(noData))
	c.northAndScale()
}

// drawPartition draws which well floods (or drains) each cell: part holds
// 1-based indices into names, 0 for none. Each well present gets a colour
// of the categorical palette (in the order of names), boundaries between
// partitions are outlined, and the legend lists the wells.
func drawPartition(s Scene, part []int, names []string, legendTitle string, w, h int) (*image.RGBA, error) {
	if err := checkScene(s); err != nil {
		return nil, err
	}
	if len(part) != s.Grid.N() {
		return nil, fmt.Errorf("render: %d partition values for a %dx%d grid", len(part), s.Grid.NX, s.Grid.NY)
	}
	present := make([]bool, len(names)+1)
	for k, v := range part {
		if v < 0 || v > len(names) {
			return nil, fmt.Errorf("render: partition value %d in cell %d outside 0..%d", v, k, len(names))
		}
		if s.Active == nil || s.Active[k] {
			present[v] = true
		}
	}
	slot := make([]int, len(names)+1) // palette slot per well index
	nslot := 0
	for v := 1; v <= len(names); v++ {
		if present[v] {
			slot[v] = nslot
			nslot++
		}
	}
	c, err := newMapCanvas(s, w, h)
	if err != nil {
		return nil, err
	}
	col := make([]color.RGBA, len(part))
	for k, v := range part {
		switch {
		case !c.active(k):
			col[k] = colInactive
		case v == 0:
			col[k] = color.RGBA{}
		default:
			col[k] = categoricalFill(slot[v])
		}
	}
	c.fillCells(col)
	c.edges(func(a, b int) bool {
		return a >= 0 && b >= 0 && c.active(a) && c.active(b) && part[a] != part[b]
	}, color.NRGBA{40, 44, 52, 150}, math.Max(1, 1.3*c.l.S))
	c.depthContours()
	c.outline()
	c.faults(false)
	c.wells()
	c.faultLabels()
	c.contourLabels()
	c.header()
	c.panelHeading(legendTitle, "cells coloured by well")
	var entries []legendEntry
	for v := 1; v <= len(names); v++ {
		if present[v] {
			fill := categoricalFill(slot[v])
			entries = append(entries, legendEntry{names[v-1], func(x, y float64) { c.swatch(x, y, fill, false) }})
		}
	}
	if present[0] {
		entries = append(entries, legendEntry{"None", func(x, y float64) { c.swatch(x, y, colNoData, true) }})
	}
	y := c.symbolLegend(float64(c.l.Panel.Min.Y)+100*c.l.S, capEntries(entries, c))
	c.symbolLegend(y+26*c.l.S, c.standardEntries(""))
	c.northAndScale()
	return c.img, nil
}

// drawStreamlines draws the streamlines over a dark reservoir, coloured by
// time of flight on sc (a zero Scale means a log scale of the lines' own
// times with TimeOfFlightColors). Long lines are drawn first so the fast
// paths stay on top; wells and faults are drawn above the lines.
func drawStreamlines(s Scene, lines []Polyline, sc Scale, w, h int) (*image.RGBA, error) {
	var tofs []float64
	for n, ln := range lines {
		if len(ln.X) != len(ln.Y) {
			return nil, fmt.Errorf("render: streamline %d has %d x and %d y values", n, len(ln.X), len(ln.Y))
		}
		if len(ln.TOF) == len(ln.X) {
			tofs = append(tofs, ln.TOF...)
		}
		tofs = append(tofs, ln.TotalTOF)
	}
	if sc.Map == nil {
		sc.Map = &TimeOfFlightColors
	}
	if sc.Label == "" {
		sc.Label, sc.Unit, sc.Log = "Total time of flight", "days, injector to producer, log scale", true
	}
	var err error
	if len(tofs) == 0 && sc.Min == 0 && sc.Max == 0 {
		sc.Min, sc.Max = 1, 10
	}
	if sc, err = sc.Resolve(tofs, nil); err != nil {
		return nil, err
	}
	c, err := newMapCanvas(s, w, h)
	if err != nil {
		return nil, err
	}
	c.dark = true
	col := make([]color.RGBA, s.Grid.N())
	for k := range col {
		if c.active(k) {
			col[k] = colCanvas
		} else {
			col[k] = colInactive
		}
	}
	c.fillCells(col)
	c.depthContours() // under the lines
	order := make([]int, len(lines))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return lines[order[a]].TotalTOF > lines[order[b]].TotalTOF })
	cm := sc.colormap()
	dc := c.dc
	c.clipMap()
	dc.SetLineCapRound()
	dc.SetLineJoinRound()
	// Thinner lines when there are many, so the dense bundles (high flux)
	// stay distinct from the sparse ones.
	lw := 1.8 * c.l.S * math.Min(1, math.Sqrt(300/math.Max(1, float64(len(lines)))))
	dc.SetLineWidth(math.Max(0.6, math.Max(lw, 0.8*c.l.S)))
	for _, n := range order {
		ln := lines[n]
		if len(ln.X) < 2 {
			continue
		}
		if len(ln.TOF) == len(ln.X) {
			for i := 1; i < len(ln.X); i++ {
				ax, ay := c.l.ToPixel(ln.X[i-1], ln.Y[i-1])
				bx, by := c.l.ToPixel(ln.X[i], ln.Y[i])
				dc.SetColor(cm.At(sc.T(0.5 * (ln.TOF[i-1] + ln.TOF[i]))))
				dc.DrawLine(ax, ay, bx, by)
				dc.Stroke()
			}
			continue
		}
		for i := range ln.X {
			x, y := c.l.ToPixel(ln.X[i], ln.Y[i])
			if i == 0 {
				dc.MoveTo(x, y)
			} else {
				dc.LineTo(x, y)
			}
		}
		dc.SetColor(cm.At(sc.T(ln.TotalTOF)))
		dc.Stroke()
	}
	dc.ResetClip()
	c.outline()
	c.faults(true)
	c.wells()
	c.faultLabels()
	c.contourLabels()
	c.header()
	c.panelHeading(sc.Label, sc.Unit)
	c.colourBar(sc)
	entries := c.standardEntries("")
	entries = append(entries, legendEntry{fmt.Sprintf("%s streamlines", FormatNumber(float64(len(lines)), 0)), func(x, y float64) {
		c.swatch(x, y, colCanvas, false)
		c.dc.SetColor(cm.At(0.15))
		c.dc.SetLineWidth(math.Max(1, 2*c.l.S))
		c.dc.DrawLine(x-13*c.l.S, y+5*c.l.S, x+13*c.l.S, y-5*c.l.S)
		c.dc.Stroke()
	}})
	c.symbolLegend(float64(c.l.Bar.Max.Y)+56*c.l.S, entries)
	c.northAndScale()
	return c.img, nil
}

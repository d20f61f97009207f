package render

import (
	"fmt"
	"image"
	"image/color"
	"math"

	"github.com/fogleman/gg"
)

// colourBar draws the bar pixel by pixel (smallest value at the bottom)
// with ticks and labels on its right.
func (c *mapCanvas) colourBar(sc Scale) {
	b := c.l.Bar
	cm := sc.colormap()
	n := b.Dy()
	for y := b.Min.Y; y < b.Max.Y; y++ {
		t := float64(b.Max.Y-1-y) / float64(max(n-1, 1))
		col := cm.At(t)
		for x := b.Min.X; x < b.Max.X; x++ {
			c.img.SetRGBA(x, y, col)
		}
	}
	s := c.l.S
	dc := c.dc
	// Pointed ends for values beyond the scale.
	th := 0.75 * float64(b.Dx())
	bx0, bx1 := float64(b.Min.X)-0.5, float64(b.Max.X)+0.5
	top, bot := float64(b.Min.Y)-0.5, float64(b.Max.Y)+0.5
	if sc.ExtendMax {
		dc.MoveTo(bx0, top)
		dc.LineTo((bx0+bx1)/2, top-th)
		dc.LineTo(bx1, top)
		dc.ClosePath()
		dc.SetColor(cm.At(1))
		dc.FillPreserve()
		dc.SetColor(colInk)
		dc.SetLineWidth(math.Max(1, 1.2*s))
		dc.Stroke()
	}
	if sc.ExtendMin {
		dc.MoveTo(bx0, bot)
		dc.LineTo((bx0+bx1)/2, bot+th)
		dc.LineTo(bx1, bot)
		dc.ClosePath()
		dc.SetColor(cm.At(0))
		dc.FillPreserve()
		dc.SetColor(colInk)
		dc.SetLineWidth(math.Max(1, 1.2*s))
		dc.Stroke()
	}
	frameBar(dc, b, s)

	ticks, dec := barTicks(sc, max(3, min(9, int(float64(n)/(38*s)))))
	size := math.Max(8, 19*s)
	face := c.f.get(regular, size)
	lastY := math.Inf(1)
	for _, v := range ticks {
		t := sc.T(v)
		y := float64(b.Max.Y-1) - t*float64(max(n-1, 1)) + 0.5
		dc.SetColor(colInk)
		dc.DrawLine(float64(b.Max.X), y, float64(b.Max.X)+9*s, y)
		dc.Stroke()
		if lastY-y < size*1.15 {
			continue
		}
		lab := FormatNumber(v, dec)
		if sc.Log {
			lab = formatLogTick(v)
		}
		c.text(lab, face, size, float64(b.Max.X)+14*s, y, 0, true, colInk)
		lastY = y
	}
}

// legendEntry is one line of the symbol legend.
type legendEntry struct {
	label string
	draw  func(x, y float64) // draws the key centred at (x, y)
}

// symbolLegend writes the legend lines from y downwards and returns the y
// below the last line.
func (c *mapCanvas) symbolLegend(y float64, entries []legendEntry) float64 {
	s := c.l.S
	p := c.l.Panel
	size := math.Max(8, 20*s)
	face := c.f.get(regular, size)
	step := math.Max(size*1.5, 38*s)
	for _, e := range entries {
		kx := float64(p.Min.X) + 22*s
		e.draw(kx, y)
		c.text(fitText(e.label, face, float64(p.Dx())-56*s), face, size, float64(p.Min.X)+54*s, y, 0, true, colInk)
		y += step
	}
	return y
}

// standardEntries are the legend lines for wells, faults and masks.
func (c *mapCanvas) standardEntries(noData string) []legendEntry {
	s := c.l.S
	r := c.symbolRadius()
	var es []legendEntry
	hasInj, hasProd := false, false
	for _, w := range c.s.Wells {
		hasInj = hasInj || w.Injector
		hasProd = hasProd || !w.Injector
	}
	if hasInj {
		es = append(es, legendEntry{"Injector", func(x, y float64) { drawInjector(c.dc, x, y, r) }})
	}
	if hasProd {
		es = append(es, legendEntry{"Producer", func(x, y float64) { drawProducer(c.dc, x, y, r) }})
	}
	if len(c.s.Faults) > 0 {
		es = append(es, legendEntry{"Fault", func(x, y float64) {
			c.dc.SetLineCapRound()
			if c.dark {
				c.swatch(x, y, colCanvas, false)
				c.dc.SetColor(colFaultOnDark)
			} else {
				c.dc.SetColor(colFault)
			}
			c.dc.SetLineWidth(math.Max(1.8, 4.2*s))
			c.dc.DrawLine(x-13*s, y+5*s, x+13*s, y-5*s)
			c.dc.Stroke()
		}})
	}
	inactive := false
	for k := range c.s.Grid.N() {
		if !c.active(k) {
			inactive = true
			break
		}
	}
	if inactive {
		es = append(es, legendEntry{"Outside the reservoir", func(x, y float64) {
			c.swatch(x, y, colInactive, false)
		}})
	}
	if noData != "" {
		es = append(es, legendEntry{noData, func(x, y float64) { c.swatch(x, y, colNoData, true) }})
	}
	return append(es, c.structureEntries()...)
}

// swatch draws a small filled rectangle centred at (x, y), optionally
// hatched like cells without a value.
func (c *mapCanvas) swatch(x, y float64, col color.RGBA, hatch bool) {
	s := c.l.S
	w, h := 32*s, 22*s
	x0, y0 := x-w/2, y-h/2
	c.dc.SetColor(col)
	c.dc.DrawRectangle(x0, y0, w, h)
	c.dc.Fill()
	if hatch {
		c.dc.Push()
		c.dc.DrawRectangle(x0, y0, w, h)
		c.dc.Clip()
		c.dc.SetColor(colNoDataHat)
		c.dc.SetLineWidth(math.Max(1, 1.6*s))
		step := math.Max(5, 9*s)
		for d := -h; d < w+h; d += step {
			c.dc.DrawLine(x0+d, y0+h, x0+d+h, y0)
		}
		c.dc.Stroke()
		c.dc.ResetClip()
		c.dc.Pop()
	}
	c.dc.SetColor(colInkSoft)
	c.dc.SetLineWidth(math.Max(1, s))
	c.dc.DrawRectangle(x0, y0, w, h)
	c.dc.Stroke()
}

// northAndScale draws the north arrow and the scale bar at the bottom of
// the panel.
func (c *mapCanvas) northAndScale() {
	s := c.l.S
	p := c.l.Panel
	dc := c.dc
	// North arrow: a slim kite, west half solid, east half open.
	ax := float64(p.Min.X) + 22*s
	ybot := float64(p.Max.Y) - 8*s
	ytop := ybot - 62*s
	hw := 11 * s
	notch := ybot - 14*s
	dc.SetLineJoinRound()
	dc.SetColor(colInk)
	dc.MoveTo(ax, ytop)
	dc.LineTo(ax-hw, ybot)
	dc.LineTo(ax, notch)
	dc.ClosePath()
	dc.Fill()
	dc.SetColor(colWhite)
	dc.MoveTo(ax, ytop)
	dc.LineTo(ax+hw, ybot)
	dc.LineTo(ax, notch)
	dc.ClosePath()
	dc.Fill()
	dc.SetColor(colInk)
	dc.SetLineWidth(math.Max(1, 1.4*s))
	dc.MoveTo(ax, ytop)
	dc.LineTo(ax+hw, ybot)
	dc.LineTo(ax, notch)
	dc.LineTo(ax-hw, ybot)
	dc.ClosePath()
	dc.Stroke()
	ns := math.Max(8, 20*s)
	c.text("N", c.f.get(bold, ns), ns, ax, ytop-8*s, 0.5, false, colInk)

	// Scale bar.
	x0 := ax + 48*s
	avail := float64(p.Max.X) - x0 - 40*s
	length, seg := scaleBarLength(avail / c.l.PixelsPerUnit)
	if seg == 0 {
		return
	}
	wpx := length * c.l.PixelsPerUnit
	bh := math.Max(4, 10*s)
	by := ybot - bh
	for k := range seg {
		if k%2 == 0 {
			dc.SetColor(colInk)
		} else {
			dc.SetColor(colWhite)
		}
		dc.DrawRectangle(x0+float64(k)*wpx/float64(seg), by, wpx/float64(seg), bh)
		dc.Fill()
	}
	dc.SetColor(colInk)
	dc.SetLineWidth(math.Max(1, 1.2*s))
	dc.DrawRectangle(x0, by, wpx, bh)
	dc.Stroke()
	ls := math.Max(8, 18*s)
	lf := c.f.get(regular, ls)
	c.text("0", lf, ls, x0, by-8*s, 0.5, false, colInk)
	c.text(FormatNumber(length, decimalsFor(length))+" "+c.s.LengthUnit, lf, ls, x0+wpx, by-8*s, 0.5, false, colInk)
}

// capEntries keeps the partition legend within half the panel.
func capEntries(es []legendEntry, c *mapCanvas) []legendEntry {
	maxN := max(2, int(0.45*float64(c.l.Panel.Dy())/(38*c.l.S)))
	if len(es) <= maxN {
		return es
	}
	more := len(es) - (maxN - 1)
	out := append([]legendEntry(nil), es[:maxN-1]...)
	return append(out, legendEntry{fmt.Sprintf("… and %d more", more), func(x, y float64) {}})
}

// frameBar draws the ink frame around a colour bar's rectangle r at
// scale s.
func frameBar(dc *gg.Context, r image.Rectangle, s float64) {
	dc.SetColor(colInk)
	dc.SetLineWidth(math.Max(1, 1.2*s))
	dc.DrawRectangle(float64(r.Min.X)-0.5, float64(r.Min.Y)-0.5, float64(r.Dx())+1, float64(r.Dy())+1)
	dc.Stroke()
}

// barTicks returns the tick values of a colour bar for scale sc (about n
// of them on a linear scale, the decades on a log scale) and the decimals
// their labels need.
func barTicks(sc Scale, n int) (ticks []float64, dec int) {
	if sc.Log {
		return logTicks(sc.Min, sc.Max), 0
	}
	ticks, step := linearTicks(sc.Min, sc.Max, n)
	return ticks, decimalsFor(step)
}

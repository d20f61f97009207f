package render

import (
	"fmt"
	"image"
	"image/color"
	"math"

	"golang.org/x/image/font"
)

// MarkerShape is the symbol of a Marker.
type MarkerShape int

const (
	// MarkValue is a square filled with the marker's value on the
	// overlay's colour scale (the no-value colour when the value is NaN).
	MarkValue MarkerShape = iota
	// MarkHollow is a small open grey square: a point left out.
	MarkHollow
	// MarkCross is a red cross: a point whose computation failed.
	MarkCross
)

// colFailed is the colour of MarkCross.
var colFailed = color.RGBA{178, 34, 34, 255}

// Marker is one symbol of an Overlay, at a position in map coordinates.
type Marker struct {
	X, Y  float64
	Shape MarkerShape
	Value float64 // MarkValue: the value coloured on Overlay.Scale
	// Rank > 0 frames the marker and writes the number beside it (the
	// best few of a ranking).
	Rank int
}

// MarkerKey is a line of the legend explaining a marker symbol.
type MarkerKey struct {
	Label  string
	Shape  MarkerShape
	Ranked bool // the key shows the frame of a ranked marker
	// Value, when set, is the value whose colour a MarkValue key shows
	// (nil: a colour six tenths along the scale).
	Value *float64
}

// Overlay is a set of markers drawn over a field map (DrawFieldOverlay).
// The markers' colour scale takes the legend panel's colour bar; the
// field's own scale becomes a small horizontal bar under the symbol
// legend, titled FieldLabel (the field scale's label when empty), drawn
// when there is room.
type Overlay struct {
	Markers []Marker
	// Size is the half-width of a MarkValue square in map units; the
	// square is kept between 4 and 14 pixels at 1920x1080.
	Size float64
	// Scale colours the MarkValue markers; Min and Max both zero mean
	// "from the markers' values".
	Scale Scale
	// Pixels, when > 0, is the half-width of a MarkValue square in
	// pixels at 1920x1080 instead of Size (a marker around a well symbol).
	Pixels     float64
	Keys       []MarkerKey
	FieldLabel string
}

// DrawFieldOverlay draws values as DrawField does, with the markers of ov
// over the cells and under the wells, and a legend panel for both: the
// markers' colour bar, the symbol legend with ov.Keys, and the field's
// scale as a small horizontal bar.
func DrawFieldOverlay(s Scene, values []float64, field Scale, ov Overlay, w, h int) (*image.RGBA, error) {
	var vals []float64
	for _, m := range ov.Markers {
		if math.IsNaN(m.X) || math.IsNaN(m.Y) || math.IsInf(m.X, 0) || math.IsInf(m.Y, 0) {
			return nil, fmt.Errorf("render: marker at (%v, %v) has no position", m.X, m.Y)
		}
		if m.Shape == MarkValue {
			vals = append(vals, m.Value)
		}
	}
	if !(ov.Size >= 0) || math.IsInf(ov.Size, 0) {
		return nil, fmt.Errorf("render: marker size %v", ov.Size)
	}
	if len(vals) == 0 && ov.Scale.Min == 0 && ov.Scale.Max == 0 {
		ov.Scale.Min, ov.Scale.Max = 0, 1
	}
	sc, err := ov.Scale.Resolve(vals, nil)
	if err != nil {
		return nil, err
	}
	ov.Scale = sc
	return drawField(s, values, field, &ov, w, h)
}

// markerHalf is the drawn half-width of a MarkValue square, in pixels.
func (c *mapCanvas) markerHalf(ov *Overlay) float64 {
	s := c.l.S
	if ov.Pixels > 0 {
		return ov.Pixels * s
	}
	return math.Max(4*s, math.Min(14*s, ov.Size*c.l.PixelsPerUnit))
}

// markers draws the overlay's markers (clipped to the map), left-out ones
// first and ranked ones last, then the frames and numbers of the ranked
// markers. The markers' areas are kept free of well names.
func (c *mapCanvas) markers(ov *Overlay) {
	s := c.l.S
	half := c.markerHalf(ov)
	dc := c.dc
	cm := ov.Scale.colormap()
	c.clipMap()
	for _, shape := range []MarkerShape{MarkHollow, MarkCross, MarkValue} {
		for _, m := range ov.Markers {
			if m.Shape != shape {
				continue
			}
			x, y := c.l.ToPixel(m.X, m.Y)
			switch shape {
			case MarkHollow:
				c.hollowMark(x, y, half)
			case MarkCross:
				c.crossMark(x, y, half)
			default:
				col := colNoData
				if !math.IsNaN(m.Value) {
					col = cm.At(ov.Scale.T(m.Value))
				}
				c.valueMark(x, y, half, col)
				c.boxes = append(c.boxes, box{x - half, y - half, x + half, y + half})
			}
		}
	}
	dc.ResetClip()
	size := math.Max(9, 20*s)
	face := c.f.get(bold, size)
	for _, m := range ov.Markers {
		if m.Rank <= 0 {
			continue
		}
		x, y := c.l.ToPixel(m.X, m.Y)
		c.rankFrame(x, y, half)
		lab := fmt.Sprint(m.Rank)
		tx, ty := x+half+8*s, y-half-4*s
		w := textWidth(lab, face)
		c.haloText(lab, face, size, tx, ty, 0, 2*s, colInk)
		c.boxes = append(c.boxes, box{tx, ty - 0.5*size, tx + w, ty + 0.5*size})
	}
}

func (c *mapCanvas) valueMark(x, y, half float64, col color.RGBA) {
	dc := c.dc
	dc.SetColor(col)
	dc.DrawRectangle(x-half, y-half, 2*half, 2*half)
	dc.FillPreserve()
	dc.SetColor(colInk)
	dc.SetLineWidth(math.Max(1, 1.3*c.l.S))
	dc.Stroke()
}

func (c *mapCanvas) hollowMark(x, y, half float64) {
	dc := c.dc
	dc.SetColor(colInkSoft)
	dc.SetLineWidth(math.Max(1, 1.2*c.l.S))
	dc.DrawRectangle(x-half*0.5, y-half*0.5, half, half)
	dc.Stroke()
}

func (c *mapCanvas) crossMark(x, y, half float64) {
	dc := c.dc
	dc.SetColor(colFailed)
	dc.SetLineWidth(math.Max(1.5, 2.5*c.l.S))
	dc.DrawLine(x-half*0.7, y-half*0.7, x+half*0.7, y+half*0.7)
	dc.DrawLine(x-half*0.7, y+half*0.7, x+half*0.7, y-half*0.7)
	dc.Stroke()
}

func (c *mapCanvas) rankFrame(x, y, half float64) {
	s := c.l.S
	dc := c.dc
	dc.SetColor(colInk)
	dc.SetLineWidth(math.Max(1.5, 3*s))
	dc.DrawRectangle(x-half-4*s, y-half-4*s, 2*half+8*s, 2*half+8*s)
	dc.Stroke()
}

// overlayLegend fills the legend panel of an overlay map: the markers'
// heading and colour bar, the symbol legend with the marker keys, and the
// field's horizontal bar when it fits above the north arrow. The colour
// bar is shortened (to a quarter of the panel at least) to make room.
func (c *mapCanvas) overlayLegend(ov *Overlay, field Scale, noData string) {
	s := c.l.S
	p := c.l.Panel
	entries := c.standardEntries(noData)
	kh := math.Min(c.markerHalf(ov), 11*s)
	cm := ov.Scale.colormap()
	for _, k := range ov.Keys {
		switch {
		case k.Shape == MarkHollow:
			entries = append(entries, legendEntry{k.Label, func(x, y float64) { c.hollowMark(x, y, kh) }})
		case k.Shape == MarkCross:
			entries = append(entries, legendEntry{k.Label, func(x, y float64) { c.crossMark(x, y, kh) }})
		case k.Ranked:
			entries = append(entries, legendEntry{k.Label, func(x, y float64) {
				c.valueMark(x, y, 0.75*kh, cm.At(1))
				c.rankFrame(x, y, 0.75*kh)
			}})
		default:
			t := 0.6
			if k.Value != nil {
				t = ov.Scale.T(*k.Value)
			}
			entries = append(entries, legendEntry{k.Label, func(x, y float64) { c.valueMark(x, y, kh, cm.At(t)) }})
		}
	}
	step := math.Max(math.Max(8, 20*s)*1.5, 38*s)
	fieldNeed := 96 * s
	northTop := float64(p.Max.Y) - 100*s
	legend := 56*s + float64(len(entries))*step + 4*s
	bar := c.l.Bar
	if room := northTop - float64(bar.Min.Y) - legend - fieldNeed; float64(bar.Dy()) > room {
		bar.Max.Y = bar.Min.Y + max(int(room), p.Dy()/4, 1)
	}
	c.l.Bar = bar
	c.panelHeading(ov.Scale.Label, ov.Scale.Unit)
	c.colourBar(ov.Scale)
	y := c.symbolLegend(float64(bar.Max.Y)+56*s, entries) + 4*s
	if y+fieldNeed > northTop {
		return
	}
	label := ov.FieldLabel
	if label == "" {
		label = field.Label
	}
	us := math.Max(8, 19*s)
	c.text(fitText(label, c.f.get(regular, us), float64(p.Dx())), c.f.get(regular, us), us, float64(p.Min.X), y+18*s, 0, false, colInk)
	hb := image.Rect(p.Min.X+int(4*s), int(y+30*s), p.Min.X+int(math.Min(float64(p.Dx())-40*s, 300*s)), int(y+48*s))
	c.colourBarH(field, hb)
}

// colourBarH draws a horizontal colour bar of sc in r (smallest value at
// the left) with a few nice ticks labelled below it.
func (c *mapCanvas) colourBarH(sc Scale, r image.Rectangle) {
	s := c.l.S
	cm := sc.colormap()
	n := max(r.Dx()-1, 1)
	for x := r.Min.X; x < r.Max.X; x++ {
		col := cm.At(float64(x-r.Min.X) / float64(n))
		for y := r.Min.Y; y < r.Max.Y; y++ {
			c.img.SetRGBA(x, y, col)
		}
	}
	dc := c.dc
	frameBar(dc, r, s)
	ticks, dec := barTicks(sc, 4)
	size := math.Max(8, 19*s)
	face := c.f.get(regular, size)
	last := math.Inf(-1)
	for _, v := range ticks {
		x := float64(r.Min.X) + sc.T(v)*float64(n) + 0.5
		dc.SetColor(colInk)
		dc.DrawLine(x, float64(r.Max.Y), x, float64(r.Max.Y)+7*s)
		dc.Stroke()
		lab := FormatNumber(v, dec)
		if sc.Log {
			lab = formatLogTick(v)
		}
		w := textWidth(lab, face)
		if x-w/2 < last+6*s {
			continue
		}
		c.text(lab, face, size, x, float64(r.Max.Y)+9*s+0.8*size, 0.5, false, colInk)
		last = x + w/2
	}
}

// textWidth is the advance width of s in face, in pixels.
func textWidth(s string, face font.Face) float64 {
	return float64(font.MeasureString(face, s)) / 64
}

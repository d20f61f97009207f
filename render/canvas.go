package render

import (
	"fmt"
	"image"
	"image/color"
	"math"
	"sync"

	"github.com/fogleman/gg"
)

// mapCanvas holds one map picture while it is drawn.
type mapCanvas struct {
	img   *image.RGBA
	dc    *gg.Context
	l     Layout
	f     *faces
	s     Scene
	boxes []box // occupied areas, for label placement
	dark  bool  // the reservoir is drawn dark (streamlines)
}

type box struct{ x0, y0, x1, y1 float64 }

func (a box) overlap(b box) float64 {
	w := math.Min(a.x1, b.x1) - math.Max(a.x0, b.x0)
	h := math.Min(a.y1, b.y1) - math.Max(a.y0, b.y0)
	if w <= 0 || h <= 0 {
		return 0
	}
	return w * h
}

func checkScene(s Scene) error {
	g := s.Grid
	if g.NX <= 0 || g.NY <= 0 || !(g.DX > 0) || !(g.DY > 0) {
		return fmt.Errorf("render: invalid grid %dx%d cells of %vx%v", g.NX, g.NY, g.DX, g.DY)
	}
	if g.NX > 1<<15 || g.NY > 1<<15 {
		return fmt.Errorf("render: grid %dx%d too large to draw", g.NX, g.NY)
	}
	if s.Active != nil && len(s.Active) != g.N() {
		return fmt.Errorf("render: active mask has %d values for %d cells", len(s.Active), g.N())
	}
	for _, w := range s.Wells {
		if math.IsNaN(w.X) || math.IsNaN(w.Y) || math.IsInf(w.X, 0) || math.IsInf(w.Y, 0) {
			return fmt.Errorf("render: well %q has no position", w.Name)
		}
	}
	return nil
}

func newMapCanvas(s Scene, w, h int) (*mapCanvas, error) {
	if err := checkScene(s); err != nil {
		return nil, err
	}
	l, err := NewLayout(s.Grid, w, h)
	if err != nil {
		return nil, err
	}
	img := &image.RGBA{Pix: pixels(4 * w * h), Stride: 4 * w, Rect: image.Rect(0, 0, w, h)}
	// Opaque white: the bytes are all 255; fill by doubling copies.
	if len(img.Pix) > 0 {
		img.Pix[0] = 255
		for n := 1; n < len(img.Pix); n *= 2 {
			copy(img.Pix[n:], img.Pix[:n])
		}
	}
	c := &mapCanvas{img: img, dc: gg.NewContextForRGBA(img), l: l, f: newFaces(), s: s}
	return c, nil
}

// pixelPool recycles the pixel buffers of pictures a run has encoded
// (see recycle): memory touched for the first time is slow to get, and a
// run draws many pictures of one size.
var pixelPool sync.Pool

// pixels returns a buffer of n bytes, of undefined content.
func pixels(n int) []byte {
	if p, ok := pixelPool.Get().(*[]byte); ok && cap(*p) >= n {
		return (*p)[:n]
	}
	return make([]byte, n)
}

// recycle hands the pixels of img, which nothing uses any more, back to
// pixels.
func recycle(img *image.RGBA) {
	if img != nil && cap(img.Pix) > 0 {
		p := img.Pix[:0]
		pixelPool.Put(&p)
	}
}

func (c *mapCanvas) active(k int) bool { return c.s.Active == nil || c.s.Active[k] }

// fillCells paints the map rectangle, nearest cell per pixel. A colour
// with alpha 0 marks a cell with no value (hatched).
func (c *mapCanvas) fillCells(col []color.RGBA) {
	l, g := c.l, c.s.Grid
	mw, mh := l.Map.Dx(), l.Map.Dy()
	ci := make([]int, mw)
	for x := range mw {
		i := int(math.Floor((float64(x) + 0.5) / l.PixelsPerUnit / g.DX))
		ci[x] = min(max(i, 0), g.NX-1)
	}
	step := max(5, int(math.Round(9*l.S)))
	lw := max(1, int(math.Round(1.6*l.S)))
	for y := range mh {
		yy := g.Height() - (float64(y)+0.5)/l.PixelsPerUnit
		j := min(max(int(math.Floor(yy/g.DY)), 0), g.NY-1)
		row := j * g.NX
		py := l.Map.Min.Y + y
		off := c.img.PixOffset(l.Map.Min.X, py)
		pix := c.img.Pix
		for x := range mw {
			cc := col[row+ci[x]]
			if cc.A == 0 {
				cc = colNoData
				if (l.Map.Min.X+x+py)%step < lw {
					cc = colNoDataHat
				}
			}
			pix[off], pix[off+1], pix[off+2], pix[off+3] = cc.R, cc.G, cc.B, 255
			off += 4
		}
	}
}

// edges strokes the cell faces where differ says the two sides differ; a
// side outside the grid is cell -1. Consecutive faces on one line are
// merged into one segment.
func (c *mapCanvas) edges(differ func(a, b int) bool, col color.Color, width float64) {
	g := c.s.Grid
	dc := c.dc
	dc.SetColor(col)
	dc.SetLineWidth(width)
	dc.SetLineCapSquare()
	cell := func(i, j int) int {
		if i < 0 || j < 0 || i >= g.NX || j >= g.NY {
			return -1
		}
		return g.Index(i, j)
	}
	n := 0
	flush := func(x0, y0, x1, y1 float64) {
		ax, ay := c.l.ToPixel(x0, y0)
		bx, by := c.l.ToPixel(x1, y1)
		dc.MoveTo(ax, ay)
		dc.LineTo(bx, by)
		dc.NewSubPath()
		n++
	}
	// Horizontal faces: line jj between rows jj-1 and jj.
	for jj := 0; jj <= g.NY; jj++ {
		start := -1
		for i := 0; i <= g.NX; i++ {
			on := i < g.NX && differ(cell(i, jj-1), cell(i, jj))
			if on && start < 0 {
				start = i
			}
			if !on && start >= 0 {
				y := g.Y0 + float64(jj)*g.DY
				flush(g.X0+float64(start)*g.DX, y, g.X0+float64(i)*g.DX, y)
				start = -1
			}
		}
	}
	for ii := 0; ii <= g.NX; ii++ {
		start := -1
		for j := 0; j <= g.NY; j++ {
			on := j < g.NY && differ(cell(ii-1, j), cell(ii, j))
			if on && start < 0 {
				start = j
			}
			if !on && start >= 0 {
				x := g.X0 + float64(ii)*g.DX
				flush(x, g.Y0+float64(start)*g.DY, x, g.Y0+float64(j)*g.DY)
				start = -1
			}
		}
	}
	if n > 0 {
		dc.Stroke()
	}
	dc.ClearPath()
}

// outline draws the reservoir boundary (active against inactive or the
// grid edge) and a thin frame round the grid.
func (c *mapCanvas) outline() {
	act := func(k int) bool { return k >= 0 && c.active(k) }
	c.edges(func(a, b int) bool { return act(a) != act(b) }, colInk, math.Max(1, 1.6*c.l.S))
	r := c.l.Map
	c.dc.SetColor(colInkSoft)
	c.dc.SetLineWidth(math.Max(1, c.l.S))
	c.dc.DrawRectangle(float64(r.Min.X)-0.5, float64(r.Min.Y)-0.5, float64(r.Dx())+1, float64(r.Dy())+1)
	c.dc.Stroke()
}

func (c *mapCanvas) clipMap() {
	r := c.l.Map
	c.dc.DrawRectangle(float64(r.Min.X), float64(r.Min.Y), float64(r.Dx()), float64(r.Dy()))
	c.dc.Clip()
}

// faults draws each fault as a bold dark line on a white casing, so it
// reads on light and dark colours alike.
func (c *mapCanvas) faults(onDark bool) {
	drawn := false
	for _, tr := range c.s.Faults {
		drawn = drawn || len(tr) >= 2
	}
	dc := c.dc
	s := c.l.S
	if drawn {
		// The clip mask is a full-canvas raster: made only when there is
		// something to draw.
		c.clipMap()
	}
	for pass := range 2 {
		for _, tr := range c.s.Faults {
			if len(tr) < 2 {
				continue
			}
			for i, p := range tr {
				x, y := c.l.ToPixel(p[0], p[1])
				if i == 0 {
					dc.MoveTo(x, y)
				} else {
					dc.LineTo(x, y)
				}
			}
			dc.NewSubPath()
		}
		casing, line := color.Color(color.NRGBA{255, 255, 255, 230}), color.Color(colFault)
		if onDark {
			casing, line = color.NRGBA{0, 0, 0, 200}, colFaultOnDark
		}
		if pass == 0 {
			dc.SetColor(casing)
			dc.SetLineWidth(math.Max(3, 8*s))
		} else {
			dc.SetColor(line)
			dc.SetLineWidth(math.Max(1.8, 4.2*s))
		}
		dc.SetLineCapRound()
		dc.SetLineJoinRound()
		if drawn {
			dc.Stroke()
		} else {
			dc.ClearPath()
		}
	}
	if drawn {
		dc.ResetClip()
	}
}

// symbolRadius is the radius of a well symbol.
func (c *mapCanvas) symbolRadius() float64 { return math.Max(4.5, 11*c.l.S) }

// drawInjector draws the injector symbol: a ring holding a downward
// triangle (water going down the well), on a white halo.
func drawInjector(dc *gg.Context, x, y, r float64) {
	dc.SetColor(colWhite)
	dc.DrawCircle(x, y, r*1.28)
	dc.Fill()
	dc.SetColor(colInjector)
	dc.SetLineWidth(math.Max(1.2, r*0.24))
	dc.DrawCircle(x, y, r)
	dc.Stroke()
	a := r * 0.62
	dc.MoveTo(x-a*0.866, y-a*0.5)
	dc.LineTo(x+a*0.866, y-a*0.5)
	dc.LineTo(x, y+a)
	dc.ClosePath()
	dc.Fill()
}

// drawProducer draws the producer symbol: a solid disc with a white core,
// on a white halo.
func drawProducer(dc *gg.Context, x, y, r float64) {
	dc.SetColor(colWhite)
	dc.DrawCircle(x, y, r*1.28)
	dc.Fill()
	dc.SetColor(colProducer)
	dc.DrawCircle(x, y, r)
	dc.Fill()
	dc.SetColor(colWhite)
	dc.DrawCircle(x, y, r*0.34)
	dc.Fill()
}

// wells draws every well symbol, then places the names where they overlap
// least with symbols, other names and the map edge.
func (c *mapCanvas) wells() {
	r := c.symbolRadius()
	type pos struct{ x, y float64 }
	ps := make([]pos, len(c.s.Wells))
	m := c.l.Map
	inside := func(p pos) bool {
		return p.x >= float64(m.Min.X)-1 && p.x <= float64(m.Max.X)+1 && p.y >= float64(m.Min.Y)-1 && p.y <= float64(m.Max.Y)+1
	}
	for i, w := range c.s.Wells {
		x, y := c.l.ToPixel(w.X, w.Y)
		ps[i] = pos{x, y}
		c.boxes = append(c.boxes, box{x - 1.3*r, y - 1.3*r, x + 1.3*r, y + 1.3*r})
	}
	for i, w := range c.s.Wells {
		if !inside(ps[i]) {
			continue // a well off the grid is not drawn over the legend
		}
		if w.Injector {
			drawInjector(c.dc, ps[i].x, ps[i].y, r)
		} else {
			drawProducer(c.dc, ps[i].x, ps[i].y, r)
		}
	}
	size := math.Max(11, 21*c.l.S)
	face := c.f.get(bold, size)
	for i, w := range c.s.Wells {
		if inside(ps[i]) {
			c.placeLabel(w.Name, face, size, ps[i].x, ps[i].y, r*1.3+5*c.l.S, colInk)
		}
	}
}

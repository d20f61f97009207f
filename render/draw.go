package render

import (
	"fmt"
	"image"
	"image/color"
	"image/draw"
	"math"
	"sort"

	"github.com/fogleman/gg"
	"golang.org/x/image/font"
	"golang.org/x/image/math/fixed"
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
	img := image.NewRGBA(image.Rect(0, 0, w, h))
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
	dc := c.dc
	s := c.l.S
	c.clipMap()
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
		dc.Stroke()
	}
	dc.ResetClip()
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

// text draws s with its left edge at x (ax = 0), centre (0.5) or right
// (1), and its baseline at y; with vcenter the capital letters are centred
// on y instead.
func (c *mapCanvas) text(s string, face font.Face, size, x, y, ax float64, vcenter bool, col color.Color) (w float64) {
	w = float64(font.MeasureString(face, s)) / 64
	if vcenter {
		y += 0.36 * size
	}
	c.dc.SetFontFace(face)
	c.dc.SetColor(col)
	c.dc.DrawString(s, x-ax*w, y)
	return w
}

// haloText draws text with a halo of radius r so it stays readable on
// any background: the glyph coverage is dilated by a disc (soft-edged) and
// painted in the halo colour first. On the dark streamline canvas the
// text is light on a dark halo, elsewhere dark on white.
func (c *mapCanvas) haloText(s string, face font.Face, size, x, y, ax float64, r float64, col color.Color) {
	halo := color.Color(colWhite)
	if c.dark {
		halo, col = color.RGBA{10, 12, 16, 255}, colWhite
	}
	w := float64(font.MeasureString(face, s)) / 64
	x -= ax * w
	y += 0.36 * size
	pad := int(math.Ceil(r)) + 2
	asc := int(math.Ceil(size))
	desc := int(math.Ceil(0.35 * size))
	x0, y0 := int(math.Floor(x))-pad, int(math.Floor(y))-asc-pad
	bw, bh := int(math.Ceil(w))+2*pad+2, asc+desc+2*pad
	mask := image.NewAlpha(image.Rect(0, 0, bw, bh))
	d := font.Drawer{Dst: mask, Src: image.Opaque, Face: face,
		Dot: fixed.Point26_6{X: fixed.Int26_6(math.Round((x - float64(x0)) * 64)), Y: fixed.Int26_6(math.Round((y - float64(y0)) * 64))}}
	d.DrawString(s)
	// Soft disc dilation of the coverage.
	type tap struct {
		dx, dy int
		wt     float64
	}
	var taps []tap
	ri := int(math.Ceil(r))
	for dy := -ri; dy <= ri; dy++ {
		for dx := -ri; dx <= ri; dx++ {
			dist := math.Hypot(float64(dx), float64(dy))
			if wt := math.Min(1, r+0.5-dist); wt > 0 {
				taps = append(taps, tap{dx, dy, wt})
			}
		}
	}
	dil := image.NewAlpha(mask.Rect)
	for py := range bh {
		for px := range bw {
			best := 0.0
			for _, t := range taps {
				qx, qy := px+t.dx, py+t.dy
				if qx < 0 || qy < 0 || qx >= bw || qy >= bh {
					continue
				}
				if v := float64(mask.Pix[qy*mask.Stride+qx]) * t.wt; v > best {
					best = v
				}
			}
			dil.Pix[py*dil.Stride+px] = uint8(math.Min(255, best*1.6))
		}
	}
	dst := image.Rect(x0, y0, x0+bw, y0+bh)
	draw.DrawMask(c.img, dst, image.NewUniform(halo), image.Point{}, dil, image.Point{}, draw.Over)
	draw.DrawMask(c.img, dst, image.NewUniform(col), image.Point{}, mask, image.Point{}, draw.Over)
}

// fitText shortens s with an ellipsis until it fits maxW pixels.
func fitText(s string, face font.Face, maxW float64) string {
	if float64(font.MeasureString(face, s))/64 <= maxW {
		return s
	}
	r := []rune(s)
	for len(r) > 1 {
		r = r[:len(r)-1]
		t := string(r) + "…"
		if float64(font.MeasureString(face, t))/64 <= maxW {
			return t
		}
	}
	return "…"
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

// placeLabel puts a haloed label beside the point (x, y) at distance d,
// choosing among eight positions the one with the least overlap.
func (c *mapCanvas) placeLabel(s string, face font.Face, size, x, y, d float64, col color.Color) {
	if s == "" {
		return
	}
	w := float64(font.MeasureString(face, s)) / 64
	h := size * 0.8
	pad := 3 * c.l.S
	type cand struct{ dx, dy, ax float64 } // label anchor relative to (x, y)
	cands := []cand{
		{d, -d * 0.7, 0}, {d, d * 0.7, 0}, {-d, -d * 0.7, 1}, {-d, d * 0.7, 1},
		{d * 1.1, 0, 0}, {-d * 1.1, 0, 1}, {0, -d * 1.25, 0.5}, {0, d * 1.25, 0.5},
	}
	m := c.l.Map
	best, bestScore := 0, math.Inf(1)
	var bestBox box
	for k, cd := range cands {
		lx := x + cd.dx - cd.ax*w
		ly := y + cd.dy
		b := box{lx - pad, ly - h/2 - pad, lx + w + pad, ly + h/2 + pad}
		score := float64(k) * 0.5
		for _, o := range c.boxes {
			score += 10 * o.overlap(b)
		}
		out := 0.0
		if b.x0 < float64(m.Min.X) {
			out += float64(m.Min.X) - b.x0
		}
		if b.x1 > float64(m.Max.X) {
			out += b.x1 - float64(m.Max.X)
		}
		if b.y0 < float64(m.Min.Y) {
			out += float64(m.Min.Y) - b.y0
		}
		if b.y1 > float64(m.Max.Y) {
			out += b.y1 - float64(m.Max.Y)
		}
		score += out * h * 4
		if score < bestScore {
			best, bestScore, bestBox = k, score, b
		}
	}
	cd := cands[best]
	c.boxes = append(c.boxes, bestBox)
	c.haloText(s, face, size, x+cd.dx, y+cd.dy, cd.ax, math.Max(1.5, 3.6*c.l.S), col)
}

// faultLabels writes each fault name beside its trace, a fifth of the way
// along it, offset on the north side of the line.
func (c *mapCanvas) faultLabels() {
	size := math.Max(10, 17*c.l.S)
	face := c.f.get(italic, size)
	m := c.l.Map
	for n, tr := range c.s.Faults {
		if n >= len(c.s.FaultNames) || c.s.FaultNames[n] == "" || len(tr) < 2 {
			continue
		}
		// Pixel polyline clipped to the map by skipping outside points.
		var xs, ys []float64
		for _, p := range tr {
			x, y := c.l.ToPixel(p[0], p[1])
			if x >= float64(m.Min.X) && x <= float64(m.Max.X) && y >= float64(m.Min.Y) && y <= float64(m.Max.Y) {
				xs, ys = append(xs, x), append(ys, y)
			}
		}
		if len(xs) < 2 {
			continue
		}
		total := 0.0
		for i := 1; i < len(xs); i++ {
			total += math.Hypot(xs[i]-xs[i-1], ys[i]-ys[i-1])
		}
		target, acc := 0.2*total, 0.0
		px, py, dx, dy := xs[0], ys[0], xs[1]-xs[0], ys[1]-ys[0]
		for i := 1; i < len(xs); i++ {
			seg := math.Hypot(xs[i]-xs[i-1], ys[i]-ys[i-1])
			if acc+seg >= target && seg > 0 {
				t := (target - acc) / seg
				px, py = xs[i-1]+t*(xs[i]-xs[i-1]), ys[i-1]+t*(ys[i]-ys[i-1])
				dx, dy = xs[i]-xs[i-1], ys[i]-ys[i-1]
				break
			}
			acc += seg
		}
		l := math.Hypot(dx, dy)
		if l == 0 {
			continue
		}
		nx, ny := -dy/l, dx/l
		if ny > 0 { // the normal pointing up the picture
			nx, ny = -nx, -ny
		}
		w := float64(font.MeasureString(face, c.s.FaultNames[n])) / 64
		// Distance so that the label box clears the line.
		off := 8*c.l.S + 0.5*math.Abs(nx)*w + 0.5*math.Abs(ny)*size*0.8
		lx, ly := px+nx*off, py+ny*off
		c.haloText(c.s.FaultNames[n], face, size, lx, ly, 0.5, math.Max(1.5, 3.5*c.l.S), colFault)
		c.boxes = append(c.boxes, box{lx - w/2, ly - size*0.5, lx + w/2, ly + size*0.5})
	}
}

// header draws the title block and the footer.
func (c *mapCanvas) header() {
	s, l := c.l.S, c.l
	m := l.Margin
	maxW := float64(l.W) - 2*m
	tsize := math.Max(12, 40*s)
	tf := c.f.get(bold, tsize)
	c.text(fitText(c.s.Title, tf, maxW), tf, tsize, m, m+38*s, 0, false, colInk)
	ssize := math.Max(10, 26*s)
	sf := c.f.get(regular, ssize)
	c.text(fitText(c.s.Subtitle, sf, maxW), sf, ssize, m, m+80*s, 0, false, colInkSoft)
	c.dc.SetColor(colRule)
	c.dc.SetLineWidth(math.Max(1, 1.5*s))
	c.dc.DrawLine(m, l.HeaderBottom, float64(l.W)-m, l.HeaderBottom)
	c.dc.Stroke()

	fsize := math.Max(8, 17*s)
	ff := c.f.get(regular, fsize)
	g := c.s.Grid
	u := c.s.LengthUnit
	foot := fmt.Sprintf("Grid %d × %d cells of %s × %s %s · origin (%s, %s)", g.NX, g.NY,
		trimNum(g.DX), trimNum(g.DY), u, trimNum(g.X0), trimNum(g.Y0))
	if c.s.Note != "" {
		foot += " · " + c.s.Note
	}
	y := float64(l.H) - 16*s
	bw := c.text("floodtrace", ff, fsize, float64(l.W)-m, y, 1, false, colInkSoft)
	c.text(fitText(foot, ff, float64(l.W)-2*m-bw-20*s), ff, fsize, m, y, 0, false, colInkSoft)
}

func trimNum(v float64) string {
	if v == math.Trunc(v) && math.Abs(v) < 1e15 {
		return FormatNumber(v, 0)
	}
	return FormatNumber(v, decimalsFor(math.Abs(v)/1000))
}

// panelHeading writes the legend heading (bold) and its second line.
func (c *mapCanvas) panelHeading(label, unit string) {
	s := c.l.S
	p := c.l.Panel
	hs := math.Max(10, 24*s)
	hf := c.f.get(bold, hs)
	c.text(fitText(label, hf, float64(p.Dx())), hf, hs, float64(p.Min.X), float64(p.Min.Y)+24*s, 0, false, colInk)
	if unit != "" {
		us := math.Max(8, 19*s)
		uf := c.f.get(regular, us)
		c.text(fitText(unit, uf, float64(p.Dx())), uf, us, float64(p.Min.X), float64(p.Min.Y)+54*s, 0, false, colInkSoft)
	}
}

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
	dc.SetColor(colInk)
	dc.SetLineWidth(math.Max(1, 1.2*s))
	dc.DrawRectangle(float64(b.Min.X)-0.5, float64(b.Min.Y)-0.5, float64(b.Dx())+1, float64(b.Dy())+1)
	dc.Stroke()

	var ticks []float64
	dec := 0
	if sc.Log {
		ticks = LogTicks(sc.Min, sc.Max)
	} else {
		var step float64
		ticks, step = LinearTicks(sc.Min, sc.Max, max(3, min(9, int(float64(n)/(38*s)))))
		dec = decimalsFor(step)
	}
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
	return es
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
	length, seg := ScaleBarLength(avail / c.l.PixelsPerUnit)
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

// cellColours computes one colour per cell: inactive cells grey, NaN
// values transparent (drawn hatched).
func cellColours(s Scene, values []float64, sc Scale) []color.RGBA {
	cm := sc.colormap()
	col := make([]color.RGBA, len(values))
	for k, v := range values {
		switch {
		case s.Active != nil && !s.Active[k]:
			col[k] = colInactive
		case math.IsNaN(v):
			col[k] = color.RGBA{}
		default:
			col[k] = cm.At(sc.T(v))
		}
	}
	return col
}

// DrawField draws a cell property as a w x h map: the values fill the
// cells (nearest cell per pixel), then the reservoir outline, faults,
// wells, the title block, the colour bar of sc, the symbol legend, a
// north arrow and a scale bar. NaN values are drawn hatched as "no
// value"; inactive cells light grey.
func DrawField(s Scene, values []float64, sc Scale, w, h int) (*image.RGBA, error) {
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
	c.outline()
	c.faults(false)
	c.wells()
	c.faultLabels()
	c.header()
	c.panelHeading(sc.Label, sc.Unit)
	c.colourBar(sc)
	noData := ""
	for k, v := range values {
		if c.active(k) && math.IsNaN(v) {
			noData = "No value (no flow)"
			break
		}
	}
	c.symbolLegend(float64(c.l.Bar.Max.Y)+56*c.l.S, c.standardEntries(noData))
	c.northAndScale()
	return c.img, nil
}

// DrawPartition draws which well floods (or drains) each cell: part holds
// 1-based indices into names, 0 for none. Each well present gets a colour
// of the categorical palette (in the order of names), boundaries between
// partitions are outlined, and the legend lists the wells.
func DrawPartition(s Scene, part []int, names []string, legendTitle string, w, h int) (*image.RGBA, error) {
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
			col[k] = CategoricalFill(slot[v])
		}
	}
	c.fillCells(col)
	c.edges(func(a, b int) bool {
		return a >= 0 && b >= 0 && c.active(a) && c.active(b) && part[a] != part[b]
	}, color.NRGBA{40, 44, 52, 150}, math.Max(1, 1.3*c.l.S))
	c.outline()
	c.faults(false)
	c.wells()
	c.faultLabels()
	c.header()
	c.panelHeading(legendTitle, "cells coloured by well")
	var entries []legendEntry
	for v := 1; v <= len(names); v++ {
		if present[v] {
			fill := CategoricalFill(slot[v])
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

// DrawStreamlines draws the streamlines over a dark reservoir, coloured by
// time of flight on sc (a zero Scale means a log scale of the lines' own
// times with TimeOfFlightColors). Long lines are drawn first so the fast
// paths stay on top; wells and faults are drawn above the lines.
func DrawStreamlines(s Scene, lines []Polyline, sc Scale, w, h int) (*image.RGBA, error) {
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

package render

import (
	"fmt"
	"image"
	"image/color"
	"image/draw"
	"math"

	"golang.org/x/image/font"
	"golang.org/x/image/math/fixed"
)

// text draws s with its left edge at x (ax = 0), centre (0.5) or right
// (1), and its baseline at y; with vcenter the capital letters are centred
// on y instead.
func (c *mapCanvas) text(s string, face font.Face, size, x, y, ax float64, vcenter bool, col color.Color) (w float64) {
	w = float64(font.MeasureString(face, s)) / 64
	if vcenter {
		y += 0.36 * size
	}
	// The glyph masks go straight onto the picture (no clip is set when
	// text is drawn, and the canvas is never transformed): the same dot
	// as gg's DrawString, without its per-glyph bilinear resampling.
	d := font.Drawer{Dst: c.img, Src: image.NewUniform(col), Face: face,
		Dot: fixed.Point26_6{X: fixed.Int26_6((x - ax*w) * 64), Y: fixed.Int26_6(y * 64)}}
	d.DrawString(s)
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

// subtitle draws the scene's subtitle under the title.
func (c *mapCanvas) subtitle() {
	s, m := c.l.S, c.l.Margin
	ssize := math.Max(10, 26*s)
	sf := c.f.get(regular, ssize)
	c.text(fitText(c.s.Subtitle, sf, float64(c.l.W)-2*m), sf, ssize, m, m+80*s, 0, false, colInkSoft)
}

// header draws the title block and the footer.
func (c *mapCanvas) header() {
	s, l := c.l.S, c.l
	m := l.Margin
	maxW := float64(l.W) - 2*m
	tsize := math.Max(12, 40*s)
	tf := c.f.get(bold, tsize)
	c.text(fitText(c.s.Title, tf, maxW), tf, tsize, m, m+38*s, 0, false, colInk)
	c.subtitle()
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

package render

import (
	"fmt"
	"image/color"
	"math"

	"floodtrace/reservoir"
	"floodtrace/runfolder"

	"golang.org/x/image/font"
)

// Structure is the depth structure drawn over the maps of a case with a
// depth map: the depth contours, their interval and the mean dip. A
// Scene without one (a case without depth, or a constant depth) is drawn
// as before.
type Structure struct {
	// Contours holds one entry per level, shallowest first.
	Contours []Contour
	// Interval is the depth between contours, in length units.
	Interval float64
	// DipDegrees is the dip of the plane fitted to the depth by least
	// squares, DipAzimuth the compass direction down that dip (degrees
	// clockwise from north). HasDirection is false when the depth has no
	// single down-dip direction (a dome, a bowl: the fitted plane's
	// gradient is under a third of the cells' mean gradient); DipDegrees
	// is then the mean of the cells' dips.
	DipDegrees, DipAzimuth float64
	HasDirection           bool
}

// Contour is the line set of one depth level, in map coordinates; a
// closed line ends on its first point.
type Contour struct {
	Level float64
	Lines [][][2]float64
}

// NewStructure contours the cell-centred depth map of grid g (NaN or
// inactive cells are left out) at the interval ContourInterval picks for
// its range, and fits its mean dip. It returns nil when no active cell
// holds a depth.
func NewStructure(g reservoir.Grid, depth []float64, active []bool) (*Structure, error) {
	if len(depth) != g.N() || active != nil && len(active) != g.N() {
		return nil, fmt.Errorf("render: depth has %d values for a %dx%d grid", len(depth), g.NX, g.NY)
	}
	on := func(k int) bool {
		return (active == nil || active[k]) && !math.IsNaN(depth[k]) && !math.IsInf(depth[k], 0)
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for k, d := range depth {
		if on(k) {
			lo, hi = math.Min(lo, d), math.Max(hi, d)
		}
	}
	if lo > hi {
		return nil, nil
	}
	st := &Structure{}
	if step := ContourInterval(lo, hi); step > 0 {
		st.Interval = step
		for n := math.Floor(lo/step) + 1; n*step < hi; n++ {
			lv := n * step
			if lv <= lo {
				continue
			}
			st.Contours = append(st.Contours, Contour{Level: lv, Lines: ContourLines(g, depth, active, lv)})
		}
	}
	st.DipDegrees, st.DipAzimuth, st.HasDirection = meanDip(g, depth, on)
	return st, nil
}

// ContourInterval returns the contour interval for depths from lo to hi:
// the step of 1, 2 or 5 times a power of ten that puts between 5 and 12
// levels strictly inside the range, the one nearest 8 levels (common
// practice for structure maps); 0 when the range is empty.
func ContourInterval(lo, hi float64) float64 {
	if !(hi > lo) || math.IsInf(hi-lo, 0) {
		return 0
	}
	count := func(step float64) int {
		a, b := math.Floor(lo/step)+1, math.Ceil(hi/step)-1
		return int(b - a + 1)
	}
	p := math.Pow(10, math.Floor(math.Log10(hi-lo))-2)
	best, bestScore := 0.0, math.Inf(1)
	for e := 0; e < 6; e++ {
		for _, m := range []float64{1, 2, 5} {
			step := m * p * math.Pow(10, float64(e))
			n := count(step)
			if n < 5 || n > 12 {
				continue
			}
			if sc := math.Abs(float64(n) - 8); sc < bestScore {
				best, bestScore = step, sc
			}
		}
	}
	if best == 0 {
		// No step gives 5 to 12 levels (cannot happen for 1-2-5 steps,
		// whose counts grow by at most 2.5 times): the range's own step.
		best = niceNumber((hi-lo)/8, true)
	}
	return best
}

// ContourLines returns the lines where the cell-centred field v of grid g
// equals level, by marching squares over the squares whose four corners
// are cell centres of active cells with finite values (Lorensen and Cline
// 1987 in three dimensions; the square cases are the classic table, the
// two saddles resolved by the mean of the corners). The crossing on each
// edge is interpolated linearly, so a planar field gives exact straight
// lines. Values equal to the level count as above it. The line pieces are
// joined into polylines in a fixed order.
func ContourLines(g reservoir.Grid, v []float64, active []bool, level float64) [][][2]float64 {
	nx, ny := g.NX, g.NY
	ok := func(k int) bool {
		return (active == nil || active[k]) && !math.IsNaN(v[k]) && !math.IsInf(v[k], 0)
	}
	// Edge ids: 2k for the edge from node k to k+1 (east), 2k+1 from node
	// k to k+nx (north).
	type seg struct{ a, b int }
	var segs []seg
	for j := 0; j+1 < ny; j++ {
		for i := 0; i+1 < nx; i++ {
			k0 := j*nx + i
			k1, k2, k3 := k0+1, k0+nx+1, k0+nx
			c := 0
			for bit, k := range [4]int{k0, k1, k2, k3} {
				if v[k] >= level {
					c |= 1 << bit
				}
			}
			// Most squares are wholly above or below (a NaN corner counts
			// as below, so such squares reach the check).
			if c == 0 || c == 15 || !ok(k0) || !ok(k1) || !ok(k2) || !ok(k3) {
				continue
			}
			e0, e1, e2, e3 := 2*k0, 2*k1+1, 2*k3, 2*k0+1 // south, east, north, west
			centreAbove := (v[k0]+v[k1]+v[k2]+v[k3])/4 >= level
			add := func(a, b int) { segs = append(segs, seg{a, b}) }
			switch c {
			case 1, 14:
				add(e3, e0)
			case 2, 13:
				add(e0, e1)
			case 3, 12:
				add(e3, e1)
			case 4, 11:
				add(e1, e2)
			case 6, 9:
				add(e0, e2)
			case 7, 8:
				add(e2, e3)
			case 5:
				if centreAbove {
					add(e0, e1)
					add(e2, e3)
				} else {
					add(e3, e0)
					add(e1, e2)
				}
			case 10:
				if centreAbove {
					add(e3, e0)
					add(e1, e2)
				} else {
					add(e0, e1)
					add(e2, e3)
				}
			}
		}
	}
	if len(segs) == 0 {
		return nil
	}
	point := func(e int) [2]float64 {
		k := e / 2
		i, j := k%nx, k/nx
		x := g.X0 + (float64(i)+0.5)*g.DX
		y := g.Y0 + (float64(j)+0.5)*g.DY
		kb := k + 1
		if e%2 == 1 {
			kb = k + nx
		}
		t := (level - v[k]) / (v[kb] - v[k])
		if e%2 == 0 {
			return [2]float64{x + t*g.DX, y}
		}
		return [2]float64{x, y + t*g.DY}
	}
	// Each edge is shared by at most two pieces.
	at := make(map[int][2]int, 2*len(segs))
	for n, s := range segs {
		for _, e := range [2]int{s.a, s.b} {
			p, found := at[e]
			if !found {
				p = [2]int{-1, -1}
			}
			if p[0] < 0 {
				p[0] = n
			} else {
				p[1] = n
			}
			at[e] = p
		}
	}
	used := make([]bool, len(segs))
	// other returns a piece at edge e other than n for which skip is
	// false, and its far edge; -1 when there is none.
	other := func(e, n int, skip func(int) bool) (int, int) {
		for _, m := range at[e] {
			if m >= 0 && m != n && !skip(m) {
				if s := segs[m]; s.a == e {
					return m, s.b
				} else {
					return m, s.a
				}
			}
		}
		return -1, -1
	}
	var lines [][][2]float64
	for n := range segs {
		if used[n] {
			continue
		}
		// Walk backwards from the piece's first edge to the start of its
		// open line (an edge with one piece), or round a closed line back
		// to its second edge.
		seen := map[int]bool{n: true}
		start, s := segs[n].a, n
		for {
			m, e := other(start, s, func(q int) bool { return seen[q] })
			if m < 0 {
				break
			}
			seen[m] = true
			start, s = e, m
		}
		// Forwards from there, through the unused pieces.
		edges := []int{start}
		cur, curSeg := start, -1
		for {
			m, e := other(cur, curSeg, func(q int) bool { return used[q] })
			if m < 0 {
				break
			}
			used[m] = true
			edges = append(edges, e)
			cur, curSeg = e, m
		}
		pts := make([][2]float64, len(edges))
		for i, e := range edges {
			pts[i] = point(e)
		}
		lines = append(lines, pts)
	}
	return lines
}

// meanDip fits the plane D = a + b x + c y to the depths of the cells on
// by least squares and returns its dip (atan |(b, c)|, degrees) and the
// compass azimuth of (b, c), the direction down dip. When the plane's
// gradient is under a third of the mean of the cells' own gradients
// (central differences, one-sided beside cells that are off), the depth
// has no single direction: the mean of the cells' dips is returned with
// hasDir false.
func meanDip(g reservoir.Grid, d []float64, on func(int) bool) (dip, az float64, hasDir bool) {
	var n, sx, sy, sz float64
	for k := range d {
		if on(k) {
			x, y := float64(k%g.NX)*g.DX, float64(k/g.NX)*g.DY
			n, sx, sy, sz = n+1, sx+x, sy+y, sz+d[k]
		}
	}
	if n == 0 {
		return 0, 0, false
	}
	mx, my, mz := sx/n, sy/n, sz/n
	var sxx, sxy, syy, sxz, syz float64
	for k := range d {
		if on(k) {
			x, y, z := float64(k%g.NX)*g.DX-mx, float64(k/g.NX)*g.DY-my, d[k]-mz
			sxx, sxy, syy, sxz, syz = sxx+x*x, sxy+x*y, syy+y*y, sxz+x*z, syz+y*z
		}
	}
	var b, c float64
	switch det := sxx*syy - sxy*sxy; {
	case det > 1e-12*(sxx*syy+1e-300):
		b, c = (sxz*syy-syz*sxy)/det, (syz*sxx-sxz*sxy)/det
	case sxx > 0: // one row of cells
		b = sxz / sxx
	case syy > 0: // one column
		c = syz / syy
	}
	// The cells' own gradients.
	grad := func(k, di, dj int, h float64) float64 {
		i, j := k%g.NX, k/g.NX
		lo, hi := k, k
		if i-di >= 0 && j-dj >= 0 && on(k-di-dj*g.NX) {
			lo = k - di - dj*g.NX
		}
		if i+di < g.NX && j+dj < g.NY && on(k+di+dj*g.NX) {
			hi = k + di + dj*g.NX
		}
		if lo == hi {
			return 0
		}
		steps := 2.0
		if lo == k || hi == k {
			steps = 1
		}
		return (d[hi] - d[lo]) / (steps * h)
	}
	var sumG, sumDip float64
	for k := range d {
		if on(k) {
			gm := math.Hypot(grad(k, 1, 0, g.DX), grad(k, 0, 1, g.DY))
			sumG += gm
			sumDip += math.Atan(gm)
		}
	}
	gp := math.Hypot(b, c)
	if gp == 0 || gp < sumG/n/3 {
		return sumDip / n * 180 / math.Pi, 0, false
	}
	az = math.Atan2(b, c) * 180 / math.Pi
	if az < 0 {
		az += 360
	}
	return math.Atan(gp) * 180 / math.Pi, az, true
}

// readStructure reads depth.asc, when the run wrote one (rock.depth as a
// map), into the scene: its contours and dip are drawn on every map.
func (r *run) readStructure() error {
	p := r.raster(runfolder.DataDepth, runfolder.DepthFile)
	if !exists(p) {
		return nil
	}
	v, err := readASC(p, r.scene.Grid)
	if err != nil {
		return err
	}
	st, err := NewStructure(r.scene.Grid, v, r.scene.Active)
	if err != nil {
		return fmt.Errorf("render: %s: %w", p, err)
	}
	r.scene.Depth = st
	return nil
}

// contourColour is the colour of the depth contours on light and dark
// maps.
func (c *mapCanvas) contourColour() color.Color {
	if c.dark {
		return color.NRGBA{235, 240, 245, 110}
	}
	return color.NRGBA{20, 24, 32, 150}
}

// depthContours strokes the scene's depth contours, thin, clipped to the
// map; nothing without a structure.
func (c *mapCanvas) depthContours() {
	st := c.s.Depth
	if st == nil || len(st.Contours) == 0 {
		return
	}
	dc := c.dc
	c.clipMap()
	n := 0
	for _, ct := range st.Contours {
		for _, ln := range ct.Lines {
			for i, p := range ln {
				x, y := c.l.ToPixel(p[0], p[1])
				if i == 0 {
					dc.MoveTo(x, y)
				} else {
					dc.LineTo(x, y)
				}
			}
			dc.NewSubPath()
			n++
		}
	}
	if n > 0 {
		dc.SetColor(c.contourColour())
		dc.SetLineWidth(math.Max(0.8, 1.2*c.l.S))
		dc.SetLineCapRound()
		dc.SetLineJoinRound()
		dc.Stroke()
	}
	dc.ClearPath()
	dc.ResetClip()
}

// labelledLevel says which contour levels get a label: all of them up to
// six levels, else every other multiple of the interval.
func labelledLevel(st *Structure, lv float64) bool {
	if len(st.Contours) <= 6 {
		return true
	}
	q := math.Round(lv / st.Interval)
	return math.Mod(q, 2) == 0
}

// contourLabels writes the depth of the labelled levels once each, on the
// level's longest line, at the point among a few along it (the middle
// first) whose label overlaps no well, name or other label; a level with
// no free point or no line long enough (six label widths) goes
// unlabelled.
func (c *mapCanvas) contourLabels() {
	st := c.s.Depth
	if st == nil {
		return
	}
	s := c.l.S
	size := math.Max(8, 15*s)
	face := c.f.get(regular, size)
	m := c.l.Map
	dec := decimalsFor(st.Interval)
	for _, ct := range st.Contours {
		if !labelledLevel(st, ct.Level) {
			continue
		}
		lab := FormatNumber(ct.Level, dec)
		w := float64(font.MeasureString(face, lab)) / 64
		// The longest line, in pixels.
		var best [][2]float64
		bestLen := 0.0
		for _, ln := range ct.Lines {
			if l := c.pixelLength(ln); l > bestLen {
				best, bestLen = ln, l
			}
		}
		if bestLen < 6*w {
			continue
		}
		pad := 2 * s
		for _, f := range []float64{0.5, 0.35, 0.65, 0.2, 0.8} {
			x, y := c.pointAlong(best, f*bestLen)
			b := box{x - w/2 - pad, y - 0.5*size - pad, x + w/2 + pad, y + 0.5*size + pad}
			if b.x0 < float64(m.Min.X) || b.x1 > float64(m.Max.X) || b.y0 < float64(m.Min.Y) || b.y1 > float64(m.Max.Y) {
				continue
			}
			free := true
			for _, o := range c.boxes {
				if o.overlap(b) > 0 {
					free = false
					break
				}
			}
			if !free {
				continue
			}
			c.haloText(lab, face, size, x, y, 0.5, math.Max(1.5, 3*s), colInkSoft)
			c.boxes = append(c.boxes, b)
			break
		}
	}
}

// pixelLength is the length of a map polyline in pixels.
func (c *mapCanvas) pixelLength(ln [][2]float64) float64 {
	t := 0.0
	for i := 1; i < len(ln); i++ {
		t += math.Hypot(ln[i][0]-ln[i-1][0], ln[i][1]-ln[i-1][1])
	}
	return t * c.l.PixelsPerUnit
}

// pointAlong returns the pixel position at distance d (pixels) along a
// map polyline.
func (c *mapCanvas) pointAlong(ln [][2]float64, d float64) (float64, float64) {
	acc := 0.0
	for i := 1; i < len(ln); i++ {
		seg := math.Hypot(ln[i][0]-ln[i-1][0], ln[i][1]-ln[i-1][1]) * c.l.PixelsPerUnit
		if acc+seg >= d && seg > 0 {
			t := (d - acc) / seg
			return c.l.ToPixel(ln[i-1][0]+t*(ln[i][0]-ln[i-1][0]), ln[i-1][1]+t*(ln[i][1]-ln[i-1][1]))
		}
		acc += seg
	}
	p := ln[len(ln)-1]
	return c.l.ToPixel(p[0], p[1])
}

// compass names the 16-point compass direction of an azimuth.
func compass(az float64) string {
	pts := []string{"N", "NNE", "NE", "ENE", "E", "ESE", "SE", "SSE", "S", "SSW", "SW", "WSW", "W", "WNW", "NW", "NNW"}
	return pts[int(math.Round(az/22.5))%16]
}

// structureEntries are the legend lines of the depth structure: the
// contour line with its interval, and the down-dip arrow with the mean
// dip (or the mean dip alone when the depth has no single direction).
func (c *mapCanvas) structureEntries() []legendEntry {
	st := c.s.Depth
	if st == nil {
		return nil
	}
	s := c.l.S
	var es []legendEntry
	if len(st.Contours) > 0 {
		lab := fmt.Sprintf("Depth contour, every %s %s", FormatNumber(st.Interval, decimalsFor(st.Interval)), c.s.LengthUnit)
		es = append(es, legendEntry{lab, func(x, y float64) {
			if c.dark {
				c.swatch(x, y, colCanvas, false)
			}
			c.dc.SetColor(c.contourColour())
			c.dc.SetLineWidth(math.Max(0.8, 1.2*s))
			c.dc.MoveTo(x-14*s, y+4*s)
			c.dc.QuadraticTo(x, y-8*s, x+14*s, y+2*s)
			c.dc.Stroke()
		}})
	}
	dip := FormatNumber(st.DipDegrees, 1) + "°"
	if !st.HasDirection {
		es = append(es, legendEntry{"Mean dip " + dip + ", no single direction", func(x, y float64) {}})
		return es
	}
	az := math.Round(st.DipAzimuth)
	lab := fmt.Sprintf("Down dip %s toward %03.0f° (%s)", dip, math.Mod(az, 360), compass(st.DipAzimuth))
	es = append(es, legendEntry{lab, func(x, y float64) { c.dipArrow(x, y, st.DipAzimuth, 15*s) }})
	return es
}

// dipArrow draws an arrow centred at (x, y) pointing to the compass
// azimuth az (degrees clockwise from north, north up), of half-length r.
func (c *mapCanvas) dipArrow(x, y, az, r float64) {
	dc := c.dc
	a := az * math.Pi / 180
	ux, uy := math.Sin(a), -math.Cos(a)
	tx, ty := x+ux*r, y+uy*r
	head := 0.55 * r
	dc.SetColor(colInk) // the legend panel is light on every map
	dc.SetLineWidth(math.Max(1.2, 2.4*c.l.S))
	dc.SetLineCapRound()
	dc.DrawLine(x-ux*r, y-uy*r, tx-ux*head*0.6, ty-uy*head*0.6)
	dc.Stroke()
	px, py := -uy, ux
	dc.MoveTo(tx, ty)
	dc.LineTo(tx-ux*head+px*head*0.55, ty-uy*head+py*head*0.55)
	dc.LineTo(tx-ux*head-px*head*0.55, ty-uy*head-py*head*0.55)
	dc.ClosePath()
	dc.Fill()
}

// gravityRows are the report's summary lines of a case with depth: the
// gravity number and the dip range (summary.json "gravity"); none
// without depth.
func gravityRows(s *runfolder.Summary) []kv {
	gr := s.Gravity
	if gr == nil {
		return nil
	}
	ng := "not defined (no rate-controlled injector open at the start)"
	if gr.GravityNumber != nil && !math.IsNaN(*gr.GravityNumber) {
		ng = FormatNumber(*gr.GravityNumber, 3)
		if *gr.GravityNumber > 0 && *gr.GravityNumber < 0.001 {
			ng = fmtSci(*gr.GravityNumber)
		}
	}
	dens := "lb/ft3"
	if s.Units == "metric" {
		dens = "kg/m3"
	}
	return []kv{
		{"Gravity number", ng},
		{"Dip", FormatNumber(float64(gr.DipMinDegrees), 1) + "° to " + FormatNumber(float64(gr.DipMaxDegrees), 1) + "°"},
		{"Water and oil densities", FormatNumber(float64(gr.WaterDensity), 1) + " and " + FormatNumber(float64(gr.OilDensity), 1) + " " + dens},
	}
}

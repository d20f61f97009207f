package render

import (
	"floodtrace/runfolder"

	"bytes"
	"fmt"
	"image"
	"image/color"
	"image/gif"
	"math"

	"floodtrace/internal/parallel"
)

// animationPalette returns the fixed 256-colour palette of the saturation
// animation: the layout colours, a grey ramp, tints of the well colours,
// and the rest sampled evenly from the colour map. It depends only on the
// colour map, so every animation's bytes are reproducible.
func animationPalette(cm Colormap) color.Palette {
	var p color.Palette
	add := func(c color.RGBA) { p = append(p, c) }
	for _, c := range []color.RGBA{colPage, colInk, colInkSoft, colRule, colInactive, colNoData, colNoDataHat,
		colFault, colInjector, colProducer, colWarn} {
		add(c)
	}
	for i := range 16 {
		v := uint8(i * 17)
		add(color.RGBA{v, v, v, 255})
	}
	for _, base := range []color.RGBA{colInjector, colProducer} {
		for _, t := range []float64{0.25, 0.5, 0.75} {
			add(mixOklab(base, colWhite, t))
		}
	}
	n := 256 - len(p)
	for i := range n {
		add(cm.Entry(int(math.Round(float64(i) * float64(cm.Len()-1) / float64(n-1)))))
	}
	return p
}

// quantizer maps colours to the nearest palette entry (Euclidean in sRGB),
// cached on a 6-bit-per-channel table filled as colours are met.
type quantizer struct {
	pal   color.Palette
	rgb   [][3]int32
	cache []int16
}

func newQuantizer(p color.Palette) *quantizer {
	q := &quantizer{pal: p, rgb: make([][3]int32, len(p)), cache: make([]int16, 1<<18)}
	for i, c := range p {
		r, g, b, _ := c.RGBA()
		q.rgb[i] = [3]int32{int32(r >> 8), int32(g >> 8), int32(b >> 8)}
	}
	for i := range q.cache {
		q.cache[i] = -1
	}
	return q
}

func (q *quantizer) index(r, g, b uint8) uint8 {
	key := int(r>>2)<<12 | int(g>>2)<<6 | int(b>>2)
	if v := q.cache[key]; v >= 0 {
		return uint8(v)
	}
	// Nearest to the centre of the bin.
	cr, cg, cb := int32(r&^3)+2, int32(g&^3)+2, int32(b&^3)+2
	best, bestD := 0, int32(math.MaxInt32)
	for i, c := range q.rgb {
		dr, dg, db := c[0]-cr, c[1]-cg, c[2]-cb
		if d := dr*dr + dg*dg + db*db; d < bestD {
			best, bestD = i, d
		}
	}
	q.cache[key] = int16(best)
	return uint8(best)
}

func (q *quantizer) convert(img *image.RGBA) *image.Paletted {
	b := img.Bounds()
	out := image.NewPaletted(b, q.pal)
	for y := b.Min.Y; y < b.Max.Y; y++ {
		src := img.Pix[img.PixOffset(b.Min.X, y):][:4*b.Dx()]
		dst := out.Pix[out.PixOffset(b.Min.X, y):][:b.Dx()]
		// Runs of one colour (cells, page, legend) reuse the last index.
		lr, lg, lb := src[0]+1, src[1], src[2] // differs from the first pixel
		var li uint8
		for x := range dst {
			p := src[4*x : 4*x+3]
			if p[0] != lr || p[1] != lg || p[2] != lb {
				lr, lg, lb = p[0], p[1], p[2]
				li = q.index(lr, lg, lb)
			}
			dst[x] = li
		}
	}
	return out
}

// pickFrames returns n indices spread evenly over 0..total-1 (first and
// last included); n <= 0 or n >= total gives all.
func pickFrames(total, n int) []int {
	if n <= 0 || n >= total {
		out := make([]int, total)
		for i := range out {
			out[i] = i
		}
		return out
	}
	if n == 1 {
		return []int{total - 1}
	}
	out := make([]int, 0, n)
	for i := range n {
		k := int(math.Round(float64(i) * float64(total-1) / float64(n-1)))
		if len(out) == 0 || out[len(out)-1] != k {
			out = append(out, k)
		}
	}
	return out
}

// animation writes saturation.gif from frames/saturation_<day>.asc (or
// the snapshots when the run saved no frame).
func (r *run) animation() error {
	if r.opt.Frames < 0 {
		r.rep.note("frames: none: no animation")
		return nil
	}
	files := r.frameFiles()
	if len(files) == 0 {
		files = r.snapshotFiles()
	}
	if len(files) == 0 {
		r.rep.note("no saturation frame: no animation")
		return nil
	}
	idx := pickFrames(len(files), r.opt.Frames)
	paths := make([]string, len(idx))
	subs := make([]string, len(idx))
	for n, i := range idx {
		f := files[i]
		paths[n], subs[n] = f.Path, "Water saturation · "+r.timeLabel(f.Day)
	}
	s, sc, w, h := r.scene, r.satSc, r.opt.GIFWidth, r.opt.GIFHeight
	draw := func() ([]byte, error) { return encodeAnimation(s, sc, paths, subs, w, h) }
	r.pics = append(r.pics, picture{kind: animationPicture, rel: runfolder.AnimationFile, draw: draw})
	return nil
}

// encodeAnimation draws the saturation frames read from paths (with their
// subtitles) as a looping GIF of w x h on the fixed palette. The frames
// are drawn on up to GOMAXPROCS goroutines, each with its own quantizer
// and font faces; every frame depends only on its own file, so the bytes
// do not depend on the core count.
//
// What does not change from frame to frame (the page, title, legend,
// outline, faults, wells and their labels) is drawn once, into a layer
// whose map area is transparent (see fieldLayer); each frame fills the
// cells, lays the layer over them and writes its subtitle. A scale with
// no bounds (the frames then set them) draws every frame in full.
func encodeAnimation(s Scene, sc Scale, paths, subs []string, w, h int) ([]byte, error) {
	n := len(paths)
	pal := animationPalette(SaturationColors)
	anim := &gif.GIF{LoopCount: 0, Image: make([]*image.Paletted, n), Delay: make([]int, n), Disposal: make([]byte, n)}
	vals := make([][]float64, n)
	errs := make([]error, n)
	workers := parallel.Workers(0)
	parallel.Each(n, workers, 1, func(_, i int) {
		vals[i], errs[i] = readASC(paths[i], s.Grid)
	})
	if err := firstError(errs); err != nil {
		return nil, err
	}
	var layers [2]*image.RGBA // by whether the frame has no-value cells
	layered := !(sc.Min == 0 && sc.Max == 0)
	if layered {
		var err error
		if sc, err = sc.Resolve(vals[0], s.Active); err != nil {
			return nil, fmt.Errorf("render: %s: %w", paths[0], err)
		}
		for i := range n {
			if len(vals[i]) != s.Grid.N() {
				return nil, fmt.Errorf("render: %s: %d values for a %dx%d grid", paths[i], len(vals[i]), s.Grid.NX, s.Grid.NY)
			}
			nd := 0
			if hasNoData(s, vals[i]) {
				nd = 1
			}
			if layers[nd] == nil {
				if layers[nd], err = fieldLayer(s, sc, nd == 1, w, h); err != nil {
					return nil, fmt.Errorf("render: %s: %w", paths[i], err)
				}
			}
		}
	}
	qs := make([]*quantizer, workers)
	fs := make([]*faces, workers)
	parallel.Each(n, workers, 1, func(wk, i int) {
		if qs[wk] == nil {
			qs[wk], fs[wk] = newQuantizer(pal), newFaces()
		}
		fsc := s
		fsc.Subtitle = subs[i]
		var img *image.RGBA
		var err error
		if layered {
			nd := 0
			if hasNoData(s, vals[i]) {
				nd = 1
			}
			img, err = layeredFrame(fsc, vals[i], sc, layers[nd], fs[wk])
		} else {
			img, err = DrawField(fsc, vals[i], sc, w, h)
		}
		if err != nil {
			errs[i] = fmt.Errorf("render: %s: %w", paths[i], err)
			return
		}
		anim.Image[i] = qs[wk].convert(img)
		recycle(img)
		anim.Delay[i] = 35
		if i == n-1 {
			anim.Delay[i] = 300 // hold the last frame
		}
		anim.Disposal[i] = gif.DisposalNone
	})
	if err := firstError(errs); err != nil {
		return nil, err
	}
	var b bytes.Buffer
	if err := gif.EncodeAll(&b, anim); err != nil {
		return nil, fmt.Errorf("render: encoding saturation.gif: %w", err)
	}
	return b.Bytes(), nil
}

// firstError returns the first non-nil error of errs.
func firstError(errs []error) error {
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return nil
}

// fieldLayer draws a field map of s on sc without its cells and
// subtitle: the map area is left transparent, and what is drawn over it
// (outline, faults, wells, labels) is kept as premultiplied colour for
// layeredFrame to lay over the cells.
func fieldLayer(s Scene, sc Scale, noData bool, w, h int) (*image.RGBA, error) {
	s.Subtitle = ""
	c, err := newMapCanvas(s, w, h)
	if err != nil {
		return nil, err
	}
	r := c.l.Map
	for y := r.Min.Y; y < r.Max.Y; y++ {
		clear(c.img.Pix[c.img.PixOffset(r.Min.X, y):c.img.PixOffset(r.Max.X, y)])
	}
	c.fieldDecoration(sc, nil, noData)
	return c.img, nil
}

// layeredFrame draws the map of values on a copy of layer (fieldLayer of
// the same scene and scale): the cells fill the map area under the layer,
// then the subtitle of s is written. The result is the picture DrawField
// draws, but for rounding in the antialiased edges over the map (the
// layer is blended once, not stroke by stroke).
func layeredFrame(s Scene, values []float64, sc Scale, layer *image.RGBA, f *faces) (*image.RGBA, error) {
	l, err := NewLayout(s.Grid, layer.Rect.Dx(), layer.Rect.Dy())
	if err != nil {
		return nil, err
	}
	img := &image.RGBA{Pix: pixels(len(layer.Pix)), Stride: layer.Stride, Rect: layer.Rect}
	copy(img.Pix, layer.Pix)
	c := &mapCanvas{img: img, l: l, f: f, s: s}
	c.fillCells(cellColours(s, values, sc))
	r := l.Map
	for y := r.Min.Y; y < r.Max.Y; y++ {
		lo, hi := img.PixOffset(r.Min.X, y), img.PixOffset(r.Max.X, y)
		src, dst := layer.Pix[lo:hi], img.Pix[lo:hi]
		for i := 0; i < len(src); i += 4 {
			a := uint32(src[i+3])
			if a == 0 {
				continue
			}
			// Porter-Duff "over" in 16 bits, as image/draw does.
			k := 0xffff - a*0x101
			for j := range 3 {
				dst[i+j] = uint8((uint32(dst[i+j])*0x101*k/0xffff + uint32(src[i+j])*0x101) >> 8)
			}
			dst[i+3] = 255
		}
	}
	c.subtitle()
	return img, nil
}

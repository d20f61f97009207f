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
		src := img.Pix[img.PixOffset(b.Min.X, y):]
		dst := out.Pix[out.PixOffset(b.Min.X, y):]
		for x := 0; x < b.Dx(); x++ {
			dst[x] = q.index(src[4*x], src[4*x+1], src[4*x+2])
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
	type frame struct{ path, subtitle string }
	frames := make([]frame, len(idx))
	for n, i := range idx {
		f := files[i]
		frames[n] = frame{f.Path, "Water saturation · " + timeLabel(f.Day, r.pviAt(f.Day))}
	}
	s, sc, w, h := r.scene, r.satSc, r.opt.GIFWidth, r.opt.GIFHeight
	draw := func() ([]byte, error) {
		pal := animationPalette(SaturationColors)
		anim := &gif.GIF{LoopCount: 0, Image: make([]*image.Paletted, len(frames)),
			Delay: make([]int, len(frames)), Disposal: make([]byte, len(frames))}
		errs := make([]error, len(frames))
		qs := make([]*quantizer, parallel.Workers(0))
		parallel.Each(len(frames), len(qs), 1, func(wk, n int) {
			if qs[wk] == nil {
				qs[wk] = newQuantizer(pal)
			}
			v, err := readASC(frames[n].path, s.Grid)
			if err != nil {
				errs[n] = err
				return
			}
			fs := s
			fs.Subtitle = frames[n].subtitle
			img, err := DrawField(fs, v, sc, w, h)
			if err != nil {
				errs[n] = fmt.Errorf("render: %s: %w", frames[n].path, err)
				return
			}
			anim.Image[n] = qs[wk].convert(img)
			anim.Delay[n] = 35
			if n == len(frames)-1 {
				anim.Delay[n] = 300 // hold the last frame
			}
			anim.Disposal[n] = gif.DisposalNone
		})
		for _, err := range errs {
			if err != nil {
				return nil, err
			}
		}
		var b bytes.Buffer
		if err := gif.EncodeAll(&b, anim); err != nil {
			return nil, fmt.Errorf("render: encoding saturation.gif: %w", err)
		}
		return b.Bytes(), nil
	}
	r.pics = append(r.pics, picture{kind: animationPicture, rel: runfolder.AnimationFile, draw: draw})
	return nil
}

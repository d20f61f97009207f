package render

import (
	"fmt"
	"math"
	"sync"

	"github.com/golang/freetype/truetype"
	"golang.org/x/image/font"
	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/goitalic"
	"golang.org/x/image/font/gofont/goregular"
)

// fontStyle selects one of the Go fonts.
type fontStyle int

const (
	regular fontStyle = iota
	bold
	italic
)

var (
	fontOnce   sync.Once
	fontParsed [3]*truetype.Font
	fontErr    error
)

func parsedFont(st fontStyle) (*truetype.Font, error) {
	fontOnce.Do(func() {
		for i, ttf := range [][]byte{goregular.TTF, gobold.TTF, goitalic.TTF} {
			f, err := truetype.Parse(ttf)
			if err != nil {
				fontErr = fmt.Errorf("render: parsing built-in Go font %d: %w", i, err)
				return
			}
			fontParsed[i] = f
		}
	})
	if fontErr != nil {
		return nil, fontErr
	}
	return fontParsed[st], nil
}

// faces hands out font faces by style and pixel size. A truetype face
// caches glyphs and is not safe for concurrent use, so each drawing keeps
// its own faces.
type faces struct {
	m map[[2]int]font.Face
}

func newFaces() *faces { return &faces{m: make(map[[2]int]font.Face)} }

// get returns a face of the style at size px (pixels, at 72 dpi so points
// equal pixels), rounded to a quarter pixel and at least 7 px.
func (f *faces) get(st fontStyle, px float64) font.Face {
	px = math.Max(7, px)
	key := [2]int{int(st), int(math.Round(px * 4))}
	if fc, ok := f.m[key]; ok {
		return fc
	}
	tf, err := parsedFont(st)
	if err != nil {
		// The fonts are compiled into the binary; failing to parse them
		// is a build defect, not an input error.
		panic(err)
	}
	// A picture sets a few dozen distinct glyphs per face: 64 cache entries
	// (the default 512 cost 7 MB of masks a picture, each one drawn anew).
	fc := truetype.NewFace(tf, &truetype.Options{Size: float64(key[1]) / 4, DPI: 72, Hinting: font.HintingNone, GlyphCacheEntries: 64})
	f.m[key] = fc
	return fc
}

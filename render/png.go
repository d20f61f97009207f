package render

import (
	"bytes"
	"compress/zlib"
	"encoding/binary"
	"hash/crc32"
	"image"
	"io"
)

// writePNG encodes img as a PNG for the run's pictures. An *image.RGBA
// (every map and chart) takes the fast path of encodeRGBA; any other
// image goes through image/png.
func writePNG(w io.Writer, img image.Image) error {
	if m, ok := img.(*image.RGBA); ok {
		return encodeRGBA(w, m)
	}
	return pngEncoder.Encode(w, img)
}

// encodeRGBA writes m as an 8-bit PNG: RGB when every pixel is opaque,
// RGBA (straight alpha) otherwise. image/png tries the five row filters
// on every row and keeps the one of smallest absolute sum, which costs
// more than the compression on a 1920x1080 map; here a row that repeats
// the row above is filtered "up" (all zeros), any other row "sub" (the
// difference to the pixel on the left: zero along the flat runs of cells,
// backgrounds and lines that make up a map or chart). The compression is
// zlib's fastest level, as pngEncoder's.
func encodeRGBA(w io.Writer, m *image.RGBA) error {
	b := m.Bounds()
	wd, ht := b.Dx(), b.Dy()
	opaque := true
	for y := b.Min.Y; y < b.Max.Y && opaque; y++ {
		row := m.Pix[m.PixOffset(b.Min.X, y):][:4*wd]
		for i := 3; i < len(row); i += 4 {
			if row[i] != 255 {
				opaque = false
				break
			}
		}
	}
	bpp, ctype := 3, byte(2)
	if !opaque {
		bpp, ctype = 4, 6
	}
	var hdr [13]byte
	binary.BigEndian.PutUint32(hdr[0:], uint32(wd))
	binary.BigEndian.PutUint32(hdr[4:], uint32(ht))
	hdr[8], hdr[9] = 8, ctype // bit depth, colour type; compression, filter, interlace 0

	var idat bytes.Buffer
	zw, err := zlib.NewWriterLevel(&idat, zlib.BestSpeed)
	if err != nil {
		return err
	}
	n := bpp * wd
	cur, out := make([]byte, n), make([]byte, n+1)
	var prevSrc []byte
	for y := range ht {
		src := m.Pix[m.PixOffset(b.Min.X, b.Min.Y+y):][:4*wd]
		switch {
		case prevSrc != nil && bytes.Equal(src, prevSrc):
			out[0] = 2 // up: the row repeats the row above, all zeros
			clear(out[1:])
		case opaque:
			// Sub, straight from the RGBA row.
			out[0] = 1
			o := out[1:]
			o[0], o[1], o[2] = src[0], src[1], src[2]
			for x := 1; x < wd; x++ {
				p, q := src[4*x:4*x+3], src[4*x-4:4*x-1]
				d := o[3*x : 3*x+3]
				d[0], d[1], d[2] = p[0]-q[0], p[1]-q[1], p[2]-q[2]
			}
		default:
			for x := range wd {
				// Unpremultiply, as image/png does for *image.RGBA.
				p := src[4*x : 4*x+4]
				c := cur[4*x : 4*x+4]
				switch a := uint32(p[3]); a {
				case 0:
					c[0], c[1], c[2], c[3] = 0, 0, 0, 0
				case 255:
					copy(c, p)
				default:
					const k = 0x101 * 0xffff
					a *= 0x101
					c[0] = uint8((uint32(p[0]) * k / a) >> 8)
					c[1] = uint8((uint32(p[1]) * k / a) >> 8)
					c[2] = uint8((uint32(p[2]) * k / a) >> 8)
					c[3] = p[3]
				}
			}
			out[0] = 1 // sub
			copy(out[1:5], cur[:4])
			for i := 4; i < n; i++ {
				out[1+i] = cur[i] - cur[i-4]
			}
		}
		if _, err := zw.Write(out); err != nil {
			return err
		}
		prevSrc = src
	}
	if err := zw.Close(); err != nil {
		return err
	}
	bw := &pngWriter{w: w}
	bw.raw([]byte("\x89PNG\r\n\x1a\n"))
	bw.chunk("IHDR", hdr[:])
	bw.chunk("IDAT", idat.Bytes())
	bw.chunk("IEND", nil)
	return bw.err
}

// pngWriter writes PNG chunks, keeping the first error.
type pngWriter struct {
	w   io.Writer
	err error
}

func (p *pngWriter) raw(b []byte) {
	if p.err == nil {
		_, p.err = p.w.Write(b)
	}
}

func (p *pngWriter) chunk(typ string, data []byte) {
	var h [8]byte
	binary.BigEndian.PutUint32(h[:4], uint32(len(data)))
	copy(h[4:], typ)
	crc := crc32.NewIEEE()
	crc.Write(h[4:])
	crc.Write(data)
	var t [4]byte
	binary.BigEndian.PutUint32(t[:], crc.Sum32())
	p.raw(h[:])
	p.raw(data)
	p.raw(t[:])
}

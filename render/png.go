package render

import (
	"bytes"
	"compress/flate"
	"encoding/binary"
	"hash/adler32"
	"hash/crc32"
	"image"
	"io"
	"runtime"

	"floodtrace/internal/parallel"
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

	// The rows are filtered and compressed in strips of stripRows, on up
	// to GOMAXPROCS goroutines: each strip is a run of deflate blocks of
	// its own (no match reaches back into the strip before), ended by a
	// sync flush so that the strips join into one zlib stream (RFC 1950,
	// RFC 1951 section 3.2.3); the Adler-32 checksums of the strips are
	// combined. The strips depend on the picture's height only, so the
	// bytes do not depend on the core count.
	n := bpp * wd
	ns := max(1, (ht+stripRows-1)/stripRows)
	strips := make([]bytes.Buffer, ns)
	sums := make([]uint32, ns)
	errs := make([]error, ns)
	workers := min(ns, runtime.GOMAXPROCS(0))
	scratch := make([]pngStrip, workers)
	parallel.Each(ns, workers, 1, func(w, k int) {
		st := &scratch[w]
		if st.zw == nil {
			var err error
			if st.zw, err = flate.NewWriter(&strips[k], flate.BestSpeed); err != nil {
				errs[k] = err
				return
			}
			st.cur, st.out = make([]byte, n), make([]byte, n+1)
		} else {
			st.zw.Reset(&strips[k])
		}
		cur, out := st.cur, st.out
		ad := adler32.New()
		var prevSrc []byte
		y0 := k * stripRows
		if y0 > 0 {
			prevSrc = m.Pix[m.PixOffset(b.Min.X, b.Min.Y+y0-1):][:4*wd]
		}
		for y := y0; y < min(ht, y0+stripRows); y++ {
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
			ad.Write(out)
			if _, err := st.zw.Write(out); err != nil {
				errs[k] = err
				return
			}
			prevSrc = src
		}
		if k == ns-1 {
			errs[k] = st.zw.Close()
		} else {
			errs[k] = st.zw.Flush()
		}
		sums[k] = ad.Sum32()
	})
	var idat bytes.Buffer
	idat.Write([]byte{0x78, 0x01}) // zlib header: deflate, 32 KiB window, fastest level
	sum := uint32(1)
	for k := range strips {
		if errs[k] != nil {
			return errs[k]
		}
		idat.Write(strips[k].Bytes())
		sum = adler32Combine(sum, sums[k], int64(min(ht, (k+1)*stripRows)-k*stripRows)*int64(n+1))
	}
	var tail [4]byte
	binary.BigEndian.PutUint32(tail[:], sum)
	idat.Write(tail[:])
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

// stripRows is the height of the strips encodeRGBA compresses in
// parallel: 9 strips for a 1080-row picture. Each strip costs a sync
// flush and the matches it cannot take from the strip above, about 0.1%
// of a map's file size.
const stripRows = 128

// pngStrip is the scratch space of one goroutine of encodeRGBA.
type pngStrip struct {
	zw       *flate.Writer
	cur, out []byte
}

// adler32Combine returns the Adler-32 checksum of A followed by B from
// the checksums a of A and b of B and the length of B, as zlib's
// adler32_combine does (RFC 1950 section 8.2: the checksum is the pair of
// sums s1 = 1 + sum of bytes and s2 = sum of the s1 values, modulo 65521).
func adler32Combine(a, b uint32, lenB int64) uint32 {
	const mod = 65521
	rem := uint32(lenB % mod)
	s1 := a & 0xffff
	s2 := rem * s1 % mod
	s1 += (b & 0xffff) + mod - 1
	s2 += (a >> 16) + (b >> 16) + mod - rem
	if s1 >= mod {
		s1 -= mod
	}
	if s1 >= mod {
		s1 -= mod
	}
	if s2 >= 2*mod {
		s2 -= 2 * mod
	}
	if s2 >= mod {
		s2 -= mod
	}
	return s2<<16 | s1
}

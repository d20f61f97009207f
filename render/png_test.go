package render

import (
	"bytes"
	"hash/adler32"
	"image"
	"image/color"
	"image/png"
	"runtime"
	"testing"
)

// TestEncodeRGBARoundTrip checks the run's PNG encoder against the
// standard library's decoder (PNG specification, W3C 2003): the decoded
// picture has the same pixels, for an opaque picture (written as RGB),
// one with translucent and transparent pixels (RGBA, straight alpha, as
// image/png writes it) and a picture whose bounds do not start at 0.
func TestEncodeRGBARoundTrip(t *testing.T) {
	pattern := func(r image.Rectangle, alpha func(x, y int) uint8) *image.RGBA {
		m := image.NewRGBA(r)
		for y := r.Min.Y; y < r.Max.Y; y++ {
			for x := r.Min.X; x < r.Max.X; x++ {
				a := alpha(x, y)
				// Rows repeat in pairs (the "up" filter) and runs of 3 pixels
				// share a colour (the "sub" filter).
				c := color.NRGBA{uint8(x / 3 * 37), uint8(y / 2 * 11), uint8((x/3 + y/2) * 5), a}
				m.Set(x, y, c)
			}
		}
		return m
	}
	for _, tc := range []struct {
		name string
		img  *image.RGBA
	}{
		{"opaque", pattern(image.Rect(0, 0, 37, 20), func(x, y int) uint8 { return 255 })},
		{"translucent", pattern(image.Rect(0, 0, 23, 17), func(x, y int) uint8 { return uint8((x * 29) % 256) })},
		{"offset", pattern(image.Rect(5, 7, 30, 19), func(x, y int) uint8 { return 255 })},
		// Taller than a strip: three strips joined, the last one short.
		{"strips", pattern(image.Rect(0, 0, 41, 2*stripRows+37), func(x, y int) uint8 { return 255 })},
		{"strips translucent", pattern(image.Rect(0, 3, 19, 3+stripRows+1), func(x, y int) uint8 { return uint8(255 - y%7) })},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var b bytes.Buffer
			if err := writePNG(&b, tc.img); err != nil {
				t.Fatal(err)
			}
			got, err := png.Decode(&b)
			if err != nil {
				t.Fatal(err)
			}
			var want bytes.Buffer
			if err := png.Encode(&want, tc.img); err != nil {
				t.Fatal(err)
			}
			ref, err := png.Decode(&want)
			if err != nil {
				t.Fatal(err)
			}
			r := tc.img.Bounds()
			if got.Bounds().Dx() != r.Dx() || got.Bounds().Dy() != r.Dy() {
				t.Fatalf("decoded %v, want %v", got.Bounds(), r)
			}
			if got.ColorModel() != ref.ColorModel() {
				t.Errorf("colour model differs from image/png's")
			}
			for y := range r.Dy() {
				for x := range r.Dx() {
					g := got.At(got.Bounds().Min.X+x, got.Bounds().Min.Y+y)
					w := ref.At(ref.Bounds().Min.X+x, ref.Bounds().Min.Y+y)
					if g != w {
						t.Fatalf("pixel (%d,%d): %v, image/png gives %v", x, y, g, w)
					}
				}
			}
		})
	}
}

// TestAdler32Combine checks the combination of two checksums against
// hash/adler32 over the joined bytes (RFC 1950), for lengths around the
// modulus 65521 and data of all 0xff (the largest sums).
func TestAdler32Combine(t *testing.T) {
	for _, tc := range []struct{ na, nb int }{{0, 0}, {0, 5}, {7, 0}, {1, 1}, {1000, 65520}, {65521, 65521}, {300000, 70000}} {
		for _, fill := range []byte{0x00, 0x5a, 0xff} {
			a := bytes.Repeat([]byte{fill}, tc.na)
			b := make([]byte, tc.nb)
			for i := range b {
				b[i] = fill ^ byte(i*31)
			}
			got := adler32Combine(adler32.Checksum(a), adler32.Checksum(b), int64(len(b)))
			if want := adler32.Checksum(append(a, b...)); got != want {
				t.Errorf("%d+%d bytes of %#x: combined %#08x, want %#08x", tc.na, tc.nb, fill, got, want)
			}
		}
	}
}

// TestEncodeRGBACoreCount: the strips are fixed by the picture's height,
// so the bytes of a PNG are the same on 1, 2 and 8 cores.
func TestEncodeRGBACoreCount(t *testing.T) {
	m := image.NewRGBA(image.Rect(0, 0, 97, 5*stripRows+11))
	for i := range m.Pix {
		m.Pix[i] = uint8(i * 7 / 13)
	}
	for i := 3; i < len(m.Pix); i += 4 {
		m.Pix[i] = 255
	}
	prev := runtime.GOMAXPROCS(0)
	defer runtime.GOMAXPROCS(prev)
	var ref []byte
	for _, procs := range []int{1, 2, 8} {
		runtime.GOMAXPROCS(procs)
		var b bytes.Buffer
		if err := writePNG(&b, m); err != nil {
			t.Fatal(err)
		}
		if ref == nil {
			ref = b.Bytes()
		} else if !bytes.Equal(b.Bytes(), ref) {
			t.Errorf("GOMAXPROCS=%d: %d bytes differ from the 1-core encoding (%d bytes)", procs, b.Len(), len(ref))
		}
	}
}

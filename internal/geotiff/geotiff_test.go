package geotiff

import (
	"bufio"
	"bytes"
	"encoding/binary"
	"errors"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// asc is a GIS ASCII raster read by a minimal parser, independent of
// package reservoir: values top row first.
type asc struct {
	nx, ny           int
	x0, y0, cell, nd float64
	vals             []float64
}

func readASC(t *testing.T, path string) asc {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var a asc
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		fl := strings.Fields(sc.Text())
		if len(fl) == 0 {
			continue
		}
		if len(fl) == 2 && fl[0][0] >= 'A' && !strings.ContainsAny(fl[0][:1], "0123456789-") {
			v, _ := strconv.ParseFloat(fl[1], 64)
			switch strings.ToLower(fl[0]) {
			case "ncols":
				a.nx = int(v)
			case "nrows":
				a.ny = int(v)
			case "xllcorner":
				a.x0 = v
			case "yllcorner":
				a.y0 = v
			case "cellsize":
				a.cell = v
			case "nodata_value":
				a.nd = v
			}
			continue
		}
		for _, s := range fl {
			v, err := strconv.ParseFloat(s, 64)
			if err != nil {
				t.Fatal(err)
			}
			a.vals = append(a.vals, v)
		}
	}
	return a
}

func readFile(t *testing.T, path string) *File {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	f, err := Parse(data, path, 1<<20)
	if err != nil {
		t.Fatal(err)
	}
	return f
}

// TestGDALFiles reads files written by GDAL's gdal_translate (GDAL 3.6,
// Debian gdal-bin; made from the .asc beside them, commands in
// testdata/README) and compares every value, bit for bit after rounding the
// ASCII value to the file's sample type, and the georeferencing.
func TestGDALFiles(t *testing.T) {
	cases := []struct {
		file, src, sample string
		epsg              int
		round             func(float64) float64
	}{
		{"float32_deflate_tiled.tif", "float.asc", "float32", 32631, func(v float64) float64 { return float64(float32(v)) }},
		{"float32_lzw_pred3_tiled.tif", "float.asc", "float32", 0, func(v float64) float64 { return float64(float32(v)) }},
		{"float64_deflate_pred3.tif", "float.asc", "float64", 0, func(v float64) float64 { return v }},
		{"int16_lzw_pred2.tif", "int16.asc", "int16", 0, func(v float64) float64 { return v }},
		{"int32_deflate_pred2.tif", "int16.asc", "int32", 0, func(v float64) float64 { return v }},
		{"uint8_none.tif", "uint8.asc", "uint8", 0, func(v float64) float64 { return v }},
	}
	for _, c := range cases {
		t.Run(c.file, func(t *testing.T) {
			a := readASC(t, filepath.Join("testdata", c.src))
			f := readFile(t, filepath.Join("testdata", c.file))
			if f.Sample != c.sample || f.EPSG != c.epsg {
				t.Errorf("sample %s EPSG %d, want %s %d", f.Sample, f.EPSG, c.sample, c.epsg)
			}
			if f.Width != a.nx || f.Height != a.ny {
				t.Fatalf("size %d x %d, want %d x %d", f.Width, f.Height, a.nx, a.ny)
			}
			want := Georef{Left: a.x0, Top: a.y0 + float64(a.ny)*a.cell, PixelWidth: a.cell, PixelHeight: a.cell}
			if f.Georef != want {
				t.Errorf("georef %+v, want %+v", f.Georef, want)
			}
			if !f.HasNoData || f.NoData != a.nd {
				t.Errorf("nodata %v %g, want %g", f.HasNoData, f.NoData, a.nd)
			}
			v, err := f.Values()
			if err != nil {
				t.Fatal(err)
			}
			for k, av := range a.vals {
				if av == a.nd {
					if !math.IsNaN(v[k]) {
						t.Errorf("pixel %d: %g, want NODATA", k, v[k])
					}
					continue
				}
				if math.Float64bits(v[k]) != math.Float64bits(c.round(av)) {
					t.Errorf("pixel %d: %v, want %v", k, v[k], c.round(av))
				}
			}
		})
	}
}

// TestBadFiles checks the refusals name the tag.
func TestBadFiles(t *testing.T) {
	for _, c := range []struct{ file, tag, msg string }{
		{"multiband.tif", "SamplesPerPixel", "2 bands"},
		{"truncated.tif", "", "truncated"},
	} {
		data, err := os.ReadFile(filepath.Join("testdata", c.file))
		if err != nil {
			t.Fatal(err)
		}
		f, err := Parse(data, c.file, 1<<20)
		if err == nil {
			_, err = f.Values()
		}
		var ge *Error
		if !errors.As(err, &ge) {
			t.Fatalf("%s: error %v, want *Error", c.file, err)
		}
		if (c.tag != "" && ge.Tag != c.tag) || !strings.Contains(ge.Msg, c.msg) || ge.File != c.file {
			t.Errorf("%s: %v; want tag %q and %q", c.file, err, c.tag, c.msg)
		}
	}
}

// build makes a little-endian, one-strip, uncompressed float64 TIFF of
// w x h with extra double-valued tags.
func build(w, h int, vals []float64, extra map[uint16][]float64, shortTags map[uint16][]uint16) []byte {
	le := binary.LittleEndian
	var pix bytes.Buffer
	for _, v := range vals {
		binary.Write(&pix, le, v)
	}
	type fld struct {
		tag, typ uint16
		n        int
		data     []byte
	}
	sh := func(v ...uint16) []byte {
		b := make([]byte, 2*len(v))
		for i, x := range v {
			le.PutUint16(b[2*i:], x)
		}
		return b
	}
	lg := func(v uint32) []byte { b := make([]byte, 4); le.PutUint32(b, v); return b }
	fs := []fld{
		{256, 4, 1, lg(uint32(w))}, {257, 4, 1, lg(uint32(h))}, {258, 3, 1, sh(64)},
		{273, 4, 1, lg(8)}, {277, 3, 1, sh(1)}, {279, 4, 1, lg(uint32(pix.Len()))}, {339, 3, 1, sh(3)},
	}
	for tag, v := range shortTags {
		fs = append(fs, fld{tag, 3, len(v), sh(v...)})
	}
	for tag, v := range extra {
		var b bytes.Buffer
		binary.Write(&b, le, v)
		fs = append(fs, fld{tag, 12, len(v), b.Bytes()})
	}
	for i := range fs {
		for j := i + 1; j < len(fs); j++ {
			if fs[j].tag < fs[i].tag {
				fs[i], fs[j] = fs[j], fs[i]
			}
		}
	}
	var out, ext bytes.Buffer
	extAt := 8 + pix.Len()
	at := make([]int, len(fs))
	for i, f := range fs {
		if len(f.data) > 4 {
			at[i] = extAt + ext.Len()
			ext.Write(f.data)
		}
	}
	out.WriteString("II")
	out.Write(sh(42))
	out.Write(lg(uint32(extAt + ext.Len())))
	out.Write(pix.Bytes())
	out.Write(ext.Bytes())
	out.Write(sh(uint16(len(fs))))
	for i, f := range fs {
		out.Write(sh(f.tag, f.typ))
		out.Write(lg(uint32(f.n)))
		v := make([]byte, 4)
		if len(f.data) > 4 {
			le.PutUint32(v, uint32(at[i]))
		} else {
			copy(v, f.data)
		}
		out.Write(v)
	}
	out.Write(lg(0))
	return out.Bytes()
}

// TestGeoreferencing checks ModelTransformation, PixelIsPoint and the
// refusals of rotation and of a missing georeferencing. Expected corners
// follow the GeoTIFF 1.0 specification (Ritter and Ruth, 1995): the tie
// point of a PixelIsPoint raster is the centre of the pixel.
func TestGeoreferencing(t *testing.T) {
	vals := []float64{1, 2, 3, 4, 5, 6}
	cases := []struct {
		name   string
		extra  map[uint16][]float64
		shorts map[uint16][]uint16
		want   Georef
		errTag string
	}{
		{"transformation", map[uint16][]float64{tagModelTransform: {20, 0, 0, 100, 0, -10, 0, 500, 0, 0, 0, 0, 0, 0, 0, 1}}, nil,
			Georef{100, 500, 20, 10}, ""},
		{"tiepoint not at origin", map[uint16][]float64{tagModelPixelScale: {20, 10, 0}, tagModelTiepoint: {1, 1, 0, 120, 490, 0}}, nil,
			Georef{100, 500, 20, 10}, ""},
		{"pixel is point", map[uint16][]float64{tagModelPixelScale: {20, 10, 0}, tagModelTiepoint: {0, 0, 0, 110, 495, 0}},
			map[uint16][]uint16{tagGeoKeyDirectory: {1, 1, 0, 1, keyGTRasterType, 0, 1, 2}}, Georef{100, 500, 20, 10}, ""},
		{"rotated", map[uint16][]float64{tagModelTransform: {20, 1, 0, 100, 0.5, -10, 0, 500, 0, 0, 0, 0, 0, 0, 0, 1}}, nil,
			Georef{}, "ModelTransformation"},
		{"south up", map[uint16][]float64{tagModelTransform: {20, 0, 0, 100, 0, 10, 0, 500, 0, 0, 0, 0, 0, 0, 0, 1}}, nil,
			Georef{}, "ModelTransformation"},
		{"no georef", nil, nil, Georef{}, "ModelPixelScale"},
		{"scale without tiepoint", map[uint16][]float64{tagModelPixelScale: {20, 10, 0}}, nil, Georef{}, "ModelTiepoint"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			f, err := Parse(build(3, 2, vals, c.extra, c.shorts), "x.tif", 100)
			if c.errTag != "" {
				var ge *Error
				if !errors.As(err, &ge) || ge.Tag != c.errTag {
					t.Fatalf("error %v, want one on %s", err, c.errTag)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if f.Georef != c.want {
				t.Errorf("georef %+v, want %+v", f.Georef, c.want)
			}
			v, err := f.Values()
			if err != nil || !equalBits(v, vals) {
				t.Errorf("values %v %v", v, err)
			}
		})
	}
}

func equalBits(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
			return false
		}
	}
	return true
}

// TestWriteRoundTrip writes an image larger than one tile and reads it
// back: float32 values bit-identical, NODATA as NaN, the georeferencing
// and EPSG code unchanged.
func TestWriteRoundTrip(t *testing.T) {
	w, h := 300, 270
	img := &Image{Width: w, Height: h, Values: make([]float64, w*h), NoData: -9999,
		Georef: Georef{Left: 431000.5, Top: 6520000.25, PixelWidth: 12.5, PixelHeight: 10}, EPSG: 32631}
	for k := range img.Values {
		img.Values[k] = float64(float32(math.Sin(float64(k)) * 1000))
	}
	img.Values[17] = math.NaN()
	var b bytes.Buffer
	if err := Write(&b, img); err != nil {
		t.Fatal(err)
	}
	f, err := Parse(b.Bytes(), "out.tif", w*h)
	if err != nil {
		t.Fatal(err)
	}
	if f.Georef != img.Georef || f.EPSG != 32631 || f.NoData != -9999 || f.Sample != "float32" {
		t.Errorf("read back %+v EPSG %d nodata %g %s", f.Georef, f.EPSG, f.NoData, f.Sample)
	}
	v, err := f.Values()
	if err != nil {
		t.Fatal(err)
	}
	if !equalBits(v, img.Values) {
		t.Error("values differ after the round trip")
	}
	var b2 bytes.Buffer
	Write(&b2, img)
	if !bytes.Equal(b.Bytes(), b2.Bytes()) {
		t.Error("two writes differ")
	}
}

// TestGDALInfoReadsOurs runs gdalinfo (GDAL, Debian gdal-bin), when
// present, on a file Write made: the geotransform, NODATA and EPSG code
// must be the ones written, and gdal_translate's ASCII copy must hold the
// same values.
func TestGDALInfoReadsOurs(t *testing.T) {
	if _, err := exec.LookPath("gdalinfo"); err != nil {
		t.Skip("gdalinfo not installed (Debian package gdal-bin)")
	}
	dir := t.TempDir()
	img := &Image{Width: 4, Height: 3, Values: []float64{1.5, 2.25, math.NaN(), 4, 5, 6, 7, 8, 9, 10, 11, 0.1}, NoData: -9999,
		Georef: Georef{Left: 1000, Top: 2030, PixelWidth: 25, PixelHeight: 10}, EPSG: 32631}
	var b bytes.Buffer
	if err := Write(&b, img); err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(dir, "o.tif")
	os.WriteFile(p, b.Bytes(), 0o644)
	out, err := exec.Command("gdalinfo", p).CombinedOutput()
	if err != nil {
		t.Fatalf("gdalinfo: %v\n%s", err, out)
	}
	s := string(out)
	for _, want := range []string{"Size is 4, 3", "Origin = (1000.000000000000000,2030.000000000000000)",
		"Pixel Size = (25.000000000000000,-10.000000000000000)", "NoData Value=-9999", `ID["EPSG",32631]`, "Type=Float32"} {
		if !strings.Contains(s, want) {
			t.Errorf("gdalinfo output lacks %q:\n%s", want, s)
		}
	}
	ascPath := filepath.Join(dir, "o.asc")
	if out, err := exec.Command("gdal_translate", "-q", "-of", "AAIGrid", p, ascPath).CombinedOutput(); err != nil {
		t.Fatalf("gdal_translate: %v\n%s", err, out)
	}
	a := readASC(t, ascPath)
	for k, v := range a.vals {
		want := img.Values[k]
		if math.IsNaN(want) {
			if v != -9999 {
				t.Errorf("pixel %d: %g, want NODATA", k, v)
			}
			continue
		}
		if float32(v) != float32(want) {
			t.Errorf("pixel %d: %g, want %g", k, v, want)
		}
	}
}

// FuzzParse feeds arbitrary bytes (seeded with the committed files) to the
// reader: it must return values or an error, never panic.
func FuzzParse(f *testing.F) {
	files, _ := filepath.Glob("testdata/*.tif")
	for _, p := range files {
		b, _ := os.ReadFile(p)
		f.Add(b)
	}
	f.Add(build(3, 2, []float64{1, 2, 3, 4, 5, 6}, map[uint16][]float64{tagModelPixelScale: {1, 1, 0}, tagModelTiepoint: {0, 0, 0, 0, 0, 0}}, nil))
	f.Fuzz(func(t *testing.T, data []byte) {
		g, err := Parse(data, "fuzz.tif", 1<<16)
		if err != nil {
			return
		}
		v, err := g.Values()
		if err == nil && len(v) != g.Width*g.Height {
			t.Fatalf("%d values for %d x %d", len(v), g.Width, g.Height)
		}
	})
}

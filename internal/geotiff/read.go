// Package geotiff reads and writes single-band GeoTIFF rasters: the subset
// of TIFF 6.0 and GeoTIFF 1.0 that property maps use. It reads 8-, 16-,
// 32- and 64-bit samples (unsigned and signed integers, IEEE floats),
// stripped or tiled, uncompressed, Deflate or LZW, with the horizontal or
// floating-point predictor; georeferencing from ModelPixelScale plus
// ModelTiepoint or from a ModelTransformation without rotation; NODATA
// from the GDAL_NODATA tag and the EPSG code from the GeoKey directory. It
// writes float32, Deflate, tiled files. What it cannot take is refused with
// an *Error naming the file and the tag.
package geotiff

import (
	"bytes"
	"compress/zlib"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"golang.org/x/image/tiff/lzw"
)

// Error is a GeoTIFF the package cannot read: File names the file, Tag the
// TIFF tag at fault ("" when none is), Msg the problem.
type Error struct {
	File string
	Tag  string
	Msg  string
	// TooLarge is set when the image has more pixels than the caller
	// allows.
	TooLarge bool
}

// Error prints "file: tag: msg" (or "file: msg" without a tag).
func (e *Error) Error() string {
	if e.Tag == "" {
		return e.File + ": " + e.Msg
	}
	return e.File + ": " + e.Tag + ": " + e.Msg
}

// Detail is the message without the file name: "tag: msg" or "msg".
func (e *Error) Detail() string {
	if e.Tag == "" {
		return e.Msg
	}
	return e.Tag + ": " + e.Msg
}

// IsTIFF reports whether data starts with a TIFF signature ("II*\0" or
// "MM\0*").
func IsTIFF(data []byte) bool {
	return len(data) >= 4 && (string(data[:4]) == "II*\x00" || string(data[:4]) == "MM\x00*")
}

// Georef places the image on the map: the upper-left corner of the
// upper-left pixel and the pixel size, both positive (rows run south).
type Georef struct {
	Left, Top               float64
	PixelWidth, PixelHeight float64
}

// File is a parsed GeoTIFF whose pixels have not yet been decoded.
type File struct {
	Name          string
	Width, Height int
	Georef        Georef
	// GeorefTag names the tags that gave Georef ("ModelPixelScale" or
	// "ModelTransformation").
	GeorefTag string
	NoData    float64
	HasNoData bool
	// EPSG is the code of ProjectedCSTypeGeoKey or GeographicTypeGeoKey
	// (0 when the file gives neither, or a user-defined one).
	EPSG int
	// Sample names the sample type: uint8, int8, uint16, int16, uint32,
	// int32, float32 or float64.
	Sample string

	data          []byte
	order         binary.ByteOrder
	bits          int
	format        int // SampleFormat: 1 unsigned, 2 signed, 3 float
	compression   int
	predictor     int
	tiled         bool
	chunkW        int // strip: image width; tile: tile width
	chunkH        int // strip: rows per strip; tile: tile length
	offsets       []uint64
	counts        []uint64
	offsetsTag    string
	bytecountsTag string
}

// TIFF tag numbers used here.
const (
	tagImageWidth       = 256
	tagImageLength      = 257
	tagBitsPerSample    = 258
	tagCompression      = 259
	tagPhotometric      = 262
	tagStripOffsets     = 273
	tagSamplesPerPixel  = 277
	tagRowsPerStrip     = 278
	tagStripByteCounts  = 279
	tagPlanarConfig     = 284
	tagPredictor        = 317
	tagTileWidth        = 322
	tagTileLength       = 323
	tagTileOffsets      = 324
	tagTileByteCounts   = 325
	tagSampleFormat     = 339
	tagModelPixelScale  = 33550
	tagModelTiepoint    = 33922
	tagModelTransform   = 34264
	tagGeoKeyDirectory  = 34735
	tagGeoDoubleParams  = 34736
	tagGeoASCIIParams   = 34737
	tagGDALNoData       = 42113
	keyGTModelType      = 1024
	keyGTRasterType     = 1025
	keyGTCitation       = 1026
	keyGeographicType   = 2048
	keyProjectedCSType  = 3072
	rasterPixelIsPoint  = 2
	userDefinedGeoKey   = 32767
	maxChunkBytes       = 1 << 28
	compressionNone     = 1
	compressionLZW      = 5
	compressionDeflate  = 8
	compressionDeflate2 = 32946
)

var tagNames = map[uint16]string{
	tagImageWidth: "ImageWidth", tagImageLength: "ImageLength", tagBitsPerSample: "BitsPerSample",
	tagCompression: "Compression", tagStripOffsets: "StripOffsets", tagSamplesPerPixel: "SamplesPerPixel",
	tagRowsPerStrip: "RowsPerStrip", tagStripByteCounts: "StripByteCounts", tagPlanarConfig: "PlanarConfiguration",
	tagPredictor: "Predictor", tagTileWidth: "TileWidth", tagTileLength: "TileLength",
	tagTileOffsets: "TileOffsets", tagTileByteCounts: "TileByteCounts", tagSampleFormat: "SampleFormat",
	tagModelPixelScale: "ModelPixelScale", tagModelTiepoint: "ModelTiepoint", tagModelTransform: "ModelTransformation",
	tagGeoKeyDirectory: "GeoKeyDirectory", tagGeoDoubleParams: "GeoDoubleParams", tagGeoASCIIParams: "GeoAsciiParams",
	tagGDALNoData: "GDAL_NODATA", tagPhotometric: "PhotometricInterpretation",
}

func tagName(t uint16) string {
	if s, ok := tagNames[t]; ok {
		return s
	}
	return "tag " + strconv.Itoa(int(t))
}

type entry struct {
	typ   uint16
	count uint64
	raw   []byte // the value bytes
}

// typeSize is the byte size of one value of a TIFF field type (0 unknown).
func typeSize(t uint16) int {
	switch t {
	case 1, 2, 6, 7:
		return 1
	case 3, 8:
		return 2
	case 4, 9, 11:
		return 4
	case 5, 10, 12:
		return 8
	}
	return 0
}

type parser struct {
	f   *File
	ifd map[uint16]entry
}

func (p *parser) fail(tag uint16, format string, a ...any) *Error {
	t := ""
	if tag != 0 {
		t = tagName(tag)
	}
	return &Error{File: p.f.Name, Tag: t, Msg: fmt.Sprintf(format, a...)}
}

// ints returns the values of an integer field (BYTE, SHORT, LONG and the
// signed ones), nil if absent.
func (p *parser) ints(tag uint16) ([]uint64, error) {
	e, ok := p.ifd[tag]
	if !ok {
		return nil, nil
	}
	out := make([]uint64, e.count)
	o := p.f.order
	for i := range out {
		switch e.typ {
		case 1, 7:
			out[i] = uint64(e.raw[i])
		case 6:
			out[i] = uint64(int64(int8(e.raw[i])))
		case 3:
			out[i] = uint64(o.Uint16(e.raw[2*i:]))
		case 8:
			out[i] = uint64(int64(int16(o.Uint16(e.raw[2*i:]))))
		case 4:
			out[i] = uint64(o.Uint32(e.raw[4*i:]))
		case 9:
			out[i] = uint64(int64(int32(o.Uint32(e.raw[4*i:]))))
		default:
			return nil, p.fail(tag, "field type %d where an integer is expected", e.typ)
		}
	}
	return out, nil
}

// one returns the single value of an integer field, or def when absent.
func (p *parser) one(tag uint16, def uint64) (uint64, error) {
	v, err := p.ints(tag)
	if err != nil {
		return 0, err
	}
	if v == nil {
		return def, nil
	}
	if len(v) == 0 {
		return 0, p.fail(tag, "has no value")
	}
	for _, x := range v[1:] {
		if x != v[0] {
			return 0, p.fail(tag, "differs between samples (%d and %d)", v[0], x)
		}
	}
	return v[0], nil
}

// doubles returns the values of a DOUBLE (or FLOAT) field, nil if absent.
func (p *parser) doubles(tag uint16) ([]float64, error) {
	e, ok := p.ifd[tag]
	if !ok {
		return nil, nil
	}
	out := make([]float64, e.count)
	for i := range out {
		switch e.typ {
		case 12:
			out[i] = math.Float64frombits(p.f.order.Uint64(e.raw[8*i:]))
		case 11:
			out[i] = float64(math.Float32frombits(p.f.order.Uint32(e.raw[4*i:])))
		default:
			return nil, p.fail(tag, "field type %d where a DOUBLE is expected", e.typ)
		}
	}
	return out, nil
}

// Parse reads the header, the first image file directory and the
// georeferencing of the GeoTIFF data; name is used in messages. Images of
// more than maxPixels pixels are refused (Error.TooLarge). The pixels are
// decoded by Values.
func Parse(data []byte, name string, maxPixels int) (*File, error) {
	f := &File{Name: name, data: data}
	p := &parser{f: f, ifd: map[uint16]entry{}}
	if len(data) < 8 {
		return nil, p.fail(0, "truncated TIFF: %d bytes, shorter than the 8-byte header", len(data))
	}
	switch string(data[:2]) {
	case "II":
		f.order = binary.LittleEndian
	case "MM":
		f.order = binary.BigEndian
	default:
		return nil, p.fail(0, "not a TIFF file (no II or MM byte order mark)")
	}
	switch f.order.Uint16(data[2:]) {
	case 42:
	case 43:
		return nil, p.fail(0, "BigTIFF is not supported; write a classic TIFF (under 4 GiB)")
	default:
		return nil, p.fail(0, "not a TIFF file (version %d, not 42)", f.order.Uint16(data[2:]))
	}
	off := uint64(f.order.Uint32(data[4:]))
	if off < 8 || off+2 > uint64(len(data)) {
		return nil, p.fail(0, "truncated TIFF: the first image directory at byte %d is past the end of the file (%d bytes)", off, len(data))
	}
	n := uint64(f.order.Uint16(data[off:]))
	if off+2+12*n > uint64(len(data)) {
		return nil, p.fail(0, "truncated TIFF: the image directory of %d entries at byte %d runs past the end of the file (%d bytes)", n, off, len(data))
	}
	for i := uint64(0); i < n; i++ {
		b := data[off+2+12*i:]
		tag, typ, count := f.order.Uint16(b), f.order.Uint16(b[2:]), uint64(f.order.Uint32(b[4:]))
		sz := uint64(typeSize(typ))
		if sz == 0 {
			continue // a field type this reader does not use
		}
		total := sz * count
		var raw []byte
		if total <= 4 {
			raw = b[8 : 8+total]
		} else {
			vo := uint64(f.order.Uint32(b[8:]))
			if vo+total > uint64(len(data)) {
				return nil, p.fail(tag, "truncated TIFF: %d values at byte %d run past the end of the file (%d bytes)", count, vo, len(data))
			}
			raw = data[vo : vo+total]
		}
		p.ifd[tag] = entry{typ: typ, count: count, raw: raw}
	}
	if err := p.image(maxPixels); err != nil {
		return nil, err
	}
	if err := p.georef(); err != nil {
		return nil, err
	}
	if err := p.geokeys(); err != nil {
		return nil, err
	}
	if e, ok := p.ifd[tagGDALNoData]; ok {
		s := strings.TrimSpace(strings.TrimRight(string(e.raw), "\x00"))
		v, err := strconv.ParseFloat(s, 64)
		if err != nil && !errors.Is(err, strconv.ErrRange) {
			return nil, p.fail(tagGDALNoData, "%q is not a number", s)
		}
		f.NoData, f.HasNoData = v, true
	}
	return f, nil
}

// image reads the layout tags.
func (p *parser) image(maxPixels int) error {
	f := p.f
	w, err := p.one(tagImageWidth, 0)
	if err != nil {
		return err
	}
	h, err := p.one(tagImageLength, 0)
	if err != nil {
		return err
	}
	if w == 0 {
		return p.fail(tagImageWidth, "missing or zero")
	}
	if h == 0 {
		return p.fail(tagImageLength, "missing or zero")
	}
	if w > 1<<31 || h > 1<<31 || w*h > uint64(maxPixels) {
		return &Error{File: f.Name, Tag: "ImageWidth", Msg: fmt.Sprintf("image of %d x %d pixels is larger than the %d cells allowed", w, h, maxPixels), TooLarge: true}
	}
	f.Width, f.Height = int(w), int(h)
	spp, err := p.one(tagSamplesPerPixel, 1)
	if err != nil {
		return err
	}
	if spp != 1 {
		return p.fail(tagSamplesPerPixel, "the image has %d bands; a map must have one (extract the band first)", spp)
	}
	bits, err := p.one(tagBitsPerSample, 1)
	if err != nil {
		return err
	}
	format, err := p.one(tagSampleFormat, 1)
	if err != nil {
		return err
	}
	f.bits, f.format = int(bits), int(format)
	switch {
	case format == 1 && (bits == 8 || bits == 16 || bits == 32):
		f.Sample = "uint" + strconv.Itoa(int(bits))
	case format == 2 && (bits == 8 || bits == 16 || bits == 32):
		f.Sample = "int" + strconv.Itoa(int(bits))
	case format == 3 && (bits == 32 || bits == 64):
		f.Sample = "float" + strconv.Itoa(int(bits))
	default:
		return p.fail(tagBitsPerSample, "%d-bit samples of SampleFormat %d are not supported (uint8, int16, int32, float32 or float64)", bits, format)
	}
	comp, err := p.one(tagCompression, compressionNone)
	if err != nil {
		return err
	}
	switch comp {
	case compressionNone, compressionLZW, compressionDeflate, compressionDeflate2:
	default:
		return p.fail(tagCompression, "compression %d is not supported (none, LZW or Deflate)", comp)
	}
	f.compression = int(comp)
	pred, err := p.one(tagPredictor, 1)
	if err != nil {
		return err
	}
	switch {
	case pred == 1 || pred == 2:
	case pred == 3 && format == 3:
	default:
		return p.fail(tagPredictor, "predictor %d is not supported for %s samples", pred, f.Sample)
	}
	f.predictor = int(pred)
	_, tiled := p.ifd[tagTileWidth]
	f.tiled = tiled
	var offTag, cntTag uint16
	if tiled {
		tw, err := p.one(tagTileWidth, 0)
		if err != nil {
			return err
		}
		th, err := p.one(tagTileLength, 0)
		if err != nil {
			return err
		}
		if tw == 0 || tw > 1<<16 {
			return p.fail(tagTileWidth, "tile width %d is not from 1 to 65536", tw)
		}
		if th == 0 || th > 1<<16 {
			return p.fail(tagTileLength, "tile length %d is not from 1 to 65536", th)
		}
		f.chunkW, f.chunkH = int(tw), int(th)
		offTag, cntTag = tagTileOffsets, tagTileByteCounts
	} else {
		rps, err := p.one(tagRowsPerStrip, h)
		if err != nil {
			return err
		}
		if rps == 0 {
			return p.fail(tagRowsPerStrip, "zero rows per strip")
		}
		f.chunkW, f.chunkH = int(w), int(min(rps, h))
		offTag, cntTag = tagStripOffsets, tagStripByteCounts
	}
	if uint64(f.chunkW)*uint64(f.chunkH)*uint64(f.bits/8) > maxChunkBytes {
		return p.fail(tagRowsPerStrip, "a strip or tile of %d x %d pixels is too large", f.chunkW, f.chunkH)
	}
	f.offsetsTag, f.bytecountsTag = tagName(offTag), tagName(cntTag)
	if f.offsets, err = p.ints(offTag); err != nil {
		return err
	}
	if f.counts, err = p.ints(cntTag); err != nil {
		return err
	}
	want := f.chunks()
	if len(f.offsets) != want {
		return p.fail(offTag, "%d values for %d chunks", len(f.offsets), want)
	}
	if len(f.counts) != want {
		return p.fail(cntTag, "%d values for %d chunks", len(f.counts), want)
	}
	return nil
}

// chunks returns the number of strips or tiles.
func (f *File) chunks() int {
	across := (f.Width + f.chunkW - 1) / f.chunkW
	down := (f.Height + f.chunkH - 1) / f.chunkH
	return across * down
}

// georef reads ModelPixelScale + ModelTiepoint or ModelTransformation.
func (p *parser) georef() error {
	f := p.f
	scale, err := p.doubles(tagModelPixelScale)
	if err != nil {
		return err
	}
	tie, err := p.doubles(tagModelTiepoint)
	if err != nil {
		return err
	}
	mt, err := p.doubles(tagModelTransform)
	if err != nil {
		return err
	}
	// The raster type shifts the tie point by half a pixel (PixelIsPoint).
	shift := 0.0
	if keys, _ := p.keyDirectory(); keys[keyGTRasterType] == rasterPixelIsPoint {
		shift = 0.5
	}
	switch {
	case mt != nil:
		if len(mt) != 16 {
			return p.fail(tagModelTransform, "%d values, not 16", len(mt))
		}
		if mt[1] != 0 || mt[4] != 0 {
			return p.fail(tagModelTransform, "the raster is rotated or sheared (terms %g and %g); resample it to a north-up grid", mt[1], mt[4])
		}
		if !(mt[0] > 0) || !(mt[5] < 0) {
			return p.fail(tagModelTransform, "pixel size %g x %g: rows must run south and columns east", mt[0], mt[5])
		}
		f.Georef = Georef{Left: mt[3] - shift*mt[0], Top: mt[7] - shift*mt[5], PixelWidth: mt[0], PixelHeight: -mt[5]}
		f.GeorefTag = "ModelTransformation"
	case scale != nil || tie != nil:
		if len(scale) < 2 {
			return p.fail(tagModelPixelScale, "missing or with %d values; a map needs ModelPixelScale and ModelTiepoint", len(scale))
		}
		if len(tie) != 6 {
			return p.fail(tagModelTiepoint, "%d values; a map needs one tie point (6 values) with ModelPixelScale", len(tie))
		}
		if !(scale[0] > 0) || !(scale[1] > 0) || math.IsInf(scale[0], 0) || math.IsInf(scale[1], 0) {
			return p.fail(tagModelPixelScale, "pixel size %g x %g must be positive and finite", scale[0], scale[1])
		}
		f.Georef = Georef{
			Left: tie[3] - (tie[0]+shift)*scale[0], Top: tie[4] + (tie[1]+shift)*scale[1],
			PixelWidth: scale[0], PixelHeight: scale[1],
		}
		f.GeorefTag = "ModelPixelScale"
	default:
		return p.fail(tagModelPixelScale, "the file is not georeferenced (no ModelPixelScale and ModelTiepoint, no ModelTransformation)")
	}
	g := f.Georef
	for _, v := range []float64{g.Left, g.Top, g.PixelWidth, g.PixelHeight} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return p.fail(tagModelTiepoint, "georeferencing is not finite")
		}
	}
	return nil
}

// keyDirectory returns the SHORT-valued GeoKeys of the directory.
func (p *parser) keyDirectory() (map[int]int, error) {
	d, err := p.ints(tagGeoKeyDirectory)
	if err != nil || d == nil {
		return nil, err
	}
	if len(d) < 4 || uint64(len(d)) < 4+4*d[3] {
		return nil, p.fail(tagGeoKeyDirectory, "%d values, too few for its header", len(d))
	}
	keys := map[int]int{}
	for i := uint64(0); i < d[3]; i++ {
		k := d[4+4*i:]
		if k[1] == 0 && k[2] == 1 { // the value is held in the entry
			keys[int(k[0])] = int(k[3])
		}
	}
	return keys, nil
}

func (p *parser) geokeys() error {
	keys, err := p.keyDirectory()
	if err != nil {
		return err
	}
	for _, k := range []int{keyProjectedCSType, keyGeographicType} {
		if c, ok := keys[k]; ok && c > 0 && c != userDefinedGeoKey {
			p.f.EPSG = c
			return nil
		}
	}
	return nil
}

// Values decodes the pixels: Width*Height values, row by row from the top
// (north) row, each row from west to east. Pixels equal to the NODATA
// value are NaN; a NaN or infinite pixel that is not NODATA is an error
// naming its row and column (from 1 at the top left).
func (f *File) Values() ([]float64, error) {
	out := make([]float64, f.Width*f.Height)
	bps := f.bits / 8
	chunkBytes := f.chunkW * f.chunkH * bps
	buf := make([]byte, chunkBytes)
	across := (f.Width + f.chunkW - 1) / f.chunkW
	nodata := f.NoData
	if f.Sample == "float32" {
		nodata = float64(float32(nodata))
	}
	for c := range f.offsets {
		x0, y0 := (c%across)*f.chunkW, (c/across)*f.chunkH
		rows := f.chunkH
		if !f.tiled {
			rows = min(f.chunkH, f.Height-y0)
		}
		need := f.chunkW * rows * bps
		if err := f.readChunk(c, buf[:need]); err != nil {
			return nil, err
		}
		f.unpredict(buf[:need], rows)
		for r := 0; r < rows && y0+r < f.Height; r++ {
			row := buf[r*f.chunkW*bps:]
			for i := 0; i < f.chunkW && x0+i < f.Width; i++ {
				v := f.sample(row[i*bps:])
				k := (y0+r)*f.Width + x0 + i
				switch {
				case f.HasNoData && (v == nodata || (math.IsNaN(v) && math.IsNaN(nodata))):
					v = math.NaN()
				case math.IsNaN(v) || math.IsInf(v, 0):
					return nil, &Error{File: f.Name, Msg: fmt.Sprintf("row %d, column %d: value %g is not finite and not the NODATA value", y0+r+1, x0+i+1, v)}
				}
				out[k] = v
			}
		}
	}
	return out, nil
}

// readChunk fills dst with the decompressed bytes of strip or tile c.
func (f *File) readChunk(c int, dst []byte) error {
	off, n := f.offsets[c], f.counts[c]
	if off > uint64(len(f.data)) || n > uint64(len(f.data))-off {
		return &Error{File: f.Name, Tag: f.offsetsTag, Msg: fmt.Sprintf("truncated TIFF: chunk %d of %d (%d bytes at byte %d) runs past the end of the file (%d bytes)", c+1, len(f.offsets), n, off, len(f.data))}
	}
	src := f.data[off : off+n]
	var r io.Reader
	switch f.compression {
	case compressionNone:
		if len(src) < len(dst) {
			return &Error{File: f.Name, Tag: f.bytecountsTag, Msg: fmt.Sprintf("chunk %d of %d holds %d bytes, %d needed", c+1, len(f.offsets), len(src), len(dst))}
		}
		copy(dst, src)
		return nil
	case compressionLZW:
		lr := lzw.NewReader(bytes.NewReader(src), lzw.MSB, 8)
		defer lr.Close()
		r = lr
	default:
		zr, err := zlib.NewReader(bytes.NewReader(src))
		if err != nil {
			return &Error{File: f.Name, Tag: "Compression", Msg: fmt.Sprintf("chunk %d of %d: Deflate data: %v", c+1, len(f.offsets), err)}
		}
		defer zr.Close()
		r = zr
	}
	if got, err := io.ReadFull(r, dst); err != nil {
		return &Error{File: f.Name, Tag: "Compression", Msg: fmt.Sprintf("chunk %d of %d decompresses to %d bytes, %d needed (%v)", c+1, len(f.offsets), got, len(dst), err)}
	}
	return nil
}

// unpredict undoes the predictor on rows of the chunk in place.
func (f *File) unpredict(b []byte, rows int) {
	bps := f.bits / 8
	w := f.chunkW
	rowBytes := w * bps
	switch f.predictor {
	case 2:
		for r := range rows {
			row := b[r*rowBytes : (r+1)*rowBytes]
			switch bps {
			case 1:
				for i := 1; i < w; i++ {
					row[i] += row[i-1]
				}
			case 2:
				for i := 1; i < w; i++ {
					f.order.PutUint16(row[2*i:], f.order.Uint16(row[2*i:])+f.order.Uint16(row[2*i-2:]))
				}
			case 4:
				for i := 1; i < w; i++ {
					f.order.PutUint32(row[4*i:], f.order.Uint32(row[4*i:])+f.order.Uint32(row[4*i-4:]))
				}
			case 8:
				for i := 1; i < w; i++ {
					f.order.PutUint64(row[8*i:], f.order.Uint64(row[8*i:])+f.order.Uint64(row[8*i-8:]))
				}
			}
		}
	case 3:
		// Floating-point predictor (Adobe Photoshop TIFF Technical Note 3):
		// bytes are differenced along the row, after being regrouped into
		// planes, most significant byte first.
		tmp := make([]byte, rowBytes)
		for r := range rows {
			row := b[r*rowBytes : (r+1)*rowBytes]
			for i := 1; i < rowBytes; i++ {
				row[i] += row[i-1]
			}
			copy(tmp, row)
			for i := range w {
				for k := range bps {
					// Store in the file's byte order so sample() reads it.
					be := tmp[k*w+i]
					if f.order == binary.BigEndian {
						row[i*bps+k] = be
					} else {
						row[i*bps+bps-1-k] = be
					}
				}
			}
		}
	}
}

// sample converts one sample at b.
func (f *File) sample(b []byte) float64 {
	o := f.order
	switch f.Sample {
	case "uint8":
		return float64(b[0])
	case "int8":
		return float64(int8(b[0]))
	case "uint16":
		return float64(o.Uint16(b))
	case "int16":
		return float64(int16(o.Uint16(b)))
	case "uint32":
		return float64(o.Uint32(b))
	case "int32":
		return float64(int32(o.Uint32(b)))
	case "float32":
		return float64(math.Float32frombits(o.Uint32(b)))
	default:
		return math.Float64frombits(o.Uint64(b))
	}
}

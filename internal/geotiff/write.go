package geotiff

import (
	"bytes"
	"compress/zlib"
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
)

// TileSize is the edge of the square tiles Write uses, in pixels.
const TileSize = 256

// Image is a raster to write: Width*Height values row by row from the top
// (north) row; NaN values are written as NoData.
type Image struct {
	Width, Height int
	Values        []float64
	Georef        Georef
	NoData        float64
	// EPSG, when positive, is written as ProjectedCSTypeGeoKey, or as
	// GeographicTypeGeoKey for a geographic code (IsGeographic).
	EPSG int
}

// IsGeographic reports whether an EPSG code names a geographic
// (latitude-longitude) coordinate system: the codes from 4000 to 4999
// (common practice; the EPSG registry numbers geographic 2D systems
// there).
func IsGeographic(epsg int) bool { return epsg >= 4000 && epsg < 5000 }

type field struct {
	tag   uint16
	typ   uint16
	count int
	data  []byte // little-endian value bytes
}

// Write writes img as a little-endian, tiled (TileSize), Deflate-compressed
// GeoTIFF of float32 samples, georeferenced by ModelPixelScale and
// ModelTiepoint (PixelIsArea), with GDAL_NODATA. The bytes depend only on
// img.
func Write(w io.Writer, img *Image) error {
	if img.Width <= 0 || img.Height <= 0 || len(img.Values) != img.Width*img.Height {
		return fmt.Errorf("geotiff: %d values for an image of %d x %d", len(img.Values), img.Width, img.Height)
	}
	if math.IsNaN(img.NoData) || math.IsInf(img.NoData, 0) {
		return fmt.Errorf("geotiff: NODATA value %g is not finite", img.NoData)
	}
	le := binary.LittleEndian
	across := (img.Width + TileSize - 1) / TileSize
	down := (img.Height + TileSize - 1) / TileSize
	nd32 := float32(img.NoData)
	tiles := make([][]byte, 0, across*down)
	raw := make([]byte, TileSize*TileSize*4)
	for ty := range down {
		for tx := range across {
			clear(raw)
			for r := range TileSize {
				y := ty*TileSize + r
				for c := range TileSize {
					x := tx*TileSize + c
					v := nd32
					if x < img.Width && y < img.Height {
						if f := img.Values[y*img.Width+x]; !math.IsNaN(f) {
							v = float32(f)
						}
					}
					le.PutUint32(raw[4*(r*TileSize+c):], math.Float32bits(v))
				}
			}
			var b bytes.Buffer
			zw, _ := zlib.NewWriterLevel(&b, zlib.DefaultCompression)
			zw.Write(raw)
			zw.Close()
			tiles = append(tiles, b.Bytes())
		}
	}
	shorts := func(v ...uint16) []byte {
		b := make([]byte, 2*len(v))
		for i, x := range v {
			le.PutUint16(b[2*i:], x)
		}
		return b
	}
	longs := func(v ...uint32) []byte {
		b := make([]byte, 4*len(v))
		for i, x := range v {
			le.PutUint32(b[4*i:], x)
		}
		return b
	}
	doubles := func(v ...float64) []byte {
		b := make([]byte, 8*len(v))
		for i, x := range v {
			le.PutUint64(b[8*i:], math.Float64bits(x))
		}
		return b
	}
	g := img.Georef
	keys := [][4]uint16{{keyGTRasterType, 0, 1, 1}} // PixelIsArea
	if img.EPSG > 0 && img.EPSG < 32767 {
		if IsGeographic(img.EPSG) {
			keys = append(keys, [4]uint16{keyGTModelType, 0, 1, 2}, [4]uint16{keyGeographicType, 0, 1, uint16(img.EPSG)})
		} else {
			keys = append(keys, [4]uint16{keyGTModelType, 0, 1, 1}, [4]uint16{keyProjectedCSType, 0, 1, uint16(img.EPSG)})
		}
	}
	sort.Slice(keys, func(i, j int) bool { return keys[i][0] < keys[j][0] })
	dir := []uint16{1, 1, 0, uint16(len(keys))}
	for _, k := range keys {
		dir = append(dir, k[:]...)
	}
	ndText := strconv.FormatFloat(float64(nd32), 'g', -1, 32) + "\x00"
	offsets := make([]uint32, len(tiles))
	counts := make([]uint32, len(tiles))
	fields := []field{
		{tagImageWidth, 4, 1, longs(uint32(img.Width))},
		{tagImageLength, 4, 1, longs(uint32(img.Height))},
		{tagBitsPerSample, 3, 1, shorts(32)},
		{tagCompression, 3, 1, shorts(compressionDeflate)},
		{tagPhotometric, 3, 1, shorts(1)}, // BlackIsZero
		{tagSamplesPerPixel, 3, 1, shorts(1)},
		{tagPlanarConfig, 3, 1, shorts(1)},
		{tagPredictor, 3, 1, shorts(1)},
		{tagTileWidth, 3, 1, shorts(TileSize)},
		{tagTileLength, 3, 1, shorts(TileSize)},
		{tagTileOffsets, 4, len(tiles), nil},
		{tagTileByteCounts, 4, len(tiles), nil},
		{tagSampleFormat, 3, 1, shorts(3)},
		{tagModelPixelScale, 12, 3, doubles(g.PixelWidth, g.PixelHeight, 0)},
		{tagModelTiepoint, 12, 6, doubles(0, 0, 0, g.Left, g.Top, 0)},
		{tagGeoKeyDirectory, 3, len(dir), shorts(dir...)},
		{tagGDALNoData, 2, len(ndText), []byte(ndText)},
	}
	// Layout: header, tiles, out-of-line field values, the directory.
	pos := uint32(8)
	for i, t := range tiles {
		offsets[i], counts[i] = pos, uint32(len(t))
		pos += uint32(len(t))
		if pos%2 == 1 {
			pos++
		}
	}
	fields[10].data = longs(offsets...)
	fields[11].data = longs(counts...)
	var extra bytes.Buffer
	extraStart := pos
	valueAt := make([]uint32, len(fields))
	for i, f := range fields {
		if len(f.data) > 4 {
			valueAt[i] = extraStart + uint32(extra.Len())
			extra.Write(f.data)
			if extra.Len()%2 == 1 {
				extra.WriteByte(0)
			}
		}
	}
	ifdAt := extraStart + uint32(extra.Len())
	if uint64(ifdAt)+uint64(2+12*len(fields)+4) > math.MaxUint32 {
		return fmt.Errorf("geotiff: image of %d x %d is too large for a classic TIFF", img.Width, img.Height)
	}
	var out bytes.Buffer
	out.WriteString("II")
	out.Write(shorts(42))
	out.Write(longs(ifdAt))
	for _, t := range tiles {
		out.Write(t)
		if out.Len()%2 == 1 {
			out.WriteByte(0)
		}
	}
	out.Write(extra.Bytes())
	out.Write(shorts(uint16(len(fields))))
	for i, f := range fields {
		out.Write(shorts(f.tag, f.typ))
		out.Write(longs(uint32(f.count)))
		if len(f.data) > 4 {
			out.Write(longs(valueAt[i]))
		} else {
			v := make([]byte, 4)
			copy(v, f.data)
			out.Write(v)
		}
	}
	out.Write(longs(0))
	_, err := w.Write(out.Bytes())
	return err
}

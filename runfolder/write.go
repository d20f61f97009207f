package runfolder

import (
	"io"
	"math"
	"strconv"

	"floodtrace/internal/parallel"
	"floodtrace/reservoir"
)

// The rasters of a run folder: GIS ASCII grids with this NODATA value and
// this many significant digits.
const (
	RasterNodata = -9999
	RasterDigits = 7
)

// WriteRaster writes the cell values v of grid g as a run-folder raster;
// inactive cells are NODATA (reservoir.WriteASCIIRasterDigits).
func WriteRaster(w io.Writer, g reservoir.Grid, v []float64, active []bool) error {
	return reservoir.WriteASCIIRasterDigits(w, g, v, active, RasterNodata, RasterDigits)
}

// Num writes a CSV number: 10 significant digits, empty for NaN.
func Num(v float64) string {
	if math.IsNaN(v) {
		return ""
	}
	return strconv.FormatFloat(v, 'g', 10, 64)
}

// AppendNum appends Num(v).
func AppendNum(buf []byte, v float64) []byte {
	if math.IsNaN(v) {
		return buf
	}
	return strconv.AppendFloat(buf, v, 'g', 10, 64)
}

// AppendJSONNum appends v as a JSON number with 8 significant digits, or
// null when it is not finite.
func AppendJSONNum(buf []byte, v float64) []byte {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return append(buf, "null"...)
	}
	return strconv.AppendFloat(buf, v, 'g', 8, 64)
}

// WriteBands formats items [0, n) in bands of per items in parallel and
// writes the bands to w in order (parallel.Bands): the bytes do not
// depend on the number of goroutines.
func WriteBands(w io.Writer, n, per int, format func(lo, hi int, buf []byte) []byte) error {
	nb := (n + per - 1) / per
	return parallel.Bands(w, nb, func(b int, buf []byte) ([]byte, error) {
		return format(b*per, min((b+1)*per, n), buf), nil
	})
}

// AppendFixed appends strconv.AppendFloat(buf, v, 'f', dec, 64) for dec
// in 0..6. Magnitudes below 1e12 take a fast path: v is scaled by 10^dec
// (one rounding, relative error below 2^-52) and rounded to nearest; a
// scaled value within that error of a half-way point goes to strconv,
// which rounds the exact binary value, as do all other values.
func AppendFixed(buf []byte, v float64, dec int) []byte {
	a := math.Abs(v)
	if dec < 0 || dec > 6 || !(a < 1e12) {
		return strconv.AppendFloat(buf, v, 'f', dec, 64)
	}
	p := 1.0
	for range dec {
		p *= 10
	}
	scaled := a * p
	fl := math.Floor(scaled)
	frac := scaled - fl
	if math.Abs(frac-0.5) <= 4e-16*scaled+1e-300 {
		return strconv.AppendFloat(buf, v, 'f', dec, 64)
	}
	m := uint64(fl)
	if frac > 0.5 {
		m++
	}
	if math.Signbit(v) {
		buf = append(buf, '-')
	}
	ip := m / uint64(p)
	buf = strconv.AppendUint(buf, ip, 10)
	if dec == 0 {
		return buf
	}
	buf = append(buf, '.')
	f := m - ip*uint64(p)
	var d [6]byte
	for i := dec - 1; i >= 0; i-- {
		d[i] = byte('0' + f%10)
		f /= 10
	}
	return append(buf, d[:dec]...)
}

package reservoir

import (
	"bytes"
	"floodtrace/internal/parallel"
	"fmt"
	"io"
	"math"
	"strconv"
)

// WriteASCIIRaster writes values on grid g as a GIS ASCII raster: the
// header (ncols, nrows, xllcorner, yllcorner, cellsize, or dx and dy when
// the cells are not square, NODATA_value), then the rows from north to
// south. Cells that are inactive (active may be nil for all active) or NaN
// are written as nodata. Values are written in the shortest form that
// reads back exactly. An active value equal to nodata, or infinite, is an
// error, as is a length that does not match the grid.
func WriteASCIIRaster(w io.Writer, g Grid, values []float64, active []bool, nodata float64) error {
	return WriteASCIIRasterDigits(w, g, values, active, nodata, -1)
}

// WriteASCIIRasterDigits is WriteASCIIRaster with values rounded to the
// given number of significant digits (-1: the shortest form that reads
// back exactly). Results such as saturations need no more than 6, and
// writing fewer digits makes million-cell rasters smaller and faster.
func WriteASCIIRasterDigits(w io.Writer, g Grid, values []float64, active []bool, nodata float64, digits int) error {
	if digits == 0 || digits < -1 {
		return fmt.Errorf("write raster: %d significant digits", digits)
	}
	n := g.N()
	if g.NX <= 0 || g.NY <= 0 {
		return fmt.Errorf("write raster: grid %d x %d is empty", g.NX, g.NY)
	}
	if len(values) != n {
		return fmt.Errorf("write raster: %d values for a grid of %d cells", len(values), n)
	}
	if active != nil && len(active) != n {
		return fmt.Errorf("write raster: %d active flags for a grid of %d cells", len(active), n)
	}
	if math.IsNaN(nodata) || math.IsInf(nodata, 0) {
		return fmt.Errorf("write raster: NODATA value %g is not finite", nodata)
	}
	var hdr bytes.Buffer
	fmt.Fprintf(&hdr, "ncols %d\nnrows %d\nxllcorner %s\nyllcorner %s\n", g.NX, g.NY, ftoa(g.X0), ftoa(g.Y0))
	if g.DX == g.DY {
		fmt.Fprintf(&hdr, "cellsize %s\n", ftoa(g.DX))
	} else {
		fmt.Fprintf(&hdr, "dx %s\ndy %s\n", ftoa(g.DX), ftoa(g.DY))
	}
	fmt.Fprintf(&hdr, "NODATA_value %s\n", ftoa(nodata))
	if _, err := w.Write(hdr.Bytes()); err != nil {
		return err
	}
	// Bands of rows are formatted in parallel and written in file order; a
	// band of a few hundred kilobytes keeps memory small. The bytes do not
	// depend on the number of goroutines.
	bandRows := max(1, (256<<10)/(12*g.NX))
	nb := (g.NY + bandRows - 1) / bandRows
	nodataText := strconv.AppendFloat(nil, nodata, 'g', digits, 64)
	format := func(band int, buf []byte) ([]byte, error) {
		top := g.NY - 1 - band*bandRows // rows from north to south
		for j := top; j > max(top-bandRows, -1); j-- {
			row := values[j*g.NX : (j+1)*g.NX]
			var act []bool
			if active != nil {
				act = active[j*g.NX : (j+1)*g.NX]
			}
			prev, prevLen := math.NaN(), 0 // the last value formatted, and its length
			for i, v := range row {
				if i > 0 {
					buf = append(buf, ' ')
				}
				switch {
				case (act != nil && !act[i]) || math.IsNaN(v):
					buf = append(buf, nodataText...)
					prev = math.NaN()
					continue
				case math.IsInf(v, 0):
					return nil, fmt.Errorf("write raster: value %g in cell (i=%d, j=%d) is not finite", v, i, j)
				case v == nodata:
					return nil, fmt.Errorf("write raster: value %g in cell (i=%d, j=%d) equals the NODATA value", v, i, j)
				}
				// Runs of equal values (unswept cells, partitions) copy the
				// text of the previous one.
				if v == prev && math.Signbit(v) == math.Signbit(prev) {
					buf = append(buf, buf[len(buf)-1-prevLen:len(buf)-1]...)
					continue
				}
				n0 := len(buf)
				buf = appendG(buf, v, digits)
				prev, prevLen = v, len(buf)-n0
			}
			buf = append(buf, '\n')
		}
		return buf, nil
	}
	return parallel.Bands(w, nb, format)
}

package reservoir

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"sync/atomic"
	"unsafe"

	"floodtrace/internal/geotiff"
	"floodtrace/internal/parallel"
)

// MaxCells is the largest grid the package loads: 50 million cells. Larger
// grids are refused before any allocation, with an estimate of the memory
// a run would need (EstimateMemory).
const MaxCells = 50_000_000

// maxLineBytes bounds one line of a map file (64 MiB): longer lines are
// refused rather than buffered.
const maxLineBytes = 64 << 20

// Raster is a map read from a GIS ASCII raster. Values holds one value per
// grid cell, k = j*NX + i with j = 0 the SOUTH row (the file lists rows from
// north to south; the reader flips them); NODATA cells hold NaN.
type Raster struct {
	Grid      Grid
	Values    []float64
	NoData    float64 // the header's NODATA_value, if HasNoData
	HasNoData bool
}

// rasterKeys are the header keys of a GIS ASCII raster (compared in lower
// case).
var rasterKeys = []string{"ncols", "nrows", "xllcorner", "xllcenter", "yllcorner", "yllcenter",
	"cellsize", "dx", "dy", "nodata_value"}

func isRasterKey(s string) bool {
	s = strings.ToLower(s)
	for _, k := range rasterKeys {
		if s == k {
			return true
		}
	}
	return false
}

// lineReader reads a text map file line by line, tracking the line number,
// stripping a UTF-8 byte-order mark and carriage returns, refusing binary
// data and skipping blank lines and, where allowed, '#' comment lines.
type lineReader struct {
	sc       *bufio.Scanner
	name     string
	line     int
	comments bool
	pending  []string // a line pushed back by unread
	pendLine int
}

func newLineReader(r io.Reader, name string, comments bool) *lineReader {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 0, 64*1024), maxLineBytes)
	return &lineReader{sc: sc, name: name, comments: comments}
}

// next returns the fields of the next non-blank line, or nil at the end of
// the file.
func (lr *lineReader) next() ([]string, error) {
	if lr.pending != nil {
		f := lr.pending
		lr.pending = nil
		lr.line = lr.pendLine
		return f, nil
	}
	b, err := lr.nextLine()
	if b == nil || err != nil {
		return nil, err
	}
	f, msg := splitFields(string(b))
	if msg != "" {
		return nil, &InputError{Path: lr.name, Line: lr.line, Msg: msg}
	}
	return f, nil
}

// nextLine returns the next non-blank line with surrounding white space
// trimmed, or nil at the end of the file. The bytes are valid until the
// next call. A pending (unread) line must be taken with next first.
func (lr *lineReader) nextLine() ([]byte, error) {
	for lr.sc.Scan() {
		lr.line++
		b := lr.sc.Bytes()
		if lr.line == 1 {
			b = bytes.TrimPrefix(b, []byte("\xef\xbb\xbf"))
		}
		if i := bytes.IndexByte(b, 0); i >= 0 {
			return nil, &InputError{Path: lr.name, Line: lr.line, Msg: "not a text file (NUL byte)"}
		}
		b = bytes.TrimSpace(b)
		if len(b) == 0 || (lr.comments && b[0] == '#') {
			continue
		}
		return b, nil
	}
	if err := lr.sc.Err(); err != nil {
		if errors.Is(err, bufio.ErrTooLong) {
			return nil, &InputError{Path: lr.name, Line: lr.line + 1, Msg: fmt.Sprintf("line longer than %d bytes", maxLineBytes), Err: ErrTooLarge}
		}
		return nil, &InputError{Path: lr.name, Msg: "reading: " + err.Error(), Err: err}
	}
	return nil, nil
}

func (lr *lineReader) unread(f []string) {
	lr.pending = f
	lr.pendLine = lr.line
}

// splitFields splits a line on commas if it has any, else on white space.
// An empty field between commas is reported by its column.
func splitFields(s string) ([]string, string) {
	if !strings.ContainsRune(s, ',') {
		return strings.Fields(s), ""
	}
	f := strings.Split(s, ",")
	for i := range f {
		f[i] = strings.TrimSpace(f[i])
		if f[i] == "" {
			return nil, fmt.Sprintf("column %d: empty value between commas", i+1)
		}
	}
	return f, ""
}

// parseValue parses one map value. NaN and infinities are refused unless
// they are the NODATA value; a NODATA value becomes NaN.
func parseValue(tok string, nodata float64, hasNoData bool) (float64, string) {
	v, ok := parseDecimal(tok)
	var err error
	if !ok {
		v, err = strconv.ParseFloat(tok, 64)
	}
	if err != nil {
		if errors.Is(err, strconv.ErrRange) {
			return 0, fmt.Sprintf("%q is out of range", tok)
		}
		return 0, fmt.Sprintf("%q is not a number", tok)
	}
	if hasNoData && (v == nodata || (math.IsNaN(v) && math.IsNaN(nodata))) {
		return math.NaN(), ""
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Sprintf("%q is not a finite number", tok)
	}
	return v, ""
}

// checkSize refuses grids of more than limit cells, or with a non-positive
// dimension, without allocating anything.
func checkSize(name string, line int, nx, ny int64, limit int) error {
	if nx <= 0 || ny <= 0 {
		return &InputError{Path: name, Line: line, Msg: fmt.Sprintf("grid size %d x %d: both must be positive", nx, ny)}
	}
	if nx > int64(limit) || ny > int64(limit) || nx*ny > int64(limit) {
		cells := float64(nx) * float64(ny)
		est := float64(BytesPerCell) * cells
		return &InputError{Path: name, Line: line, Err: ErrTooLarge, Msg: fmt.Sprintf(
			"grid %d x %d = %.4g cells is too large: a run would need about %s of memory; the limit is %d cells (about %s)",
			nx, ny, cells, formatBytes(est), limit, formatBytes(float64(BytesPerCell)*float64(limit)))}
	}
	return nil
}

// readRows reads ny rows of nx values, north row first, and returns them
// flipped so that index j*nx+i has j = 0 at the south. Row and column
// numbers in messages count from 1 at the top left of the file.
//
// The lines are first collected in file order (up to ny+1 rows or a line
// that cannot be read); the values of each row are then counted and parsed
// in parallel bands of rows. The error reported is the one a
// value-by-value reading meets first: the first row, in file order, with
// the wrong number of values or a bad value (the count first, within a
// row), else the defect that ended the collection.
func readRows(lr *lineReader, nx, ny int, nodata float64, hasNoData bool, what string) ([]float64, error) {
	var first []string // a row the header reader pushed back
	if lr.pending != nil {
		first, _ = lr.next()
	}
	var arena []byte // the text of the rows after first
	var ends []int   // end of each row in arena
	var lines []int  // file line of each row in arena
	var endErr error // what ended the collection early
	rows := 0
	if first != nil {
		rows = 1
		if len(first) != nx {
			endErr = &InputError{Path: lr.name, Line: lr.line, Msg: fmt.Sprintf("row %d has %d values; expected %d", 1, len(first), nx)}
		}
	}
	for endErr == nil {
		b, err := lr.nextLine()
		if err != nil {
			endErr = err
			break
		}
		if b == nil {
			break
		}
		rows++
		if rows > ny {
			endErr = &InputError{Path: lr.name, Line: lr.line, Msg: fmt.Sprintf("more than %d rows; expected %d (%s)", ny, ny, what)}
			break
		}
		if arena == nil {
			// Room for the rows still expected if they are like this one
			// (at most 256 MiB up front: a header may overstate them).
			expect := min(ny-rows+1, (256<<20)/(len(b)+len(b)/8))
			arena = make([]byte, 0, expect*(len(b)+len(b)/8))
			ends = make([]int, 0, expect)
			lines = make([]int, 0, expect)
		}
		arena = append(arena, b...)
		ends = append(ends, len(arena))
		lines = append(lines, lr.line)
	}
	nfirst := 0
	if first != nil && len(first) == nx {
		nfirst = 1
	}
	nrows := nfirst + len(ends)
	complete := endErr == nil && nrows == ny
	vals := make([]float64, nrows*nx)
	// Row r (north first) goes to j = ny-1-r when the file is complete;
	// otherwise the values are dropped anyway.
	dst := func(r int) []float64 {
		if complete {
			return vals[(ny-1-r)*nx : (ny-r)*nx]
		}
		return vals[r*nx : (r+1)*nx]
	}
	if nfirst == 1 {
		out := dst(0)
		for c, tok := range first {
			v, msg := parseValue(tok, nodata, hasNoData)
			if msg != "" {
				return nil, &InputError{Path: lr.name, Row: 1, Col: c + 1, Msg: msg}
			}
			out[c] = v
		}
	}
	if bad := parseRowsParallel(arena, ends, nx, func(r int) []float64 { return dst(nfirst + r) }, nodata, hasNoData); bad.msg != "" || bad.count >= 0 {
		row := nfirst + bad.row + 1
		switch {
		case bad.count >= 0:
			return nil, &InputError{Path: lr.name, Line: lines[bad.row], Msg: fmt.Sprintf("row %d has %d values; expected %d", row, bad.count, nx)}
		case bad.col == 0:
			return nil, &InputError{Path: lr.name, Line: lines[bad.row], Msg: bad.msg}
		}
		return nil, &InputError{Path: lr.name, Row: row, Col: bad.col, Msg: bad.msg}
	}
	if endErr != nil {
		return nil, endErr
	}
	if rows < ny {
		return nil, &InputError{Path: lr.name, Msg: fmt.Sprintf("only %d rows; expected %d (%s)", rows, ny, what)}
	}
	return vals, nil
}

func isASCII(b []byte) bool {
	for _, c := range b {
		if c >= 0x80 {
			return false
		}
	}
	return true
}

// asciiSpace reports the ASCII characters unicode.IsSpace accepts.
func asciiSpace(c byte) bool {
	return c == ' ' || c == '\t' || c == '\n' || c == '\v' || c == '\f' || c == '\r'
}

// badRow is the first defect parseRowsParallel met: in row (0-based in
// its rows), count >= 0 values where nx were expected, else msg, at column
// col (1-based), or for the whole row when col is 0 (a malformed row). The
// zero defect has count -1 and no msg.
type badRow struct {
	row, col, count int
	msg             string
}

// parseRowsParallel counts and parses the rows arena[ends[r-1]:ends[r]]
// into dst(r), in bands of rows on up to GOMAXPROCS goroutines, and
// returns the first defect in row order: a row whose values are not nx
// (as splitFields splits them), or a bad value.
func parseRowsParallel(arena []byte, ends []int, nx int, dst func(r int) []float64, nodata float64, hasNoData bool) badRow {
	none := badRow{count: -1}
	n := len(ends)
	if n == 0 {
		return none
	}
	const band = 16
	nb := (n + band - 1) / band
	errs := make([]badRow, nb)
	// parseRow returns the row's defect, if any, as (count, col, msg).
	parseRow := func(r int) (int, int, string) {
		lo := 0
		if r > 0 {
			lo = ends[r-1]
		}
		line := arena[lo:ends[r]]
		out := dst(r)
		slow := func() (int, int, string) {
			f, msg := splitFields(string(line))
			if msg != "" {
				return -1, 0, msg
			}
			if len(f) != nx {
				return len(f), 0, ""
			}
			for c, tok := range f {
				v, msg := parseValue(tok, nodata, hasNoData)
				if msg != "" {
					return -1, c + 1, msg
				}
				out[c] = v
			}
			return -1, 0, ""
		}
		// Values are parsed as they are counted; the first bad one is
		// kept, and reported only when the count is right.
		c, badCol, badMsg := 0, 0, ""
		for i := 0; i < len(line); {
			for i < len(line) && asciiSpace(line[i]) {
				i++
			}
			j := i
			for j < len(line) && !asciiSpace(line[j]) {
				if ch := line[j]; ch == ',' || ch >= 0x80 {
					return slow()
				}
				j++
			}
			if j == i {
				break
			}
			if c < nx && badMsg == "" {
				// The token is only read during the call: no copy needed.
				v, msg := parseValue(unsafe.String(&line[i], j-i), nodata, hasNoData)
				if msg != "" {
					badCol, badMsg = c+1, msg
				} else {
					out[c] = v
				}
			}
			c++
			i = j
		}
		if c != nx {
			return c, 0, ""
		}
		return -1, badCol, badMsg
	}
	var stop atomic.Int64 // lowest band with an error, plus one (0: none)
	parallel.Each(nb, 0, 1, func(_, b int) {
		errs[b] = none
		if s := stop.Load(); s > 0 && int(s) <= b {
			return // an earlier band already failed
		}
		for r := b * band; r < min((b+1)*band, n); r++ {
			if count, col, msg := parseRow(r); count >= 0 || msg != "" {
				errs[b] = badRow{r, col, count, msg}
				for {
					s := stop.Load()
					if (s > 0 && int(s) <= b+1) || stop.CompareAndSwap(s, int64(b+1)) {
						break
					}
				}
				break
			}
		}
	})
	for _, e := range errs {
		if e.count >= 0 || e.msg != "" {
			return e
		}
	}
	return none
}

// ReadASCIIRaster reads a GIS ASCII raster from r; name is used in
// messages. The header holds, one "key value" pair per line and in any
// order, ncols, nrows, xllcorner or xllcenter, yllcorner or yllcenter,
// cellsize (or dx and dy) and optionally NODATA_value; keys are
// case-insensitive. The nrows rows that follow, one per line, list ncols
// values each from north to south, separated by white space (or commas).
// Rasters of more than MaxCells cells are refused before reading the data.
func ReadASCIIRaster(r io.Reader, name string) (*Raster, error) {
	return readRaster(newLineReader(r, name, false), MaxCells)
}

func readRaster(lr *lineReader, limit int) (*Raster, error) {
	h, err := readRasterHeader(lr, limit)
	if err != nil {
		return nil, err
	}
	return readRasterRows(lr, h)
}

func readRasterRows(lr *lineReader, h *Raster) (*Raster, error) {
	vals, err := readRows(lr, h.Grid.NX, h.Grid.NY, h.NoData, h.HasNoData, "nrows")
	if err != nil {
		return nil, err
	}
	h.Values = vals
	return h, nil
}

// readRasterHeader reads and validates the header of a raster; the
// returned Raster has no values yet.
func readRasterHeader(lr *lineReader, limit int) (*Raster, error) {
	hdr := map[string]float64{}
	hdrLine := map[string]int{}
	for {
		f, err := lr.next()
		if err != nil {
			return nil, err
		}
		if f == nil {
			break
		}
		if len(f) == 0 || !startsWithLetter(f[0]) {
			lr.unread(f)
			break
		}
		key := strings.ToLower(f[0])
		if !isRasterKey(key) {
			if len(f) == 2 {
				msg := fmt.Sprintf("unknown raster header key %q", f[0])
				if s, ok := nearest(key, rasterKeys); ok {
					msg += fmt.Sprintf("; did you mean %q?", s)
				}
				return nil, &InputError{Path: lr.name, Line: lr.line, Msg: msg}
			}
			lr.unread(f)
			break
		}
		if len(f) != 2 {
			return nil, &InputError{Path: lr.name, Line: lr.line, Msg: fmt.Sprintf("raster header line %q must be a key and one value", strings.Join(f, " "))}
		}
		if _, dup := hdr[key]; dup {
			return nil, &InputError{Path: lr.name, Line: lr.line, Msg: fmt.Sprintf("raster header key %s given twice (first on line %d)", f[0], hdrLine[key])}
		}
		v, err2 := strconv.ParseFloat(f[1], 64)
		if err2 != nil || (key != "nodata_value" && (math.IsNaN(v) || math.IsInf(v, 0))) {
			return nil, &InputError{Path: lr.name, Line: lr.line, Msg: fmt.Sprintf("raster header %s: %q is not a finite number", f[0], f[1])}
		}
		hdr[key], hdrLine[key] = v, lr.line
	}
	if len(hdr) == 0 {
		if lr.line == 0 {
			return nil, &InputError{Path: lr.name, Msg: "empty map file"}
		}
		return nil, &InputError{Path: lr.name, Line: lr.line, Msg: "no GIS ASCII raster header (ncols, nrows, xllcorner, yllcorner, cellsize, NODATA_value)"}
	}
	miss := func(k string) error {
		return &InputError{Path: lr.name, Msg: "raster header has no " + k}
	}
	intKey := func(k string) (int64, error) {
		v, ok := hdr[k]
		if !ok {
			return 0, miss(k)
		}
		if v != math.Trunc(v) || v < 1 || v > 1e12 {
			return 0, &InputError{Path: lr.name, Line: hdrLine[k], Msg: fmt.Sprintf("raster header %s must be a positive whole number (got %g)", k, v)}
		}
		return int64(v), nil
	}
	nx, err := intKey("ncols")
	if err != nil {
		return nil, err
	}
	ny, err := intKey("nrows")
	if err != nil {
		return nil, err
	}
	var g Grid
	_, hasCS := hdr["cellsize"]
	_, hasDX := hdr["dx"]
	_, hasDY := hdr["dy"]
	switch {
	case hasCS && (hasDX || hasDY):
		return nil, &InputError{Path: lr.name, Line: hdrLine["cellsize"], Msg: "raster header gives both cellsize and dx/dy"}
	case hasCS:
		g.DX, g.DY = hdr["cellsize"], hdr["cellsize"]
	case hasDX && hasDY:
		g.DX, g.DY = hdr["dx"], hdr["dy"]
	default:
		return nil, miss("cellsize (or dx and dy)")
	}
	if !(g.DX > 0) || !(g.DY > 0) {
		k := "cellsize"
		if !hasCS {
			k = "dx"
		}
		return nil, &InputError{Path: lr.name, Line: hdrLine[k], Msg: fmt.Sprintf("raster cell size must be positive (got %g x %g)", g.DX, g.DY)}
	}
	for _, axis := range []struct {
		corner, center string
		d              float64
		dst            *float64
	}{{"xllcorner", "xllcenter", g.DX, &g.X0}, {"yllcorner", "yllcenter", g.DY, &g.Y0}} {
		c, okc := hdr[axis.corner]
		m, okm := hdr[axis.center]
		switch {
		case okc && okm:
			return nil, &InputError{Path: lr.name, Line: hdrLine[axis.center], Msg: fmt.Sprintf("raster header gives both %s and %s", axis.corner, axis.center)}
		case okc:
			*axis.dst = c
		case okm:
			*axis.dst = m - axis.d/2
		default:
			return nil, miss(axis.corner + " (or " + axis.center + ")")
		}
	}
	if err := checkSize(lr.name, hdrLine["ncols"], nx, ny, limit); err != nil {
		return nil, err
	}
	g.NX, g.NY = int(nx), int(ny)
	nodata, hasND := hdr["nodata_value"]
	return &Raster{Grid: g, NoData: nodata, HasNoData: hasND}, nil
}

func startsWithLetter(s string) bool {
	c := s[0]
	return c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c == '_'
}

// ReadMatrix reads a plain matrix map from r: ny rows of nx values, first
// row north, values separated by white space or by commas; blank lines and
// lines starting with '#' are skipped. The values are returned flipped so
// that index k = j*nx + i has j = 0 at the south. A plain matrix has no
// NODATA value: NaN and infinities are errors. name is used in messages.
func ReadMatrix(r io.Reader, name string, nx, ny int) ([]float64, error) {
	if err := checkSize(name, 0, int64(nx), int64(ny), MaxCells); err != nil {
		return nil, err
	}
	lr := newLineReader(r, name, true)
	vals, err := readRows(lr, nx, ny, 0, false, "ny")
	if err != nil {
		return nil, err
	}
	return vals, nil
}

// sniffRaster reports whether the first non-blank line of data starts with
// a raster header key.
func sniffRaster(data []byte) bool {
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	for len(data) > 0 {
		line := data
		if i := bytes.IndexByte(data, '\n'); i >= 0 {
			line, data = data[:i], data[i+1:]
		} else {
			data = nil
		}
		f := strings.Fields(string(line))
		if len(f) == 0 {
			continue
		}
		return isRasterKey(f[0])
	}
	return false
}

// ReadMap reads the map file at path, a GeoTIFF (by its signature or a
// .tif/.tiff name, see ReadGeoTIFF), a GIS ASCII raster or a plain matrix,
// the last two told apart by the raster header (a file named .asc must
// have one). With g == nil the map must be a raster and its header defines the
// returned grid; otherwise the values must fit g: a raster header that
// disagrees with g is an error naming both, and a plain matrix must have
// g.NY rows of g.NX values. Values are indexed k = j*NX + i with j = 0 the
// south row; NODATA cells hold NaN.
func ReadMap(path string, g *Grid) ([]float64, *Grid, error) {
	return readMapFile(path, g, "", MaxCells)
}

// readMapFile is ReadMap with a cell limit and the origin of the grid named
// in messages ("from case.yaml:3"; "" for none).
func readMapFile(path string, g *Grid, gridFrom string, limit int) ([]float64, *Grid, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, nil, openError(path, err)
	}
	defer f.Close()
	br := bufio.NewReaderSize(f, 64*1024)
	head, _ := br.Peek(4096)
	if geotiff.IsTIFF(head) || isTIFFPath(path) {
		data, err := io.ReadAll(br)
		if err != nil {
			return nil, nil, &InputError{Path: path, Msg: "reading: " + err.Error(), Err: err}
		}
		return readTIFFMap(path, data, g, gridFrom, limit, nil)
	}
	raster := sniffRaster(head) || strings.EqualFold(filepath.Ext(path), ".asc")
	if !raster {
		if g == nil {
			return nil, nil, &InputError{Path: path, Msg: "a plain matrix cannot define the grid: give a grid in the case file or use a GIS ASCII raster"}
		}
		if len(bytes.TrimSpace(head)) == 0 {
			return nil, nil, &InputError{Path: path, Msg: "empty map file"}
		}
		vals, err := readRows(newLineReader(br, path, true), g.NX, g.NY, 0, false, "ny")
		if err != nil {
			return nil, nil, err
		}
		return vals, g, nil
	}
	lr := newLineReader(br, path, false)
	if g != nil {
		// Check the header against the grid before reading the data.
		r, err := readRasterChecked(lr, limit, g, gridFrom)
		if err != nil {
			return nil, nil, err
		}
		return r.Values, g, nil
	}
	r, err := readRaster(lr, limit)
	if err != nil {
		return nil, nil, err
	}
	return r.Values, &r.Grid, nil
}

// readRasterChecked reads a raster whose header must agree with g; the
// header is compared before the rows are read.
func readRasterChecked(lr *lineReader, limit int, g *Grid, gridFrom string) (*Raster, error) {
	h, err := readRasterHeader(lr, limit)
	if err != nil {
		return nil, err
	}
	if hv, gv := headerMismatch(h.Grid, *g); hv != "" {
		from := ""
		if gridFrom != "" {
			from = ", " + gridFrom
		}
		return nil, &InputError{Path: lr.name, Msg: fmt.Sprintf("raster header %s disagrees with the grid (%s%s)", hv, gv, from)}
	}
	return readRasterRows(lr, h)
}

// headerMismatch compares a raster's grid h with the grid g and describes
// the first difference as the header's value and the grid's ("" if they
// agree). Sizes must match exactly, cell sizes to 1e-9 relative and
// corners to a millionth of a cell.
func headerMismatch(h, g Grid) (hv, gv string) {
	switch {
	case h.NX != g.NX:
		return fmt.Sprintf("ncols %d", h.NX), fmt.Sprintf("nx %d", g.NX)
	case h.NY != g.NY:
		return fmt.Sprintf("nrows %d", h.NY), fmt.Sprintf("ny %d", g.NY)
	case math.Abs(h.DX-g.DX) > 1e-9*g.DX:
		return fmt.Sprintf("cell size %g in x", h.DX), fmt.Sprintf("dx %g", g.DX)
	case math.Abs(h.DY-g.DY) > 1e-9*g.DY:
		return fmt.Sprintf("cell size %g in y", h.DY), fmt.Sprintf("dy %g", g.DY)
	case math.Abs(h.X0-g.X0) > 1e-6*g.DX+1e-12*math.Abs(g.X0):
		return fmt.Sprintf("xllcorner %g", h.X0), fmt.Sprintf("origin x %g", g.X0)
	case math.Abs(h.Y0-g.Y0) > 1e-6*g.DY+1e-12*math.Abs(g.Y0):
		return fmt.Sprintf("yllcorner %g", h.Y0), fmt.Sprintf("origin y %g", g.Y0)
	}
	return "", ""
}

func openError(path string, err error) error {
	msg := err.Error()
	var pe *os.PathError
	if errors.As(err, &pe) {
		msg = pe.Err.Error()
	}
	if errors.Is(err, os.ErrNotExist) {
		msg = "file not found"
	}
	return &InputError{Path: path, Msg: msg, Err: err}
}

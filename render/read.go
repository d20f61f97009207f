package render

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"unsafe"

	"floodtrace/reservoir"
)

// Summary is the part of summary.json (docs/OUTPUTS.md) that render uses.
type Summary struct {
	Title      string `json:"title"`
	CaseFile   string `json:"case_file"`
	Units      string `json:"units"`
	UnitLabels struct {
		Length   string `json:"length"`
		Rate     string `json:"rate"`
		Volume   string `json:"volume"`
		Pressure string `json:"pressure"`
	} `json:"unit_labels"`
	Grid struct {
		NX int     `json:"nx"`
		NY int     `json:"ny"`
		DX float64 `json:"dx"`
		DY float64 `json:"dy"`
		X0 float64 `json:"x0"`
		Y0 float64 `json:"y0"`
	} `json:"grid"`
	Wells []struct {
		Name string  `json:"name"`
		Type string  `json:"type"`
		X    float64 `json:"x"`
		Y    float64 `json:"y"`
		I    int     `json:"i"`
		J    int     `json:"j"`
	} `json:"wells"`
	Faults []struct {
		Name  string       `json:"name"`
		Trace [][2]float64 `json:"trace"`
	} `json:"faults"`
	Engine     string  `json:"engine"`
	EndDays    float64 `json:"end_days"`
	PoreVolume float64 `json:"pore_volume"`
	OOIP       float64 `json:"ooip"`
	Producers  []struct {
		Name                   string   `json:"name"`
		TracerBreakthroughDays *float64 `json:"tracer_breakthrough_days"`
		TracerBreakthroughPVI  *float64 `json:"tracer_breakthrough_pvi"`
		BreakthroughDays       *float64 `json:"breakthrough_days"`
		BreakthroughPVI        *float64 `json:"breakthrough_pvi"`
		FinalWaterCut          float64  `json:"final_water_cut"`
		CumOil                 float64  `json:"cum_oil"`
		CumWater               float64  `json:"cum_water"`
	} `json:"producers"`
	Injectors []struct {
		Name          string  `json:"name"`
		CumWater      float64 `json:"cum_water"`
		MaxBHPReached bool    `json:"max_bhp_reached"`
	} `json:"injectors"`
	Field struct {
		FinalPVI            float64 `json:"final_pvi"`
		FinalRecoveryFactor float64 `json:"final_recovery_factor"`
		FinalWaterCut       float64 `json:"final_water_cut"`
	} `json:"field"`
	LorenzCoefficient *float64 `json:"lorenz_coefficient"`
	MassBalanceError  *float64 `json:"mass_balance_error"`
	Streamlines       int      `json:"streamlines"`
	PressureSolver    struct {
		Iterations       int     `json:"iterations"`
		RelativeResidual float64 `json:"relative_residual"`
		Solves           int     `json:"solves"`
	} `json:"pressure_solver"`
	Snapshots []struct {
		TimeDays float64 `json:"time_days"`
		PVI      float64 `json:"pvi"`
		File     string  `json:"file"`
	} `json:"snapshots"`
	Warnings []string `json:"warnings"`
}

// ReadSummary reads and checks DIR/summary.json.
func ReadSummary(dir string) (*Summary, error) {
	path := filepath.Join(dir, "summary.json")
	b, err := os.ReadFile(path)
	if errors.Is(err, os.ErrNotExist) {
		return nil, fmt.Errorf("render: %s has no summary.json: not a run folder, or an unfinished run", dir)
	}
	if err != nil {
		return nil, fmt.Errorf("render: %w", err)
	}
	return ParseSummary(path, b)
}

// ParseSummary parses and checks the content of a summary.json; path names
// it in messages.
func ParseSummary(path string, b []byte) (*Summary, error) {
	var s Summary
	if err := json.Unmarshal(b, &s); err != nil {
		return nil, fmt.Errorf("render: %s: %w", path, err)
	}
	g := s.Grid
	if g.NX <= 0 || g.NY <= 0 || !(g.DX > 0) || !(g.DY > 0) {
		return nil, fmt.Errorf("render: %s: invalid grid nx=%d ny=%d dx=%v dy=%v", path, g.NX, g.NY, g.DX, g.DY)
	}
	if int64(g.NX)*int64(g.NY) > 50_000_000 {
		return nil, fmt.Errorf("render: %s: grid %dx%d too large", path, g.NX, g.NY)
	}
	for _, w := range s.Wells {
		if w.Type != "injector" && w.Type != "producer" {
			return nil, fmt.Errorf("render: %s: well %q has type %q, want injector or producer", path, w.Name, w.Type)
		}
	}
	if s.UnitLabels.Length == "" {
		l, _, _, r, p, v := reservoir.UnitSystem(s.Units).Labels()
		s.UnitLabels.Length, s.UnitLabels.Rate, s.UnitLabels.Pressure, s.UnitLabels.Volume = l, r, p, v
	}
	return &s, nil
}

// ResGrid returns the summary's grid as a reservoir.Grid.
func (s *Summary) ResGrid() reservoir.Grid {
	return reservoir.Grid{NX: s.Grid.NX, NY: s.Grid.NY, DX: s.Grid.DX, DY: s.Grid.DY, X0: s.Grid.X0, Y0: s.Grid.Y0}
}

// ReadASC reads a GIS ASCII raster (header ncols, nrows, xllcorner or
// xllcenter, yllcorner or yllcenter, cellsize or dx/dy, optional
// NODATA_value; then nrows rows from north to south) into cell order of
// the grid g (k = j*NX+i, j counting north). NODATA becomes NaN. The
// header must agree with g.
func ReadASC(path string, g reservoir.Grid) ([]float64, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("render: %w", err)
	}
	v, err := parseASCData(data, g)
	if err != nil {
		return nil, fmt.Errorf("render: %s: %w", path, err)
	}
	return v, nil
}

// parseASC reads a raster. Files of ASCII text (all that floodtrace
// writes) take a fast path that parses the values in parallel; others are
// read word by word (parseASCWords). Both give the same values and errors.
func parseASC(r io.Reader, g reservoir.Grid) ([]float64, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, err
	}
	return parseASCData(data, g)
}

// parseASCData is parseASC on the bytes of a file.
func parseASCData(data []byte, g reservoir.Grid) ([]float64, error) {
	for _, c := range data {
		if c >= 0x80 {
			return parseASCWords(bytes.NewReader(data), g)
		}
	}
	return parseASCBytes(data, g)
}

// asciiSpace reports the ASCII characters that bufio.ScanWords treats as
// space.
func asciiSpace(c byte) bool {
	return c == ' ' || c == '\t' || c == '\n' || c == '\v' || c == '\f' || c == '\r'
}

// nextWord returns the bounds of the first word of data at or after i
// (start == len(data) when there is none).
func nextWord(data []byte, i int) (start, end int) {
	for i < len(data) && asciiSpace(data[i]) {
		i++
	}
	start = i
	for i < len(data) && !asciiSpace(data[i]) {
		i++
	}
	return start, i
}

// parseASCBytes is parseASCWords for ASCII text held in memory.
func parseASCBytes(data []byte, g reservoir.Grid) ([]float64, error) {
	hdr := map[string]float64{}
	pos := len(data) // start of the first value
	for i := 0; ; {
		a, b := nextWord(data, i)
		if a == b {
			break
		}
		w := string(data[a:b])
		if _, err := strconv.ParseFloat(w, 64); err == nil {
			pos = a
			break
		}
		c, d := nextWord(data, b)
		if c == d {
			return nil, fmt.Errorf("header key %q has no value", w)
		}
		v, err := strconv.ParseFloat(string(data[c:d]), 64)
		if err != nil {
			return nil, fmt.Errorf("header %s: %q is not a number", w, data[c:d])
		}
		hdr[strings.ToLower(w)] = v
		i = d
	}
	nodata, hasNoData, err := checkASCHeader(hdr, g)
	if err != nil {
		return nil, err
	}
	n := g.N()
	out := make([]float64, n)
	// Cut the values into chunks at word boundaries, count the words of
	// each, then parse the chunks in parallel: word number m goes to row
	// m/NX (north first), column m%NX.
	vals := data[pos:]
	nc := max(1, min(64, len(vals)/(64<<10)))
	cut := make([]int, nc+1)
	for c := 1; c < nc; c++ {
		k := max(cut[c-1], c*len(vals)/nc)
		for k < len(vals) && !asciiSpace(vals[k]) {
			k++
		}
		cut[c] = k
	}
	cut[nc] = len(vals)
	count := make([]int, nc+1) // words before chunk c
	bad := make([]int, nc)     // first bad word of each chunk, or -1
	forChunks(nc, func(c int) {
		m := 0
		for i := cut[c]; ; m++ {
			a, b := nextWord(vals, i)
			if a == b || a >= cut[c+1] {
				break
			}
			i = b
		}
		count[c+1] = m
	})
	for c := 0; c < nc; c++ {
		count[c+1] += count[c]
	}
	forChunks(nc, func(c int) {
		bad[c] = -1
		m := count[c]
		for i := cut[c]; m < n; m++ {
			a, b := nextWord(vals, i)
			if a == b || a >= cut[c+1] {
				break
			}
			i = b
			// The word is only read during the call: no copy needed.
			v, err := strconv.ParseFloat(unsafe.String(&vals[a], b-a), 64)
			if err != nil {
				bad[c] = m
				return
			}
			if hasNoData && v == nodata {
				v = math.NaN()
			}
			row, col := m/g.NX, m%g.NX
			out[(g.NY-1-row)*g.NX+col] = v
		}
	})
	for c := 0; c < nc; c++ {
		if m := bad[c]; m >= 0 {
			a, b := 0, 0
			for i, k := cut[c], count[c]; k <= m; k++ {
				a, b = nextWord(vals, i)
				i = b
			}
			return nil, fmt.Errorf("value %d: %q is not a number", m+1, vals[a:b])
		}
	}
	switch total := count[nc]; {
	case total > n:
		return nil, fmt.Errorf("more than %d values", n)
	case total < n:
		return nil, fmt.Errorf("%d values, want %d", total, n)
	}
	return out, nil
}

// forChunks calls fn(0..n-1) on up to GOMAXPROCS goroutines.
func forChunks(n int, fn func(c int)) {
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(n, runtime.GOMAXPROCS(0)) {
		wg.Go(func() {
			for {
				c := int(next.Add(1)) - 1
				if c >= n {
					return
				}
				fn(c)
			}
		})
	}
	wg.Wait()
}

// checkASCHeader checks a raster header against the grid g and returns
// its NODATA value.
func checkASCHeader(hdr map[string]float64, g reservoir.Grid) (nodata float64, hasNoData bool, err error) {
	nx, okx := hdr["ncols"]
	ny, oky := hdr["nrows"]
	if !okx || !oky {
		return 0, false, errors.New("missing ncols or nrows in the header")
	}
	if int(nx) != g.NX || int(ny) != g.NY {
		return 0, false, fmt.Errorf("raster is %gx%g cells, the run grid %dx%d", nx, ny, g.NX, g.NY)
	}
	cs, okc := hdr["cellsize"]
	dx, dy := cs, cs
	if !okc {
		dx, dy = hdr["dx"], hdr["dy"]
	}
	tol := 1e-6 * math.Max(g.DX, g.DY)
	if math.Abs(dx-g.DX) > tol || math.Abs(dy-g.DY) > tol {
		return 0, false, fmt.Errorf("raster cell size %gx%g, the run grid %gx%g", dx, dy, g.DX, g.DY)
	}
	nodata, hasNoData = hdr["nodata_value"]
	return nodata, hasNoData, nil
}

// parseASCWords reads a raster word by word.
func parseASCWords(r io.Reader, g reservoir.Grid) ([]float64, error) {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 1<<20), 1<<26)
	sc.Split(bufio.ScanWords)
	hdr := map[string]float64{}
	var first string
	for sc.Scan() {
		w := sc.Text()
		key := strings.ToLower(w)
		if _, err := strconv.ParseFloat(w, 64); err == nil {
			first = w
			break
		}
		if !sc.Scan() {
			return nil, fmt.Errorf("header key %q has no value", w)
		}
		v, err := strconv.ParseFloat(sc.Text(), 64)
		if err != nil {
			return nil, fmt.Errorf("header %s: %q is not a number", w, sc.Text())
		}
		hdr[key] = v
	}
	nodata, hasNoData, err := checkASCHeader(hdr, g)
	if err != nil {
		return nil, err
	}
	n := g.N()
	out := make([]float64, n)
	read := 0
	put := func(w string) error {
		if read >= n {
			return fmt.Errorf("more than %d values", n)
		}
		v, err := strconv.ParseFloat(w, 64)
		if err != nil {
			return fmt.Errorf("value %d: %q is not a number", read+1, w)
		}
		if hasNoData && v == nodata {
			v = math.NaN()
		}
		row, col := read/g.NX, read%g.NX
		out[(g.NY-1-row)*g.NX+col] = v
		read++
		return nil
	}
	if first != "" {
		if err := put(first); err != nil {
			return nil, err
		}
	}
	for sc.Scan() {
		if err := put(sc.Text()); err != nil {
			return nil, err
		}
	}
	if err := sc.Err(); err != nil {
		return nil, err
	}
	if read != n {
		return nil, fmt.Errorf("%d values, want %d", read, n)
	}
	return out, nil
}

// Table is a CSV file read by column name.
type Table struct {
	Header []string
	Rows   [][]string
	col    map[string]int
}

// ReadTable reads a CSV file with a header line.
func ReadTable(path string) (*Table, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("render: %w", err)
	}
	defer f.Close()
	return parseTable(path, f)
}

// parseTable reads CSV records with a header line from in; path names the
// file in messages.
func parseTable(path string, in io.Reader) (*Table, error) {
	r := csv.NewReader(in)
	r.TrimLeadingSpace = true
	recs, err := r.ReadAll()
	if err != nil {
		return nil, fmt.Errorf("render: %s: %w", path, err)
	}
	if len(recs) == 0 {
		return nil, fmt.Errorf("render: %s: empty file", path)
	}
	t := &Table{Header: recs[0], Rows: recs[1:], col: map[string]int{}}
	for i, h := range t.Header {
		t.col[strings.TrimSpace(strings.ToLower(h))] = i
	}
	return t, nil
}

// Has reports whether the table has the named column.
func (t *Table) Has(name string) bool { _, ok := t.col[name]; return ok }

// Str returns the text of column name in row r ("" if absent).
func (t *Table) Str(r int, name string) string {
	i, ok := t.col[name]
	if !ok || i >= len(t.Rows[r]) {
		return ""
	}
	return strings.TrimSpace(t.Rows[r][i])
}

// Num returns the number in column name of row r; NaN when absent, empty
// or not a number.
func (t *Table) Num(r int, name string) float64 {
	v, err := strconv.ParseFloat(t.Str(r, name), 64)
	if err != nil {
		return math.NaN()
	}
	return v
}

// need checks that the table has every column.
func (t *Table) need(path string, cols ...string) error {
	for _, c := range cols {
		if !t.Has(c) {
			return fmt.Errorf("render: %s has no column %q", path, c)
		}
	}
	return nil
}

// seriesBy groups rows by the text of column key (in order of first
// appearance) and returns, per group, the x and y columns.
func (t *Table) seriesBy(key, x, y string) (names []string, xs, ys [][]float64) {
	idx := map[string]int{}
	for r := range t.Rows {
		name := t.Str(r, key)
		n, ok := idx[name]
		if !ok {
			n = len(names)
			idx[name] = n
			names = append(names, name)
			xs = append(xs, nil)
			ys = append(ys, nil)
		}
		xv, yv := t.Num(r, x), t.Num(r, y)
		if math.IsNaN(xv) || math.IsNaN(yv) {
			continue
		}
		xs[n] = append(xs[n], xv)
		ys[n] = append(ys[n], yv)
	}
	return names, xs, ys
}

// ReadStreamlines reads streamlines.geojson: a FeatureCollection of
// LineStrings with properties injector, producer, flux and tof_days.
func ReadStreamlines(path string) ([]Polyline, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("render: %w", err)
	}
	return parseStreamlines(path, b)
}

// parseStreamlines parses the content of streamlines.geojson; path names
// the file in messages.
func parseStreamlines(path string, b []byte) ([]Polyline, error) {
	var fc struct {
		Type     string `json:"type"`
		Features []struct {
			Geometry struct {
				Type        string      `json:"type"`
				Coordinates [][]float64 `json:"coordinates"`
			} `json:"geometry"`
			Properties struct {
				Injector string   `json:"injector"`
				Producer string   `json:"producer"`
				Flux     float64  `json:"flux"`
				TOF      *float64 `json:"tof_days"`
			} `json:"properties"`
		} `json:"features"`
	}
	if err := json.Unmarshal(b, &fc); err != nil {
		return nil, fmt.Errorf("render: %s: %w", path, err)
	}
	if fc.Type != "FeatureCollection" {
		return nil, fmt.Errorf("render: %s: type %q, want FeatureCollection", path, fc.Type)
	}
	out := make([]Polyline, 0, len(fc.Features))
	for n, f := range fc.Features {
		if f.Geometry.Type != "LineString" {
			return nil, fmt.Errorf("render: %s: feature %d is a %q, want LineString", path, n, f.Geometry.Type)
		}
		p := Polyline{Injector: f.Properties.Injector, Producer: f.Properties.Producer, Flux: f.Properties.Flux, TotalTOF: math.NaN()}
		if f.Properties.TOF != nil {
			p.TotalTOF = *f.Properties.TOF
		}
		for i, c := range f.Geometry.Coordinates {
			if len(c) < 2 {
				return nil, fmt.Errorf("render: %s: feature %d point %d has %d coordinates", path, n, i, len(c))
			}
			p.X = append(p.X, c[0])
			p.Y = append(p.Y, c[1])
		}
		out = append(out, p)
	}
	return out, nil
}

// frameFile is a saturation raster with its day.
type frameFile struct {
	Day  float64
	Path string
	Name string // base name without extension
}

// listDays finds files named prefix<day>.asc in dir, sorted by day.
func listDays(dir, prefix string) []frameFile {
	m, _ := filepath.Glob(filepath.Join(dir, prefix+"*.asc"))
	var out []frameFile
	for _, p := range m {
		base := strings.TrimSuffix(filepath.Base(p), ".asc")
		d, err := strconv.ParseFloat(strings.TrimPrefix(base, prefix), 64)
		if err != nil {
			continue
		}
		out = append(out, frameFile{Day: d, Path: p, Name: base})
	}
	sort.Slice(out, func(a, b int) bool { return out[a].Day < out[b].Day })
	return out
}

package reservoir

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/interp"
)

// Table is relative permeability given as a table of water saturation
// against krw and kro, interpolated with the monotone piecewise-cubic
// method of Fritsch and Butland (1984, SIAM J. Sci. Stat. Comput. 5(2)
// 300-304; gonum's interp.FritschButland): the curves pass through every
// row, keep the monotonicity of the data and never leave its range. Each
// curve is fitted separately on every run of rows where it is strictly
// monotone, and is constant on runs where it is flat, so flat stretches
// (krw = 0 below swc, kro = 0 above 1 - sor) stay exactly flat and the
// kinks where a curve leaves them are kept, as in the Corey form, instead
// of being rounded off. Outside the table the end values hold.
//
// The endpoints come from the table: the connate water saturation swc is
// the last sw with krw = 0, and the residual oil saturation sor is one minus
// the first sw with kro = 0.
type Table struct {
	Sw       []float64 // water saturation, strictly increasing in [0, 1]
	KrwNodes []float64 // krw at Sw, non-decreasing
	KroNodes []float64 // kro at Sw, non-increasing
	Source   string    // file the table came from, for messages

	swc, sor float64
	krw, kro monotone
}

// NewTable validates the rows of a relative permeability table and returns
// the interpolating Table. Rows are numbered from 1 in errors.
func NewTable(sw, krw, kro []float64) (*Table, error) {
	row, msg := checkTable(sw, krw, kro)
	if msg != "" {
		if row > 0 {
			return nil, fmt.Errorf("relative permeability table row %d: %s", row, msg)
		}
		return nil, errors.New("relative permeability table: " + msg)
	}
	return newTable(sw, krw, kro), nil
}

func newTable(sw, krw, kro []float64) *Table {
	t := &Table{Sw: sw, KrwNodes: krw, KroNodes: kro}
	for i := range sw {
		if krw[i] == 0 {
			t.swc = sw[i]
		}
	}
	for i := range sw {
		if kro[i] == 0 {
			t.sor = 1 - sw[i]
			break
		}
	}
	t.krw = fitMonotone(sw, krw)
	t.kro = fitMonotone(sw, kro)
	return t
}

// monotone is a monotone piecewise interpolant of data with strictly
// increasing x: constant on runs of equal y, a Fritsch-Butland cubic on
// each run of strictly monotone y, continuous at the joins.
type monotone struct {
	xs, ys []float64
	runs   []run
}

// run covers the rows [lo, hi] of the data; fit is nil on a flat run.
type run struct {
	lo, hi int
	fit    *interp.FritschButland
}

// fitMonotone splits the data into flat and strictly monotone runs and
// fits each. xs must be strictly increasing with at least two rows (both
// checked by checkTable), so Fit cannot panic.
func fitMonotone(xs, ys []float64) monotone {
	m := monotone{xs: xs, ys: ys}
	flat := func(i int) bool { return ys[i+1] == ys[i] } // interval i
	for lo := 0; lo < len(xs)-1; {
		hi := lo + 1
		for hi < len(xs)-1 && flat(hi) == flat(lo) {
			hi++
		}
		r := run{lo: lo, hi: hi}
		if !flat(lo) {
			r.fit = &interp.FritschButland{}
			r.fit.Fit(xs[lo:hi+1], ys[lo:hi+1])
		}
		m.runs = append(m.runs, r)
		lo = hi
	}
	return m
}

// predict returns the interpolated value at x (the end values outside the
// data).
func (m *monotone) predict(x float64) float64 {
	n := len(m.xs)
	switch {
	case math.IsNaN(x):
		return math.NaN()
	case x <= m.xs[0]:
		return m.ys[0]
	case x >= m.xs[n-1]:
		return m.ys[n-1]
	}
	// The first run whose end is at or beyond x (binary search).
	lo, hi := 0, len(m.runs)-1
	for lo < hi {
		mid := (lo + hi) / 2
		if x <= m.xs[m.runs[mid].hi] {
			hi = mid
		} else {
			lo = mid + 1
		}
	}
	r := m.runs[lo]
	if r.fit == nil {
		return m.ys[r.lo]
	}
	return r.fit.Predict(x)
}

// checkTable returns the 1-based row of the first problem and a
// description, or 0 and "" if the table is usable. Row 0 with a message
// concerns the whole table.
func checkTable(sw, krw, kro []float64) (int, string) {
	n := len(sw)
	if len(krw) != n || len(kro) != n {
		return 0, fmt.Sprintf("columns of different lengths (%d, %d, %d)", n, len(krw), len(kro))
	}
	if n < 2 {
		return 0, fmt.Sprintf("needs at least two rows (has %d)", n)
	}
	for i := 0; i < n; i++ {
		for _, c := range []struct {
			name string
			v    float64
		}{{"sw", sw[i]}, {"krw", krw[i]}, {"kro", kro[i]}} {
			if !(c.v >= 0 && c.v <= 1) {
				return i + 1, fmt.Sprintf("%s = %g is outside [0, 1]", c.name, c.v)
			}
		}
		if i == 0 {
			continue
		}
		if !(sw[i] > sw[i-1]) {
			return i + 1, fmt.Sprintf("sw = %g does not increase (previous row %g)", sw[i], sw[i-1])
		}
		if krw[i] < krw[i-1] {
			return i + 1, fmt.Sprintf("krw = %g decreases (previous row %g); krw must not decrease as sw rises", krw[i], krw[i-1])
		}
		if kro[i] > kro[i-1] {
			return i + 1, fmt.Sprintf("kro = %g increases (previous row %g); kro must not increase as sw rises", kro[i], kro[i-1])
		}
	}
	if krw[0] != 0 {
		return 1, fmt.Sprintf("krw = %g: the table must start at krw = 0 (connate water)", krw[0])
	}
	if kro[n-1] != 0 {
		return n, fmt.Sprintf("kro = %g: the table must reach kro = 0 (residual oil)", kro[n-1])
	}
	last0 := 0
	for i := range krw {
		if krw[i] == 0 {
			last0 = i
		}
	}
	first0 := n - 1
	for i := range kro {
		if kro[i] == 0 {
			first0 = i
			break
		}
	}
	if first0 <= last0 {
		return first0 + 1, fmt.Sprintf("no mobile range: kro reaches 0 at sw = %g, before krw rises above 0 (last krw = 0 at sw = %g)", sw[first0], sw[last0])
	}
	return 0, ""
}

// Krw returns the interpolated water relative permeability at sw.
func (t *Table) Krw(sw float64) float64 { return clamp01(t.krw.predict(sw), sw) }

// Kro returns the interpolated oil relative permeability at sw.
func (t *Table) Kro(sw float64) float64 { return clamp01(t.kro.predict(sw), sw) }

// Endpoints returns the connate water saturation (last sw with krw = 0)
// and the residual oil saturation (one minus the first sw with kro = 0).
func (t *Table) Endpoints() (swc, sor float64) { return t.swc, t.sor }

func clamp01(v, sw float64) float64 {
	if math.IsNaN(sw) {
		return math.NaN()
	}
	return math.Min(1, math.Max(0, v))
}

// ReadTable reads a relative permeability table from a CSV file whose
// header names the columns sw, krw and kro (in any order, any case); blank
// lines and lines starting with '#' are skipped. Every problem is an
// *InputError naming the file and the line.
func ReadTable(path string) (*Table, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, openError(path, err)
	}
	defer f.Close()
	t, err := readTable(f, path)
	if err != nil {
		return nil, err
	}
	return t, nil
}

// maxTableRows bounds the rows of a relative permeability table.
const maxTableRows = 100000

func readTable(r io.Reader, path string) (*Table, error) {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 0, 4096), 1<<20)
	line := 0
	col := map[string]int{}
	var sw, krw, kro []float64
	var lines []int
	for sc.Scan() {
		line++
		s := strings.TrimSpace(strings.TrimPrefix(sc.Text(), "\ufeff"))
		if strings.IndexByte(s, 0) >= 0 {
			return nil, &InputError{Path: path, Line: line, Msg: "not a text file (NUL byte)"}
		}
		if s == "" || s[0] == '#' {
			continue
		}
		fields := strings.Split(s, ",")
		for i := range fields {
			fields[i] = strings.TrimSpace(fields[i])
		}
		if len(col) == 0 {
			for i, name := range fields {
				name = strings.ToLower(name)
				switch name {
				case "sw", "krw", "kro":
					if _, dup := col[name]; dup {
						return nil, &InputError{Path: path, Line: line, Msg: fmt.Sprintf("column %s named twice", name)}
					}
					col[name] = i
				default:
					msg := fmt.Sprintf("unknown column %q; the header must be sw,krw,kro", fields[i])
					if _, err := strconv.ParseFloat(fields[i], 64); err == nil {
						msg = "no header: the first line must be sw,krw,kro"
					}
					return nil, &InputError{Path: path, Line: line, Msg: msg}
				}
			}
			if len(col) != 3 {
				return nil, &InputError{Path: path, Line: line, Msg: "the header must name the three columns sw,krw,kro"}
			}
			continue
		}
		if len(fields) != 3 {
			return nil, &InputError{Path: path, Line: line, Msg: fmt.Sprintf("%d values; expected 3 (sw,krw,kro)", len(fields))}
		}
		var v [3]float64
		for idx, name := range [3]string{"sw", "krw", "kro"} {
			tok := fields[col[name]]
			x, err := strconv.ParseFloat(tok, 64)
			if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
				return nil, &InputError{Path: path, Line: line, Msg: fmt.Sprintf("%s: %q is not a finite number", name, tok)}
			}
			v[idx] = x
		}
		if len(sw) >= maxTableRows {
			return nil, &InputError{Path: path, Line: line, Msg: fmt.Sprintf("more than %d rows", maxTableRows), Err: ErrTooLarge}
		}
		sw, krw, kro = append(sw, v[0]), append(krw, v[1]), append(kro, v[2])
		lines = append(lines, line)
	}
	if err := sc.Err(); err != nil {
		return nil, &InputError{Path: path, Line: line + 1, Msg: "reading: " + err.Error(), Err: err}
	}
	if len(col) == 0 {
		return nil, &InputError{Path: path, Msg: "empty relative permeability table"}
	}
	row, msg := checkTable(sw, krw, kro)
	if msg != "" {
		l := line
		if row > 0 {
			l = lines[row-1]
		}
		return nil, &InputError{Path: path, Line: l, Msg: msg}
	}
	t := newTable(sw, krw, kro)
	t.Source = path
	return t, nil
}

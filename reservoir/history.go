package reservoir

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"slices"
	"strconv"
	"strings"
	"unicode/utf8"
)

// HistoryDrive says how a run with a history drives its wells over the
// history window.
type HistoryDrive string

// The history drives: DriveRates (the default) gives each well its
// observed rates period by period; DriveControls runs the case's own
// controls and only compares.
const (
	DriveRates    HistoryDrive = "rates"
	DriveControls HistoryDrive = "controls"
)

// MaxHistoryBytes is the largest history file read (64 MiB).
const MaxHistoryBytes = 64 << 20

// History is a case's production history (history: in the case file).
type History struct {
	File  string // path of the history file (joined to the case's folder)
	Drive HistoryDrive
	Rows  []HistoryRow // in file order
	Line  int          // line of history: in the case file
	// PressureDatum (history.pressure_datum, 0 when not given) is the
	// average reservoir pressure, pore-volume weighted, that sets the
	// pressure level of a region whose wells are all rate-controlled (as
	// under drive: rates), whose pressures are otherwise relative: BHPs
	// are then compared with the observed ones and with the wells' limits.
	PressureDatum float64
}

// HistoryRow is one row of a history file: one well over one period. A
// date is the end of its day: a period ending 2019-01-31 with start_date
// 2019-01-01 ends on day 31.
// Volumes are surface volumes over the period in the case's units (bbl or
// m3), NaN when not measured (a blank); BHP is the observed average
// bottom-hole pressure, NaN when blank.
type HistoryRow struct {
	Well       string
	Start, End float64 // days: the period is [Start, End)
	Oil, Water float64
	Injected   float64
	BHP        float64
	Line       int // line in the history file
}

// End returns the last day of the history (the end of its last period),
// 0 for none.
func (h *History) End() float64 {
	if h == nil {
		return 0
	}
	e := 0.0
	for _, r := range h.Rows {
		e = math.Max(e, r.End)
	}
	return e
}

// Bo returns the oil formation volume factor (1 when not set).
func (f Fluids) Bo() float64 {
	if f.OilFVF > 0 {
		return f.OilFVF
	}
	return 1
}

// Bw returns the water formation volume factor (1 when not set).
func (f Fluids) Bw() float64 {
	if f.WaterFVF > 0 {
		return f.WaterFVF
	}
	return 1
}

// OOIPSurface returns the original oil in place in surface volumes.
func (m *Model) OOIPSurface() float64 { return m.OOIP() / m.Fluids.Bo() }

// fvfCheck refuses formation volume factors outside (0, 10].
func fvfCheck(v float64) string {
	if !(v > 0) || v > 10 {
		return "is not a formation volume factor (reservoir volume per surface volume, in (0, 10])"
	}
	return ""
}

// readHistorySpec reads history: {file, drive, pressure_datum}.
func (d *decoder) readHistorySpec(m *Model, top *section) {
	s := d.section(top.vals["history"], "history", "", []string{"file", "drive", "pressure_datum"}, []string{"file"})
	if s == nil {
		return
	}
	h := &History{Drive: DriveRates, Line: top.keys["history"].Line}
	if f := d.str(s, "file"); f != "" {
		h.File = d.rel(f)
	} else if s.has("file") {
		d.fail(s, s.vals["file"], "history.file is empty")
	}
	if s.has("drive") {
		switch v := d.str(s, "drive"); HistoryDrive(v) {
		case DriveRates, DriveControls:
			h.Drive = HistoryDrive(v)
		default:
			msg := fmt.Sprintf("history.drive %q must be rates or controls", v)
			if sg, ok := nearest(v, []string{"rates", "controls"}); ok {
				msg += fmt.Sprintf("; did you mean %q?", sg)
			}
			d.fail(s, s.vals["drive"], "%s", msg)
		}
	}
	if s.has("pressure_datum") {
		h.PressureDatum = d.limited(s, "pressure_datum", 0, limBHP, nil)
	}
	m.History = h
}

// loadHistory reads the history file of m, once the wells and the
// schedule are known.
func (d *decoder) loadHistory(m *Model) error {
	h := m.History
	if h == nil || h.File == "" {
		return nil
	}
	f, err := os.Open(h.File)
	if err != nil {
		return &InputError{Path: d.path, Line: h.Line, Msg: fmt.Sprintf("history file: %v", err), Err: err}
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, MaxHistoryBytes+1))
	if err != nil {
		return &InputError{Path: h.File, Msg: fmt.Sprintf("reading: %v", err), Err: err}
	}
	if len(data) > MaxHistoryBytes {
		return &InputError{Path: h.File, Msg: fmt.Sprintf("larger than %d MiB", MaxHistoryBytes>>20), Err: ErrTooLarge}
	}
	rows, err := ParseHistory(h.File, data, m)
	if err != nil {
		return err
	}
	h.Rows = rows
	if h.Drive == DriveRates {
		return checkBalance(h.File, m, rows)
	}
	return nil
}

// checkBalance refuses a history that drives the wells by rates over a
// stretch of time in which wells produce but none injects, or the
// reverse: the model is incompressible, so it cannot give both their
// observed rates. The message names the line of a row of that stretch.
func checkBalance(path string, m *Model, rows []HistoryRow) error {
	ts := []float64{0}
	for _, r := range rows {
		ts = append(ts, r.Start, r.End)
	}
	slices.Sort(ts)
	ts = slices.Compact(ts)
	// Count, per stretch between consecutive period bounds, the rows that
	// produce and the rows that inject over it (difference arrays).
	dp, di := make([]int, len(ts)), make([]int, len(ts))
	for _, r := range rows {
		a, _ := slices.BinarySearch(ts, r.Start)
		b, _ := slices.BinarySearch(ts, r.End)
		d := dp
		v := zeroNaN(r.Oil) + zeroNaN(r.Water)
		if typeAt(m, m.WellIndex(r.Well), r.Start) == Injector {
			d, v = di, zeroNaN(r.Injected)
		}
		if v > 0 {
			d[a]++
			d[b]--
		}
	}
	np, ni := 0, 0
	for k := 0; k+1 < len(ts); k++ {
		np, ni = np+dp[k], ni+di[k]
		if (np > 0) == (ni > 0) {
			continue
		}
		a, b := ts[k], ts[k+1]
		line := 0
		for _, r := range rows {
			if r.Start <= a && r.End >= b {
				line = r.Line
				break
			}
		}
		what := "wells produce but no injector injects"
		if ni > 0 {
			what = "injectors inject but no producer produces"
		}
		when := fmt.Sprintf("from day %g to day %g", a, b)
		if !m.StartDate.IsZero() {
			when += fmt.Sprintf(" (%s to %s)", m.Date(a), m.PeriodEndDate(b))
		}
		return &InputError{Path: path, Line: line, Msg: fmt.Sprintf("%s %s: with history.drive: rates the incompressible model must balance production with injection in every period (primary production, or injection alone, cannot be driven by rates; use history.drive: controls)", when, what)}
	}
	return nil
}

func zeroNaN(v float64) float64 {
	if math.IsNaN(v) {
		return 0
	}
	return v
}

// historyColumns are the columns a history file may have.
var historyColumns = []string{"well", "date", "day", "oil", "water", "injected", "bhp"}

// ParseHistory reads a history file (its text is data, its name path, for
// messages) against the wells, schedule, start date and run end of m. The
// first problem is returned as an *InputError naming the file, the line
// and the column: an unknown column or well, a producer row with an
// injected volume (or an injector row with produced volumes) outside the
// period of a conversion, a negative or non-numeric value, a period of a
// well that ends on or before the previous one ends (or before the well
// opens), a date before start_date or without start_date, a row past the
// end of the run.
func ParseHistory(path string, data []byte, m *Model) ([]HistoryRow, error) {
	fail := func(line int, col, format string, a ...any) error {
		msg := fmt.Sprintf(format, a...)
		if col != "" {
			msg = "column " + col + ": " + msg
		}
		return &InputError{Path: path, Line: line, Msg: msg}
	}
	if i := bytes.IndexByte(data, 0); i >= 0 || !utf8.Valid(data) {
		return nil, fail(0, "", "not a text file; a history is CSV text")
	}
	r := csv.NewReader(bytes.NewReader(data))
	r.FieldsPerRecord = -1
	r.ReuseRecord = false
	header, err := r.Read()
	if errors.Is(err, io.EOF) {
		return nil, fail(1, "", "empty history file; expected a header such as well,date,oil,water,injected,bhp")
	}
	if err != nil {
		return nil, csvError(path, err)
	}
	col := map[string]int{}
	for i, h := range header {
		h = strings.ToLower(strings.TrimSpace(strings.TrimPrefix(h, "\ufeff")))
		known := false
		for _, c := range historyColumns {
			known = known || c == h
		}
		if !known {
			msg := fmt.Sprintf("unknown column %q (header field %d); columns are %s", h, i+1, strings.Join(historyColumns, ", "))
			if sg, ok := nearest(h, historyColumns); ok {
				msg = fmt.Sprintf("unknown column %q (header field %d); did you mean %q?", h, i+1, sg)
			}
			return nil, fail(1, "", "%s", msg)
		}
		if _, dup := col[h]; dup {
			return nil, fail(1, h, "given twice in the header")
		}
		col[h] = i
	}
	if _, ok := col["well"]; !ok {
		return nil, fail(1, "", "the header has no well column")
	}
	_, hasDate := col["date"]
	_, hasDay := col["day"]
	switch {
	case hasDate && hasDay:
		return nil, fail(1, "", "the header gives both date and day; give one")
	case !hasDate && !hasDay:
		return nil, fail(1, "", "the header has no date (or day) column: the end of each period")
	}
	timeCol := "date"
	if hasDay {
		timeCol = "day"
	}
	names := make([]string, len(m.Wells))
	for i, w := range m.Wells {
		names[i] = w.Name
	}
	lastEnd := map[string]float64{}
	lastLine := map[string]int{}
	var rows []HistoryRow
	for {
		rec, err := r.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return nil, csvError(path, err)
		}
		line, _ := r.FieldPos(0)
		if len(rec) == 1 && strings.TrimSpace(rec[0]) == "" {
			continue
		}
		if len(rec) != len(header) {
			return nil, fail(line, "", "%d fields, the header has %d", len(rec), len(header))
		}
		get := func(c string) (string, bool) {
			i, ok := col[c]
			if !ok {
				return "", false
			}
			return strings.TrimSpace(rec[i]), true
		}
		row := HistoryRow{Oil: math.NaN(), Water: math.NaN(), Injected: math.NaN(), BHP: math.NaN(), Line: line}
		row.Well, _ = get("well")
		wi := m.WellIndex(row.Well)
		if wi < 0 {
			msg := fmt.Sprintf("unknown well %q", row.Well)
			if sg, ok := nearest(row.Well, names); ok {
				msg += fmt.Sprintf("; did you mean %q?", sg)
			}
			return nil, fail(line, "well", "%s", msg)
		}
		tv, _ := get(timeCol)
		if timeCol == "date" {
			if tv == "" {
				return nil, fail(line, "date", "blank; every row needs the date its period ends")
			}
			day, err := DayOf(m.StartDate, tv)
			if err != nil {
				return nil, fail(line, "date", "%s", strings.TrimPrefix(err.Error(), "is "))
			}
			row.End = day + 1 // the end of the day
		} else {
			v, err := strconv.ParseFloat(tv, 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				if LooksLikeDate(tv) {
					return nil, fail(line, "day", "%q is a date; the header names a day column (day numbers)", tv)
				}
				return nil, fail(line, "day", "%q is not a day number", tv)
			}
			if v < 0 {
				return nil, fail(line, "day", "day %g is negative", v)
			}
			row.End = v
		}
		for _, c := range []struct {
			name string
			dst  *float64
		}{{"oil", &row.Oil}, {"water", &row.Water}, {"injected", &row.Injected}, {"bhp", &row.BHP}} {
			s, ok := get(c.name)
			if !ok || s == "" {
				continue
			}
			v, err := strconv.ParseFloat(s, 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fail(line, c.name, "%q is not a number (leave it blank when not measured)", s)
			}
			if v < 0 {
				return nil, fail(line, c.name, "%g is negative (volumes and pressures are positive)", v)
			}
			*c.dst = v
		}
		w := m.Wells[wi]
		start, seen := lastEnd[w.Name]
		if !seen {
			start = w.Open
		}
		row.Start = start
		switch {
		case seen && row.End <= start:
			return nil, fail(line, timeCol, "well %s: the period ends on day %g, not after the end of its previous row (line %d, day %g): rows of a well must be in order and must not overlap",
				w.Name, row.End, lastLine[w.Name], start)
		case !seen && row.End <= start:
			return nil, fail(line, timeCol, "well %s: the period ends on day %g, not after the well opens (day %g)", w.Name, row.End, start)
		case row.End > m.Run.End:
			return nil, fail(line, timeCol, "day %g is past the end of the run (run.end = %g)", row.End, m.Run.End)
		}
		typStart, typEnd := typeAt(m, wi, row.Start), typeAt(m, wi, row.End)
		converting := typStart != typEnd
		if !converting {
			if typStart == Producer && row.Injected > 0 {
				return nil, fail(line, "injected", "well %s is a producer over this period (day %g to %g); an injected volume is only allowed in the period of a conversion", w.Name, row.Start, row.End)
			}
			if typStart == Injector {
				for _, c := range []struct {
					n string
					v float64
				}{{"oil", row.Oil}, {"water", row.Water}} {
					if c.v > 0 {
						return nil, fail(line, c.n, "well %s is an injector over this period (day %g to %g); a produced volume is only allowed in the period of a conversion", w.Name, row.Start, row.End)
					}
				}
			}
		}
		lastEnd[w.Name], lastLine[w.Name] = row.End, line
		rows = append(rows, row)
	}
	if len(rows) == 0 {
		return nil, fail(1, "", "the history has a header but no row")
	}
	return rows, nil
}

// typeAt returns the type of well i at day t: its case type changed by the
// conversions of the schedule up to and including t.
func typeAt(m *Model, i int, t float64) WellType {
	typ := m.Wells[i].Type
	for _, e := range m.Schedule {
		if e.Time <= t && e.Well == m.Wells[i].Name && e.Convert != "" {
			typ = e.Convert
		}
	}
	return typ
}

// csvError turns an encoding/csv error into an *InputError with its line
// and column.
func csvError(path string, err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return &InputError{Path: path, Line: pe.Line, Msg: fmt.Sprintf("column %d: %v", pe.Column, pe.Err), Err: err}
	}
	return &InputError{Path: path, Msg: err.Error(), Err: err}
}

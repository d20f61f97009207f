package runfolder

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
)

// MatchFile is the comparison of a run with its production history, one
// row per well per history period (docs/OUTPUTS.md).
const MatchFile = "match.csv"

// ColDate is the calendar date column written beside every time_days
// column when the case gives start_date.
const ColDate = "date"

// MatchColumns is the header of match.csv.
var MatchColumns = []string{ColWell, ColDate, ColTime,
	"observed_water_cut", "model_water_cut", "observed_oil_rate", "model_oil_rate",
	"observed_water_rate", "model_water_rate", "observed_cum_oil", "model_cum_oil",
	"observed_cum_water", "model_cum_water", "observed_bhp", "model_bhp"}

// WithDate returns cols with ColDate after ColTime (a copy), the header of
// a file of a run whose case gives start_date.
func WithDate(cols []string) []string {
	out := make([]string, 0, len(cols)+1)
	for _, c := range cols {
		out = append(out, c)
		if c == ColTime {
			out = append(out, ColDate)
		}
	}
	return out
}

// History is the history object of summary.json: the run against the
// case's production history.
type History struct {
	EndDays               Float         `json:"end_days"`
	EndDate               string        `json:"end_date,omitempty"`
	Drive                 string        `json:"drive"`
	Rows                  int           `json:"rows"`
	Periods               int           `json:"periods"`
	GroupingTolerance     Float         `json:"grouping_tolerance"`
	RateGroups            int           `json:"rate_groups"`
	PressureSolves        int           `json:"pressure_solves"`
	BreakthroughThreshold Float         `json:"breakthrough_threshold"`
	Wells                 []HistoryWell `json:"wells"`
	Field                 HistoryWell   `json:"field"`
}

// HistoryWell is the match of one well, or of the field, with its history.
// Values that are not defined (no period with both an observed and a
// model value, no breakthrough) are null.
type HistoryWell struct {
	Name                     string     `json:"name"`
	Type                     string     `json:"type,omitempty"`
	WaterCutRMS              *float64   `json:"water_cut_rms"`
	ObservedBreakthroughDays *float64   `json:"observed_breakthrough_days"`
	ObservedBreakthroughDate string     `json:"observed_breakthrough_date,omitempty"`
	ModelBreakthroughDays    *float64   `json:"model_breakthrough_days"`
	ModelBreakthroughDate    string     `json:"model_breakthrough_date,omitempty"`
	BreakthroughErrorDays    *float64   `json:"breakthrough_error_days"`
	CumOilError              *float64   `json:"cum_oil_error"`
	CumWaterError            *float64   `json:"cum_water_error"`
	BHPRMS                   *float64   `json:"bhp_rms"`
	LimitPeriods             [][2]Float `json:"limit_periods,omitempty"`
}

// MatchRow is one row of match.csv as read back: a well over one history
// period. Values not measured or not defined (blank in the file) are NaN.
type MatchRow struct {
	Well                       string
	Date                       string // blank without start_date
	Time                       float64
	ObsWaterCut, ModWaterCut   float64
	ObsOilRate, ModOilRate     float64
	ObsWaterRate, ModWaterRate float64
	ObsCumOil, ModCumOil       float64
	ObsCumWater, ModCumWater   float64
	ObsBHP, ModBHP             float64
}

// ReadMatch reads match.csv of the run folder dir. The header must hold
// every column of MatchColumns (in any order); a blank value is NaN, any
// other value must be a finite number, and a well's times must increase.
// Errors name the file, the line and the column.
func ReadMatch(dir string) ([]MatchRow, error) {
	path := filepath.Join(dir, MatchFile)
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return ParseMatch(path, f)
}

// ParseMatch reads match.csv from in; path names it in errors.
func ParseMatch(path string, in io.Reader) ([]MatchRow, error) {
	r := csv.NewReader(in)
	r.FieldsPerRecord = -1
	head, err := r.Read()
	if err != nil {
		return nil, fmt.Errorf("%s: header: %w", path, err)
	}
	col := map[string]int{}
	for i, h := range head {
		col[h] = i
	}
	for _, c := range MatchColumns {
		if _, ok := col[c]; !ok {
			return nil, fmt.Errorf("%s:1: no %s column", path, c)
		}
	}
	var out []MatchRow
	last := map[string]float64{}
	for line := 2; ; line++ {
		rec, err := r.Read()
		if err == io.EOF {
			return out, nil
		}
		if err != nil {
			return nil, fmt.Errorf("%s: %w", path, err)
		}
		if len(rec) != len(head) {
			return nil, fmt.Errorf("%s:%d: %d fields, the header has %d", path, line, len(rec), len(head))
		}
		num := func(c string) (float64, error) {
			s := rec[col[c]]
			if s == "" {
				return math.NaN(), nil
			}
			v, err := strconv.ParseFloat(s, 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return 0, fmt.Errorf("%s:%d: column %s: %q is not a number", path, line, c, s)
			}
			return v, nil
		}
		m := MatchRow{Well: rec[col[ColWell]], Date: rec[col[ColDate]]}
		if m.Well == "" {
			return nil, fmt.Errorf("%s:%d: column %s: no well name", path, line, ColWell)
		}
		dst := []*float64{&m.Time, &m.ObsWaterCut, &m.ModWaterCut, &m.ObsOilRate, &m.ModOilRate,
			&m.ObsWaterRate, &m.ModWaterRate, &m.ObsCumOil, &m.ModCumOil, &m.ObsCumWater, &m.ModCumWater, &m.ObsBHP, &m.ModBHP}
		for i, c := range MatchColumns[2:] {
			if *dst[i], err = num(c); err != nil {
				return nil, err
			}
		}
		if math.IsNaN(m.Time) {
			return nil, fmt.Errorf("%s:%d: column %s: no time", path, line, ColTime)
		}
		if t, ok := last[m.Well]; ok && !(m.Time > t) {
			return nil, fmt.Errorf("%s:%d: well %s: time %g does not increase", path, line, m.Well, m.Time)
		}
		last[m.Well] = m.Time
		out = append(out, m)
	}
}

// SameObserved reports whether two runs' match.csv rows hold the same
// history: the same wells, period ends and observed values, row by row
// (the observed columns come from the history file alone, so two runs of
// the same history file give the same ones). Two empty lists are not a
// history.
func SameObserved(a, b []MatchRow) bool {
	if len(a) == 0 || len(a) != len(b) {
		return false
	}
	same := func(x, y float64) bool { return x == y || math.IsNaN(x) && math.IsNaN(y) }
	for i := range a {
		x, y := a[i], b[i]
		if x.Well != y.Well || x.Time != y.Time || !same(x.ObsWaterCut, y.ObsWaterCut) || !same(x.ObsOilRate, y.ObsOilRate) ||
			!same(x.ObsWaterRate, y.ObsWaterRate) || !same(x.ObsCumOil, y.ObsCumOil) || !same(x.ObsCumWater, y.ObsCumWater) || !same(x.ObsBHP, y.ObsBHP) {
			return false
		}
	}
	return true
}

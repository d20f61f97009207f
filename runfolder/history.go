package runfolder

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

package runfolder

import (
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"math"
	"os"
	"path/filepath"

	"floodtrace/reservoir"
)

// Float is a number of summary.json that is never absent in a good run.
// A value that is not finite (NaN, an infinity) encodes as null rather
// than making the encoding fail, and null decodes as NaN.
type Float float64

// MarshalJSON writes f as encoding/json writes a float64, or null when f
// is not finite.
func (f Float) MarshalJSON() ([]byte, error) {
	v := float64(f)
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return []byte("null"), nil
	}
	return json.Marshal(v)
}

// UnmarshalJSON reads a number, or null as NaN.
func (f *Float) UnmarshalJSON(b []byte) error {
	if string(b) == "null" {
		*f = Float(math.NaN())
		return nil
	}
	var v float64
	if err := json.Unmarshal(b, &v); err != nil {
		return err
	}
	*f = Float(v)
	return nil
}

// Opt returns a pointer to v, or nil when v is not finite: the value of
// a nullable field of summary.json.
func Opt(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}

// Value returns *p, or NaN when p is nil.
func Value(p *float64) float64 {
	if p == nil {
		return math.NaN()
	}
	return *p
}

// Summary is the content of summary.json (docs/OUTPUTS.md), the one
// description of it that floodtrace writes and reads. Nullable fields are
// pointers (nil = null: an event that does not happen, a value that could
// not be computed); every other number is a Float.
type Summary struct {
	Title      string     `json:"title"`
	CaseFile   string     `json:"case_file"`
	Units      string     `json:"units"`
	UnitLabels UnitLabels `json:"unit_labels"`
	Grid       Grid       `json:"grid"`
	Wells      []Well     `json:"wells"`
	Faults     []Fault    `json:"faults"`
	Engine     string     `json:"engine"`
	EndDays    Float      `json:"end_days"`
	// StartDate and EndDate are the calendar dates of day 0 and of the
	// end, when the case gives start_date.
	StartDate  string `json:"start_date,omitempty"`
	EndDate    string `json:"end_date,omitempty"`
	PoreVolume Float  `json:"pore_volume"`
	OOIP       Float  `json:"ooip"`
	// OOIPSurface is the oil initially in place in surface volumes; it and
	// every other *_surface value are present only when the case gives a
	// formation volume factor (fluids.oil_fvf or fluids.water_fvf).
	OOIPSurface *Float `json:"ooip_surface,omitempty"`
	// OilFVF and WaterFVF are the case's formation volume factors
	// (reservoir volume per surface volume), present with the *_surface
	// values; readers take 1 when they are absent.
	OilFVF    *Float     `json:"oil_fvf,omitempty"`
	WaterFVF  *Float     `json:"water_fvf,omitempty"`
	Producers []Producer `json:"producers"`
	Injectors []Injector `json:"injectors"`
	Field     Field      `json:"field"`
	// LorenzCoefficient is null when the F-Phi curve is not valid (no
	// streamline, for instance).
	LorenzCoefficient *float64   `json:"lorenz_coefficient"`
	MassBalanceError  Float      `json:"mass_balance_error"`
	Streamlines       int        `json:"streamlines"`
	PressureSolver    Solver     `json:"pressure_solver"`
	Snapshots         []Snapshot `json:"snapshots"`
	// History compares the run with the case's production history; absent
	// without one.
	History  *History `json:"history,omitempty"`
	Warnings []string `json:"warnings"`
	// FieldLimitDays is the day the field water cut reached
	// run.field_max_water_cut and the run ended (EndDays is then that
	// day); absent when it did not.
	FieldLimitDays *float64 `json:"field_limit_days,omitempty"`
	// Gravity is present only for a case with depth (rock.depth).
	Gravity *Gravity `json:"gravity,omitempty"`
}

// Gravity describes the structure of a case with depth: the dip range
// over the active cells, the densities and the gravity number
// (reservoir.Model.GravityNumber; null when it is not defined, without a
// rate-controlled injector open at the start).
type Gravity struct {
	GravityNumber *float64 `json:"gravity_number"`
	DipMinDegrees Float    `json:"dip_min_degrees"`
	DipMaxDegrees Float    `json:"dip_max_degrees"`
	WaterDensity  Float    `json:"water_density"`
	OilDensity    Float    `json:"oil_density"`
}

// UnitLabels names the units of lengths, pressures, rates and volumes.
type UnitLabels struct {
	Length   string `json:"length"`
	Pressure string `json:"pressure"`
	Rate     string `json:"rate"`
	Volume   string `json:"volume"`
	// SurfaceVolume is the unit of the surface volumes ("stb" or "sm3"),
	// present when the case gives a formation volume factor.
	SurfaceVolume string `json:"surface_volume,omitempty"`
}

// Grid is the grid block of summary.json.
type Grid struct {
	NX int   `json:"nx"`
	NY int   `json:"ny"`
	DX Float `json:"dx"`
	DY Float `json:"dy"`
	X0 Float `json:"x0"`
	Y0 Float `json:"y0"`
}

// Reservoir returns the grid as a reservoir.Grid.
func (g Grid) Reservoir() reservoir.Grid {
	return reservoir.Grid{NX: g.NX, NY: g.NY, DX: float64(g.DX), DY: float64(g.DY), X0: float64(g.X0), Y0: float64(g.Y0)}
}

// Well is a well's place in summary.json.
type Well struct {
	Name string `json:"name"`
	Type string `json:"type"`
	X    Float  `json:"x"`
	Y    Float  `json:"y"`
	I    int    `json:"i"`
	J    int    `json:"j"`
}

// Fault is a fault trace in summary.json.
type Fault struct {
	Name  string     `json:"name"`
	Trace [][2]Float `json:"trace"`
}

// Producer is one producer's results in summary.json. The water
// breakthrough is null when it does not happen within the run; the tracer
// breakthrough (a property of the flow field) is null only when no
// streamline reaches the producer.
type Producer struct {
	Name                   string   `json:"name"`
	TracerBreakthroughDays *float64 `json:"tracer_breakthrough_days"`
	TracerBreakthroughPVI  *float64 `json:"tracer_breakthrough_pvi"`
	BreakthroughDays       *float64 `json:"breakthrough_days"`
	BreakthroughPVI        *float64 `json:"breakthrough_pvi"`
	FinalWaterCut          Float    `json:"final_water_cut"`
	CumOil                 Float    `json:"cum_oil"`
	CumWater               Float    `json:"cum_water"`
	// CumOilSurface and CumWaterSurface are the cumulative volumes in
	// surface volumes (with a formation volume factor only).
	CumOilSurface   *Float `json:"cum_oil_surface,omitempty"`
	CumWaterSurface *Float `json:"cum_water_surface,omitempty"`
	// Limit names the economic limit the producer reached ("max_water_cut"
	// or "min_oil_rate") and LimitDays the day it did, from which it is
	// shut in; both absent when it reached none (or the case has none).
	Limit     string   `json:"limit,omitempty"`
	LimitDays *float64 `json:"limit_days,omitempty"`
}

// Injector is one injector's totals in summary.json.
type Injector struct {
	Name     string `json:"name"`
	CumWater Float  `json:"cum_water"`
	// CumWaterSurface is the injected water in surface volumes (with a
	// formation volume factor only).
	CumWaterSurface *Float `json:"cum_water_surface,omitempty"`
	MaxBHPReached   bool   `json:"max_bhp_reached"`
}

// Field holds the field totals at the end of the run.
type Field struct {
	FinalPVI            Float `json:"final_pvi"`
	FinalRecoveryFactor Float `json:"final_recovery_factor"`
	FinalWaterCut       Float `json:"final_water_cut"`
	FinalCumOil         Float `json:"final_cum_oil"`
	FinalCumWater       Float `json:"final_cum_water"`
	// FinalCumOilSurface and FinalCumWaterSurface are the field's
	// cumulative volumes in surface volumes (with a formation volume
	// factor only).
	FinalCumOilSurface   *Float `json:"final_cum_oil_surface,omitempty"`
	FinalCumWaterSurface *Float `json:"final_cum_water_surface,omitempty"`
}

// Solver reports the pressure solves.
type Solver struct {
	Iterations       int   `json:"iterations"`
	RelativeResidual Float `json:"relative_residual"`
	Solves           int   `json:"solves"`
}

// Snapshot names a saturation map (SnapshotName).
type Snapshot struct {
	TimeDays Float  `json:"time_days"`
	PVI      Float  `json:"pvi"`
	File     string `json:"file"`
	Date     string `json:"date,omitempty"`
}

// Encode returns the content of summary.json: indented JSON and a final
// newline. A value that is not finite, in a Float or behind a nullable
// pointer, is written as null: encoding never fails on NaN.
func (s *Summary) Encode() ([]byte, error) {
	c := *s
	c.LorenzCoefficient = finite(c.LorenzCoefficient)
	c.FieldLimitDays = finite(c.FieldLimitDays)
	c.Producers = make([]Producer, len(s.Producers))
	for i, p := range s.Producers {
		p.TracerBreakthroughDays, p.TracerBreakthroughPVI = finite(p.TracerBreakthroughDays), finite(p.TracerBreakthroughPVI)
		p.BreakthroughDays, p.BreakthroughPVI = finite(p.BreakthroughDays), finite(p.BreakthroughPVI)
		p.LimitDays = finite(p.LimitDays)
		c.Producers[i] = p
	}
	if s.Producers == nil {
		c.Producers = nil
	}
	b, err := json.MarshalIndent(&c, "", "  ")
	if err != nil {
		return nil, fmt.Errorf("encoding %s: %w", SummaryFile, err)
	}
	return append(b, '\n'), nil
}

// finite returns p, or nil when *p is not finite.
func finite(p *float64) *float64 {
	if p == nil {
		return nil
	}
	return Opt(*p)
}

// Finished returns nil when dir holds a finished run (summary.json, which
// a run writes last, is present) and an error saying why not otherwise.
func Finished(dir string) error {
	_, err := os.Stat(filepath.Join(dir, SummaryFile))
	if errors.Is(err, fs.ErrNotExist) {
		return fmt.Errorf("%s: no %s: not a finished floodtrace run (not a run folder, or an unfinished run)", dir, SummaryFile)
	}
	if err != nil {
		return err
	}
	return nil
}

// ReadSummary reads DIR/summary.json (ParseSummary). A folder without it
// holds no finished run and is an error.
func ReadSummary(dir string) (*Summary, error) {
	path := filepath.Join(dir, SummaryFile)
	b, err := os.ReadFile(path)
	if errors.Is(err, fs.ErrNotExist) {
		return nil, Finished(dir)
	}
	if err != nil {
		return nil, err
	}
	return ParseSummary(path, b)
}

// ParseSummary decodes the content of a summary.json; path names it in
// messages. Unit labels that are absent are filled in from the unit
// system. Check the result with Check before drawing from it.
func ParseSummary(path string, b []byte) (*Summary, error) {
	var s Summary
	if err := json.Unmarshal(b, &s); err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	if s.UnitLabels.Length == "" {
		l, _, _, r, p, v := reservoir.UnitSystem(s.Units).Labels()
		s.UnitLabels = UnitLabels{Length: l, Pressure: p, Rate: r, Volume: v}
	}
	return &s, nil
}

// maxCells bounds the grid a summary may describe (a damaged file must
// not make a reader allocate without limit).
const maxCells = 50_000_000

// Check reports a summary that cannot describe a run: a grid without
// cells or too large, a well that is neither injector nor producer. path
// names the file in messages.
func (s *Summary) Check(path string) error {
	g := s.Grid
	if g.NX <= 0 || g.NY <= 0 || !(g.DX > 0) || !(g.DY > 0) {
		return fmt.Errorf("%s: invalid grid nx=%d ny=%d dx=%v dy=%v", path, g.NX, g.NY, float64(g.DX), float64(g.DY))
	}
	if int64(g.NX)*int64(g.NY) > maxCells {
		return fmt.Errorf("%s: grid %dx%d too large", path, g.NX, g.NY)
	}
	for _, w := range s.Wells {
		if w.Type != "injector" && w.Type != "producer" {
			return fmt.Errorf("%s: well %q has type %q, want injector or producer", path, w.Name, w.Type)
		}
	}
	return nil
}

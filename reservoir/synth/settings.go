package synth

import (
	"fmt"
	"math"
	"strings"
)

// Variogram names a stationary variogram model. Each is written in terms of
// the practical range a, the lag at which the variogram reaches 95 % of the
// sill (exactly the sill for the spherical model):
//
//	exponential  gamma(h) = sigma^2 * (1 - exp(-3h/a))
//	gaussian     gamma(h) = sigma^2 * (1 - exp(-3h^2/a^2))
//	spherical    gamma(h) = sigma^2 * (1.5 h/a - 0.5 (h/a)^3) for h < a, sigma^2 beyond
//
// (Deutsch and Journel 1998, GSLIB, from memory.)
type Variogram string

// The supported variogram models. The empty string means Exponential.
const (
	Exponential Variogram = "exponential"
	Gaussian    Variogram = "gaussian"
	Spherical   Variogram = "spherical"
)

// Porosity defaults and clipping bounds.
const (
	DefaultPoroMean        = 0.2
	DefaultPoroStd         = 0.03
	DefaultPoroCorrelation = 0.7
	MinPorosity            = 0.01
	MaxPorosity            = 0.45
)

// Settings describes a log-normal permeability field and its porosity
// companion. The zero value of every optional field selects a default, so
// only NX, NY and RangeMajor must be set for a usable field.
type Settings struct {
	// NX and NY are the number of cells east and north (both > 0).
	NX, NY int
	// DX and DY are the cell sizes in map units; zero means 1 (ranges are
	// then in cells).
	DX, DY float64
	// RangeMajor and RangeMinor are the practical ranges along the major and
	// minor axes, in map units. RangeMajor must be > 0; zero RangeMinor means
	// RangeMajor (isotropic). RangeMinor may not exceed RangeMajor.
	RangeMajor, RangeMinor float64
	// Azimuth of the major axis in degrees clockwise from north: 0 puts the
	// long correlation north-south, 90 east-west.
	Azimuth float64
	// Model is the variogram model; empty means Exponential.
	Model Variogram
	// LogMean and LogStd are the mean and standard deviation of ln(k) with k
	// in md, so the mean permeability is exp(LogMean + LogStd^2/2). Zero
	// LogStd gives a homogeneous field of exp(LogMean) md.
	LogMean, LogStd float64
	// Seed selects the realization; the same seed gives the same field.
	Seed uint64
	// PoroMean and PoroStd are the mean and standard deviation of porosity
	// (defaults 0.2 and 0.03). PoroCorrelation is its correlation with ln(k)
	// (default 0.7). Zeros select the defaults unless PoroLiteral is set.
	PoroMean, PoroStd, PoroCorrelation float64
	// PoroLiteral makes PoroMean, PoroStd and PoroCorrelation count as given,
	// zeros included (for a constant porosity or one independent of k).
	PoroLiteral bool
}

// SettingsError reports a setting that cannot be honoured.
type SettingsError struct {
	Field  string  // name of the Settings or ChannelSettings field
	Value  float64 // the offending value
	Reason string  // what is wrong with it
}

// Error describes the setting, its value and the problem.
func (e *SettingsError) Error() string {
	return fmt.Sprintf("synth: %s = %g: %s", e.Field, e.Value, e.Reason)
}

func bad(field string, v float64, reason string) error {
	return &SettingsError{Field: field, Value: v, Reason: reason}
}

// maxCells bounds the number of cells of a map and of the periodic
// embedding (each embedding cell costs two complex128 values).
const (
	maxGridCells      = 1 << 24
	maxEmbeddingCells = 1 << 23 // default of embeddingBudget
)

// embeddingBudget is the largest embedding NewGenerator builds; a variable
// only so that tests can exercise the budget without huge transforms.
var embeddingBudget = maxEmbeddingCells

// finite reports whether v is neither NaN nor infinite.
func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// Bounds on every length (cell sizes, ranges, channel dimensions) in map
// units. They are far outside any real map in ft, m or km and keep every
// lag-over-range ratio finite.
const (
	minLength = 1e-9
	maxLength = 1e12
)

// length checks a length that may be zero only when def > 0 (then it is
// replaced by def) and must otherwise lie in [minLength, maxLength].
func length(name string, v *float64, def float64, what string) error {
	if *v == 0 && def > 0 {
		*v = def
	}
	if !finite(*v) || *v < minLength || *v > maxLength {
		return bad(name, *v, fmt.Sprintf("must be %s between %g and %g", what, minLength, maxLength))
	}
	return nil
}

// resolved returns s with defaults filled in, or the first problem found.
func (s Settings) resolved() (Settings, error) {
	if s.NX <= 0 {
		return s, bad("NX", float64(s.NX), "must be positive")
	}
	if s.NY <= 0 {
		return s, bad("NY", float64(s.NY), "must be positive")
	}
	if s.NX > maxGridCells/s.NY {
		return s, bad("NX*NY", float64(s.NX)*float64(s.NY), fmt.Sprintf("more than %d cells", maxGridCells))
	}
	if err := length("DX", &s.DX, 1, "a cell size (zero means 1)"); err != nil {
		return s, err
	}
	if err := length("DY", &s.DY, 1, "a cell size (zero means 1)"); err != nil {
		return s, err
	}
	if err := length("RangeMajor", &s.RangeMajor, 0, "a positive range"); err != nil {
		return s, err
	}
	if err := length("RangeMinor", &s.RangeMinor, s.RangeMajor, "a positive range (zero means RangeMajor)"); err != nil {
		return s, err
	}
	if s.RangeMinor > s.RangeMajor {
		return s, bad("RangeMinor", s.RangeMinor, fmt.Sprintf("exceeds RangeMajor %g; swap them and turn Azimuth by 90", s.RangeMajor))
	}
	if !finite(s.Azimuth) {
		return s, bad("Azimuth", s.Azimuth, "must be finite")
	}
	m := Variogram(strings.ToLower(strings.TrimSpace(string(s.Model))))
	switch m {
	case "":
		m = Exponential
	case Exponential, Gaussian, Spherical:
	default:
		return s, &SettingsError{Field: "Model", Value: math.NaN(),
			Reason: fmt.Sprintf("unknown variogram %q (want exponential, gaussian or spherical)", s.Model)}
	}
	s.Model = m
	if !finite(s.LogMean) {
		return s, bad("LogMean", s.LogMean, "must be finite")
	}
	if !finite(s.LogStd) || s.LogStd < 0 {
		return s, bad("LogStd", s.LogStd, "must be zero or positive")
	}
	if !s.PoroLiteral {
		if s.PoroMean == 0 {
			s.PoroMean = DefaultPoroMean
		}
		if s.PoroStd == 0 {
			s.PoroStd = DefaultPoroStd
		}
		if s.PoroCorrelation == 0 {
			s.PoroCorrelation = DefaultPoroCorrelation
		}
	}
	if !finite(s.PoroMean) || s.PoroMean < MinPorosity || s.PoroMean > MaxPorosity {
		return s, bad("PoroMean", s.PoroMean, fmt.Sprintf("must lie in [%g, %g]", MinPorosity, MaxPorosity))
	}
	if !finite(s.PoroStd) || s.PoroStd < 0 {
		return s, bad("PoroStd", s.PoroStd, "must be zero or positive")
	}
	if !finite(s.PoroCorrelation) || s.PoroCorrelation < -1 || s.PoroCorrelation > 1 {
		return s, bad("PoroCorrelation", s.PoroCorrelation, "must lie in [-1, 1]")
	}
	return s, nil
}

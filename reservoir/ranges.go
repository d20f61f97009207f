package reservoir

import (
	"fmt"
	"math"
	"strings"

	"gopkg.in/yaml.v3"
)

// Bound is the span of values of one physical input in one unit system.
// A value outside [Lo, Hi] is refused; a value inside it but outside
// [UsualLo, UsualHi] is accepted with a warning.
type Bound struct {
	Lo, Hi           float64
	UsualLo, UsualHi float64
}

// Limit is the accepted and the usual range of one physical input, in
// field and in metric units. Positive inputs refuse zero and negative
// values with "is not positive" (NonNegative ones refuse negative values
// with "is negative") before the range is checked.
type Limit struct {
	Name        string // what the input is, for the table
	Keys        string // where it is given in a case file (Markdown)
	UnitField   string
	UnitMetric  string
	Field       Bound
	Metric      Bound
	Positive    bool
	NonNegative bool
	HiOpen      bool // Hi itself is refused
}

// Bound returns the bound of the unit system u.
func (l Limit) Bound(u UnitSystem) Bound {
	if u == Metric {
		return l.Metric
	}
	return l.Field
}

// Unit returns the unit label of u ("" for dimensionless inputs).
func (l Limit) Unit(u UnitSystem) string {
	if u == Metric {
		return l.UnitMetric
	}
	return l.UnitField
}

// refuse returns "" for an accepted value or a phrase such as "is outside
// the accepted range [1e-07, 1e+07] md" (or "is not positive").
func (l Limit) refuse(u UnitSystem, v float64) string {
	switch {
	case math.IsNaN(v) || math.IsInf(v, 0):
		return "is not a finite number"
	case l.Positive && !(v > 0):
		return "is not positive"
	case l.NonNegative && v < 0:
		return "is negative"
	}
	b := l.Bound(u)
	if v < b.Lo || v > b.Hi || (l.HiOpen && v == b.Hi) {
		r := "]"
		if l.HiOpen {
			r = ")"
		}
		return fmt.Sprintf("is outside the accepted range [%g, %g%s%s", b.Lo, b.Hi, r, unitSuffix(l.Unit(u)))
	}
	return ""
}

// unusual returns "" for a usual value or a phrase for a warning, such as
// "is outside the usual range [0.001, 100000] md".
func (l Limit) unusual(u UnitSystem, v float64) string {
	b := l.Bound(u)
	if v < b.UsualLo || v > b.UsualHi {
		return fmt.Sprintf("is outside the usual range [%g, %g]%s", b.UsualLo, b.UsualHi, unitSuffix(l.Unit(u)))
	}
	return ""
}

func unitSuffix(unit string) string {
	if unit == "" {
		return ""
	}
	return " " + unit
}

// The physical inputs with a range (indices into Limits).
const (
	limPerm = iota
	limPorosity
	limThickness
	limDX
	limCells
	limWaterVisc
	limOilVisc
	limMobileOil
	limSatEnd
	limKrMax
	limCoreyExp
	limMobileRange
	limRate
	limBHP
	limRadius
	limSkin
	limTime
	limEnd
	limStreamlines
	limFaultMult
	limWaterCut
	limOilRate
	limDepth
	limDensity
)

// Limits holds the range of every physical input. The ranges are common
// practice: the accepted range covers every value met in oil reservoirs
// with a wide margin and keeps the pressure equation well within floating
// point; the usual range is where most waterfloods lie, and a value
// outside it is more often a typing or unit error than a real rock, fluid
// or well. docs and README.md print this table (see LimitsMarkdown).
var Limits = []Limit{
	limPerm: {Name: "permeability, per active cell, both directions", Keys: "`rock.perm`, `rock.perm_y` (number or map)", UnitField: "md", UnitMetric: "mD",
		Field: Bound{1e-7, 1e7, 1e-3, 1e5}, Metric: Bound{1e-7, 1e7, 1e-3, 1e5}, Positive: true},
	limPorosity: {Name: "porosity, per active cell", Keys: "`rock.porosity` (number or map)",
		Field: Bound{1e-4, 0.75, 0.01, 0.45}, Metric: Bound{1e-4, 0.75, 0.01, 0.45}, Positive: true},
	limThickness: {Name: "net thickness, per active cell", Keys: "`rock.thickness` (number or map)", UnitField: "ft", UnitMetric: "m",
		Field: Bound{0.1, 1e4, 1, 2000}, Metric: Bound{0.03, 3000, 0.3, 600}, Positive: true},
	limDX: {Name: "cell size", Keys: "`grid.dx`, `grid.dy`, a raster's `cellsize`", UnitField: "ft", UnitMetric: "m",
		Field: Bound{0.1, 1e5, 1, 1e4}, Metric: Bound{0.03, 3e4, 0.3, 3000}, Positive: true},
	limCells: {Name: "number of cells", Keys: "`grid.nx` times `grid.ny`, a raster's `ncols` times `nrows`",
		Field: Bound{1, MaxCells, 1, 1e7}, Metric: Bound{1, MaxCells, 1, 1e7}, Positive: true},
	limWaterVisc: {Name: "water viscosity", Keys: "`fluids.water_viscosity`", UnitField: "cp", UnitMetric: "cP",
		Field: Bound{0.01, 100, 0.1, 5}, Metric: Bound{0.01, 100, 0.1, 5}, Positive: true},
	limOilVisc: {Name: "oil viscosity", Keys: "`fluids.oil_viscosity`", UnitField: "cp", UnitMetric: "cP",
		Field: Bound{0.01, 1e6, 0.1, 1e4}, Metric: Bound{0.01, 1e6, 0.1, 1e4}, Positive: true},
	limMobileOil: {Name: "movable oil at the start, 1 - sor - initial_water_saturation", Keys: "`fluids.initial_water_saturation`",
		Field: Bound{0, 1, 0.05, 1}, Metric: Bound{0, 1, 0.05, 1}},
	limSatEnd: {Name: "end-point saturations", Keys: "`relperm.corey.swc`, `relperm.corey.sor`",
		Field: Bound{0, 1, 0, 0.6}, Metric: Bound{0, 1, 0, 0.6}, NonNegative: true, HiOpen: true},
	limKrMax: {Name: "end-point relative permeabilities", Keys: "`relperm.corey.krw_max`, `relperm.corey.kro_max`",
		Field: Bound{0, 1, 0.01, 1}, Metric: Bound{0, 1, 0.01, 1}, Positive: true},
	limCoreyExp: {Name: "Corey exponents", Keys: "`relperm.corey.nw`, `relperm.corey.no`",
		Field: Bound{1, 20, 1, 8}, Metric: Bound{1, 20, 1, 8}, Positive: true},
	limMobileRange: {Name: "mobile saturation range, 1 - swc - sor", Keys: "`relperm` (Corey or table)",
		Field: Bound{0, 1, 0.1, 1}, Metric: Bound{0, 1, 0.1, 1}, Positive: true},
	limRate: {Name: "well rate", Keys: "well `rate`, `min_rate`, `max_rate`, event `rate`", UnitField: "bbl/day", UnitMetric: "m3/day",
		Field: Bound{0.01, 1e6, 1, 1e5}, Metric: Bound{0.001, 1.6e5, 0.1, 1.6e4}, Positive: true},
	limBHP: {Name: "bottom-hole pressure and its limits", Keys: "well `bhp`, `max_bhp`, `min_bhp`, event `bhp`, `history.pressure_datum`", UnitField: "psi", UnitMetric: "bar",
		Field: Bound{0, 3e4, 14.7, 2e4}, Metric: Bound{0, 2000, 1.01325, 1400}, Positive: true},
	limRadius: {Name: "wellbore radius", Keys: "well `radius`", UnitField: "ft", UnitMetric: "m",
		Field: Bound{0.01, 10, 0.1, 1}, Metric: Bound{0.003, 3, 0.03, 0.3}, Positive: true},
	limSkin: {Name: "skin", Keys: "well `skin`",
		Field: Bound{-10, 1000, -6, 100}, Metric: Bound{-10, 1000, -6, 100}},
	limTime: {Name: "well opening and event times", Keys: "well `open`, event `time`", UnitField: "days", UnitMetric: "days",
		Field: Bound{0, 1e5, 0, 1e5}, Metric: Bound{0, 1e5, 0, 1e5}, NonNegative: true},
	limEnd: {Name: "end of the run", Keys: "`run.end`", UnitField: "days", UnitMetric: "days",
		Field: Bound{0, 1e5, 1, 36500}, Metric: Bound{0, 1e5, 1, 36500}, Positive: true},
	limStreamlines: {Name: "streamline count", Keys: "`run.streamlines`",
		Field: Bound{1, 1e6, 100, 2e5}, Metric: Bound{1, 1e6, 100, 2e5}, Positive: true},
	limFaultMult: {Name: "fault transmissibility multiplier", Keys: "fault `multiplier`",
		Field: Bound{0, 1000, 0, 1}, Metric: Bound{0, 1000, 0, 1}, NonNegative: true},
	limWaterCut: {Name: "water-cut limit (economic)", Keys: "well or `run` `max_water_cut`, `run.field_max_water_cut`",
		Field: Bound{0, 1, 0.5, 0.999}, Metric: Bound{0, 1, 0.5, 0.999}, Positive: true, HiOpen: true},
	limOilRate: {Name: "minimum oil rate (economic)", Keys: "well or `run` `min_oil_rate`", UnitField: "bbl/day", UnitMetric: "m3/day",
		Field: Bound{0.01, 1e6, 1, 1e4}, Metric: Bound{0.001, 1.6e5, 0.1, 1.6e3}, Positive: true},
	limDepth: {Name: "depth of the layer below the datum, per active cell (positive down)", Keys: "`rock.depth` (number or map)", UnitField: "ft", UnitMetric: "m",
		Field: Bound{-3e4, 1e5, 0, 3e4}, Metric: Bound{-1e4, 3e4, 0, 1e4}},
	limDensity: {Name: "fluid density at reservoir conditions", Keys: "`fluids.water_density`, `fluids.oil_density`", UnitField: "lb/ft3", UnitMetric: "kg/m3",
		Field: Bound{0, 200, 30, 80}, Metric: Bound{0, 3200, 480, 1280}, Positive: true},
}

// LimitsMarkdown returns Limits as the Markdown table README.md shows.
// Inputs that must be positive refuse 0 too; "< 1" marks an excluded
// upper end.
func LimitsMarkdown() string {
	var b strings.Builder
	b.WriteString("| input | case-file keys | accepted (field) | usual (field) | accepted (metric) | usual (metric) |\n")
	b.WriteString("| --- | --- | --- | --- | --- | --- |\n")
	for _, l := range Limits {
		span := func(lo, hi float64, unit string) string {
			if lo == 0 && l.Positive {
				return fmt.Sprintf("> 0 .. %g%s", hi, unitSuffix(unit))
			}
			return fmt.Sprintf("%g .. %g%s", lo, hi, unitSuffix(unit))
		}
		limit := func(lo, hi float64, unit string) string {
			if l.HiOpen {
				return fmt.Sprintf("%g .. < %g%s", lo, hi, unitSuffix(unit))
			}
			return span(lo, hi, unit)
		}
		fmt.Fprintf(&b, "| %s | %s | %s | %s | %s | %s |\n", l.Name, l.Keys,
			limit(l.Field.Lo, l.Field.Hi, l.UnitField), span(l.Field.UsualLo, l.Field.UsualHi, l.UnitField),
			limit(l.Metric.Lo, l.Metric.Hi, l.UnitMetric), span(l.Metric.UsualLo, l.Metric.UsualHi, l.UnitMetric))
	}
	return b.String()
}

// warnAt records a warning at node n of section s (s may be nil), in the
// form of an error message: "path:line: msg" or "path:line: well W: msg".
func (d *decoder) warnAt(s *section, n *yaml.Node, format string, a ...any) {
	line := 0
	if n != nil {
		line = n.Line
	}
	msg := fmt.Sprintf(format, a...)
	if s != nil && s.well != "" {
		d.warns = append(d.warns, (&WellError{Path: d.path, Line: line, Well: s.well, Msg: msg}).Error())
		return
	}
	d.warns = append(d.warns, (&InputError{Path: d.path, Line: line, Msg: msg}).Error())
}

// nErrs counts the problems recorded so far.
func (d *decoder) nErrs() int { return len(d.errs.errs) + d.errs.dropped }

// limited returns the number at key like num, refusing values outside the
// accepted range of Limits[lim] (after the check pre, if not nil) and
// warning about values outside the usual range.
func (d *decoder) limited(s *section, key string, def float64, lim int, pre func(float64) string) float64 {
	l := Limits[lim]
	before := d.nErrs()
	v := d.num(s, key, def, func(v float64) string {
		if pre != nil {
			if m := pre(v); m != "" {
				return m
			}
		}
		return l.refuse(d.units, v)
	})
	if s.has(key) && d.nErrs() == before {
		d.usual(s, s.vals[key], s.label(key), v, lim)
	}
	return v
}

// usual warns at node n when v lies outside the usual range of
// Limits[lim]; label names the input.
func (d *decoder) usual(s *section, n *yaml.Node, label string, v float64, lim int) {
	if m := Limits[lim].unusual(d.units, v); m != "" {
		d.warnAt(s, n, "%s = %g %s; check the value and its unit", label, v, m)
	}
}

// positiveRate refuses rates that are not positive, saying why.
func positiveRate(v float64) string {
	if v > 0 {
		return ""
	}
	return "is not positive (rates are positive for injectors and producers; shut a well with a schedule event)"
}

// mobileRangeWarning warns when 1 - swc - sor is outside the usual range.
func (d *decoder) mobileRangeWarning(s *section, n *yaml.Node, label string, swc, sor float64) {
	if mr := 1 - swc - sor; Limits[limMobileRange].unusual(d.units, mr) != "" {
		d.warnAt(s, n, "%s: the mobile saturation range 1 - swc - sor = %.3g is narrow (usually at least %g)", label, mr, Limits[limMobileRange].Field.UsualLo)
	}
}

// cellCountWarning warns about a grid with more cells than usual; name
// and line locate where the grid is defined.
func (d *decoder) cellCountWarning(name string, line int, g Grid) {
	n := float64(g.NX) * float64(g.NY)
	if Limits[limCells].unusual(d.units, n) != "" {
		d.warns = append(d.warns, (&InputError{Path: name, Line: line, Msg: fmt.Sprintf(
			"grid %d x %d = %.4g cells is a large model: a run needs about %s of memory",
			g.NX, g.NY, n, formatBytes(float64(EstimateMemory(g.NX, g.NY, 0))))}).Error())
	}
}

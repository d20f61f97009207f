package reservoir

import (
	"fmt"
	"strings"

	"gopkg.in/yaml.v3"
)

// CalibrationWaterCut is the observed water cut above which a producer's
// history shows water (the same threshold as the history match's
// breakthrough, two percent: common practice).
const CalibrationWaterCut = 0.02

// Calibration holds the settings of floodtrace calibrate (calibration: in
// the case file); every key is optional.
type Calibration struct {
	// Iterations is the most outer iterations (forward run, shifts,
	// sensitivities, update).
	Iterations int
	// Damping weighs the distance of the log multipliers from 0 (the prior
	// map) and Smoothness their discrete Laplacian, both against the
	// travel-time misfit in days.
	Damping, Smoothness float64
	// MinMultiplier and MaxMultiplier bound the permeability multiplier of
	// every cell.
	MinMultiplier, MaxMultiplier float64
	// KeepNearWells names the wells around which the map is kept as given
	// (cells whose centre lies within Radius of the well), and Radius is
	// that distance in the case's length unit (0: one cell, the larger of
	// dx and dy).
	KeepNearWells []string
	Radius        float64
	// Wells names the producers whose history is matched (nil: every
	// producer with history rows).
	Wells []string
	// Line is the line of calibration: in the case file.
	Line int
}

// DefaultCalibration returns the settings used for keys the case does not
// give: five iterations, damping 0.1 and smoothness 1 (per day of
// misfit), multipliers within [0.1, 10], radius one cell.
func DefaultCalibration() Calibration {
	return Calibration{Iterations: 5, Damping: 0.1, Smoothness: 1, MinMultiplier: 0.1, MaxMultiplier: 10}
}

var calibrationKeys = []string{"iterations", "damping", "smoothness", "min_multiplier", "max_multiplier", "keep_near_wells", "radius", "wells"}

// calibrationNodes keeps the nodes of well names for messages once the
// wells are known.
type calibrationNodes struct {
	keep, wells []*yaml.Node
	sec         *section
}

// readCalibration reads calibration: {...}.
func (d *decoder) readCalibration(m *Model, top *section) {
	s := d.section(top.vals["calibration"], "calibration", "", calibrationKeys, nil)
	if s == nil {
		return
	}
	c := DefaultCalibration()
	c.Line = top.keys["calibration"].Line
	c.Iterations = int(d.integer(s, "iterations", int64(c.Iterations), 0, 1000))
	c.Damping = d.num(s, "damping", c.Damping, nonNegativeWeight)
	c.Smoothness = d.num(s, "smoothness", c.Smoothness, nonNegativeWeight)
	before := d.nErrs()
	c.MinMultiplier = d.num(s, "min_multiplier", c.MinMultiplier, inRange(0, 1e6, true, false))
	c.MaxMultiplier = d.num(s, "max_multiplier", c.MaxMultiplier, inRange(0, 1e6, true, false))
	if d.nErrs() == before {
		at := s.vals["min_multiplier"]
		if at == nil {
			at = s.vals["max_multiplier"]
		}
		switch {
		case c.MinMultiplier > c.MaxMultiplier:
			d.fail(s, at, "calibration.min_multiplier = %g is above calibration.max_multiplier = %g", c.MinMultiplier, c.MaxMultiplier)
		case c.MinMultiplier > 1 || c.MaxMultiplier < 1:
			d.fail(s, at, "calibration multipliers [%g, %g] exclude 1: the given map itself must lie within the bounds", c.MinMultiplier, c.MaxMultiplier)
		}
	}
	c.Radius = d.num(s, "radius", 0, nonNegative)
	cn := &calibrationNodes{sec: s}
	c.KeepNearWells, cn.keep = d.names(s, "keep_near_wells")
	c.Wells, cn.wells = d.names(s, "wells")
	m.Calibration = &c
	d.calib = cn
}

// nonNegativeWeight refuses a negative or absurd weight.
func nonNegativeWeight(v float64) string {
	if v < 0 {
		return "is negative (a weight is 0 or more)"
	}
	if v > 1e6 {
		return "is above 1e6"
	}
	return ""
}

// names reads a list of well names.
func (d *decoder) names(s *section, key string) ([]string, []*yaml.Node) {
	var out []string
	var nodes []*yaml.Node
	for i, it := range d.list(s, key) {
		if it.Kind != yaml.ScalarNode || it.Value == "" {
			d.fail(s, it, "%s item %d must be a well name", s.label(key), i+1)
			continue
		}
		out = append(out, it.Value)
		nodes = append(nodes, it)
	}
	return out, nodes
}

// checkCalibration checks the calibration settings against the wells and
// the history, once both are loaded: it needs a history, known well names
// (wells: producers), and a producer whose observed water cut rises above
// CalibrationWaterCut (without one there is no arrival to match).
func (d *decoder) checkCalibration(m *Model) error {
	c := m.Calibration
	if c == nil {
		return nil
	}
	if m.History == nil {
		return &InputError{Path: d.path, Line: c.Line, Msg: "calibration: needs a production history (history: {file: ...}) to calibrate against"}
	}
	cn := d.calib
	for k, name := range c.KeepNearWells {
		if m.WellIndex(name) < 0 {
			return d.unknownWell(cn.keep[k], "calibration.keep_near_wells", name, m)
		}
	}
	for k, name := range c.Wells {
		i := m.WellIndex(name)
		if i < 0 {
			return d.unknownWell(cn.wells[k], "calibration.wells", name, m)
		}
		if m.Wells[i].Type != Producer {
			return &InputError{Path: d.path, Line: cn.wells[k].Line, Msg: fmt.Sprintf("calibration.wells: %s is an injector; the data matched are producers' water cuts", name)}
		}
	}
	use := map[string]bool{}
	for _, n := range c.Wells {
		use[n] = true
	}
	wet := false
	for _, r := range m.History.Rows {
		if len(use) > 0 && !use[r.Well] {
			continue
		}
		if i := m.WellIndex(r.Well); i < 0 || m.Wells[i].Type != Producer {
			continue
		}
		if s := zeroNaN(r.Oil) + zeroNaN(r.Water); s > 0 && zeroNaN(r.Water)/s > CalibrationWaterCut {
			wet = true
			break
		}
	}
	if !wet {
		which := "no producer"
		if len(use) > 0 {
			which = "none of the producers of calibration.wells (" + strings.Join(c.Wells, ", ") + ")"
		}
		return &InputError{Path: m.History.File, Msg: fmt.Sprintf("%s ever shows water in the history (water cut above %g %%): there is no water arrival to match, nothing to calibrate", which, 100*CalibrationWaterCut)}
	}
	return nil
}

// unknownWell is the error of a well name the case does not have.
func (d *decoder) unknownWell(n *yaml.Node, key, name string, m *Model) error {
	var names []string
	for _, w := range m.Wells {
		names = append(names, w.Name)
	}
	msg := fmt.Sprintf("%s: no well %q in the case", key, name)
	if sg, ok := nearest(name, names); ok {
		msg += fmt.Sprintf("; did you mean %q?", sg)
	}
	return &InputError{Path: d.path, Line: n.Line, Msg: msg}
}

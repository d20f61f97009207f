package calibrate

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"

	"gopkg.in/yaml.v3"

	"floodtrace/balance"
	"floodtrace/internal/outdir"
	"floodtrace/internal/yamldoc"
	"floodtrace/reservoir"
	"floodtrace/runfolder"
)

// Summary is the content of calibration.json.
type Summary struct {
	Settings   SettingsJSON   `json:"settings"`
	Iterations int            `json:"iterations"`
	Forward    int            `json:"forward_runs"`
	Producers  []ProducerJSON `json:"producers"`
	Misfit     struct {
		Before runfolder.Float `json:"before"`
		After  runfolder.Float `json:"after"`
	} `json:"travel_time_misfit_days"`
	WaterCutRMS struct {
		Before runfolder.Float `json:"before"`
		After  runfolder.Float `json:"after"`
	} `json:"water_cut_rms"`
	Constrained ConstrainedJSON `json:"constrained"`
	Warnings    []string        `json:"warnings"`
}

// SettingsJSON are the settings used.
type SettingsJSON struct {
	Iterations    int             `json:"iterations"`
	Damping       runfolder.Float `json:"damping"`
	Smoothness    runfolder.Float `json:"smoothness"`
	MinMultiplier runfolder.Float `json:"min_multiplier"`
	MaxMultiplier runfolder.Float `json:"max_multiplier"`
	KeepNearWells []string        `json:"keep_near_wells"`
	Radius        runfolder.Float `json:"radius"`
	Wells         []string        `json:"wells"`
}

// ProducerJSON is one producer's match before and after.
type ProducerJSON struct {
	Producer                string          `json:"producer"`
	ShiftBefore             runfolder.Float `json:"shift_before_days"`
	ShiftAfter              runfolder.Float `json:"shift_after_days"`
	BreakthroughErrorBefore runfolder.Float `json:"breakthrough_error_before_days"`
	BreakthroughErrorAfter  runfolder.Float `json:"breakthrough_error_after_days"`
	WaterCutRMSBefore       runfolder.Float `json:"water_cut_rms_before"`
	WaterCutRMSAfter        runfolder.Float `json:"water_cut_rms_after"`
}

// ConstrainedJSON says which part of the map the data constrain.
type ConstrainedJSON struct {
	// Cells counts the active cells crossed by streamlines that reach the
	// producers matched, Fraction their share of the active cells; Kept
	// the cells held at the prior around keep_near_wells.
	Cells    int             `json:"cells"`
	Fraction runfolder.Float `json:"fraction"`
	Kept     int             `json:"kept_cells"`
	// MinMultiplier and MaxMultiplier are the extreme multipliers of the
	// calibrated map.
	MinMultiplier runfolder.Float `json:"min_multiplier"`
	MaxMultiplier runfolder.Float `json:"max_multiplier"`
}

// Summary returns calibration.json.
func (r *Result) Summary() *Summary {
	s := &Summary{Warnings: append([]string{}, r.Warnings...)}
	st := r.Settings
	s.Settings = SettingsJSON{Iterations: st.Iterations, Damping: runfolder.Float(st.Damping), Smoothness: runfolder.Float(st.Smoothness),
		MinMultiplier: runfolder.Float(st.MinMultiplier), MaxMultiplier: runfolder.Float(st.MaxMultiplier),
		KeepNearWells: append([]string{}, st.KeepNearWells...), Radius: runfolder.Float(st.Radius), Wells: append([]string{}, st.Wells...)}
	s.Iterations = len(r.Iterations) - 1
	last := r.Iterations[len(r.Iterations)-1]
	s.Forward = r.ForwardRuns
	s.Misfit.Before, s.Misfit.After = runfolder.Float(r.Iterations[0].TravelTimeMisfit), runfolder.Float(last.TravelTimeMisfit)
	s.WaterCutRMS.Before, s.WaterCutRMS.After = runfolder.Float(r.Iterations[0].WaterCutRMS), runfolder.Float(last.WaterCutRMS)
	for _, p := range r.Producers {
		s.Producers = append(s.Producers, ProducerJSON{Producer: p.Name, ShiftBefore: runfolder.Float(p.ShiftBefore), ShiftAfter: runfolder.Float(p.ShiftAfter),
			BreakthroughErrorBefore: runfolder.Float(p.BreakthroughErrorBefore), BreakthroughErrorAfter: runfolder.Float(p.BreakthroughErrorAfter),
			WaterCutRMSBefore: runfolder.Float(p.WaterCutRMSBefore), WaterCutRMSAfter: runfolder.Float(p.WaterCutRMSAfter)})
	}
	m := r.Calibrated
	active, lo, hi := 0, math.Inf(1), math.Inf(-1)
	for k, a := range m.Active {
		if !a {
			continue
		}
		active++
		if r.Constrained[k] {
			s.Constrained.Cells++
		}
		if r.Kept[k] {
			s.Constrained.Kept++
		}
		f := math.Exp(r.LogMultiplier[k])
		lo, hi = math.Min(lo, f), math.Max(hi, f)
	}
	s.Constrained.Fraction = runfolder.Float(float64(s.Constrained.Cells) / float64(max(1, active)))
	s.Constrained.MinMultiplier, s.Constrained.MaxMultiplier = runfolder.Float(lo), runfolder.Float(hi)
	return s
}

// Write writes perm_calibrated.asc (and perm_y_calibrated.asc when the
// case gives rock.perm_y), case_calibrated.yaml, calibration.csv and
// calibration.json into d, whose folder is dir.
func (r *Result) Write(d *outdir.Dir, dir string) error {
	m := r.Calibrated
	src, err := os.ReadFile(m.Path)
	if err != nil {
		return &reservoir.InputError{Path: m.Path, Msg: "reading the case again for case_calibrated.yaml", Err: err}
	}
	rock := map[string]string{"perm": runfolder.CalibratedPermFile}
	if hasPermY(src) {
		rock["perm_y"] = runfolder.CalibratedPermYFile
	}
	raster := func(name string, v []float64) error {
		return d.Create(name, func(w io.Writer) error { return runfolder.WriteRaster(w, m.Grid, v, m.Active) })
	}
	if err := raster(runfolder.CalibratedPermFile, m.PermEast); err != nil {
		return err
	}
	if _, ok := rock["perm_y"]; ok {
		if err := raster(runfolder.CalibratedPermYFile, m.PermNorth); err != nil {
			return err
		}
	}
	out, err := balance.CaseWithRock(src, m.Path, dir, rock)
	if err != nil {
		return err
	}
	if err := d.Bytes(runfolder.CalibratedCaseFile, out); err != nil {
		return err
	}
	var b bytes.Buffer
	b.WriteString(runfolder.Header(runfolder.CalibrationColumns))
	for _, it := range r.Iterations {
		fmt.Fprintf(&b, "%d,%s,%s,%s,%s,%d,%s\n", it.Iteration, runfolder.Num(it.TravelTimeMisfit), runfolder.Num(it.WaterCutRMS),
			runfolder.Num(it.Objective), runfolder.Num(it.ChangeRMS), it.ForwardRuns, runfolder.Num(math.Round(it.Seconds*1000)/1000))
	}
	if err := d.Bytes(runfolder.CalibrationFile, b.Bytes()); err != nil {
		return err
	}
	js, err := json.MarshalIndent(r.Summary(), "", "  ")
	if err != nil {
		return err
	}
	return d.Bytes(runfolder.CalibrationJSONFile, append(js, '\n'))
}

// hasPermY reports whether the case text gives rock.perm_y.
func hasPermY(src []byte) bool {
	root, perr := yamldoc.Parse(src)
	if perr != nil {
		return false
	}
	top := yamldoc.Deref(root)
	rock := valueOf(top, "rock")
	return valueOf(rock, "perm_y") != nil
}

// valueOf returns the value of key in mapping n (nil when absent).
func valueOf(n *yaml.Node, key string) *yaml.Node {
	n = yamldoc.Deref(n)
	if n == nil || n.Kind != yaml.MappingNode {
		return nil
	}
	for i := 0; i+1 < len(n.Content); i += 2 {
		if n.Content[i].Value == key {
			return yamldoc.Deref(n.Content[i+1])
		}
	}
	return nil
}

package render

import (
	"fmt"
	"image"
	"math"
	"os"
	"path/filepath"
	"strings"

	"floodtrace/runfolder"
)

// Calibration picture files, relative to the calibration folder.
const (
	CalibrationPriorMap      = runfolder.MapsDir + "/perm_prior.png"
	CalibrationCalibratedMap = runfolder.MapsDir + "/perm_calibrated.png"
	CalibrationChangeMap     = runfolder.MapsDir + "/perm_change.png"
	CalibrationMisfitChart   = runfolder.ChartsDir + "/calibration_misfit.png"
)

// CalibrationWaterCutChart is the file of producer k's water-cut chart
// (k its position among the matched producers; the name is made safe for
// a file name).
func CalibrationWaterCutChart(k int, name string) string {
	safe := strings.Map(func(r rune) rune {
		if r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || r == '-' || r == '_' {
			return r
		}
		return '_'
	}, name)
	return fmt.Sprintf("%s/calibration_water_cut_%02d_%s.png", runfolder.ChartsDir, k+1, safe)
}

// ChangeColors is a diverging map for multipliers centred on 1: blue
// (permeability lowered) through near white to red (raised), after
// ColorBrewer RdBu reversed (Brewer 2003).
var ChangeColors = mustColormap("permeability multiplier", []string{"#2166ac", "#67a9cf", "#d1e5f0", "#f7f7f7", "#fddbc7", "#ef8a62", "#b2182b"})

// PermeabilityColors runs from pale (low) to dark green-blue (high),
// after ColorBrewer YlGnBu (Brewer 2003), the saturation map's colours.
var PermeabilityColors = SaturationColors

// ProducerCurves is one producer's observed water cut (mid-period
// times) and the model's of the prior and the calibrated map.
type ProducerCurves struct {
	Name               string
	ObsTimes, Observed []float64
	// Times are the report times of both runs (the same case).
	Times             []float64
	Prior, Calibrated []float64
	HistoryEnd        float64
}

// CalibrationPictures is the data of the calibration pictures.
type CalibrationPictures struct {
	Scene Scene
	// PermUnit labels the permeability ("md").
	PermUnit string
	// Prior and Calibrated are the permeability along x per cell;
	// Multiplier their ratio.
	Prior, Calibrated, Multiplier []float64
	// MultiplierRange is the extent of the change map's scale, [1/r, r]
	// (r >= 1; the larger of the bounds' reach when 0).
	MultiplierRange float64
	// Iteration and Misfit are the travel-time misfit per iteration.
	Iteration, Misfit []float64
	Producers         []ProducerCurves
	// Lines, when given, are drawn over the change map: the streamlines
	// of the calibrated map, which cross the cells the data constrain.
	Lines []Polyline
}

// WriteCalibrationPictures draws the calibration pictures into dir (w x h
// pixels, PNG) and returns their names relative to dir: the prior and the
// calibrated map on one log scale, the change (multiplier, a diverging
// scale centred on 1, with the streamlines Lines), the misfit against iteration and each producer's
// water cut observed, prior and calibrated.
func WriteCalibrationPictures(dir string, p CalibrationPictures, w, h int) ([]string, error) {
	if err := checkSize(w, h); err != nil {
		return nil, err
	}
	for _, sub := range []string{runfolder.MapsDir, runfolder.ChartsDir} {
		if err := os.MkdirAll(filepath.Join(dir, sub), 0o755); err != nil {
			return nil, fmt.Errorf("render: %w", err)
		}
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for k := range p.Prior {
		if p.Scene.Active != nil && !p.Scene.Active[k] {
			continue
		}
		for _, v := range []float64{p.Prior[k], p.Calibrated[k]} {
			if v > 0 {
				lo, hi = math.Min(lo, v), math.Max(hi, v)
			}
		}
	}
	if !(hi > lo) {
		lo, hi = lo/2, lo*2
	}
	r := p.MultiplierRange
	if !(r >= 1) {
		r = 10
	}
	var files []string
	for _, m := range []struct {
		file, what string
		v          []float64
		sc         Scale
	}{
		{CalibrationPriorMap, "Permeability, given map", p.Prior, Scale{Label: "Permeability", Unit: p.PermUnit, Min: lo, Max: hi, Log: true, Map: &PermeabilityColors}},
		{CalibrationCalibratedMap, "Permeability, calibrated to the history", p.Calibrated, Scale{Label: "Permeability", Unit: p.PermUnit, Min: lo, Max: hi, Log: true, Map: &PermeabilityColors}},
		{CalibrationChangeMap, "Change: calibrated over given permeability", p.Multiplier, Scale{Label: "Multiplier", Unit: "ratio", Min: 1 / r, Max: r, Log: true, Map: &ChangeColors}},
	} {
		s := p.Scene
		s.Subtitle = m.what
		var img *image.RGBA
		var err error
		if m.file == CalibrationChangeMap && len(p.Lines) > 0 {
			s.Subtitle += ", with the streamlines of the calibrated map"
			img, err = drawFieldLines(s, m.v, m.sc, p.Lines, w, h)
		} else {
			img, err = DrawField(s, m.v, m.sc, w, h)
		}
		if err != nil {
			return nil, err
		}
		b, err := encodePNG(m.file, img)
		if err != nil {
			return nil, err
		}
		if err := writeFileAtomic(filepath.Join(dir, m.file), b); err != nil {
			return nil, err
		}
		files = append(files, m.file)
	}
	ch := Chart{Title: p.Scene.Title, Subtitle: "Travel-time misfit against iteration", XLabel: "iteration", YLabel: "travel-time misfit (days)",
		LegendTitle: "misfit", Series: []Series{{Name: "RMS time shift", X: p.Iteration, Y: p.Misfit}}}
	if err := lineChart(filepath.Join(dir, CalibrationMisfitChart), ch, w, h, "png"); err != nil {
		return nil, err
	}
	files = append(files, CalibrationMisfitChart)
	for k, pc := range p.Producers {
		ch := Chart{Title: p.Scene.Title, Subtitle: fmt.Sprintf("Producer %s: water cut, observed and modelled (history to day %g)", pc.Name, pc.HistoryEnd),
			XLabel: "time (days)", YLabel: "water cut (fraction)", LegendTitle: "water cut",
			Series: []Series{{Name: "observed", X: pc.ObsTimes, Y: pc.Observed}, {Name: "given map", X: pc.Times, Y: pc.Prior}, {Name: "calibrated", X: pc.Times, Y: pc.Calibrated}}}
		f := CalibrationWaterCutChart(k, pc.Name)
		if err := lineChart(filepath.Join(dir, f), ch, w, h, "png"); err != nil {
			return nil, err
		}
		files = append(files, f)
	}
	return files, nil
}

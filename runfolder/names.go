package runfolder

import (
	"math"
	"strconv"
	"strings"
)

// File and folder names of a run folder (docs/OUTPUTS.md).
const (
	SummaryFile         = "summary.json"
	WellsFile           = "wells.csv"
	ProducersFile       = "producers.csv"
	FieldFile           = "field.csv"
	AllocationFile      = "allocation.csv"
	PairsFile           = "pairs.csv"
	InjectorsFile       = "injectors.csv"
	EffectiveCurvesFile = "effective_curves.csv"
	FPhiFile            = "f_phi.csv"
	SweepFile           = "sweep.csv"
	PressureFile        = "pressure.asc"
	// DepthFile is the depth of each cell, written when the case gives
	// rock.depth as a map.
	DepthFile        = "depth.asc"
	TOFFile          = "tof.asc"
	ProducerTOFFile  = "tof_producers.asc"
	InjectorPartFile = "injector_partition.asc"
	ProducerPartFile = "producer_partition.asc"
	StreamlinesFile  = "streamlines.geojson"
	AnimationFile    = "saturation.gif"
	ReportFile       = "report.html"
	// FramesDir holds the animation's saturation maps, named as the
	// snapshots (SnapshotName).
	FramesDir = "frames"
	// MapsDir and ChartsDir hold the pictures render draws.
	MapsDir   = "maps"
	ChartsDir = "charts"
)

// CSV column names (docs/OUTPUTS.md).
const (
	ColTime               = "time_days"
	ColPVI                = "pvi"
	ColWell               = "well"
	ColType               = "type"
	ColControl            = "control"
	ColRate               = "rate"
	ColLiquidRate         = "liquid_rate"
	ColBHP                = "bhp"
	ColWaterCut           = "water_cut"
	ColOilRate            = "oil_rate"
	ColWaterRate          = "water_rate"
	ColCumOil             = "cum_oil"
	ColCumWater           = "cum_water"
	ColRecoveryFactor     = "recovery_factor"
	ColInjector           = "injector"
	ColProducer           = "producer"
	ColFractionOfInjector = "fraction_of_injector"
	ColFractionOfProducer = "fraction_of_producer"
	ColPoreVolume         = "pore_volume"
	ColAvgWaterSaturation = "avg_water_saturation"
	ColPhi                = "phi"
	ColF                  = "F"
	ColTD                 = "tD"
	ColSweep              = "sweep"
	ColAttributedOilRate  = "attributed_oil_rate"
	ColEfficiency         = "efficiency"
)

// The column headers of the CSV files, in file order.
var (
	WellsColumns           = []string{ColTime, ColWell, ColType, ColControl, ColLiquidRate, ColOilRate, ColWaterRate, ColBHP}
	ProducersColumns       = []string{ColTime, ColPVI, ColWell, ColWaterCut, ColOilRate, ColWaterRate, ColCumOil, ColCumWater}
	FieldColumns           = []string{ColTime, ColPVI, ColWaterCut, ColOilRate, ColWaterRate, ColCumOil, ColCumWater, ColRecoveryFactor}
	AllocationColumns      = []string{ColTime, ColInjector, ColProducer, ColRate, ColFractionOfInjector, ColFractionOfProducer, ColPoreVolume}
	EffectiveCurvesColumns = []string{ColTime, ColWell, ColAvgWaterSaturation, ColWaterCut}
	PairsColumns           = []string{ColInjector, ColProducer, ColWaterRate, ColAttributedOilRate, ColEfficiency}
	InjectorsColumns       = []string{ColInjector, ColRate, ColEfficiency, ColAttributedOilRate}
	FPhiColumns            = []string{ColPhi, ColF}
	SweepColumns           = []string{ColTD, ColSweep}
)

// Header returns the header line of a CSV file with the given columns.
func Header(cols []string) string { return strings.Join(cols, ",") + "\n" }

// snapshotPrefix and snapshotExt frame the day in a saturation map's name.
const (
	snapshotPrefix = "saturation_"
	snapshotExt    = ".asc"
)

// SnapshotName returns the raster name of the saturation map at day t:
// saturation_<day>.asc, the day as an integer or with the decimals it
// needs. Snapshots sit in the folder, animation frames in FramesDir.
func SnapshotName(t float64) string { return snapshotPrefix + DayLabel(t) + snapshotExt }

// SnapshotDay returns the day of a saturation map's base name (the
// inverse of SnapshotName); ok is false for any other name.
func SnapshotDay(name string) (day float64, ok bool) {
	if !strings.HasPrefix(name, snapshotPrefix) || !strings.HasSuffix(name, snapshotExt) {
		return 0, false
	}
	d, err := strconv.ParseFloat(strings.TrimSuffix(strings.TrimPrefix(name, snapshotPrefix), snapshotExt), 64)
	if err != nil {
		return 0, false
	}
	return d, true
}

// SnapshotGlob is the file-name pattern of the saturation maps.
const SnapshotGlob = snapshotPrefix + "*" + snapshotExt

// DayLabel writes a day as an integer, or with the decimals it needs.
func DayLabel(t float64) string {
	if t == math.Trunc(t) {
		return strconv.FormatFloat(t, 'f', 0, 64)
	}
	return strconv.FormatFloat(t, 'f', -1, 64)
}

// The animation-frame count of flood.Settings.Frames and
// render.Options.Frames, and of the --frames flag of `floodtrace run` and
// `floodtrace render` (auto, none or a count): one rule for all.
// FramesAuto, the zero value, lets floodtrace choose (a run keeps up to 40
// saturation maps, fewer on very large grids; render animates every map
// the run kept); FramesNone, or any negative count, asks for none; a
// positive count asks for that many, spread evenly over the run.
const (
	FramesAuto = 0
	FramesNone = -1
)

// IsPicture reports whether the run-folder file rel (slash-separated) is
// one render draws: a map or chart picture, the animation or the report.
// A redraw replaces exactly these.
func IsPicture(rel string) bool {
	if rel == AnimationFile || rel == ReportFile {
		return true
	}
	dir, name, ok := strings.Cut(rel, "/")
	if !ok || (dir != MapsDir && dir != ChartsDir) {
		return false
	}
	return strings.HasSuffix(name, ".png") || strings.HasSuffix(name, ".svg")
}

package runfolder

// File names and CSV header of a calibration folder (floodtrace
// calibrate, docs/OUTPUTS.md).
const (
	CalibrationFile     = "calibration.csv"
	CalibrationJSONFile = "calibration.json"
	CalibratedCaseFile  = "case_calibrated.yaml"
	CalibratedPermFile  = "perm_calibrated.asc"
	CalibratedPermYFile = "perm_y_calibrated.asc"
)

// Columns of calibration.csv.
const (
	ColIteration            = "iteration"
	ColTravelTimeMisfitDays = "travel_time_misfit_days"
	ColWaterCutRMS          = "water_cut_rms"
	ColObjective            = "objective"
	ColChangeRMS            = "change_rms"
	ColForwardRuns          = "forward_runs"
	ColSeconds              = "seconds"
)

// CalibrationColumns is the header of calibration.csv.
var CalibrationColumns = []string{ColIteration, ColTravelTimeMisfitDays, ColWaterCutRMS, ColObjective, ColChangeRMS, ColForwardRuns, ColSeconds}

// CalibrationEnsembleFile is the table of an ensemble calibration
// (floodtrace calibrate --ensemble): one row per realization calibrated.
const CalibrationEnsembleFile = "calibration_ensemble.csv"

// CalibrationEnsembleJSONFile records the spec, the size of the ensemble
// and the shard of an ensemble calibration folder.
const CalibrationEnsembleJSONFile = "calibration_ensemble.json"

// CalibrationEnsembleColumns is the header of calibration_ensemble.csv.
var CalibrationEnsembleColumns = []string{"index", "realization", "folder", ColIterations, ColForwardRuns,
	"travel_time_misfit_before_days", "travel_time_misfit_after_days", "water_cut_rms_before", "water_cut_rms_after"}

// ColIterations is the accepted updates of a calibration.
const ColIterations = "iterations"

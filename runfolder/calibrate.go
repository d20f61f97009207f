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

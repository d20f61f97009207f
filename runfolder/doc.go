// Package runfolder owns the contract of a run's output folder
// (docs/OUTPUTS.md): the one Summary type of summary.json, every file
// name and CSV column header, the snapshot file-name rule, the readers
// (ReadSummary, ReadRunCurves, Finished), the data groups a run may
// leave out (Data, the --data flag) and the pieces the writers share
// (number formatting, ordered parallel bands, rasters).
//
// It sits below flood, render, screen and cmd/floodtrace, which write and
// read the folder through it; it imports only reservoir and
// internal/outdir.
package runfolder

package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strconv"
	"strings"

	"floodtrace/balance"
	"floodtrace/calibrate"
	"floodtrace/internal/hugeheap"
	"floodtrace/internal/outdir"
	"floodtrace/reservoir"
	"floodtrace/runfolder"
	"floodtrace/screen"
)

// ensembleRow is one line of calibration_ensemble.csv, as text (a merge
// copies the parts' lines unchanged).
type ensembleRow struct {
	index  int
	fields []string
}

// ensembleInfo is calibration_ensemble.json: the spec, the size of its
// ensemble and the part of it the folder holds.
type ensembleInfo struct {
	Spec         string `json:"spec"`
	Realizations int    `json:"realizations"`
	Shard        string `json:"shard"`
	Calibrated   int    `json:"calibrated"`
}

// runCalibrateEnsemble calibrates the base case of the screen spec on each
// realization of its ensemble in shard k of n (n == 0: all), one
// subfolder per realization, and writes calibration_ensemble.csv.
func runCalibrateEnsemble(specPath string, k, n, w, h int, logf func(string, ...any)) error {
	f := calibrateFlags
	spec, err := screen.LoadSpec(specPath)
	if err != nil {
		return err
	}
	if len(spec.Realizations) == 0 {
		return &screen.SpecError{Path: specPath, Msg: "calibrate --ensemble needs a realizations: list of permeability maps in the spec"}
	}
	// The spec drops the base case's history (screening plans from day 0);
	// the calibration needs it, so the base case is read again.
	base, err := reservoir.Load(spec.Base.Path)
	if err != nil {
		return err
	}
	hugeheap.ForCase(base.Grid.N())
	folders, err := realizationFolders(specPath, spec.Realizations)
	if err != nil {
		return err
	}
	d, err := outdir.Open(f.out, f.force)
	if err != nil {
		return err
	}
	idx := screen.ShardIndices(k, n, len(spec.Realizations))
	var rows []ensembleRow
	for _, ri := range idx {
		rz := spec.Realizations[ri]
		m := realizationModel(base, rz)
		logf("realization %s (%d of %d)", rz.Name, ri+1, len(spec.Realizations))
		prior := slices.Clone(m.PermEast)
		res, err := calibrate.Calibrate(m, calibrate.Options{Iterations: f.iterations, Workers: f.workers, Streamlines: f.streamlines, Log: logf})
		if err != nil {
			return fmt.Errorf("realization %s: %w", rz.Path, err)
		}
		files, err := writeCalibrationFolder(filepath.Join(f.out, folders[ri]), true, res, prior, w, h)
		if err != nil {
			return err
		}
		for _, rel := range files {
			d.Adopt(folders[ri] + "/" + rel)
		}
		s := res.Summary()
		rows = append(rows, ensembleRow{index: ri + 1, fields: []string{strconv.Itoa(ri + 1), rz.Name, folders[ri], strconv.Itoa(s.Iterations), strconv.Itoa(s.Forward),
			runfolder.Num(float64(s.Misfit.Before)), runfolder.Num(float64(s.Misfit.After)), runfolder.Num(float64(s.WaterCutRMS.Before)), runfolder.Num(float64(s.WaterCutRMS.After))}})
	}
	info := ensembleInfo{Spec: specPath, Realizations: len(spec.Realizations), Shard: "all", Calibrated: len(rows)}
	if n > 0 {
		info.Shard = fmt.Sprintf("%d/%d", k, n)
	}
	if err := writeEnsemble(d, rows, info); err != nil {
		return err
	}
	if err := d.Close(); err != nil {
		return err
	}
	if !f.quiet {
		printEnsemble(rows, len(spec.Realizations))
	}
	return nil
}

// writeCalibrationFolder writes one calibration into its own output
// folder dir and returns the files it holds (the manifest included),
// relative to dir.
func writeCalibrationFolder(dir string, force bool, res *calibrate.Result, prior []float64, w, h int) ([]string, error) {
	d, err := outdir.Open(dir, force)
	if err != nil {
		return nil, err
	}
	if err := res.Write(d, dir); err != nil {
		return nil, err
	}
	if calibrateFlags.pictures == "all" {
		files, err := drawCalibration(dir, res, prior, w, h)
		if err != nil {
			return nil, fmt.Errorf("drawing pictures: %w", err)
		}
		d.Adopt(files...)
	}
	if err := d.Close(); err != nil {
		return nil, err
	}
	return manifestFiles(dir)
}

// manifestFiles lists the files of output folder dir: those of its
// manifest and the manifest itself.
func manifestFiles(dir string) ([]string, error) {
	b, err := os.ReadFile(filepath.Join(dir, outdir.Manifest))
	if err != nil {
		return nil, fmt.Errorf("%s: not a calibration folder written by floodtrace (%w)", dir, err)
	}
	files := []string{outdir.Manifest}
	for _, l := range strings.Split(string(b), "\n") {
		if l = strings.TrimSpace(l); l != "" {
			files = append(files, l)
		}
	}
	return files, nil
}

// realizationModel is the base case with the realization's permeability
// along x and, when the base case is anisotropic, its ratio perm_y/perm
// kept cell by cell (as screening does); its title names the realization.
func realizationModel(base *reservoir.Model, rz screen.Realization) *reservoir.Model {
	m := *base
	px := slices.Clone(rz.Perm)
	py := slices.Clone(px)
	if !slices.Equal(base.PermEast, base.PermNorth) {
		for k := range py {
			py[k] = 0
			if base.PermEast[k] > 0 {
				py[k] = px[k] * base.PermNorth[k] / base.PermEast[k]
			}
		}
	}
	m.PermEast, m.PermNorth = px, py
	m.Title = base.Title + " · realization " + rz.Name
	return &m
}

// realizationFolders names the subfolder of each realization: its file
// name without the extension.
func realizationFolders(specPath string, rs []screen.Realization) ([]string, error) {
	out := make([]string, len(rs))
	seen := map[string]string{}
	for i, r := range rs {
		name := strings.TrimSuffix(r.Name, filepath.Ext(r.Name))
		if name == "" || name == "." || name == ".." {
			name = r.Name
		}
		if o, dup := seen[name]; dup {
			return nil, &screen.SpecError{Path: specPath, Msg: fmt.Sprintf("realizations %s and %s would share the folder %s; rename one", o, r.Path, name)}
		}
		seen[name] = r.Path
		out[i] = name
	}
	return out, nil
}

// writeEnsemble writes calibration_ensemble.csv, rows in the order of the
// spec's realizations, and calibration_ensemble.json.
func writeEnsemble(d *outdir.Dir, rows []ensembleRow, info ensembleInfo) error {
	sort.Slice(rows, func(a, b int) bool { return rows[a].index < rows[b].index })
	var b bytes.Buffer
	cw := csv.NewWriter(&b)
	cw.Write(runfolder.CalibrationEnsembleColumns)
	for _, r := range rows {
		cw.Write(r.fields)
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return err
	}
	if err := d.Bytes(runfolder.CalibrationEnsembleFile, b.Bytes()); err != nil {
		return err
	}
	js, err := json.MarshalIndent(info, "", "  ")
	if err != nil {
		return err
	}
	return d.Bytes(runfolder.CalibrationEnsembleJSONFile, append(js, '\n'))
}

// readEnsemble reads a part's calibration_ensemble.csv and .json.
func readEnsemble(dir string) ([]ensembleRow, *ensembleInfo, error) {
	rows, err := readEnsembleTable(dir)
	if err != nil {
		return nil, nil, err
	}
	path := filepath.Join(dir, runfolder.CalibrationEnsembleJSONFile)
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, nil, &reservoir.InputError{Path: path, Msg: "not the folder of an ensemble calibration (floodtrace calibrate SPEC --ensemble)", Err: err}
	}
	var info ensembleInfo
	if err := json.Unmarshal(b, &info); err != nil || info.Realizations < 1 {
		return nil, nil, &reservoir.InputError{Path: path, Msg: "not a calibration_ensemble.json of this version", Err: err}
	}
	for _, r := range rows {
		if r.index > info.Realizations {
			return nil, nil, &reservoir.InputError{Path: path, Msg: fmt.Sprintf("realization %d of an ensemble of %d", r.index, info.Realizations)}
		}
	}
	return rows, &info, nil
}

// readEnsembleTable reads a part's calibration_ensemble.csv.
func readEnsembleTable(dir string) ([]ensembleRow, error) {
	path := filepath.Join(dir, runfolder.CalibrationEnsembleFile)
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, &reservoir.InputError{Path: path, Msg: "not the folder of an ensemble calibration (floodtrace calibrate SPEC --ensemble)", Err: err}
	}
	recs, err := csv.NewReader(bytes.NewReader(b)).ReadAll()
	if err != nil || len(recs) == 0 || !slices.Equal(recs[0], runfolder.CalibrationEnsembleColumns) {
		return nil, &reservoir.InputError{Path: path, Msg: "not a calibration_ensemble.csv of this version (header or CSV text)", Err: err}
	}
	var rows []ensembleRow
	for i, r := range recs[1:] {
		idx, err := strconv.Atoi(r[0])
		if err != nil || idx < 1 || !validFolder(r[2]) {
			return nil, &reservoir.InputError{Path: path, Line: i + 2, Msg: fmt.Sprintf("bad index %q or folder %q", r[0], r[2])}
		}
		rows = append(rows, ensembleRow{index: idx, fields: r})
	}
	return rows, nil
}

// validFolder reports whether s names a subfolder (no path separators).
func validFolder(s string) bool {
	return s != "" && s != "." && s != ".." && !strings.ContainsAny(s, `/\`)
}

// runCalibrateMerge joins the folders of the shards of an ensemble
// calibration: the realization subfolders are copied (case_calibrated.yaml
// with its paths rewritten for the new folder) and
// calibration_ensemble.csv lists them all, so the result is the folder an
// unsharded run writes.
func runCalibrateMerge(parts []string) error {
	f := calibrateFlags
	type src struct {
		row  ensembleRow
		part string
	}
	byIndex := map[int]src{}
	var first *ensembleInfo
	for _, part := range parts {
		rows, info, err := readEnsemble(part)
		if err != nil {
			return err
		}
		if first == nil {
			first = info
		} else if info.Spec != first.Spec || info.Realizations != first.Realizations {
			return &reservoir.InputError{Path: filepath.Join(part, runfolder.CalibrationEnsembleJSONFile),
				Msg: fmt.Sprintf("an ensemble of %d realization(s) of %s, not the %d of %s of %s", info.Realizations, info.Spec, first.Realizations, first.Spec, parts[0])}
		}
		for _, r := range rows {
			if o, dup := byIndex[r.index]; dup {
				return &reservoir.InputError{Path: filepath.Join(part, runfolder.CalibrationEnsembleFile),
					Msg: fmt.Sprintf("realization %d (%s) is also in %s; merge each shard once", r.index, r.fields[1], o.part)}
			}
			byIndex[r.index] = src{r, part}
		}
	}
	var missing []string
	top := first.Realizations
	for i := 1; i <= top; i++ {
		if _, ok := byIndex[i]; !ok {
			missing = append(missing, strconv.Itoa(i))
		}
	}
	if len(missing) > 0 {
		return &reservoir.InputError{Path: parts[0], Msg: fmt.Sprintf("realization(s) %s missing from the parts; run the missing shards and merge again", strings.Join(missing, ", "))}
	}
	d, err := outdir.Open(f.out, f.force)
	if err != nil {
		return err
	}
	var rows []ensembleRow
	for i := 1; i <= top; i++ {
		s := byIndex[i]
		folder := s.row.fields[2]
		from := filepath.Join(s.part, folder)
		err := filepath.WalkDir(from, func(p string, e fs.DirEntry, err error) error {
			if err != nil || e.IsDir() {
				return err
			}
			rel, _ := filepath.Rel(from, p)
			b, err := os.ReadFile(p)
			if err != nil {
				return err
			}
			if filepath.ToSlash(rel) == runfolder.CalibratedCaseFile {
				// Its paths are relative to the part's folder: rewrite them
				// for the merged one (the same text when both lie at the
				// same depth beside each other).
				rock := map[string]string{"perm": runfolder.CalibratedPermFile}
				if _, err := os.Stat(filepath.Join(from, runfolder.CalibratedPermYFile)); err == nil {
					rock["perm_y"] = runfolder.CalibratedPermYFile
				}
				if b, err = balance.CaseWithRock(b, p, filepath.Join(f.out, folder), rock); err != nil {
					return err
				}
			}
			return d.Bytes(folder+"/"+filepath.ToSlash(rel), b)
		})
		if err != nil {
			return fmt.Errorf("copying %s: %w", from, err)
		}
		rows = append(rows, s.row)
	}
	if err := writeEnsemble(d, rows, ensembleInfo{Spec: first.Spec, Realizations: top, Shard: "all", Calibrated: len(rows)}); err != nil {
		return err
	}
	if err := d.Close(); err != nil {
		return err
	}
	if !f.quiet {
		printEnsemble(rows, top)
	}
	return nil
}

// printEnsemble prints the misfit before and after per realization.
func printEnsemble(rows []ensembleRow, total int) {
	fmt.Fprintf(stdout, "\ncalibrated %d of %d realization(s)\n", len(rows), total)
	fmt.Fprintf(stdout, "%-24s %14s %14s %10s %10s\n", "realization", "misfit before", "misfit after", "wc before", "wc after")
	num := func(s string, dec int) string {
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			return s
		}
		return strconv.FormatFloat(v, 'f', dec, 64)
	}
	for _, r := range rows {
		fmt.Fprintf(stdout, "%-24s %14s %14s %10s %10s\n", r.fields[1], num(r.fields[5], 1), num(r.fields[6], 1), num(r.fields[7], 3), num(r.fields[8], 3))
	}
	fmt.Fprintln(stdout, "(travel-time misfit in days; water-cut RMS)")
}

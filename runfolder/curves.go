package runfolder

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
)

// ProducerCurve is one producer's water-cut curve read from a finished
// run.
type ProducerCurve struct {
	Name string
	// Time (days) and WaterCut at the report times, in increasing time.
	Time, WaterCut []float64
	// Breakthrough is the water breakthrough in days, NaN when the run
	// reports none.
	Breakthrough float64
}

// RunCurves is what a comparison needs from a finished run folder: the
// producers' water-cut curves (producers.csv) and breakthrough times
// (summary.json).
type RunCurves struct {
	Dir, Title, Engine string
	// Setup names the engine and its settings for people (EngineSetup).
	Setup     string
	Producers []ProducerCurve
	// History is the summary's history object and Match the rows of
	// match.csv, both nil for a run without a history.
	History *History
	Match   []MatchRow
	// StartDate is the summary's start_date (day 0), "" without one.
	StartDate string
}

// EngineSetup names a run's engine and its settings: "fixed streamlines
// (2000 lines, 1 pressure solve)", "streamlines with pressure updates (2000
// lines, 5 pressure solves)" or "grid engine (IMPES, 412 pressure solves)".
func EngineSetup(s *Summary) string {
	solves := s.PressureSolver.Solves
	plural := func(n int, what string) string {
		if n == 1 {
			return fmt.Sprintf("1 %s", what)
		}
		return fmt.Sprintf("%d %ss", n, what)
	}
	switch {
	case s.Engine == "grid":
		return fmt.Sprintf("grid engine (IMPES, %s)", plural(solves, "pressure solve"))
	case solves > 1:
		return fmt.Sprintf("streamlines with pressure updates (%d lines, %s)", s.Streamlines, plural(solves, "pressure solve"))
	}
	return fmt.Sprintf("fixed streamlines (%d lines, %s)", s.Streamlines, plural(max(solves, 1), "pressure solve"))
}

// ReadRunCurves reads summary.json and producers.csv from the run folder
// dir. A folder without summary.json holds no finished run and is an
// error. The engine of a summary that names none is "streamline".
func ReadRunCurves(dir string) (*RunCurves, error) {
	sum, err := ReadSummary(dir)
	if err != nil {
		return nil, err
	}
	rc := &RunCurves{Dir: dir, Title: sum.Title, Engine: sum.Engine, Setup: EngineSetup(sum), History: sum.History, StartDate: sum.StartDate}
	if sum.History != nil {
		if _, err := os.Stat(filepath.Join(dir, MatchFile)); err == nil {
			if rc.Match, err = ReadMatch(dir); err != nil {
				return nil, err
			}
		}
	}
	if rc.Engine == "" {
		rc.Engine = "streamline"
	}
	index := func(name string) int {
		for i := range rc.Producers {
			if rc.Producers[i].Name == name {
				return i
			}
		}
		return -1
	}
	for _, p := range sum.Producers {
		if index(p.Name) < 0 {
			rc.Producers = append(rc.Producers, ProducerCurve{Name: p.Name, Breakthrough: Value(p.BreakthroughDays)})
		}
	}
	path := filepath.Join(dir, ProducersFile)
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	r := csv.NewReader(f)
	r.ReuseRecord = true
	head, err := r.Read()
	if err != nil {
		return nil, fmt.Errorf("%s: header: %w", path, err)
	}
	col := map[string]int{}
	for i, h := range head {
		col[h] = i
	}
	for _, need := range []string{ColTime, ColWell, ColWaterCut} {
		if _, ok := col[need]; !ok {
			return nil, fmt.Errorf("%s: no %s column", path, need)
		}
	}
	ct, cw, cc := col[ColTime], col[ColWell], col[ColWaterCut]
	for line := 2; ; line++ {
		rec, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("%s: %w", path, err)
		}
		if rec[cc] == "" {
			continue // no value (written for NaN)
		}
		t, err1 := strconv.ParseFloat(rec[ct], 64)
		wc, err2 := strconv.ParseFloat(rec[cc], 64)
		if err1 != nil || err2 != nil || math.IsNaN(t) || math.IsInf(t, 0) {
			return nil, fmt.Errorf("%s:%d: time %q or water cut %q is not a number", path, line, rec[ct], rec[cc])
		}
		i := index(rec[cw])
		if i < 0 {
			rc.Producers = append(rc.Producers, ProducerCurve{Name: rec[cw], Breakthrough: math.NaN()})
			i = len(rc.Producers) - 1
		}
		p := &rc.Producers[i]
		if n := len(p.Time); n > 0 && !(t > p.Time[n-1]) {
			return nil, fmt.Errorf("%s:%d: well %s: time %g does not increase", path, line, p.Name, t)
		}
		p.Time = append(p.Time, t)
		p.WaterCut = append(p.WaterCut, wc)
	}
	return rc, nil
}

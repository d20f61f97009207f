package screen

import (
	"bufio"
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"sort"
	"sync"

	"floodtrace/flood"
	"floodtrace/pressure"
	"floodtrace/reservoir"
)

// ResultsFile is the name of the file of finished candidates in an output
// folder: one JSON record per line.
const ResultsFile = "results.jsonl"

// Settings controls Execute. The zero value runs the whole plan on all
// cores, quietly.
type Settings struct {
	// Workers is the number of runs at once; 0 = GOMAXPROCS. Each run
	// uses one goroutine, so results do not depend on it.
	Workers int
	// Shard and Shards select the Shard-th (1-based) of Shards disjoint
	// round-robin parts of the candidate list; 0 = the whole list.
	Shard, Shards int
	// Progress, when set, is called (from one goroutine) after each run
	// with the runs done and the runs to do in this call.
	Progress func(done, total int)
	// Pressure configures the pressure solves.
	Pressure pressure.Settings
}

// Record is one finished candidate: a line of results.jsonl.
type Record struct {
	Spec      string    `json:"spec"` // the plan's hash
	Total     int       `json:"total"`
	Objective Objective `json:"objective"`
	Horizon   float64   `json:"horizon_days"`
	Index     int       `json:"index"`
	Candidate string    `json:"candidate"`
	Kind      Kind      `json:"kind"`
	X         *float64  `json:"x,omitempty"`
	Y         *float64  `json:"y,omitempty"`
	NewWells  int       `json:"new_wells"`
	// Runs holds one outcome per realization, in the plan's order.
	Runs []RunOutcome `json:"runs"`
}

// Results are the records of a screen, one per candidate present, sorted
// by candidate index.
type Results struct {
	Hash      string
	Total     int
	Objective Objective
	Horizon   float64
	Records   []Record
}

// ErrOtherSpec is wrapped by the error for a results file written by a
// different spec (or different inputs).
var ErrOtherSpec = errors.New("results of another spec")

// Model returns the model run for candidate ci on realization ri (ri < 0
// or a plan without realizations: the base permeability): a copy of the
// base case with the candidate's wells, the realization's permeability,
// the horizon as run end (report interval scaled, one snapshot at the
// horizon) and the schedule events of wells the candidate keeps.
func (p *Plan) Model(ci, ri int) *reservoir.Model {
	b := p.Spec.Base
	m := *b
	c := p.Candidates[ci]
	m.Wells = slices.Clone(c.Wells)
	if ri >= 0 && ri < len(p.Spec.Realizations) {
		px := p.Spec.Realizations[ri].Perm
		py := px
		if !slices.Equal(b.PermEast, b.PermNorth) {
			// Keep the base case's anisotropy ratio cell by cell.
			py = make([]float64, len(px))
			for k := range py {
				if b.PermEast[k] > 0 {
					py[k] = px[k] * b.PermNorth[k] / b.PermEast[k]
				}
			}
		}
		m.PermEast, m.PermNorth = px, py
	}
	h := p.Horizon
	r := b.Run
	if r.End > 0 && r.ReportEvery > 0 {
		r.ReportEvery = r.ReportEvery * h / r.End
	} else {
		r.ReportEvery = h / 120
	}
	r.End = h
	r.Snapshots = []float64{h}
	if len(r.UpdateTimes) > 0 {
		var ts []float64
		for _, t := range r.UpdateTimes {
			if t < h {
				ts = append(ts, t)
			}
		}
		r.UpdateTimes = ts
		r.PressureUpdates = 1 + len(ts)
	}
	m.Run = r
	m.Schedule = nil
	for _, ev := range b.Schedule {
		if ev.Time < h && m.WellIndex(ev.Well) >= 0 {
			m.Schedule = append(m.Schedule, ev)
		}
	}
	return &m
}

// realizationNames returns the names of the plan's realizations ("base"
// when there are none).
func (p *Plan) realizationNames() []string {
	if len(p.Spec.Realizations) == 0 {
		return []string{"base"}
	}
	names := make([]string, len(p.Spec.Realizations))
	for i, r := range p.Spec.Realizations {
		names[i] = r.Name
	}
	return names
}

// RunCandidate runs candidate ci on realization ri (see Model) and
// returns the full result of flood.Run.
func (p *Plan) RunCandidate(ci, ri int, ps pressure.Settings) (*flood.Result, error) {
	return flood.Run(p.Model(ci, ri), flood.Settings{Streamlines: p.Spec.Streamlines, Workers: 1, Frames: -1, Pressure: ps})
}

// runOne runs one job and reduces it; a failure (or a panic in the
// computation) becomes the outcome's Error.
func (p *Plan) runOne(ci, ri int, ps pressure.Settings) (out RunOutcome) {
	name := p.realizationNames()[max(ri, 0)]
	defer func() {
		if r := recover(); r != nil {
			out = RunOutcome{Realization: name, Error: fmt.Sprintf("internal error: %v", r)}
		}
	}()
	res, err := p.RunCandidate(ci, ri, ps)
	if err != nil {
		return RunOutcome{Realization: name, Error: err.Error()}
	}
	out, err = summarize(res, p.Spec.Economics, p.Candidates[ci].NewWells)
	if err != nil {
		return RunOutcome{Realization: name, Error: err.Error()}
	}
	out.Realization = name
	return out
}

func (p *Plan) record(ci int, runs []RunOutcome) Record {
	c := p.Candidates[ci]
	r := Record{Spec: p.Hash, Total: len(p.Candidates), Objective: objectiveOf(p.Spec), Horizon: p.Horizon,
		Index: ci, Candidate: c.Name, Kind: c.Kind, NewWells: c.NewWells, Runs: runs}
	if c.Kind == KindInfill {
		x, y := c.X, c.Y
		r.X, r.Y = &x, &y
	}
	return r
}

// Execute runs the candidates of the plan (or of one shard of it) that
// dir/results.jsonl does not hold yet, every candidate on every
// realization, Settings.Workers runs at a time, and appends one record per
// finished candidate to dir/results.jsonl (written with O_APPEND and
// synced record by record). A torn last line, left by an interruption, is
// cut off first. The file must hold records of this plan only (same hash);
// otherwise Execute refuses with an error wrapping ErrOtherSpec.
//
// When ctx is cancelled no new run starts; the candidates already finished
// are recorded and ctx's error is returned. Running Execute again resumes.
// Execute returns every record of the file, sorted by candidate index.
func Execute(ctx context.Context, p *Plan, dir string, s Settings) (*Results, error) {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, err
	}
	path := filepath.Join(dir, ResultsFile)
	prev, good, err := readResultsFile(path)
	if err != nil && !errors.Is(err, os.ErrNotExist) {
		return nil, err
	}
	if err := p.checkRecords(path, prev); err != nil {
		return nil, err
	}
	if st, err := os.Stat(path); err == nil && st.Size() > good {
		// Cut the torn tail so that the next record starts on its own line.
		if err := os.Truncate(path, good); err != nil {
			return nil, fmt.Errorf("%s: cutting a torn last line: %w", path, err)
		}
	}
	f, err := os.OpenFile(path, os.O_WRONLY|os.O_APPEND|os.O_CREATE, 0o644)
	if err != nil {
		return nil, err
	}
	defer f.Close()

	done := make([]bool, len(p.Candidates))
	for _, r := range prev {
		done[r.Index] = true
	}
	var todo []int
	for _, ci := range p.Shard(s.Shard, s.Shards) {
		if !done[ci] {
			todo = append(todo, ci)
		}
	}
	nr := max(1, len(p.Spec.Realizations))
	realIdx := func(r int) int {
		if len(p.Spec.Realizations) == 0 {
			return -1
		}
		return r
	}
	workers := s.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	total := len(todo) * nr
	workers = max(1, min(workers, total))

	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	type job struct{ slot, ci, ri int }
	type res struct {
		job
		out RunOutcome
	}
	jobs := make(chan job)
	results := make(chan res)
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for j := range jobs {
				results <- res{j, p.runOne(j.ci, realIdx(j.ri), s.Pressure)}
			}
		}()
	}
	go func() {
		// Hand out the jobs in a fixed order until cancelled.
		defer close(jobs)
		for slot, ci := range todo {
			for r := 0; r < nr; r++ {
				select {
				case jobs <- job{slot, ci, r}:
				case <-ctx.Done():
					return
				}
			}
		}
	}()
	go func() {
		wg.Wait()
		close(results)
	}()

	runs := make([][]RunOutcome, len(todo))
	left := make([]int, len(todo))
	for i := range left {
		left[i] = nr
	}
	var fresh []Record
	var werr error
	finished := 0
	for r := range results {
		finished++
		if runs[r.slot] == nil {
			runs[r.slot] = make([]RunOutcome, nr)
		}
		runs[r.slot][r.ri] = r.out
		left[r.slot]--
		if left[r.slot] == 0 && werr == nil {
			rec := p.record(r.ci, runs[r.slot])
			runs[r.slot] = nil
			if werr = appendRecord(f, rec); werr != nil {
				cancel() // stop handing out jobs; drain the runs in progress
				continue
			}
			fresh = append(fresh, rec)
		}
		if s.Progress != nil && werr == nil {
			s.Progress(finished, total)
		}
	}
	if werr != nil {
		return nil, fmt.Errorf("%s: %w", path, werr)
	}
	if err := context.Cause(ctx); err != nil && finished < total {
		return nil, err
	}
	all := append(prev, fresh...)
	sort.Slice(all, func(a, b int) bool { return all[a].Index < all[b].Index })
	return &Results{Hash: p.Hash, Total: len(p.Candidates), Objective: objectiveOf(p.Spec), Horizon: p.Horizon, Records: all}, nil
}

// appendRecord writes one record as a line and syncs the file, so that a
// crash loses at most the line being written.
func appendRecord(f *os.File, r Record) error {
	b, err := json.Marshal(r)
	if err != nil {
		return err
	}
	b = append(b, '\n')
	if _, err := f.Write(b); err != nil {
		return err
	}
	return f.Sync()
}

// checkRecords checks that records read from path belong to the plan.
func (p *Plan) checkRecords(path string, recs []Record) error {
	for _, r := range recs {
		if r.Spec != p.Hash {
			return fmt.Errorf("%s holds results of another spec or other inputs (hash %s, this spec %s); write into a new folder or remove the file: %w",
				path, r.Spec, p.Hash, ErrOtherSpec)
		}
		if r.Total != len(p.Candidates) || r.Index < 0 || r.Index >= len(p.Candidates) || p.Candidates[r.Index].Name != r.Candidate {
			return fmt.Errorf("%s: record of candidate %d (%s) does not match the plan: %w", path, r.Index, r.Candidate, ErrOtherSpec)
		}
		if len(r.Runs) != max(1, len(p.Spec.Realizations)) {
			return fmt.Errorf("%s: record of candidate %s has %d runs, the plan %d realizations: %w", path, r.Candidate, len(r.Runs), max(1, len(p.Spec.Realizations)), ErrOtherSpec)
		}
	}
	return nil
}

// readResultsFile reads the records of a results file and the length of
// its valid part. A last line that does not parse (torn by an
// interruption) is ignored; a damaged line before it is an error. Repeated
// records of one candidate keep the first.
func readResultsFile(path string) (recs []Record, good int64, err error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, 0, err
	}
	seen := map[int]bool{}
	var off int64
	line := 0
	for len(data) > 0 {
		line++
		i := bytes.IndexByte(data, '\n')
		last := i < 0
		var l []byte
		if last {
			l, data = data, nil
		} else {
			l, data = data[:i], data[i+1:]
		}
		var r Record
		perr := json.Unmarshal(l, &r)
		if perr == nil && r.Spec == "" {
			perr = errors.New("no spec hash")
		}
		if perr != nil || last {
			// An unterminated line is torn even if it parses: its newline
			// (and sync) never happened.
			if len(bytes.TrimSpace(l)) == 0 && !last {
				off += int64(len(l)) + 1
				continue
			}
			if last || len(bytes.TrimSpace(data)) == 0 {
				return recs, off, nil
			}
			return nil, 0, fmt.Errorf("%s:%d: damaged record (%v); the file was changed by hand or the disk failed", path, line, perr)
		}
		off += int64(len(l)) + 1
		if !seen[r.Index] {
			seen[r.Index] = true
			recs = append(recs, r)
		}
	}
	return recs, off, nil
}

// ReadResults reads dir/results.jsonl (see Execute) and checks that its
// records agree with each other.
func ReadResults(dir string) (*Results, error) {
	path := filepath.Join(dir, ResultsFile)
	recs, _, err := readResultsFile(path)
	if err != nil {
		return nil, err
	}
	if len(recs) == 0 {
		return nil, fmt.Errorf("%s: no finished candidate", path)
	}
	r0 := recs[0]
	for _, r := range recs {
		if r.Spec != r0.Spec || r.Total != r0.Total || r.Objective != r0.Objective || r.Horizon != r0.Horizon {
			return nil, fmt.Errorf("%s: records of candidates %s and %s come from different specs: %w", path, r0.Candidate, r.Candidate, ErrOtherSpec)
		}
		if r.Index < 0 || r.Index >= r.Total {
			return nil, fmt.Errorf("%s: candidate %s has index %d outside 0..%d", path, r.Candidate, r.Index, r.Total-1)
		}
	}
	sort.Slice(recs, func(a, b int) bool { return recs[a].Index < recs[b].Index })
	return &Results{Hash: r0.Spec, Total: r0.Total, Objective: r0.Objective, Horizon: r0.Horizon, Records: recs}, nil
}

// Merge joins the results of shards of one spec: the hashes must agree
// and no candidate may appear twice. Missing lists the indices of
// candidates that no part holds (the merge is complete when it is empty).
func Merge(parts ...*Results) (merged *Results, missing []int, err error) {
	if len(parts) == 0 {
		return nil, nil, errors.New("merge: no results")
	}
	m := &Results{Hash: parts[0].Hash, Total: parts[0].Total, Objective: parts[0].Objective, Horizon: parts[0].Horizon}
	from := map[int]int{}
	for pi, r := range parts {
		if r.Hash != m.Hash || r.Total != m.Total {
			return nil, nil, fmt.Errorf("merge: part %d comes from another spec (hash %s, %d candidates; part 1: hash %s, %d candidates): %w",
				pi+1, r.Hash, r.Total, m.Hash, m.Total, ErrOtherSpec)
		}
		for _, rec := range r.Records {
			if q, dup := from[rec.Index]; dup {
				return nil, nil, fmt.Errorf("merge: candidate %s is in part %d and part %d; each candidate must be in one part", rec.Candidate, q+1, pi+1)
			}
			from[rec.Index] = pi
			m.Records = append(m.Records, rec)
		}
	}
	sort.Slice(m.Records, func(a, b int) bool { return m.Records[a].Index < m.Records[b].Index })
	for i := 0; i < m.Total; i++ {
		if _, ok := from[i]; !ok {
			missing = append(missing, i)
		}
	}
	return m, missing, nil
}

// WriteResults writes the records as a results file (one JSON line each).
func WriteResults(w io.Writer, r *Results) error {
	bw := bufio.NewWriter(w)
	for _, rec := range r.Records {
		b, err := json.Marshal(rec)
		if err != nil {
			return err
		}
		bw.Write(b)
		bw.WriteByte('\n')
	}
	return bw.Flush()
}

package flood

import (
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"slices"
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
	Producers          []ProducerCurve
}

// ReadRunCurves reads producers.csv and summary.json from the run folder
// dir. A folder without summary.json holds no finished run and is an
// error.
func ReadRunCurves(dir string) (*RunCurves, error) {
	b, err := os.ReadFile(filepath.Join(dir, "summary.json"))
	if errors.Is(err, fs.ErrNotExist) {
		return nil, fmt.Errorf("%s: no summary.json: not a finished floodtrace run", dir)
	}
	if err != nil {
		return nil, err
	}
	var sum struct {
		Title     string `json:"title"`
		Engine    string `json:"engine"`
		Producers []struct {
			Name             string   `json:"name"`
			BreakthroughDays *float64 `json:"breakthrough_days"`
		} `json:"producers"`
	}
	if err := json.Unmarshal(b, &sum); err != nil {
		return nil, fmt.Errorf("%s: %w", filepath.Join(dir, "summary.json"), err)
	}
	rc := &RunCurves{Dir: dir, Title: sum.Title, Engine: sum.Engine}
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
		bt := math.NaN()
		if p.BreakthroughDays != nil {
			bt = *p.BreakthroughDays
		}
		if index(p.Name) < 0 {
			rc.Producers = append(rc.Producers, ProducerCurve{Name: p.Name, Breakthrough: bt})
		}
	}
	path := filepath.Join(dir, "producers.csv")
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
	for _, need := range []string{"time_days", "well", "water_cut"} {
		if _, ok := col[need]; !ok {
			return nil, fmt.Errorf("%s: no %s column", path, need)
		}
	}
	ct, cw, cc := col["time_days"], col["well"], col["water_cut"]
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

// ProducerComparison compares one producer of two runs.
type ProducerComparison struct {
	Name string
	// RMS is the root-mean-square water-cut difference B - A over Points
	// times: the union of both runs' report times within the span both
	// runs cover, each curve interpolated linearly. NaN when the spans do
	// not overlap.
	RMS    float64
	Points int
	// BreakthroughA and BreakthroughB are the water breakthroughs (days,
	// NaN for none); BreakthroughDiff is B - A, NaN unless both exist.
	BreakthroughA, BreakthroughB, BreakthroughDiff float64
	// A and B are the two curves.
	A, B ProducerCurve
}

// Comparison is the comparison of two runs.
type Comparison struct {
	A, B *RunCurves
	// Producers lists the producers found in both runs, in the order of A.
	Producers []ProducerComparison
	// OnlyA and OnlyB name producers found in one run only.
	OnlyA, OnlyB []string
	// RMS is the root-mean-square water-cut difference over all the
	// compared points of all producers.
	RMS float64
}

// Compare compares the producers' water-cut curves and breakthrough times
// of two runs.
func Compare(a, b *RunCurves) *Comparison {
	c := &Comparison{A: a, B: b, RMS: math.NaN()}
	find := func(rc *RunCurves, name string) *ProducerCurve {
		for i := range rc.Producers {
			if rc.Producers[i].Name == name {
				return &rc.Producers[i]
			}
		}
		return nil
	}
	sum, n := 0.0, 0
	for _, pa := range a.Producers {
		pb := find(b, pa.Name)
		if pb == nil {
			c.OnlyA = append(c.OnlyA, pa.Name)
			continue
		}
		pc := ProducerComparison{Name: pa.Name, A: pa, B: *pb, RMS: math.NaN(),
			BreakthroughA: pa.Breakthrough, BreakthroughB: pb.Breakthrough, BreakthroughDiff: pb.Breakthrough - pa.Breakthrough}
		s, k := curveSquares(pa.Time, pa.WaterCut, pb.Time, pb.WaterCut)
		if k > 0 {
			pc.RMS, pc.Points = math.Sqrt(s/float64(k)), k
			sum += s
			n += k
		}
		c.Producers = append(c.Producers, pc)
	}
	for _, pb := range b.Producers {
		if find(a, pb.Name) == nil {
			c.OnlyB = append(c.OnlyB, pb.Name)
		}
	}
	if n > 0 {
		c.RMS = math.Sqrt(sum / float64(n))
	}
	return c
}

// curveSquares returns the sum of squared differences of two piecewise
// linear curves over the union of their abscissae inside the common span,
// and the number of points.
func curveSquares(ta, ya, tb, yb []float64) (float64, int) {
	if len(ta) == 0 || len(tb) == 0 {
		return 0, 0
	}
	lo := math.Max(ta[0], tb[0])
	hi := math.Min(ta[len(ta)-1], tb[len(tb)-1])
	if lo > hi {
		return 0, 0
	}
	ts := make([]float64, 0, len(ta)+len(tb))
	for _, t := range ta {
		if t >= lo && t <= hi {
			ts = append(ts, t)
		}
	}
	for _, t := range tb {
		if t >= lo && t <= hi {
			ts = append(ts, t)
		}
	}
	slices.Sort(ts)
	ts = slices.Compact(ts)
	s := 0.0
	for _, t := range ts {
		d := Interpolate(ta, ya, t) - Interpolate(tb, yb, t)
		s += d * d
	}
	return s, len(ts)
}

// Interpolate returns the piecewise linear interpolant of (xs, ys) at x,
// with xs increasing; outside the range it returns the end values.
func Interpolate(xs, ys []float64, x float64) float64 {
	n := len(xs)
	if n == 0 {
		return math.NaN()
	}
	k, found := slices.BinarySearch(xs, x)
	switch {
	case found:
		return ys[k]
	case k == 0:
		return ys[0]
	case k >= n:
		return ys[n-1]
	}
	x0, x1 := xs[k-1], xs[k]
	return ys[k-1] + (ys[k]-ys[k-1])*(x-x0)/(x1-x0)
}

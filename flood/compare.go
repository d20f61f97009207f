package flood

import (
	"math"
	"slices"

	"floodtrace/runfolder"
)

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
	A, B runfolder.ProducerCurve
}

// Comparison is the comparison of two runs.
type Comparison struct {
	A, B *runfolder.RunCurves
	// Producers lists the producers found in both runs, in the order of A.
	Producers []ProducerComparison
	// OnlyA and OnlyB name producers found in one run only.
	OnlyA, OnlyB []string
	// RMS is the root-mean-square water-cut difference over all the
	// compared points of all producers.
	RMS float64
}

// Compare compares the producers' water-cut curves and breakthrough times
// of two runs (read with runfolder.ReadRunCurves).
func Compare(a, b *runfolder.RunCurves) *Comparison {
	c := &Comparison{A: a, B: b, RMS: math.NaN()}
	find := func(rc *runfolder.RunCurves, name string) *runfolder.ProducerCurve {
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

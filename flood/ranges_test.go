package flood

import (
	"math"
	"runtime"
	"slices"
	"testing"
)

// TestCellRangesAnyCores: the line set and the saturation maps are summed
// over cell ranges whose number follows the cores; every sum must come out
// bit for bit the same on 1, 2, 3 and 8 cores (a grid of 16384 cells gets
// up to 4 ranges).
func TestCellRangesAnyCores(t *testing.T) {
	m := fiveSpot(t, 128, demoCorey, 0.5, 2)
	m.Run.Streamlines = 1000
	_, tr := solveTrace(t, m)
	rs := blForModel(t, m)
	same := func(a, b []float64) bool {
		return slices.EqualFunc(a, b, func(x, y float64) bool { return x == y || (math.IsNaN(x) && math.IsNaN(y)) })
	}
	prev := runtime.GOMAXPROCS(0)
	defer runtime.GOMAXPROCS(prev)
	var refB []float64
	var refMaps [][]float64
	for _, procs := range []int{1, 2, 3, 8} {
		runtime.GOMAXPROCS(procs)
		ls := mustLineSet(t, tr, m.PoreVolumes())
		if refB == nil {
			refB = ls.b
		} else if !same(refB, ls.b) {
			t.Fatalf("%d cores: rescaled time of flight differs from 1 core", procs)
		}
		for k, tm := range []float64{300, 1500, 4000} {
			sw := ls.cellSaturation(m, rs, tm, m.Fluids.InitialSw, 0)
			if len(refMaps) <= k {
				refMaps = append(refMaps, sw)
			} else if !same(refMaps[k], sw) {
				t.Fatalf("%d cores: the saturation map at day %g differs from 1 core", procs, tm)
			}
		}
	}
	if n := len(mustLineSet(t, tr, m.PoreVolumes()).cellBounds(8)) - 1; n < 2 {
		t.Fatalf("only %d cell range: the test does not reach the parallel sums", n)
	}
}

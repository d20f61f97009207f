package render

import (
	"image"
	"math"
	"slices"
	"testing"

	"floodtrace/reservoir"
)

// TestLinearTicks follows the loose-labelling examples of Heckbert (1990,
// "Nice numbers for graph labels"): steps of 1, 2 or 5 times a power of
// ten, ticks inside the range.
func TestLinearTicks(t *testing.T) {
	cases := []struct {
		lo, hi float64
		n      int
		want   []float64
		step   float64
	}{
		{0, 1, 6, []float64{0, 0.2, 0.4, 0.6, 0.8, 1}, 0.2},
		{2500, 4000, 6, []float64{2500, 3000, 3500, 4000}, 500},
		{0.2, 0.75, 5, []float64{0.2, 0.4, 0.6}, 0.2},
		{0.2, 0.75, 8, []float64{0.2, 0.3, 0.4, 0.5, 0.6, 0.7}, 0.1},
		{-3, 7, 6, []float64{-2, 0, 2, 4, 6}, 2},
		{0, 1825, 7, []float64{0, 500, 1000, 1500}, 500},
	}
	for _, c := range cases {
		got, step := linearTicks(c.lo, c.hi, c.n)
		if step != c.step || len(got) != len(c.want) {
			t.Errorf("LinearTicks(%v, %v, %d) = %v step %v, want %v step %v", c.lo, c.hi, c.n, got, step, c.want, c.step)
			continue
		}
		for i := range got {
			if !near(got[i], c.want[i], 1e-9*math.Max(1, math.Abs(c.want[i]))) {
				t.Errorf("LinearTicks(%v, %v, %d)[%d] = %v, want %v", c.lo, c.hi, c.n, i, got[i], c.want[i])
			}
		}
	}
}

func TestLogTicks(t *testing.T) {
	cases := []struct {
		lo, hi float64
		want   []float64
	}{
		{1, 1e6, []float64{1, 10, 100, 1e3, 1e4, 1e5, 1e6}},
		{500, 50000, []float64{500, 1000, 2000, 5000, 10000, 20000, 50000}},
		{2, 10, []float64{2, 5, 10}},
		{1, 1e12, []float64{1, 100, 1e4, 1e6, 1e8, 1e10, 1e12}},
	}
	for _, c := range cases {
		got := logTicks(c.lo, c.hi)
		if len(got) != len(c.want) {
			t.Errorf("LogTicks(%v, %v) = %v, want %v", c.lo, c.hi, got, c.want)
			continue
		}
		for i := range got {
			if !near(got[i], c.want[i], 1e-9*c.want[i]) {
				t.Errorf("LogTicks(%v, %v) = %v, want %v", c.lo, c.hi, got, c.want)
				break
			}
		}
	}
}

func TestFormatNumber(t *testing.T) {
	cases := []struct {
		v    float64
		dec  int
		want string
	}{
		{0, 0, "0"},
		{999, 0, "999"},
		{1000, 0, "1,000"},
		{1234567.891, 1, "1,234,567.9"},
		{-12500, 0, "-12,500"},
		{0.35, 2, "0.35"},
		{-0.0001, 2, "0.00"},
		{math.NaN(), 2, "n/a"},
	}
	for _, c := range cases {
		if got := FormatNumber(c.v, c.dec); got != c.want {
			t.Errorf("FormatNumber(%v, %d) = %q, want %q", c.v, c.dec, got, c.want)
		}
	}
}

func TestScaleBarLength(t *testing.T) {
	cases := []struct {
		max  float64
		want float64
		seg  int
	}{
		{730, 500, 5}, {1999, 1000, 4}, {2000, 2000, 4}, {0.37, 0.2, 4}, {5, 5, 5},
	}
	for _, c := range cases {
		got, seg := scaleBarLength(c.max)
		if !near(got, c.want, 1e-12) || seg != c.seg {
			t.Errorf("ScaleBarLength(%v) = %v, %d; want %v, %d", c.max, got, seg, c.want, c.seg)
		}
	}
	if l, s := scaleBarLength(0); l != 0 || s != 0 {
		t.Errorf("ScaleBarLength(0) = %v, %d", l, s)
	}
}

// TestLayoutTransform: the map keeps the reservoir's aspect ratio, lies
// inside the picture left of the legend panel, and ToPixel/ToMap are
// inverse to each other and put the grid corners on the map corners.
func TestLayoutTransform(t *testing.T) {
	grids := []reservoir.Grid{
		{NX: 60, NY: 40, DX: 50, DY: 50, X0: 1000, Y0: 2000},
		{NX: 10, NY: 200, DX: 30, DY: 10, X0: -500, Y0: 0},
		{NX: 300, NY: 20, DX: 10, DY: 10},
	}
	for _, g := range grids {
		for _, sz := range [][2]int{{1920, 1080}, {800, 800}, {1280, 720}, {400, 300}} {
			l, err := NewLayout(g, sz[0], sz[1])
			if err != nil {
				t.Fatal(err)
			}
			if !l.Map.In(image0(sz)) || l.Map.Max.X > l.Panel.Min.X {
				t.Errorf("grid %v size %v: map %v outside picture or over panel %v", g, sz, l.Map, l.Panel)
			}
			aspectMap := float64(l.Map.Dx()) / float64(l.Map.Dy())
			aspectRes := g.Width() / g.Height()
			if math.Abs(aspectMap/aspectRes-1) > 2/math.Min(float64(l.Map.Dx()), float64(l.Map.Dy())) {
				t.Errorf("grid %v size %v: aspect %v, reservoir %v", g, sz, aspectMap, aspectRes)
			}
			px, py := l.ToPixel(g.X0, g.Y0)
			if !near(px, float64(l.Map.Min.X), 0.5) || !near(py, float64(l.Map.Max.Y), 1) {
				t.Errorf("south-west corner at (%v, %v), map %v", px, py, l.Map)
			}
			px, py = l.ToPixel(g.X0+g.Width(), g.Y0+g.Height())
			if !near(px, float64(l.Map.Max.X), 1) || !near(py, float64(l.Map.Min.Y), 0.5) {
				t.Errorf("north-east corner at (%v, %v), map %v", px, py, l.Map)
			}
			x, y := l.ToMap(l.ToPixel(g.X0+123.4, g.Y0+56.7))
			if !near(x, g.X0+123.4, 1e-9) || !near(y, g.Y0+56.7, 1e-9) {
				t.Errorf("round trip gives (%v, %v)", x, y)
			}
		}
	}
	if _, err := NewLayout(grids[0], 50, 50); err == nil {
		t.Error("50x50 picture accepted")
	}
	if _, err := NewLayout(reservoir.Grid{NX: 0, NY: 3, DX: 1, DY: 1}, 800, 600); err == nil {
		t.Error("empty grid accepted")
	}
}

func image0(sz [2]int) image.Rectangle { return image.Rect(0, 0, sz[0], sz[1]) }

func TestScaleResolve(t *testing.T) {
	v := []float64{math.NaN(), 0.3, 0.7, 5}
	sc, err := Scale{}.Resolve(v, []bool{true, true, true, false})
	if err != nil || sc.Min != 0.3 || sc.Max != 0.7 {
		t.Errorf("Resolve = %+v, %v", sc, err)
	}
	if !near(sc.T(0.5), 0.5, 1e-12) || sc.T(-1) != 0 || sc.T(9) != 1 || !math.IsNaN(sc.T(math.NaN())) {
		t.Errorf("T: %v %v %v", sc.T(0.5), sc.T(-1), sc.T(9))
	}
	lg, err := Scale{Log: true}.Resolve([]float64{-1, 0, 10, 1000}, nil)
	if err != nil || lg.Min != 10 || lg.Max != 1000 || !near(lg.T(100), 0.5, 1e-12) || !near(lg.Value(0.5), 100, 1e-9) {
		t.Errorf("log Resolve = %+v, %v", lg, err)
	}
	c, err := Scale{}.Resolve([]float64{2, 2}, nil)
	if err != nil || !(c.Min < 2 && c.Max > 2) {
		t.Errorf("constant data: %+v, %v", c, err)
	}
	for _, bad := range []Scale{{Min: 1, Max: 0}, {Log: true, Min: -1, Max: 2}, {Min: math.NaN(), Max: 1}} {
		if _, err := bad.Resolve(nil, nil); err == nil {
			t.Errorf("Resolve(%+v): no error", bad)
		}
	}
	if _, err := (Scale{}).Resolve([]float64{math.NaN()}, nil); err == nil {
		t.Error("no finite value: no error")
	}
}

func TestRobustRange(t *testing.T) {
	v := make([]float64, 101)
	for i := range v {
		v[i] = float64(i)
	}
	v[100] = 1e9
	lo, hi, below, above, ok := robustRange(v, nil, 0.01, 0.99, false)
	if !ok || lo != 1 || hi != 99 || !below || !above {
		t.Errorf("RobustRange = %v %v %v %v %v", lo, hi, below, above, ok)
	}
	if _, _, _, _, ok := robustRange([]float64{-1, 0}, nil, 0, 1, true); ok {
		t.Error("no positive value: ok")
	}
}

func TestPickFrames(t *testing.T) {
	cases := []struct {
		total, n int
		want     []int
	}{
		{5, 0, []int{0, 1, 2, 3, 4}},
		{5, 9, []int{0, 1, 2, 3, 4}},
		{12, 4, []int{0, 4, 7, 11}},
		{12, 1, []int{11}},
		{40, 2, []int{0, 39}},
	}
	for _, c := range cases {
		if got := pickFrames(c.total, c.n); !slices.Equal(got, c.want) {
			t.Errorf("pickFrames(%d, %d) = %v, want %v", c.total, c.n, got, c.want)
		}
	}
}

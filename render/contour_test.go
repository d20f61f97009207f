package render

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strings"
	"testing"

	"floodtrace/reservoir"
)

// node returns the map position of cell k's centre.
func node(g reservoir.Grid, k int) (float64, float64) {
	return g.X0 + (float64(k%g.NX)+0.5)*g.DX, g.Y0 + (float64(k/g.NX)+0.5)*g.DY
}

func fieldOf(g reservoir.Grid, f func(x, y float64) float64) []float64 {
	v := make([]float64, g.N())
	for k := range v {
		v[k] = f(node(g, k))
	}
	return v
}

// TestContourPlanar: on a planar depth D = a + b x + c y, linear
// interpolation along the square edges is exact, so every contour point
// lies on the straight line b x + c y = L - a (closed form) to round-off,
// the lines of successive levels are parallel at the spacing interval /
// |grad D|, each level is one unbroken line across a grid without holes,
// and a line stops at an inactive block: no piece lies in a square with
// an inactive corner.
func TestContourPlanar(t *testing.T) {
	g := reservoir.Grid{NX: 40, NY: 30, DX: 50, DY: 40, X0: 1000, Y0: 2000}
	for _, tc := range []struct {
		name    string
		a, b, c float64
		hole    bool
	}{
		{"east dip", 6000, 0.05, 0, false},
		{"oblique", 7200, -0.03, 0.04, false},
		{"north dip with a hole", 5000, 0.002, -0.06, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			d := fieldOf(g, func(x, y float64) float64 { return tc.a + tc.b*x + tc.c*y })
			var active []bool
			if tc.hole {
				active = make([]bool, g.N())
				for k := range active {
					i, j := k%g.NX, k/g.NX
					active[k] = !(i >= 10 && i < 20 && j >= 8 && j < 22)
				}
			}
			st, err := NewStructure(g, d, active)
			must(t, err)
			if n := len(st.Contours); n < 5 || n > 12 {
				t.Fatalf("%d levels at interval %v", n, st.Interval)
			}
			grad := math.Hypot(tc.b, tc.c)
			var prev float64
			for n, ct := range st.Contours {
				if len(ct.Lines) == 0 {
					t.Fatalf("level %v has no line", ct.Level)
				}
				if !tc.hole && len(ct.Lines) != 1 {
					t.Errorf("level %v in %d pieces, want one", ct.Level, len(ct.Lines))
				}
				// Signed distance of each point from the origin line, along
				// the unit gradient.
				off := (ct.Level - tc.a) / grad
				for _, ln := range ct.Lines {
					for _, p := range ln {
						if e := math.Abs((tc.b*p[0]+tc.c*p[1])/grad - off); e > 1e-12*(math.Abs(p[0])+math.Abs(p[1])+math.Abs(off)) {
							t.Fatalf("level %v: point %v is %g off the line", ct.Level, p, e)
						}
					}
					if tc.hole {
						for i := 1; i < len(ln); i++ {
							mx, my := (ln[i][0]+ln[i-1][0])/2, (ln[i][1]+ln[i-1][1])/2
							si := int(math.Floor((mx-g.X0)/g.DX - 0.5))
							sj := int(math.Floor((my-g.Y0)/g.DY - 0.5))
							for _, k := range []int{sj*g.NX + si, sj*g.NX + si + 1, (sj+1)*g.NX + si, (sj+1)*g.NX + si + 1} {
								if !active[k] {
									t.Fatalf("level %v: a piece at (%v, %v) crosses inactive cell %d", ct.Level, mx, my, k)
								}
							}
						}
					}
				}
				if n > 0 {
					if sp := off - prev; math.Abs(sp-st.Interval/grad) > 1e-9*math.Abs(off) {
						t.Errorf("spacing %v, want %v", sp, st.Interval/grad)
					}
				}
				prev = off
			}
		})
	}
}

// TestContourRadial: the depth D = D0 + r, r the distance from a point
// that is no cell centre, has circles of radius L - D0 as contours
// (closed form); marching squares gives closed lines whose points lie on
// the circle to well within a cell (measured 0.52 ft at most on 25 ft
// cells, at R = 95 ft) and whose enclosed area is pi R^2 within 3 %
// (measured 1.5 % at R = 95 ft, 0.03 % at 660 ft: the chords cut the
// circle).
func TestContourRadial(t *testing.T) {
	g := reservoir.Grid{NX: 80, NY: 70, DX: 25, DY: 25}
	xc, yc := 1013.0, 871.0
	d := fieldOf(g, func(x, y float64) float64 { return 4000 + math.Hypot(x-xc, y-yc) })
	for _, R := range []float64{95, 210, 437.5, 660} {
		lines := ContourLines(g, d, nil, 4000+R)
		if len(lines) != 1 {
			t.Fatalf("R %v: %d lines, want one circle", R, len(lines))
		}
		ln := lines[0]
		if ln[0] != ln[len(ln)-1] {
			t.Errorf("R %v: the line is not closed", R)
		}
		worst, area := 0.0, 0.0
		for i, p := range ln {
			worst = math.Max(worst, math.Abs(math.Hypot(p[0]-xc, p[1]-yc)-R))
			if i > 0 {
				q := ln[i-1]
				area += (q[0]-xc)*(p[1]-yc) - (p[0]-xc)*(q[1]-yc)
			}
		}
		area = math.Abs(area) / 2
		rel := area/(math.Pi*R*R) - 1
		t.Logf("R %v: %d points, radius error at most %.3f ft, area error %.3f %%", R, len(ln), worst, 100*rel)
		if worst > 2 || math.Abs(rel) > 0.03 {
			t.Errorf("R %v: radius error %v ft (want under 2, a cell is 25), area error %.3f %%", R, worst, 100*rel)
		}
	}
}

// TestContourInterval: the 1-2-5 step nearest 8 levels (values worked by
// hand) and, over many ranges, always 5 to 12 levels inside the range.
func TestContourInterval(t *testing.T) {
	for _, tc := range []struct{ lo, hi, want float64 }{
		{0, 100, 10},          // 10..90: 9 levels (20 gives 4)
		{5000, 5300, 50},      // 5050..5250: 5 levels (20 gives 14)
		{7210.5, 7388.2, 20},  // 7220..7380: 9 levels (10 gives 18, 50 gives 3)
		{1612.3, 1614.1, 0.2}, // 1612.4..1614.0: 9 levels
		{-40, 35, 10},         // -30..30: 7 levels
	} {
		if got := ContourInterval(tc.lo, tc.hi); math.Abs(got-tc.want) > 1e-12*tc.want {
			t.Errorf("%v..%v: interval %v, want %v", tc.lo, tc.hi, got, tc.want)
		}
	}
	for n := range 2000 {
		lo := 1000 * math.Sin(float64(n))
		hi := lo + math.Pow(10, 4*math.Abs(math.Cos(1.7*float64(n))))*0.37
		st := ContourInterval(lo, hi)
		cnt := 0
		for l := (math.Floor(lo/st) + 1) * st; l < hi; l += st {
			if l > lo {
				cnt++
			}
		}
		if cnt < 5 || cnt > 12 {
			t.Fatalf("%v..%v: interval %v gives %d levels", lo, hi, st, cnt)
		}
	}
	if ContourInterval(3, 3) != 0 {
		t.Error("a constant depth has an interval")
	}
}

// TestMeanDip: a planar depth dips atan |grad D| toward the azimuth of
// grad D (closed form); a dome has no single direction.
func TestMeanDip(t *testing.T) {
	g := reservoir.Grid{NX: 30, NY: 20, DX: 100, DY: 100}
	for _, tc := range []struct {
		b, c, az float64
	}{
		{0.05, 0, 90}, {-0.03, -0.03, 225}, {0, 0.1, 0}, {-0.02, 0.0346410161514, 330},
	} {
		d := fieldOf(g, func(x, y float64) float64 { return 8000 + tc.b*x + tc.c*y })
		st, err := NewStructure(g, d, nil)
		must(t, err)
		want := math.Atan(math.Hypot(tc.b, tc.c)) * 180 / math.Pi
		if !st.HasDirection || math.Abs(st.DipDegrees-want) > 1e-9 || math.Abs(st.DipAzimuth-tc.az) > 1e-6 {
			t.Errorf("grad (%v, %v): dip %v toward %v (direction %v), want %v toward %v", tc.b, tc.c, st.DipDegrees, st.DipAzimuth, st.HasDirection, want, tc.az)
		}
	}
	dome := fieldOf(g, func(x, y float64) float64 { return 8000 + 0.05*math.Hypot(x-1500, y-1000) })
	st, err := NewStructure(g, dome, nil)
	must(t, err)
	if st.HasDirection {
		t.Errorf("dome: a direction %v", st.DipAzimuth)
	}
	if want := math.Atan(0.05) * 180 / math.Pi; math.Abs(st.DipDegrees-want) > 0.1*want {
		t.Errorf("dome: mean dip %v, want about %v", st.DipDegrees, want)
	}
}

// withDepth writes the synthetic run into dir with depth.asc (a planar
// depth dipping east, 0.05 ft/ft, about 2.9 degrees) and a gravity
// object in summary.json.
func withDepth(t *testing.T, dir string) synthCase {
	c := newSynthCase()
	c.write(t, dir)
	g := c.grid
	c.writeASC(t, filepath.Join(dir, "depth.asc"), func(i, j int) float64 {
		return 6000 + 0.05*(float64(i)+0.5)*g.DX
	})
	p := filepath.Join(dir, "summary.json")
	b, err := os.ReadFile(p)
	must(t, err)
	var m map[string]any
	must(t, json.Unmarshal(b, &m))
	m["gravity"] = map[string]any{"gravity_number": 0.237, "dip_min_degrees": 2.86, "dip_max_degrees": 2.86, "water_density": 64, "oil_density": 50}
	b, err = json.Marshal(m)
	must(t, err)
	must(t, os.WriteFile(p, b, 0o644))
	return c
}

// TestRunDepthContours draws the synthetic run with and without a depth
// map: the same files; with depth the maps carry contours where the
// closed form puts them (the pixel on the 6,100 ft contour, x = 2000 ft
// from the grid's west edge, changes; a pixel between two contours does
// not), the legend names the interval and the dip, the report gives the
// gravity number, and the bytes do not depend on the core count.
func TestRunDepthContours(t *testing.T) {
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(0))
	plain := outDir(t, "plain")
	newSynthCase().write(t, plain)
	opt := Options{Width: 960, Height: 540, Frames: 2}
	repPlain, err := Run(plain, opt)
	must(t, err)
	var refDir string
	var ref *Report
	for _, procs := range []int{1, 3} {
		runtime.GOMAXPROCS(procs)
		dir := outDir(t, "depth"+string(rune('0'+procs)))
		c := withDepth(t, dir)
		rep, err := Run(dir, opt)
		must(t, err)
		if !slices.Equal(rep.Files, repPlain.Files) {
			t.Fatalf("files %v, without depth %v", rep.Files, repPlain.Files)
		}
		if ref == nil {
			ref, refDir = rep, dir
			g := c.grid
			l, err := NewLayout(g, 960, 540)
			must(t, err)
			for _, m := range []string{"tof", "pressure", "injector_partition", "streamlines"} {
				a := decodePNG(t, filepath.Join(plain, "maps", m+".png"))
				b := decodePNG(t, filepath.Join(dir, "maps", m+".png"))
				// Row at y = 2300 ft (cell row 6), clear of wells and labels.
				on, py := l.ToPixel(g.X0+2000, g.Y0+300)
				off, _ := l.ToPixel(g.X0+1000, g.Y0+300) // 6050 ft, half-way between contours
				if rgbaAt(a, int(on), int(py)) == rgbaAt(b, int(on), int(py)) {
					t.Errorf("%s: no contour at the 6,100 ft line", m)
				}
				if rgbaAt(a, int(off), int(py)) != rgbaAt(b, int(off), int(py)) {
					t.Errorf("%s: a line between the contours", m)
				}
			}
			html, err := os.ReadFile(filepath.Join(dir, "report.html"))
			must(t, err)
			for _, want := range []string{"Gravity number", "0.237", "2.9° to 2.9°", "64.0 and 50.0 lb/ft3"} {
				if !strings.Contains(string(html), want) {
					t.Errorf("report lacks %q", want)
				}
			}
			continue
		}
		for _, f := range rep.Files {
			a, err := os.ReadFile(filepath.Join(refDir, f))
			must(t, err)
			b, err := os.ReadFile(filepath.Join(dir, f))
			must(t, err)
			if !bytes.Equal(a, b) {
				t.Errorf("GOMAXPROCS %d: %s differs from the picture drawn on one core", procs, f)
			}
		}
	}
	html, err := os.ReadFile(filepath.Join(plain, "report.html"))
	must(t, err)
	if strings.Contains(string(html), "Gravity number") {
		t.Error("a run without depth reports a gravity number")
	}
}

// BenchmarkNewStructure contours a 1000x1000 planar depth (12 levels,
// each line 1000 pieces long) and fits its dip.
func BenchmarkNewStructure(b *testing.B) {
	g := reservoir.Grid{NX: 1000, NY: 1000, DX: 10, DY: 10}
	d := fieldOf(g, func(x, y float64) float64 { return 6000 + 0.02*x + 0.01*y })
	for b.Loop() {
		if _, err := NewStructure(g, d, nil); err != nil {
			b.Fatal(err)
		}
	}
}

package reservoir

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

func TestFaultFacesByHand(t *testing.T) {
	g5 := Grid{NX: 5, NY: 4, DX: 10, DY: 10}
	g3 := Grid{NX: 3, NY: 3, DX: 1, DY: 1}
	cases := []struct {
		name   string
		g      Grid
		trace  [][2]float64
		xf, yf []int
	}{
		// A vertical fault along the grid line x = 20, beyond both ends
		// of the grid: every link between columns 1 and 2.
		{"vertical through", g5, [][2]float64{{20, -5}, {20, 45}},
			[]int{g5.XFace(2, 0), g5.XFace(2, 1), g5.XFace(2, 2), g5.XFace(2, 3)}, nil},
		// Ending at y = 15 it reaches the row-1 link (centres at y = 15)
		// with its end point, which counts.
		{"vertical partial", g5, [][2]float64{{20, 0}, {20, 15}},
			[]int{g5.XFace(2, 0), g5.XFace(2, 1)}, nil},
		// Along a row of centres (y = 15): collinear with the x-links (no
		// crossing), through the centres of row 1, so by the half-open
		// convention the barrier lies between rows 1 and 2 only.
		{"along centres", g5, [][2]float64{{-1, 15}, {51, 15}},
			nil, []int{g5.YFace(0, 2), g5.YFace(1, 2), g5.YFace(2, 2), g5.YFace(3, 2), g5.YFace(4, 2)}},
		// y = 0.25 + 2x/3 on a 3 x 3 grid of unit cells, worked by hand:
		// at the row centres y = 0.5, 1.5, 2.5 the line is at x = 0.375,
		// 1.875, 3.375, so only the link from (1,1) to (2,1) is crossed;
		// at the column centres x = 0.5, 1.5, 2.5 it is at y = 0.583,
		// 1.25, 1.917: links (0,0)-(0,1), (1,0)-(1,1) and (2,1)-(2,2).
		{"diagonal by hand", g3, [][2]float64{{0, 0.25}, {3, 2.25}},
			[]int{g3.XFace(2, 1)}, []int{g3.YFace(0, 1), g3.YFace(1, 1), g3.YFace(2, 2)}},
		{"outside", g5, [][2]float64{{100, 0}, {100, 40}}, nil, nil},
		{"far away", g5, [][2]float64{{-1e300, 1e300}, {1e300, 1e300}}, nil, nil},
		{"huge crossing", g5, [][2]float64{{-1e300, 12}, {1e300, 12}}, nil,
			[]int{g5.YFace(0, 1), g5.YFace(1, 1), g5.YFace(2, 1), g5.YFace(3, 1), g5.YFace(4, 1)}},
		{"not finite", g5, [][2]float64{{math.NaN(), 0}, {20, 40}}, nil, nil},
		{"single point", g5, [][2]float64{{20, 20}}, nil, nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			xf, yf := FaultFaces(c.g, c.trace)
			if !slices.Equal(xf, c.xf) || !slices.Equal(yf, c.yf) {
				t.Errorf("x-faces %v y-faces %v, want %v %v", xf, yf, c.xf, c.yf)
			}
		})
	}
}

// TestFaultFacesRandom compares FaultFaces with a second formulation of
// the same definition: solve p0 + t(p1-p0) = q0 + u(q1-q0) by Cramer's
// rule and accept 0 <= t < 1, 0 <= u <= 1. With random real coordinates
// the degenerate cases have probability zero, so the two must agree.
func TestFaultFacesRandom(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	g := Grid{NX: 13, NY: 9, DX: 30, DY: 20, X0: 500, Y0: -100}
	cross := func(p0, p1, q0, q1 [2]float64) bool {
		rx, ry := p1[0]-p0[0], p1[1]-p0[1]
		sx, sy := q1[0]-q0[0], q1[1]-q0[1]
		den := rx*sy - ry*sx
		if den == 0 {
			return false
		}
		wx, wy := q0[0]-p0[0], q0[1]-p0[1]
		tt := (wx*sy - wy*sx) / den
		u := (wx*ry - wy*rx) / den
		return tt >= 0 && tt < 1 && u >= 0 && u <= 1
	}
	for trial := 0; trial < 200; trial++ {
		var trace [][2]float64
		for p := 0; p < 2+rng.IntN(4); p++ {
			trace = append(trace, [2]float64{g.X0 - 50 + rng.Float64()*(g.Width()+100), g.Y0 - 50 + rng.Float64()*(g.Height()+100)})
		}
		var wantX, wantY []int
		for j := 0; j < g.NY; j++ {
			for i := 0; i < g.NX; i++ {
				c := [2]float64{g.X0 + (float64(i)+0.5)*g.DX, g.Y0 + (float64(j)+0.5)*g.DY}
				east := [2]float64{c[0] + g.DX, c[1]}
				north := [2]float64{c[0], c[1] + g.DY}
				for s := 0; s+1 < len(trace); s++ {
					if i+1 < g.NX && cross(c, east, trace[s], trace[s+1]) {
						wantX = append(wantX, g.XFace(i+1, j))
					}
					if j+1 < g.NY && cross(c, north, trace[s], trace[s+1]) {
						wantY = append(wantY, g.YFace(i, j+1))
					}
				}
			}
		}
		slices.Sort(wantX)
		slices.Sort(wantY)
		wantX, wantY = slices.Compact(wantX), slices.Compact(wantY)
		xf, yf := FaultFaces(g, trace)
		if !slices.Equal(xf, wantX) || !slices.Equal(yf, wantY) {
			t.Fatalf("trace %v:\n x-faces %v\n want    %v\n y-faces %v\n want    %v", trace, xf, wantX, yf, wantY)
		}
	}
}

func TestApplyFaults(t *testing.T) {
	m := NewUniform(5, 4, 10, 10, 100, 0.2, 10)
	m.Faults = []Fault{
		// A V that crosses the link from (1,0) to (2,0) twice: multiplied
		// once.
		{Name: "V", Trace: [][2]float64{{17, 10}, {20, 0}, {23, 10}}, Multiplier: 0.5},
		// A second fault on the same face: multipliers multiply.
		{Name: "W", Trace: [][2]float64{{20, 0}, {20, 8}}, Multiplier: 0.1},
	}
	counts := m.ApplyFaults()
	g := m.Grid
	if got := m.TransMultX[g.XFace(2, 0)]; math.Abs(got-0.05) > 1e-15 {
		t.Errorf("shared face multiplier %g, want 0.5*0.1", got)
	}
	if counts[1] != 1 {
		t.Errorf("fault W crosses %d faces, want 1", counts[1])
	}
	// Applying again starts from 1: the result does not compound.
	m.ApplyFaults()
	if got := m.TransMultX[g.XFace(2, 0)]; math.Abs(got-0.05) > 1e-15 {
		t.Errorf("after a second ApplyFaults: %g", got)
	}
	n := 0
	for _, v := range append(m.TransMultX, m.TransMultY...) {
		if v != 1 {
			n++
		}
	}
	if n != counts[0] {
		t.Errorf("%d faces changed; fault V crosses %d and W adds none of its own", n, counts[0])
	}
}

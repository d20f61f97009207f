package flood

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"testing"

	"floodtrace/internal/outdir"
	"floodtrace/reservoir"
	"floodtrace/runfolder"
)

// gravityChannel is a tilted 1D channel of n cells of 10 ft, 500 md, 10 ft
// thick, injecting 2 bbl/day at the west end, with water 15 lb/ft3
// heavier than the oil and the depth growing eastwards by slope ft per ft
// (slope > 0: injection up-dip, the water flows down; slope < 0:
// injection down-dip). Quadratic Corey curves with swc = sor = 0, unit
// viscosities.
func gravityChannel(t testing.TB, n int, slope float64) *reservoir.Model {
	t.Helper()
	m := reservoir.NewUniform(n, 1, 10, 10, 500, 0.2, 10)
	m.RelPerm = reservoir.Corey{KrwMax: 1, KroMax: 1, Nw: 2, No: 2}
	m.Fluids = reservoir.Fluids{WaterViscosity: 1, OilViscosity: 1, InitialSw: 0, WaterDensity: 64.4, OilDensity: 49.4}
	m.Depth = make([]float64, n)
	for k := range m.Depth {
		x, _ := m.Grid.Center(k)
		m.Depth[k] = 6000 + slope*x
	}
	if err := m.PlaceWell("I-1", reservoir.Injector, 5, 5, reservoir.RateControl, 2); err != nil {
		t.Fatal(err)
	}
	if err := m.PlaceWell("P-1", reservoir.Producer, float64(n)*10-5, 5, reservoir.BHPControl, 1000); err != nil {
		t.Fatal(err)
	}
	m.Run.Streamlines = 20
	return m
}

// channelGravityNumber is N of the channel: the Darcy velocity gravity
// gives the oil at its end-point mobility along the channel,
// 0.001127 k (kro_max/mu_o) (rho_w - rho_o)/144 dD/dx, over the total
// velocity Q/(h dy) (Darcy factor and 1/144 psi per ft per lb/ft3 from
// memory).
func channelGravityNumber(slope float64) float64 {
	return 0.001127 * 500 * 1 * 15.0 / 144 * slope / (2.0 / (10 * 10))
}

// blGravity is the outlet water cut and the breakthrough of the
// Buckley-Leverett solution (Buckley and Leverett 1942, who include the
// gravity term) with the gravity-modified fractional flow of the channel,
// F(S) = fw(S) (1 + N kro(S)/kro_max), fw = S^2/(S^2 + (1-S)^2),
// kro = (1-S)^2, injecting S = 1 into S = 0. The solution is given by the
// upper concave envelope of F on [0, 1] (the general form of the Welge
// 1952 tangent), computed here from the closed form on 20001 points.
type blGravity struct {
	s, f []float64 // the envelope's vertices, by increasing S
}

func newBLGravity(N float64) *blGravity {
	F := func(s float64) float64 {
		fw := s * s / (s*s + (1-s)*(1-s))
		return fw * (1 + N*(1-s)*(1-s))
	}
	const n = 20000
	var hs, hf []float64
	for i := 0; i <= n; i++ {
		s := float64(i) / n
		f := F(s)
		// Upper hull, monotone chain: drop the last vertex while it lies
		// on or below the chord from the one before to the new point.
		for len(hs) >= 2 {
			a, b := len(hs)-2, len(hs)-1
			if (hf[b]-hf[a])*(s-hs[a]) <= (f-hf[a])*(hs[b]-hs[a]) {
				hs, hf = hs[:b], hf[:b]
				continue
			}
			break
		}
		hs, hf = append(hs, s), append(hf, f)
	}
	return &blGravity{s: hs, f: hf}
}

// breakthrough returns the pore volumes injected at water breakthrough:
// 1 / the slope of the envelope's first piece (the shock).
func (b *blGravity) breakthrough() float64 {
	return (b.s[1] - b.s[0]) / (b.f[1] - b.f[0])
}

// waterCut returns the outlet water cut at tD pore volumes injected: the
// envelope's value where its slope is 1/tD.
func (b *blGravity) waterCut(tD float64) float64 {
	if tD < b.breakthrough() {
		return 0
	}
	for i := 1; i < len(b.s); i++ {
		if slope := (b.f[i] - b.f[i-1]) / (b.s[i] - b.s[i-1]); slope < 1/tD {
			return b.f[i-1]
		}
	}
	return b.f[len(b.f)-1]
}

// checkGravityBL compares a channel run with the envelope solution: water
// cut (averaged over its report interval) at 1 and 2 PVI within tol, and
// breakthrough within btTol PVI.
func checkGravityBL(t *testing.T, what string, r *Result, bl *blGravity, tol, btTol float64) {
	t.Helper()
	p := r.Producers[0]
	for _, pvi := range []float64{1, 2} {
		k := nearestIndex(r.PVI, pvi)
		lo := 0.0
		if k > 0 {
			lo = r.PVI[k-1]
		}
		want := 0.0
		const n = 50
		for i := range n {
			want += bl.waterCut(lo+(r.PVI[k]-lo)*(float64(i)+0.5)/n) / n
		}
		t.Logf("%s: PVI %.3f: water cut %.4f, Buckley-Leverett with gravity %.4f", what, r.PVI[k], p.WaterCut[k], want)
		if got := p.WaterCut[k]; math.Abs(got-want) > tol {
			t.Errorf("%s: PVI %.3f: water cut %.4f, Buckley-Leverett with gravity %.4f (tolerance %g)", what, r.PVI[k], got, want, tol)
		}
	}
	bt := p.Breakthrough * 2 / r.PoreVolume
	t.Logf("%s: breakthrough at %.4f PVI, Buckley-Leverett with gravity %.4f", what, bt, bl.breakthrough())
	if !(math.Abs(bt-bl.breakthrough()) < btTol) {
		t.Errorf("%s: breakthrough at %.4f PVI, Buckley-Leverett with gravity %.4f (tolerance %g)", what, bt, bl.breakthrough(), btTol)
	}
}

// TestGridGravityChannel: the grid engine with gravity on a tilted
// channel, injection up-dip (water flows down, faster: N > 0) and
// down-dip (water flows up, slower), follows the Buckley-Leverett
// solution with the gravity-modified fractional flow, and converges:
// closer on 200 cells than on 50. Water is conserved to round-off.
func TestGridGravityChannel(t *testing.T) {
	for _, slope := range []float64{0.2, -0.2} {
		N := channelGravityNumber(slope)
		bl := newBLGravity(N)
		var errs []float64
		for _, n := range []int{50, 200} {
			m := gravityChannel(t, n, slope)
			pvDays := m.TotalPoreVolume() / 2
			m.Run.End = 2.2 * pvDays
			m.Run.ReportEvery = 0.01 * pvDays
			r, err := RunGrid(m, Settings{Frames: -1}, GridOptions{})
			if err != nil {
				t.Fatal(err)
			}
			what := fmt.Sprintf("grid, slope %g, %d cells", slope, n)
			checkMassBalance(t, what, r.MassBalanceError, 3e-14) // measured 7.3e-15
			if n == 200 {
				// Measured: water cut within 0.005, breakthrough 0.016 PVI
				// early (the smeared front crosses the threshold first);
				// without gravity it would be 0.046 and 0.037 off.
				checkGravityBL(t, what, r, bl, 0.015, 0.025)
			}
			k := nearestIndex(r.PVI, 1)
			errs = append(errs, math.Abs(r.Producers[0].WaterCut[k]-bl.waterCut(r.PVI[k])))
		}
		t.Logf("slope %g (N = %.3f): water-cut error at 1 PVI %.4f on 50 cells, %.4f on 200", slope, N, errs[0], errs[1])
		if !(errs[1] < errs[0]) {
			t.Errorf("slope %g: no convergence: error %.4f on 50 cells, %.4f on 200", slope, errs[0], errs[1])
		}
	}
}

// TestUpdatesGravityChannel: the streamline engine with pressure updates
// on the tilted channel, gravity carried along the streamline (the
// across part is zero in 1D), follows the Buckley-Leverett solution with
// the gravity-modified fractional flow like the grid engine, and water
// is conserved to round-off.
func TestUpdatesGravityChannel(t *testing.T) {
	for _, slope := range []float64{0.2, -0.2} {
		bl := newBLGravity(channelGravityNumber(slope))
		m := gravityChannel(t, 200, slope)
		pvDays := m.TotalPoreVolume() / 2
		m.Run.End = 2.2 * pvDays
		m.Run.ReportEvery = 0.01 * pvDays
		r, err := Run(m, Settings{Frames: -1})
		if err != nil {
			t.Fatal(err)
		}
		what := fmt.Sprintf("streamlines, slope %g", slope)
		if r.Solves != GravityUpdates {
			t.Errorf("%s: %d pressure solves, want the default %d of a case with depth", what, r.Solves, GravityUpdates)
		}
		checkMassBalance(t, what, r.MassBalanceError, 1e-11) // measured 1.9e-12 (20 solves, sub-steps in the thousands)
		// Measured: water cut within 0.0055, breakthrough 0.0146 PVI early.
		checkGravityBL(t, what, r, bl, 0.015, 0.025)
	}
}

// dippingQuarterFiveSpot is a quarter five-spot on an n x n grid of 20 ft
// cells, 500 md, the injector in the south-west corner cell and the
// producer in the north-east one, 40 bbl/day, on a plane dipping along the
// diagonal: the depth grows by slope ft per ft along x and along y
// (slope > 0: the injector is up-dip; slope < 0: down-dip). Gravity
// number about 0.5 (reservoir.Model.GravityNumber).
func dippingQuarterFiveSpot(t testing.TB, n int, slope float64) *reservoir.Model {
	t.Helper()
	m := reservoir.NewUniform(n, n, 20, 20, 500, 0.2, 10)
	m.RelPerm = reservoir.Corey{Swc: 0.2, Sor: 0.2, KrwMax: 0.4, KroMax: 0.8, Nw: 2, No: 2}
	m.Fluids = reservoir.Fluids{WaterViscosity: 0.5, OilViscosity: 2, InitialSw: 0.2, WaterDensity: 64.4, OilDensity: 49.4}
	m.Depth = make([]float64, m.Grid.N())
	for k := range m.Depth {
		x, y := m.Grid.Center(k)
		m.Depth[k] = 6000 + slope*(x+y)
	}
	L := float64(n) * 20
	if err := m.PlaceWell("I-1", reservoir.Injector, 10, 10, reservoir.RateControl, 40); err != nil {
		t.Fatal(err)
	}
	if err := m.PlaceWell("P-1", reservoir.Producer, L-10, L-10, reservoir.BHPControl, 1000); err != nil {
		t.Fatal(err)
	}
	pvDays := m.TotalPoreVolume() / 40
	m.Run.End = 1.5 * pvDays
	m.Run.ReportEvery = 0.02 * pvDays
	m.Run.Streamlines = 400
	m.Run.Snapshots = []float64{m.Run.End}
	return m
}

// TestDippingFiveSpot: injecting down-dip (the water rises to the
// producer and gravity holds it back) breaks through later than injecting
// up-dip at the same rate, in both engines (the stable and the unstable
// displacement, Buckley and Leverett 1942, whose fractional flow carries
// the gravity term); the streamline engine with gravity agrees with the
// grid engine with gravity within 0.065 RMS in water cut (twice the
// measured 0.0252 up-dip and 0.0326 down-dip), and both conserve water.
func TestDippingFiveSpot(t *testing.T) {
	bt := map[string]float64{}
	for _, slope := range []float64{0.15, -0.15} {
		m := dippingQuarterFiveSpot(t, 21, slope)
		ng := m.GravityNumber()
		grid, sl := gridAndStreamlines(t, m)
		rms := waterCutRMS(t, sl, grid)
		t.Logf("slope %g (gravity number %.3f): breakthrough grid %.0f days, streamlines %.0f days; water-cut RMS %.4f; mass balance grid %.2g, streamlines %.2g",
			slope, ng, grid.Producers[0].Breakthrough, sl.Producers[0].Breakthrough, rms, grid.MassBalanceError, sl.MassBalanceError)
		if !(rms < 0.065) {
			t.Errorf("slope %g: streamlines vs grid with gravity: water-cut RMS %.4f, want < 0.065", slope, rms)
		}
		checkMassBalance(t, fmt.Sprintf("grid, slope %g", slope), grid.MassBalanceError, 3e-14) // measured 6.1e-15
		// The streamline engine's round-off on this case is 4.9e-10
		// without gravity; with it, measured 7.7e-10 and 2.9e-10.
		checkMassBalance(t, fmt.Sprintf("streamlines, slope %g", slope), sl.MassBalanceError, 3e-9)
		key := "up-dip"
		if slope < 0 {
			key = "down-dip"
		}
		bt["grid "+key] = grid.Producers[0].Breakthrough
		bt["streamlines "+key] = sl.Producers[0].Breakthrough
	}
	for _, e := range []string{"grid", "streamlines"} {
		if !(bt[e+" down-dip"] > bt[e+" up-dip"]) {
			t.Errorf("%s: down-dip injection breaks through at day %.0f, not later than up-dip injection (day %.0f)", e, bt[e+" down-dip"], bt[e+" up-dip"])
		}
	}
}

// TestUniformDepthIdentical: a uniform depth (no depth difference across
// any face) gives bit for bit the run without depth, in both engines with
// the same settings, although the densities differ.
func TestUniformDepthIdentical(t *testing.T) {
	base := heteroCase(t, 16, 3, 0.4, 0.5, 0.9, 5)
	base.Run.PressureUpdates = 5
	flat := heteroCase(t, 16, 3, 0.4, 0.5, 0.9, 5)
	flat.Run.PressureUpdates = 5
	flat.Depth = make([]float64, flat.Grid.N())
	for k := range flat.Depth {
		flat.Depth[k] = 7200
	}
	flat.Fluids.WaterDensity, flat.Fluids.OilDensity = 64, 48
	for _, e := range []Engine{EngineStreamline, EngineGrid} {
		a, err := Run(base, Settings{Engine: e, Frames: 3})
		if err != nil {
			t.Fatal(err)
		}
		b, err := Run(flat, Settings{Engine: e, Frames: 3})
		if err != nil {
			t.Fatal(err)
		}
		sameResults(t, a, b)
	}
}

// TestGravityOutputs: a case whose depth is a map writes depth.asc (the
// depth of each cell, read back through the raster reader) and a gravity
// object in summary.json with the dip range and the gravity number of the
// model; a case without depth writes neither.
func TestGravityOutputs(t *testing.T) {
	for _, withDepth := range []bool{true, false} {
		m := dippingQuarterFiveSpot(t, 9, 0.1)
		m.Run.PressureUpdates = 2
		if withDepth {
			m.DepthFile = "depth.asc"
		} else {
			m.Depth = nil
		}
		r, err := RunGrid(m, Settings{Frames: -1}, GridOptions{})
		if err != nil {
			t.Fatal(err)
		}
		dir := t.TempDir()
		d, err := outdir.Open(dir, false)
		if err != nil {
			t.Fatal(err)
		}
		if err := r.WriteData(d); err != nil {
			t.Fatal(err)
		}
		if err := r.WriteSummary(d); err != nil {
			t.Fatal(err)
		}
		s, err := runfolder.ReadSummary(dir)
		if err != nil {
			t.Fatal(err)
		}
		_, statErr := os.Stat(filepath.Join(dir, runfolder.DepthFile))
		if !withDepth {
			if s.Gravity != nil || statErr == nil {
				t.Errorf("a case without depth has gravity %v in summary.json, depth.asc stat %v", s.Gravity, statErr)
			}
			continue
		}
		want := math.Atan(math.Hypot(0.1, 0.1)) * 180 / math.Pi
		if s.Gravity == nil || math.Abs(float64(s.Gravity.DipMaxDegrees)-want) > 1e-9 || s.Gravity.GravityNumber == nil ||
			math.Abs(*s.Gravity.GravityNumber-m.GravityNumber()) > 1e-12 {
			t.Fatalf("summary gravity %+v, want dip %g and gravity number %g", s.Gravity, want, m.GravityNumber())
		}
		f, err := os.Open(filepath.Join(dir, runfolder.DepthFile))
		if err != nil {
			t.Fatal(err)
		}
		ras, err := reservoir.ReadASCIIRaster(f, runfolder.DepthFile)
		f.Close()
		if err != nil {
			t.Fatal(err)
		}
		for k, v := range ras.Values {
			if math.Abs(v-m.Depth[k]) > 1e-9*m.Depth[k] {
				t.Fatalf("depth.asc cell %d: %g, model %g", k, v, m.Depth[k])
			}
		}
	}
}

// TestGravityStepEquilibrium: on a closed dipping box the counter-current
// gravity step leaves water lying under oil at rest (each face's flux
// vanishes where either phase is immobile: segregated equilibrium), and
// moves water down-dip from a uniform state, conserving it to round-off.
func TestGravityStepEquilibrium(t *testing.T) {
	m := dippingQuarterFiveSpot(t, 12, 0.1)
	gf := newGravityFaces(m)
	pv := m.PoreVolumes()
	n := m.Grid.N()
	sw, delta := make([]float64, n), make([]float64, n)
	for k := range sw {
		sw[k] = 0.2 // connate water: oil only mobile
		if m.Depth[k] > 6000+0.1*240 {
			sw[k] = 0.8 // residual oil: water only mobile
		}
	}
	before := append([]float64(nil), sw...)
	gf.step(sw, pv, delta, 500, 0.9)
	for k := range sw {
		if sw[k] != before[k] {
			t.Fatalf("cell %d: segregated state moved from %g to %g", k, before[k], sw[k])
		}
	}
	for k := range sw {
		sw[k] = 0.5
	}
	w0 := 0.0
	for k := range sw {
		w0 += pv[k] * sw[k]
	}
	if gf.step(sw, pv, delta, 200, 0.9) == 0 {
		t.Fatal("no gravity sub-step")
	}
	w1 := 0.0
	for k := range sw {
		w1 += pv[k] * sw[k]
		if !(sw[k] >= 0.2-1e-12 && sw[k] <= 0.8+1e-12) {
			t.Fatalf("cell %d: saturation %g outside [swc, 1-sor]", k, sw[k])
		}
	}
	deep, shallow := n-1, 0 // north-east corner is the deepest, south-west the shallowest
	if !(sw[deep] > 0.5 && sw[shallow] < 0.5) {
		t.Errorf("water did not slump: deepest cell %g, shallowest %g", sw[deep], sw[shallow])
	}
	if math.Abs(w1-w0) > 1e-13*w0 {
		t.Errorf("water volume %g -> %g", w0, w1)
	}
}

// TestGravityUpdatesBetweenEvents: a case with depth and a schedule event
// (a rate change) still gets the GravityUpdates evenly spaced pressure
// solves besides the event's: gravity moves the water between the events
// too. The streamline run then follows the grid engine (which re-solves at
// every step) on the down-dip five-spot as closely as the case without
// the event does: measured water-cut RMS 0.0326 with the 21 solves (0.0326
// without the event), 0.0658 with the event's 2 solves alone (the
// behaviour before); the bound 0.05 lies between.
func TestGravityUpdatesBetweenEvents(t *testing.T) {
	m := dippingQuarterFiveSpot(t, 21, -0.15)
	m.Schedule = []reservoir.Event{{Time: 0.33 * m.Run.End, Well: "I-1", Rate: 30, BHP: nan()}}
	grid, sl := gridAndStreamlines(t, m)
	if sl.Solves != GravityUpdates+1 {
		t.Errorf("%d pressure solves, want %d (the evenly spaced ones and the event's)", sl.Solves, GravityUpdates+1)
	}
	rms := waterCutRMS(t, sl, grid)
	t.Logf("%d solves: water-cut RMS against the grid engine %.4f; mass balance %.2g", sl.Solves, rms, sl.MassBalanceError)
	if !(rms < 0.05) {
		t.Errorf("water-cut RMS against the grid engine %.4f, want < 0.05", rms)
	}
	checkMassBalance(t, "streamlines with an event", sl.MassBalanceError, 3e-9)
}

package flood

import (
	"fmt"
	"math"
	"slices"
	"testing"

	"floodtrace/reservoir"
	"floodtrace/reservoir/synth"
)

// blChannel is a 1D channel of n cells (10 ft x 10 ft x 10 ft, 100 md,
// porosity 0.2) with a rate injector (10 bbl/day) in the west cell and a
// BHP producer in the east cell, quadratic Corey curves with no residual
// saturations and equal viscosities, initial water saturation 0.
func blChannel(t testing.TB, n int) *reservoir.Model {
	t.Helper()
	m := reservoir.NewUniform(n, 1, 10, 10, 100, 0.2, 10)
	m.RelPerm = reservoir.Corey{KrwMax: 1, KroMax: 1, Nw: 2, No: 2}
	m.Fluids = reservoir.Fluids{WaterViscosity: 1, OilViscosity: 1, InitialSw: 0}
	if err := m.PlaceWell("I-1", reservoir.Injector, 5, 5, reservoir.RateControl, 10); err != nil {
		t.Fatal(err)
	}
	if err := m.PlaceWell("P-1", reservoir.Producer, float64(n)*10-5, 5, reservoir.BHPControl, 1000); err != nil {
		t.Fatal(err)
	}
	m.Run.Streamlines = 20
	return m
}

// welgeQuad is the Buckley-Leverett outlet water cut at tD pore volumes
// injected for quadratic Corey curves, swc = sor = 0 and viscosity ratio 1:
// fw = s^2/(s^2+(1-s)^2) (Buckley and Leverett 1942). The front saturation
// is sqrt(1/2) (Welge 1952 tangent, closed form for exponents 2), so water
// arrives at tD = 1/fw'(Sf) = 2(sqrt(2)-1); after that the outlet
// saturation S solves fw'(S) = 1/tD (bisection on [Sf, 1]).
func welgeQuad(tD float64) float64 {
	fw := func(s float64) float64 { return s * s / (s*s + (1-s)*(1-s)) }
	dfw := func(s float64) float64 {
		d := s*s + (1-s)*(1-s)
		return 2 * s * (1 - s) / (d * d)
	}
	if tD < 2*(math.Sqrt2-1) {
		return 0
	}
	lo, hi := math.Sqrt(0.5), 1.0
	for range 200 {
		mid := 0.5 * (lo + hi)
		if dfw(mid) > 1/tD {
			lo = mid
		} else {
			hi = mid
		}
	}
	return fw(0.5 * (lo + hi))
}

// checkBuckleyLeverett compares the producer's water cut of a channel run
// with the analytic solution at several PVI. Report values are averages
// over the report interval, so the analytic value is averaged the same way.
func checkBuckleyLeverett(t *testing.T, r *Result, tol, btTol float64) {
	t.Helper()
	p := r.Producers[0]
	for _, pvi := range []float64{0.95, 1.2, 1.5, 2, 2.5} {
		k := nearestIndex(r.PVI, pvi)
		lo := 0.0
		if k > 0 {
			lo = r.PVI[k-1]
		}
		want := 0.0
		const n = 50
		for i := range n {
			want += welgeQuad(lo+(r.PVI[k]-lo)*(float64(i)+0.5)/n) / n
		}
		if got := p.WaterCut[k]; math.Abs(got-want) > tol {
			t.Errorf("PVI %.3f: water cut %.4f, Buckley-Leverett %.4f (tolerance %g)", r.PVI[k], got, want, tol)
		}
	}
	// Breakthrough at 2(sqrt(2)-1) PVI; the numerical front is smeared
	// over a few cells, so the 1e-3 threshold is crossed a little early.
	rate := 10.0
	btPVI := p.Breakthrough * rate / r.PoreVolume
	if want := 2 * (math.Sqrt2 - 1); !(math.Abs(btPVI-want) < btTol) {
		t.Errorf("breakthrough at %.4f PVI, Welge %.4f (tolerance %g)", btPVI, want, btTol)
	}
}

func nearestIndex(xs []float64, x float64) int {
	best := 0
	for i, v := range xs {
		if math.Abs(v-x) < math.Abs(xs[best]-x) {
			best = i
		}
	}
	return best
}

// TestUpdatesBuckleyLeverett: with pressure updates, a 1D channel must
// reproduce the analytic Buckley-Leverett outlet water cut (Buckley and
// Leverett 1942; Welge 1952). Upwind on 100 cells smears the front over a
// few cells: 0.02 in water cut, and 0.04 PVI at breakthrough, cover it
// (the error falls with refinement: transport's own tests check the order).
func TestUpdatesBuckleyLeverett(t *testing.T) {
	m := blChannel(t, 100)
	pvDays := m.TotalPoreVolume() / 10
	m.Run.End = 2.6 * pvDays
	m.Run.ReportEvery = 0.01 * pvDays
	m.Run.PressureUpdates = 6
	r, err := Run(m, Settings{Frames: -1})
	if err != nil {
		t.Fatal(err)
	}
	if r.Solves != 6 || r.Engine != EngineStreamline {
		t.Fatalf("%d solves with engine %q, want 6 streamline solves", r.Solves, r.Engine)
	}
	checkBuckleyLeverett(t, r, 0.02, 0.04)
	checkMassBalance(t, "updates channel", r.MassBalanceError, 1e-12) // measured -1.6e-13
}

// constantMobility is a relative-permeability pair whose sum is 1 at every
// saturation, krw = x^2(3-2x) and kro = 1-krw with x the normalised
// saturation: with equal viscosities the total mobility is constant, so the
// velocity field never changes, and fw = krw is S-shaped (shock and fan).
// Corey curves with equal end-point mobilities do not give this: their
// total mobility dips between the end points (to 1/2 for exponents 2), so
// updated streamlines differ from fixed ones for a physical reason.
type constantMobility struct{}

func (constantMobility) norm(s float64) float64 { return math.Min(1, math.Max(0, (s-0.2)/0.6)) }
func (c constantMobility) Krw(s float64) float64 {
	x := c.norm(s)
	return x * x * (3 - 2*x)
}
func (c constantMobility) Kro(s float64) float64       { return 1 - c.Krw(s) }
func (constantMobility) Endpoints() (swc, sor float64) { return 0.2, 0.2 }

// heteroCase is an n x n log-normal permeability field (synth, ln k
// standard deviation 1, anisotropic ranges) with an injector in the centre
// and a BHP producer in each corner; Corey curves with end-point mobility
// ratio (krw/muw)/(kro/muo).
func heteroCase(t testing.TB, n int, seed uint64, krw, muw, kro, muo float64) *reservoir.Model {
	t.Helper()
	m := reservoir.NewUniform(n, n, 20, 20, 100, 0.2, 10)
	perm, poro, err := synth.Generate(synth.Settings{NX: n, NY: n, DX: 20, DY: 20, RangeMajor: 10 * 20, RangeMinor: 5 * 20,
		Azimuth: 30, LogMean: 4.6, LogStd: 1, Seed: seed})
	if err != nil {
		t.Fatal(err)
	}
	copy(m.PermEast, perm)
	copy(m.PermNorth, perm)
	copy(m.Porosity, poro)
	m.RelPerm = reservoir.Corey{Swc: 0.2, Sor: 0.2, KrwMax: krw, KroMax: kro, Nw: 2, No: 2}
	m.Fluids = reservoir.Fluids{WaterViscosity: muw, OilViscosity: muo, InitialSw: 0.2}
	L := float64(n) * 20
	for _, w := range []struct {
		name string
		typ  reservoir.WellType
		x, y float64
	}{{"I-1", reservoir.Injector, L / 2, L / 2}, {"P-1", reservoir.Producer, 10, 10}, {"P-2", reservoir.Producer, L - 10, 10},
		{"P-3", reservoir.Producer, 10, L - 10}, {"P-4", reservoir.Producer, L - 10, L - 10}} {
		c, v := reservoir.BHPControl, 1000.0
		if w.typ == reservoir.Injector {
			c, v = reservoir.RateControl, 200
		}
		if err := m.PlaceWell(w.name, w.typ, w.x, w.y, c, v); err != nil {
			t.Fatal(err)
		}
	}
	pvDays := m.TotalPoreVolume() / 200
	m.Run.End = 1.5 * pvDays
	m.Run.ReportEvery = 0.02 * pvDays
	m.Run.Streamlines = 1000
	m.Run.Snapshots = []float64{0.5 * pvDays, m.Run.End}
	return m
}

// checkMassBalance logs a run's mass balance error (injected - produced -
// change of water in place, over injected) and fails unless it is within
// tol; the tolerances are a few times the measured figure, so a change
// that stops conserving water fails.
func checkMassBalance(t *testing.T, what string, got, tol float64) {
	t.Helper()
	t.Logf("%s: mass balance error %.2g (tolerance %.0e)", what, got, tol)
	if !(math.Abs(got) <= tol) {
		t.Errorf("%s: mass balance error %g, want within %g", what, got, tol)
	}
}

// gridAndStreamlines runs m on the grid engine and on the streamline
// engine its settings choose, without frames.
func gridAndStreamlines(t testing.TB, m *reservoir.Model) (grid, sl *Result) {
	t.Helper()
	grid, err := RunGrid(m, Settings{Frames: -1}, GridOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if sl, err = Run(m, Settings{Frames: -1}); err != nil {
		t.Fatal(err)
	}
	return grid, sl
}

// waterCutRMS is the RMS difference of the producers' water cuts of two
// runs with the same report times.
func waterCutRMS(t testing.TB, a, b *Result) float64 {
	t.Helper()
	if len(a.Producers) != len(b.Producers) || len(a.Times) != len(b.Times) {
		t.Fatalf("runs differ in shape: %d/%d producers, %d/%d times", len(a.Producers), len(b.Producers), len(a.Times), len(b.Times))
	}
	s, n := 0.0, 0
	for p := range a.Producers {
		for k := range a.Times {
			d := a.Producers[p].WaterCut[k] - b.Producers[p].WaterCut[k]
			s += d * d
			n++
		}
	}
	return math.Sqrt(s / float64(n))
}

// TestUnitMobilityFixedEqualsUpdated: when the total mobility does not
// depend on saturation the velocity field never changes, so streamlines
// updated 15 times must give the producers' water cuts of fixed
// streamlines, which carry the exact Buckley-Leverett solution (Buckley
// and Leverett 1942; Welge 1952). The remaining difference is the
// numerical diffusion of the 1D scheme and of the cell mappings.
func TestUnitMobilityFixedEqualsUpdated(t *testing.T) {
	m := heteroCase(t, 40, 7, 1, 1, 1, 1)
	m.RelPerm = constantMobility{}
	fixed, err := Run(m, Settings{Frames: -1})
	if err != nil {
		t.Fatal(err)
	}
	m.Run.PressureUpdates = 15
	upd, err := Run(m, Settings{Frames: -1})
	if err != nil {
		t.Fatal(err)
	}
	if upd.Solves != 15 {
		t.Fatalf("%d solves, want 15", upd.Solves)
	}
	if rms := waterCutRMS(t, fixed, upd); !(rms < 0.02) {
		t.Errorf("fixed and updated streamlines: water-cut RMS difference %.4f, want < 0.02", rms)
	} else {
		t.Logf("water-cut RMS difference fixed vs 15 updates: %.4f", rms)
	}
}

// TestUpdatesMassBalance: the cell-to-streamline mappings and the 1D
// scheme conserve water (conservative finite volumes, LeVeque 2002, from
// memory), so injected - produced - change of water in place vanishes to
// round-off over a run with updates, on a heterogeneous case with an
// unfavourable mobility ratio: 4.8e-11 of the injected volume, checked to
// 2e-10. (A clamp of the producers' water fraction that the transport did
// not see once made it -2e-8.)
func TestUpdatesMassBalance(t *testing.T) {
	m := heteroCase(t, 30, 3, 0.4, 0.5, 0.9, 5)
	m.Run.PressureUpdates = 8
	r, err := Run(m, Settings{Frames: -1})
	if err != nil {
		t.Fatal(err)
	}
	checkMassBalance(t, fmt.Sprintf("updates, %d solves", r.Solves), r.MassBalanceError, 2e-10) // measured 4.8e-11
	// The same balance by hand from the reported volumes and the last map.
	injected := 0.0
	for _, in := range r.Injectors {
		injected += in.CumWater
	}
	last := len(r.Times) - 1
	produced := r.FieldCumWater[last]
	end := r.Snapshots[len(r.Snapshots)-1]
	if end.Time != m.Run.End {
		t.Fatalf("last snapshot at %g, want %g", end.Time, m.Run.End)
	}
	dW := 0.0
	for c, s := range end.Sw {
		if m.Active[c] {
			dW += m.PoreVolume(c) * (s - m.Fluids.InitialSw)
		}
	}
	checkMassBalance(t, "from the outputs", (injected-produced-dW)/injected, 2e-10) // measured 4.8e-11
	if got, want := r.PVI[last], injected/r.PoreVolume; math.Abs(got-want) > 1e-12*want {
		t.Errorf("final PVI %g, want %g", got, want)
	}
	for _, p := range r.Producers {
		for k, wc := range p.WaterCut {
			if !(wc >= 0 && wc <= 1) {
				t.Fatalf("%s day %g: water cut %g outside [0, 1]", p.Name, r.Times[k], wc)
			}
		}
	}
	// Saturations stay within the initial and injected values (the
	// schemes are monotone and the mappings are averages).
	for _, sn := range r.Snapshots {
		for c, s := range sn.Sw {
			if m.Active[c] && !(s >= 0.2-1e-9 && s <= 0.8+1e-9) {
				t.Fatalf("day %g cell %d: saturation %g outside [0.2, 0.8]", sn.Time, c, s)
			}
		}
	}
}

// TestUpdatesDeterministic: the per-line transport runs in parallel, but
// every reduction is in line order, so any worker count gives the same
// numbers bit for bit.
func TestUpdatesDeterministic(t *testing.T) {
	m := heteroCase(t, 24, 5, 0.4, 0.5, 0.9, 5)
	m.Run.PressureUpdates = 4
	var runs []*Result
	for _, w := range []int{1, 4} {
		r, err := Run(m, Settings{Workers: w, Frames: 5})
		if err != nil {
			t.Fatal(err)
		}
		runs = append(runs, r)
	}
	sameResults(t, runs[0], runs[1])
}

// sameResults fails unless two runs hold identical numbers.
func sameResults(t *testing.T, a, b *Result) {
	t.Helper()
	eq := func(what string, x, y []float64) {
		if !slices.EqualFunc(x, y, func(u, v float64) bool { return u == v || math.IsNaN(u) && math.IsNaN(v) }) {
			t.Errorf("%s differs", what)
		}
	}
	eq("PVI", a.PVI, b.PVI)
	eq("field water cut", a.FieldWaterCut, b.FieldWaterCut)
	for p := range a.Producers {
		pa, pb := a.Producers[p], b.Producers[p]
		eq(pa.Name+" water cut", pa.WaterCut, pb.WaterCut)
		eq(pa.Name+" cum oil", pa.CumOil, pb.CumOil)
		eq(pa.Name+" avg sw", pa.AvgSw, pb.AvgSw)
		eq(pa.Name+" breakthrough", []float64{pa.Breakthrough, pa.TracerBreakthrough}, []float64{pb.Breakthrough, pb.TracerBreakthrough})
	}
	if len(a.Frames) != len(b.Frames) || len(a.Snapshots) != len(b.Snapshots) {
		t.Fatalf("frames %d/%d, snapshots %d/%d", len(a.Frames), len(b.Frames), len(a.Snapshots), len(b.Snapshots))
	}
	for i := range a.Frames {
		eq("frame", a.Frames[i].Sw, b.Frames[i].Sw)
	}
	for i := range a.Snapshots {
		eq("snapshot", a.Snapshots[i].Sw, b.Snapshots[i].Sw)
	}
	if a.MassBalanceError != b.MassBalanceError {
		t.Errorf("mass balance %g vs %g", a.MassBalanceError, b.MassBalanceError)
	}
}

// TestUpdatesDeferredCellMap: mapping the lines to the cells only when the
// cells are read, with the partition saturations of the reports taken from
// the line nodes, must give the run of a map at every stop: the same
// water cuts and maps bit for bit (the transport never reads the cells
// between solves) and the same dynamic-curve saturations to round-off (the
// same sum in another order; measured within 4.1e-15).
func TestUpdatesDeferredCellMap(t *testing.T) {
	m := heteroCase(t, 24, 5, 0.4, 0.5, 0.9, 5)
	m.Run.PressureUpdates = 4
	lazy, err := Run(m, Settings{Frames: 5})
	if err != nil {
		t.Fatal(err)
	}
	eagerCells = true
	eager, err := Run(m, Settings{Frames: 5})
	eagerCells = false
	if err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for p := range lazy.Producers {
		a, b := lazy.Producers[p].AvgSw, eager.Producers[p].AvgSw
		for k := range a {
			worst = max(worst, math.Abs(a[k]-b[k]))
		}
		copy(a, b)
	}
	t.Logf("largest difference of the partition saturations: %.2g", worst)
	if !(worst <= 1e-14) {
		t.Errorf("partition saturations differ by %g", worst)
	}
	sameResults(t, lazy, eager)
}

func TestUpdateTimes(t *testing.T) {
	m := reservoir.NewUniform(4, 4, 10, 10, 100, 0.2, 10)
	m.Run.End = 100
	if err := m.PlaceWell("P", reservoir.Producer, 5, 5, reservoir.BHPControl, 100); err != nil {
		t.Fatal(err)
	}
	m.Wells[0].Open = 30
	m.Schedule = []reservoir.Event{{Time: 55, Well: "P", Rate: math.NaN(), BHP: 200}, {Time: 150, Well: "P", Shut: true, Rate: math.NaN(), BHP: math.NaN()}}
	sched, err := newWellSchedule(m)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		n    int
		list []float64
		want []float64
	}{
		{1, nil, []float64{0, 30, 55}},
		{4, nil, []float64{0, 25, 30, 50, 55, 75}},
		{1, []float64{30, 60}, []float64{0, 30, 55, 60}},
	} {
		m.Run.PressureUpdates, m.Run.UpdateTimes = c.n, c.list
		if got := UpdateTimes(m, sched); !slices.Equal(got, c.want) {
			t.Errorf("updates %d, list %v: got %v, want %v", c.n, c.list, got, c.want)
		}
	}
}

func TestUpdatesBadInput(t *testing.T) {
	m := blChannel(t, 10)
	m.Run.PressureUpdates = 3
	if _, err := RunUpdates(m, Settings{Workers: -1}, UpdateOptions{}); err == nil {
		t.Error("negative workers accepted")
	}
	m.Fluids.OilViscosity = 0
	if _, err := RunUpdates(m, Settings{}, UpdateOptions{}); err == nil {
		t.Error("zero oil viscosity accepted")
	}
	m = blChannel(t, 10)
	m.Schedule = []reservoir.Event{{Time: 5, Well: "nobody", Rate: math.NaN(), BHP: math.NaN(), Shut: true}}
	if _, err := Run(m, Settings{}); err == nil {
		t.Error("event for an unknown well accepted")
	}
	if _, err := RunUpdates(nil, Settings{}, UpdateOptions{}); err == nil {
		t.Error("nil model accepted")
	}
}

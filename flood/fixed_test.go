package flood

import (
	"fmt"
	"math"
	"sort"
	"testing"

	"floodtrace/pressure"
	"floodtrace/reservoir"
	"floodtrace/streamline"
	"floodtrace/transport"
)

// channel returns a 1D channel: a rate injector in the west cell and a BHP
// producer in the east cell, quadratic Corey curves with no residual
// saturations and water/oil viscosity ratio a.
func channel(t *testing.T, nx int, a float64) *reservoir.Model {
	t.Helper()
	m := reservoir.NewUniform(nx, 1, 10, 10, 100, 0.2, 10)
	m.Fluids = reservoir.Fluids{WaterViscosity: a, OilViscosity: 1, InitialSw: 0}
	m.RelPerm = reservoir.Corey{KrwMax: 1, KroMax: 1, Nw: 2, No: 2}
	if err := m.PlaceWell("I", reservoir.Injector, 5, 5, reservoir.RateControl, 10); err != nil {
		t.Fatal(err)
	}
	if err := m.PlaceWell("P", reservoir.Producer, float64(nx)*10-5, 5, reservoir.BHPControl, 1000); err != nil {
		t.Fatal(err)
	}
	return m
}

// quadFw is fw for quadratic Corey curves with swc = sor = 0 and
// viscosity ratio a = mu_w/mu_o: fw = s^2 / (s^2 + a (1-s)^2).
func quadFw(s, a float64) float64 { return s * s / (s*s + a*(1-s)*(1-s)) }

func quadDFw(s, a float64) float64 {
	d := s*s + a*(1-s)*(1-s)
	return 2 * a * s * (1 - s) / (d * d)
}

// outletSaturation solves fw'(S) = 1/tD for S behind the front
// (Buckley and Leverett 1942): fw' decreases from the front saturation to 1.
func outletSaturation(tD, a float64) float64 {
	lo, hi := math.Sqrt(a/(1+a)), 1.0
	for i := 0; i < 200; i++ {
		mid := 0.5 * (lo + hi)
		if quadDFw(mid, a) > 1/tD {
			lo = mid
		} else {
			hi = mid
		}
	}
	return 0.5 * (lo + hi)
}

func TestChannelBuckleyLeverett(t *testing.T) {
	for _, a := range []float64{0.25, 1, 4} {
		m := channel(t, 60, a)
		m.Run = reservoir.RunSettings{End: 3000, ReportEvery: 25, Streamlines: 50, Snapshots: []float64{3000}}
		r, err := Run(m, Settings{Frames: -1})
		if err != nil {
			t.Fatal(err)
		}
		p := r.Producers[0]
		// The streamlines hold the pore volume between the well cells.
		pv := p.DrainedVolume
		q := p.Rate
		sf := math.Sqrt(a / (1 + a)) // Welge (1952) tangent, closed form for quadratic Corey
		tdBT := 1 / quadDFw(sf, a)   // breakthrough at 1/fw'(Sf) pore volumes
		if got := p.Breakthrough * q / pv; math.Abs(got-tdBT) > 1e-6*tdBT {
			t.Errorf("a=%g: breakthrough %.8f PV, want %.8f (Welge 1952)", a, got, tdBT)
		}
		checked := 0
		for k, tm := range r.Times {
			tD := q * tm / pv
			var wantWC, wantAvg float64
			if tD < tdBT {
				wantWC, wantAvg = 0, tD // before breakthrough all injected water is in place (swi = 0)
			} else {
				s2 := outletSaturation(tD, a)
				wantWC = quadFw(s2, a)              // Buckley and Leverett (1942)
				wantAvg = s2 + (1-quadFw(s2, a))*tD // Welge (1952): Sw2 + (1-fw2)/fw'(Sw2)
			}
			if math.Abs(p.WaterCut[k]-wantWC) > 2e-5 || math.Abs(p.AvgSw[k]-wantAvg) > 2e-5 {
				t.Errorf("a=%g tD=%.3f: water cut %.6f avg Sw %.6f, want %.6f %.6f", a, tD, p.WaterCut[k], p.AvgSw[k], wantWC, wantAvg)
			}
			checked++
		}
		if checked < 100 {
			t.Fatalf("only %d report times checked", checked)
		}
		checkMassBalance(t, fmt.Sprintf("a=%g", a), r.MassBalanceError, 5e-14) // measured 1.1e-14
	}
}

func fiveSpot(t *testing.T, n int, rp reservoir.RelPerm, muw, muo float64) *reservoir.Model {
	t.Helper()
	m := reservoir.NewUniform(n, n, 20, 20, 200, 0.2, 20)
	m.Fluids = reservoir.Fluids{WaterViscosity: muw, OilViscosity: muo, InitialSw: 0.2}
	m.RelPerm = rp
	L := float64(n) * 20
	must := func(err error) {
		if err != nil {
			t.Fatal(err)
		}
	}
	must(m.PlaceWell("INJ", reservoir.Injector, L/2, L/2, reservoir.RateControl, 800))
	must(m.PlaceWell("P-SW", reservoir.Producer, 10, 10, reservoir.BHPControl, 500))
	must(m.PlaceWell("P-SE", reservoir.Producer, L-10, 10, reservoir.BHPControl, 500))
	must(m.PlaceWell("P-NW", reservoir.Producer, 10, L-10, reservoir.BHPControl, 500))
	must(m.PlaceWell("P-NE", reservoir.Producer, L-10, L-10, reservoir.BHPControl, 500))
	m.Run = reservoir.RunSettings{End: 4000, ReportEvery: 40, Streamlines: 2000, Snapshots: []float64{1000, 4000}}
	return m
}

var demoCorey = reservoir.Corey{Swc: 0.2, Sor: 0.25, KrwMax: 0.3, KroMax: 0.85, Nw: 2.5, No: 2}

func TestFiveSpotSymmetricCurves(t *testing.T) {
	m := fiveSpot(t, 41, demoCorey, 0.5, 2)
	r, err := Run(m, Settings{Frames: -1})
	if err != nil {
		t.Fatal(err)
	}
	ref := r.Producers[0]
	for _, p := range r.Producers[1:] {
		if d := math.Abs(p.Breakthrough-ref.Breakthrough) / ref.Breakthrough; d > 1e-6 {
			t.Errorf("%s breakthrough %g, %s %g", p.Name, p.Breakthrough, ref.Name, ref.Breakthrough)
		}
		for k := range r.Times {
			if math.Abs(p.WaterCut[k]-ref.WaterCut[k]) > 1e-6 || math.Abs(p.CumOil[k]-ref.CumOil[k]) > 1e-6*ref.CumOil[len(r.Times)-1] {
				t.Fatalf("day %g: %s water cut %g cum oil %g, %s %g %g", r.Times[k], p.Name, p.WaterCut[k], p.CumOil[k], ref.Name, ref.WaterCut[k], ref.CumOil[k])
			}
		}
	}
	// Material balance, and oil recovered against the saturation map.
	checkMassBalance(t, "five-spot", r.MassBalanceError, 1e-10) // measured 2e-11
	last := r.Snapshots[len(r.Snapshots)-1]
	oilInPlace := 0.0
	for c, s := range last.Sw {
		if m.Active[c] {
			oilInPlace += m.PoreVolume(c) * (1 - s)
		}
	}
	rec := r.FieldCumOil[len(r.Times)-1]
	if d := math.Abs(rec-(r.OOIP-oilInPlace)) / rec; d > 0.01 {
		t.Errorf("recovered oil %g, OOIP - oil in place %g (relative difference %g)", rec, r.OOIP-oilInPlace, d)
	}
}

func TestLinearCurvesGiveTracerBreakthrough(t *testing.T) {
	// Straight-line relative permeabilities and equal viscosities make fw = s:
	// the displacement is piston-like and water arrives with a tracer
	// (Buckley and Leverett 1942 with a linear fractional-flow curve).
	rp := reservoir.Corey{Swc: 0, Sor: 0, KrwMax: 1, KroMax: 1, Nw: 1, No: 1}
	m := fiveSpot(t, 31, rp, 1, 1)
	m.Fluids.InitialSw = 0
	r, err := Run(m, Settings{Frames: -1})
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range r.Producers {
		if d := math.Abs(p.Breakthrough-p.TracerBreakthrough) / p.TracerBreakthrough; d > 1e-9 {
			t.Errorf("%s: water breakthrough %g days, tracer %g days", p.Name, p.Breakthrough, p.TracerBreakthrough)
		}
	}
}

// dynamicCurveAt interpolates a producer's water cut at average water
// saturation s on its dynamic curve.
func dynamicCurveAt(p Producer, s float64) float64 {
	for k := 1; k < len(p.AvgSw); k++ {
		if p.AvgSw[k-1] <= s && s <= p.AvgSw[k] && p.AvgSw[k] > p.AvgSw[k-1] {
			f := (s - p.AvgSw[k-1]) / (p.AvgSw[k] - p.AvgSw[k-1])
			return p.WaterCut[k-1] + f*(p.WaterCut[k]-p.WaterCut[k-1])
		}
	}
	return math.NaN()
}

func TestDynamicCurvesDifferBetweenProducers(t *testing.T) {
	// An off-centre injector: a near and a far producer see different
	// relations between the saturation of what they drain and the water
	// they produce (the point of the per-producer dynamic curve).
	m := reservoir.NewUniform(50, 30, 20, 20, 200, 0.2, 20)
	m.Fluids = reservoir.Fluids{WaterViscosity: 0.5, OilViscosity: 2, InitialSw: 0.2}
	m.RelPerm = demoCorey
	for _, w := range []struct {
		name string
		t    reservoir.WellType
		x, y float64
		c    reservoir.Control
		v    float64
	}{{"INJ", reservoir.Injector, 300, 300, reservoir.RateControl, 600},
		{"NEAR", reservoir.Producer, 100, 300, reservoir.BHPControl, 500},
		{"FAR", reservoir.Producer, 950, 500, reservoir.BHPControl, 500}} {
		if err := m.PlaceWell(w.name, w.t, w.x, w.y, w.c, w.v); err != nil {
			t.Fatal(err)
		}
	}
	m.Run = reservoir.RunSettings{End: 6000, ReportEvery: 20, Streamlines: 1500}
	r, err := Run(m, Settings{Frames: -1})
	if err != nil {
		t.Fatal(err)
	}
	near, far := r.Producers[0], r.Producers[1]
	maxDiff := 0.0
	for s := 0.3; s <= 0.5; s += 0.01 {
		a, b := dynamicCurveAt(near, s), dynamicCurveAt(far, s)
		if !math.IsNaN(a) && !math.IsNaN(b) {
			maxDiff = math.Max(maxDiff, math.Abs(a-b))
		}
	}
	if maxDiff < 0.05 {
		t.Errorf("dynamic curves of NEAR and FAR differ by at most %.3f in water cut at equal drained saturation", maxDiff)
	}
}

// cellOutflow returns, per cell, the flux-weighted water fraction of the
// streamlines leaving the cell at time t.
func (ls *lineSet) cellOutflow(rs *blTable, t float64) []float64 {
	fw := make([]float64, len(ls.pv))
	q := make([]float64, len(ls.pv))
	for i := range ls.q {
		for s := ls.start[i]; s < ls.start[i+1]; s++ {
			c := ls.cell[s]
			fw[c] += ls.q[i] * rs.outletFw(ls.b[s], t)
			q[c] += ls.q[i]
		}
	}
	for c := range fw {
		if q[c] > 0 {
			fw[c] /= q[c]
		} else {
			fw[c] = math.NaN()
		}
	}
	return fw
}

func TestSameSaturationDifferentOutflow(t *testing.T) {
	// Common practice, no single source: in a homogeneous 2D pattern two
	// cells with nearly the same average water saturation can pass on very
	// different water fractions, depending only on where they sit. A cell
	// the front is crossing mixes flooded and unflooded streamlines; fw is
	// not linear in saturation, so its outflow differs from that of a cell
	// at the same average saturation swept uniformly.
	m := fiveSpot(t, 41, demoCorey, 0.5, 2)
	m.Run.End = 1500
	pv := m.PoreVolumes()
	sol, tr := solveTrace(t, m)
	ls := mustLineSet(t, tr, pv)
	_ = sol
	rs := blForModel(t, m)
	tm := 250.0
	sw := ls.cellSaturation(m, rs, tm, m.Fluids.InitialSw, 0)
	out := ls.cellOutflow(rs, tm)
	type cell struct{ s, fw float64 }
	var cells []cell
	for c := range sw {
		if !math.IsNaN(out[c]) && sw[c] > 0.3 && sw[c] < 0.6 {
			cells = append(cells, cell{sw[c], out[c]})
		}
	}
	sort.Slice(cells, func(i, j int) bool { return cells[i].s < cells[j].s })
	best := 0.0
	for i := range cells {
		for j := i + 1; j < len(cells) && cells[j].s-cells[i].s < 0.005; j++ {
			best = math.Max(best, math.Abs(cells[j].fw-cells[i].fw))
		}
	}
	if best < 0.15 {
		t.Errorf("largest outflow water-fraction difference between cells within 0.005 in saturation: %.3f", best)
	}
	t.Logf("cells within 0.005 in average saturation differ by up to %.3f in outflow water fraction", best)
}

func solveTrace(t *testing.T, m *reservoir.Model) (*pressure.Solution, *streamline.Result) {
	t.Helper()
	sol, err := pressure.Solve(pressure.Input{Model: m}, pressure.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	tr, err := streamline.Trace(Field(m, sol), streamline.Settings{Count: m.Run.Streamlines})
	if err != nil {
		t.Fatal(err)
	}
	return sol, tr
}

func blForModel(t *testing.T, m *reservoir.Model) *blTable {
	t.Helper()
	ff := transport.NewFracFlow(m.RelPerm, m.Fluids.WaterViscosity, m.Fluids.OilViscosity)
	_, sor := m.RelPerm.Endpoints()
	rs, err := transport.NewRiemann(ff, m.Fluids.InitialSw, 1-sor)
	if err != nil {
		t.Fatal(err)
	}
	return newBLTable(rs, ff)
}

// mustLineSet builds the line set of a trace or fails the test.
func mustLineSet(tb testing.TB, tr *streamline.Result, pv []float64) *lineSet {
	tb.Helper()
	ls, err := newLineSet(tr, pv)
	if err != nil {
		tb.Fatal(err)
	}
	return ls
}

// TestBLOutlet: outlet gives outletFw and cumSat together, bit for bit,
// at the ends (no time, no time of flight) and inside, behind and ahead
// of the front.
func TestBLOutlet(t *testing.T) {
	m := reservoir.NewUniform(10, 10, 10, 10, 100, 0.2, 10)
	m.RelPerm = reservoir.Corey{Swc: 0.2, Sor: 0.2, KrwMax: 0.5, KroMax: 1, Nw: 2, No: 2}
	m.Fluids = reservoir.Fluids{WaterViscosity: 0.5, OilViscosity: 5, InitialSw: 0.2}
	rs := blForModel(t, m)
	for _, tau := range []float64{0, 1e-9, 0.3, 1, 7.5, 1e6, -1} {
		for _, tm := range []float64{0, 1e-9, 0.5, 1, 3, 40, 1e7} {
			fw, cum := rs.outlet(tau, tm)
			if wfw, wcum := rs.outletFw(tau, tm), rs.cumSat(tau, tm); math.Float64bits(fw) != math.Float64bits(wfw) || math.Float64bits(cum) != math.Float64bits(wcum) {
				t.Errorf("outlet(%g, %g) = %v, %v; want %v, %v", tau, tm, fw, cum, wfw, wcum)
			}
		}
	}
}

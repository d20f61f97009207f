package streamline_test

import (
	"math"
	"strconv"
	"testing"

	"floodtrace/reservoir"
	"floodtrace/streamline"
)

// TestQuarterFiveSpot checks the tracer breakthrough of the homogeneous
// quarter five-spot at unit mobility ratio against the areal sweep
// efficiency at breakthrough, 0.7178 (Craig 1971, SPE Monograph 3, after
// Muskat's exact solution; from memory), on refined grids. Tracer
// breakthrough in pore volumes is the smallest injector-to-producer time of
// flight times the injection rate over the pore volume; it does not depend
// on the rate. The two-point pressure solve and the corner-cell wells bias
// coarse grids; the error must shrink with refinement and be within 3e-4
// at 201 x 201 (measured at 2000 lines: +1.1e-3, +3.5e-4, +9e-5 at 51,
// 101, 201; the bound is about three times the last).
func TestQuarterFiveSpot(t *testing.T) {
	const want = 0.7178
	sizes := []int{51, 101, 201}
	errs := make([]float64, len(sizes))
	t.Logf("%6s %10s %10s %12s %8s", "grid", "bt (PV)", "error", "traced PV", "lines")
	for n, size := range sizes {
		f := quarterFiveSpot(t, size)
		r, err := streamline.Trace(f, streamline.Settings{Count: 2000})
		if err != nil {
			t.Fatal(err)
		}
		pv := 0.0
		for _, v := range f.PoreVolume {
			pv += v
		}
		inj := f.Wells[0].Q
		bt := r.Breakthrough(1) * inj / pv
		errs[n] = bt - want

		// Volume bookkeeping: sum of flux*tau over the lines equals the
		// pore volume of the flowing region (here all of it) within 1%;
		// the producer receives its rate (common practice).
		traced, arrived := 0.0, 0.0
		for _, l := range r.Lines {
			traced += l.Flux * l.TotalTau
			if l.Producer == 1 {
				arrived += l.Flux
			}
		}
		t.Logf("%3dx%-3d %10.5f %+10.5f %12.6f %8d", size, size, bt, errs[n], traced/pv, len(r.Lines))
		if math.Abs(traced/pv-1) > 0.01 {
			t.Errorf("%d: traced pore volume %g of %g", size, traced, pv)
		}
		if math.Abs(arrived+f.Wells[1].Q) > 1e-9*inj {
			t.Errorf("%d: producer receives %.12g, rate %.12g", size, arrived, -f.Wells[1].Q)
		}
		if len(r.Warnings) > 0 {
			t.Errorf("%d: warnings %q", size, r.Warnings)
		}
	}
	if e := errs[len(errs)-1]; math.Abs(e) > 3e-4 {
		t.Errorf("201x201 breakthrough off by %g PV", e)
	}
	for n := 1; n < len(errs); n++ {
		if math.Abs(errs[n]) >= math.Abs(errs[n-1]) {
			t.Errorf("no convergence: error %g at %d after %g at %d", errs[n], sizes[n], errs[n-1], sizes[n-1])
		}
	}
}

// TestSymmetricAllocation: patterns with a mirror symmetry must give
// mirror-symmetric allocations (common practice; it follows from the
// symmetry of the problem).
func TestSymmetricAllocation(t *testing.T) {
	t.Run("inverted five-spot", func(t *testing.T) {
		// One injector at the centre of a 41x41 grid, four BHP producers
		// in the corners: each pair carries a quarter of the injection and
		// all of its producer's rate.
		const n = 41
		m := reservoir.NewUniform(n, n, 25, 25, 60, 0.18, 20)
		addWellAt(t, m, "I", reservoir.Injector, n/2, n/2, reservoir.RateControl, 800)
		for _, ij := range [][2]int{{0, 0}, {n - 1, 0}, {0, n - 1}, {n - 1, n - 1}} {
			addWellAt(t, m, "P", reservoir.Producer, ij[0], ij[1], reservoir.BHPControl, 500)
		}
		f := solve(t, m)
		r, err := streamline.Trace(f, streamline.Settings{Count: 2000})
		if err != nil {
			t.Fatal(err)
		}
		if len(r.Pairs) != 4 {
			t.Fatalf("pairs %+v", r.Pairs)
		}
		for _, p := range r.Pairs {
			if math.Abs(p.FractionOfInjector-0.25) > 1e-6 || math.Abs(p.FractionOfProducer-1) > 1e-9 {
				t.Errorf("pair %+v, want a quarter of the injector and all of the producer", p)
			}
			if d := p.PoreVolume/r.Pairs[0].PoreVolume - 1; math.Abs(d) > 1e-6 {
				t.Errorf("pair %d-%d pore volume %g differs from %g", p.Injector, p.Producer, p.PoreVolume, r.Pairs[0].PoreVolume)
			}
		}
	})
	t.Run("mirrored line drive", func(t *testing.T) {
		// Two injectors on the west side, two producers on the east side
		// and a third on the mid-line, placed symmetrically about the
		// east-west mid-line of a reservoir whose permeability is
		// mirror-symmetric about the same line: pair (I1,P1) mirrors
		// (I2,P2), (I1,P3) mirrors (I2,P3), and P3 takes half of its rate
		// from each injector.
		const nx, ny = 40, 31
		m := reservoir.NewUniform(nx, ny, 30, 30, 100, 0.2, 15)
		for k := range m.PermEast {
			i, j := m.Grid.IJ(k)
			jm := min(j, ny-1-j)
			m.PermEast[k] = 50 + 10*float64((i*7+jm*3)%11)
			m.PermNorth[k] = m.PermEast[k]
		}
		addWellAt(t, m, "I-1", reservoir.Injector, 3, 6, reservoir.RateControl, 300)
		addWellAt(t, m, "I-2", reservoir.Injector, 3, ny-1-6, reservoir.RateControl, 300)
		addWellAt(t, m, "P-1", reservoir.Producer, nx-5, 4, reservoir.BHPControl, 900)
		addWellAt(t, m, "P-2", reservoir.Producer, nx-5, ny-1-4, reservoir.BHPControl, 900)
		addWellAt(t, m, "P-3", reservoir.Producer, nx/2, ny/2, reservoir.BHPControl, 900)
		mirror := []int{1, 0, 3, 2, 4} // well index seen in the mirror
		f := solve(t, m)
		r, err := streamline.Trace(f, streamline.Settings{Count: 3000})
		if err != nil {
			t.Fatal(err)
		}
		pairs := map[[2]int]streamline.Pair{}
		for _, p := range r.Pairs {
			pairs[[2]int{p.Injector, p.Producer}] = p
		}
		if len(pairs) != 4 {
			t.Errorf("pairs %+v, want I1-P1, I1-P3, I2-P2, I2-P3", r.Pairs)
		}
		for key, a := range pairs {
			b, ok := pairs[[2]int{mirror[key[0]], mirror[key[1]]}]
			if !ok || math.Abs(a.Rate/b.Rate-1) > 1e-6 || math.Abs(a.FractionOfProducer/b.FractionOfProducer-1) > 1e-6 ||
				math.Abs(a.PoreVolume/b.PoreVolume-1) > 1e-3 {
				t.Errorf("pair %+v is not the mirror of %+v", a, b)
			}
			if key[1] == 4 && math.Abs(a.FractionOfProducer-0.5) > 1e-6 {
				t.Errorf("pair %+v: P-3 should take half its rate from each injector", a)
			}
		}
		// Partitions mirror too, off the mid-line.
		bad := 0
		for k := range r.ProducerPartition {
			i, j := m.Grid.IJ(k)
			if j == ny/2 {
				continue
			}
			km := m.Grid.Index(i, ny-1-j)
			for _, part := range [][]int{r.InjectorPartition, r.ProducerPartition} {
				if part[k] >= 0 && mirror[part[k]] != part[km] || (part[k] < 0) != (part[km] < 0) {
					bad++
				}
			}
		}
		if bad > 0 {
			t.Errorf("%d cells break the mirror symmetry of the partitions", bad)
		}
	})
}

// TestWorkersIdentical: the result must not depend on the number of
// goroutines.
func TestWorkersIdentical(t *testing.T) {
	f := solve(t, heterogeneous(t, 60, 3))
	var ref *streamline.Result
	for _, w := range []int{1, 2, 8} {
		r, err := streamline.Trace(f, streamline.Settings{Count: 800, Workers: w, KeepPaths: true})
		if err != nil {
			t.Fatal(err)
		}
		if ref == nil {
			ref = r
			continue
		}
		if d := diffResult(ref, r); d != "" {
			t.Errorf("workers %d differ from 1: %s", w, d)
		}
	}
}

// diffResult compares two results bit for bit (NaN equal to NaN).
func diffResult(a, b *streamline.Result) string {
	same := func(x, y []float64) bool {
		if len(x) != len(y) {
			return false
		}
		for i := range x {
			if math.Float64bits(x[i]) != math.Float64bits(y[i]) {
				return false
			}
		}
		return true
	}
	if len(a.Lines) != len(b.Lines) {
		return "line count"
	}
	for i := range a.Lines {
		la, lb := &a.Lines[i], &b.Lines[i]
		if la.Injector != lb.Injector || la.Producer != lb.Producer || la.Start != lb.Start || la.End != lb.End ||
			la.Launch != lb.Launch || math.Float64bits(la.Flux) != math.Float64bits(lb.Flux) ||
			math.Float64bits(la.TotalTau) != math.Float64bits(lb.TotalTau) || !same(la.Tau, lb.Tau) ||
			len(la.Cells) != len(lb.Cells) || len(la.Path) != len(lb.Path) {
			return "line " + strconv.Itoa(i)
		}
		for m := range la.Cells {
			if la.Cells[m] != lb.Cells[m] {
				return "cells of line " + strconv.Itoa(i)
			}
		}
		for m := range la.Path {
			if la.Path[m] != lb.Path[m] {
				return "path of line " + strconv.Itoa(i)
			}
		}
	}
	switch {
	case !same(a.TOF, b.TOF), !same(a.BackTOF, b.BackTOF), !same(a.Travel, b.Travel), !same(a.Volume, b.Volume):
		return "cell maps"
	}
	for k := range a.InjectorPartition {
		if a.InjectorPartition[k] != b.InjectorPartition[k] || a.ProducerPartition[k] != b.ProducerPartition[k] || a.Stagnant[k] != b.Stagnant[k] {
			return "partitions"
		}
	}
	if len(a.Pairs) != len(b.Pairs) {
		return "pairs"
	}
	for i := range a.Pairs {
		if a.Pairs[i] != b.Pairs[i] {
			return "pair " + strconv.Itoa(i)
		}
	}
	if len(a.Warnings) != len(b.Warnings) {
		return "warnings"
	}
	return ""
}

// TestVolumeBookkeeping checks, on a heterogeneous field with several
// wells, that the sum over lines of flux*tau approaches the pore volume of
// the flowing region as the lines get denser (within 1% at the default
// count), that the cell by cell traced volumes converge to the cells' pore
// volumes (the pore-volume weighted relative L1 error sum|V_k - PV_k| /
// sum PV_k falls with every doubling of the count and stays below a bound
// about 15% above its measured value: 0.152, 0.089, 0.052, 0.027 at 250,
// 1000, 2000, 4000 lines), that each producer receives exactly its rate,
// that each injector sends its rate, and that the allocation fractions of
// each well sum to 1 (common practice).
func TestVolumeBookkeeping(t *testing.T) {
	f := solve(t, heterogeneous(t, 90, 11))
	t.Logf("%6s %8s %12s %12s", "count", "lines", "traced/PV", "L1 rel")
	prevL1 := math.Inf(1)
	for _, tc := range []struct {
		count int
		maxL1 float64
	}{{250, 0.175}, {1000, 0.10}, {2000, 0.06}, {4000, 0.031}} {
		count := tc.count
		r, err := streamline.Trace(f, streamline.Settings{Count: count})
		if err != nil {
			t.Fatal(err)
		}
		flowing, traced, l1 := 0.0, 0.0, 0.0
		for k, pv := range f.PoreVolume {
			if !r.Stagnant[k] {
				flowing += pv
				l1 += math.Abs(r.Volume[k] - pv)
			}
		}
		l1 /= flowing
		in := make([]float64, len(f.Wells))
		out := make([]float64, len(f.Wells))
		for _, l := range r.Lines {
			traced += l.Flux * l.TotalTau
			if l.Injector >= 0 {
				out[l.Injector] += l.Flux
			}
			if l.Producer >= 0 {
				in[l.Producer] += l.Flux
			}
		}
		t.Logf("%6d %8d %12.6f %12.5f", count, len(r.Lines), traced/flowing, l1)
		if !(l1 <= tc.maxL1) {
			t.Errorf("count %d: traced cell volumes off their pore volumes by %.4f (relative L1), bound %g", count, l1, tc.maxL1)
		}
		if !(l1 < prevL1) {
			t.Errorf("count %d: relative L1 error %.4f does not fall from %.4f with more lines", count, l1, prevL1)
		}
		prevL1 = l1
		if count >= 2000 && math.Abs(traced/flowing-1) > 0.01 {
			t.Errorf("count %d: traced pore volume %g, flowing pore volume %g", count, traced, flowing)
		}
		fi := make([]float64, len(f.Wells))
		fp := make([]float64, len(f.Wells))
		for _, p := range r.Pairs {
			fi[p.Injector] += p.FractionOfInjector
			fp[p.Producer] += p.FractionOfProducer
		}
		for w, wl := range f.Wells {
			switch {
			case wl.Q < 0:
				if math.Abs(in[w]+wl.Q) > 1e-9*-wl.Q || math.Abs(fp[w]-1) > 1e-9 {
					t.Errorf("count %d: producer %s receives %.12g (fractions %g), rate %.12g", count, wl.Name, in[w], fp[w], -wl.Q)
				}
			case wl.Q > 0:
				// Lines balance the injector faces as well as the thin
				// tubes that no line resolves allow (see Trace).
				if math.Abs(out[w]-wl.Q) > 1e-4*wl.Q || math.Abs(fi[w]-1) > 1e-4 {
					t.Errorf("count %d: injector %s sends %.12g (fractions %g), rate %.12g", count, wl.Name, out[w], fi[w], wl.Q)
				}
			}
		}
	}
}

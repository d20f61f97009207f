package streamline

import (
	"math"
	"math/rand/v2"
	"slices"
	"sort"
	"testing"

	"floodtrace/reservoir"
)

// TestFPhiWorkedExample checks FPhi and Lorenz on three cells worked by
// hand from the definitions (Shook and Mitchell 2009, from memory): sorted
// by travel time the cells hold pore volumes 2, 1, 1 and fluxes (pv/tau)
// 2, 0.5, 0.25, so phi = 0, 1/2, 3/4, 1 and F = 0, 8/11, 10/11, 1; the
// area under F is 55/88 = 0.625 and L = 2*(0.625-0.5) = 0.25.
func TestFPhiWorkedExample(t *testing.T) {
	phi, F := FPhi([]float64{1, 2, 1, 5}, []float64{2, 1, 4, math.NaN()})
	wantPhi := []float64{0, 0.5, 0.75, 1}
	wantF := []float64{0, 8.0 / 11, 10.0 / 11, 1}
	if len(phi) != len(wantPhi) || len(F) != len(wantF) {
		t.Fatalf("got %d, %d points, want 4 (the NaN cell left out)", len(phi), len(F))
	}
	for m := range phi {
		if math.Abs(phi[m]-wantPhi[m]) > 1e-15 || math.Abs(F[m]-wantF[m]) > 1e-15 {
			t.Errorf("point %d: (%g, %g), want (%g, %g)", m, phi[m], F[m], wantPhi[m], wantF[m])
		}
	}
	if l := Lorenz(phi, F); math.Abs(l-0.25) > 1e-15 {
		t.Errorf("Lorenz %g, want 0.25", l)
	}
	// Sweep by hand: segment slopes dPhi/dF = 11/16, 11/8, 11/4 and
	// Ev = phi + (1-F)*tD at each segment's end.
	tD, Ev := Sweep(phi, F)
	wantT := []float64{0, 11.0 / 16, 11.0 / 8, 11.0 / 4}
	wantE := []float64{0, 0.5 + 3.0/11*11/16, 0.75 + 1.0/11*11/8, 1}
	for m := range wantT {
		if math.Abs(tD[m]-wantT[m]) > 1e-14 || math.Abs(Ev[m]-wantE[m]) > 1e-14 {
			t.Errorf("sweep point %d: (%g, %g), want (%g, %g)", m, tD[m], Ev[m], wantT[m], wantE[m])
		}
	}
}

func TestDiagnosticsBadInput(t *testing.T) {
	if phi, F := FPhi([]float64{1, 2}, []float64{1}); phi != nil || F != nil {
		t.Error("FPhi accepted inputs of different lengths")
	}
	if phi, F := FPhi([]float64{1, 2}, []float64{math.NaN(), -1}); phi != nil || F != nil {
		t.Error("FPhi returned a curve without a flowing cell")
	}
	for _, c := range []struct{ phi, F []float64 }{
		{nil, nil},
		{[]float64{0}, []float64{0}},
		{[]float64{0, 1}, []float64{0}},
		{[]float64{0, 0.6, 0.5, 1}, []float64{0, 0.5, 0.7, 1}},
		{[]float64{0, math.NaN(), 1}, []float64{0, 0.5, 1}},
	} {
		if l := Lorenz(c.phi, c.F); !math.IsNaN(l) {
			t.Errorf("Lorenz(%v, %v) = %g, want NaN", c.phi, c.F, l)
		}
		if tD, Ev := Sweep(c.phi, c.F); tD != nil || Ev != nil {
			t.Errorf("Sweep(%v, %v) returned a curve", c.phi, c.F)
		}
	}
}

// TestLorenzHomogeneousChannel: a homogeneous one-dimensional displacement
// has F = Phi, so L = 0 and Ev reaches 1 at tD = 1 (Shook and Mitchell
// 2009, from memory; it follows from the definitions).
func TestLorenzHomogeneousChannel(t *testing.T) {
	f := channel{nx: 30, ny: 4, dx: 50, dy: 50, pv: 900, q: 25}.field()
	r, err := Trace(f, Settings{Count: 100})
	if err != nil {
		t.Fatal(err)
	}
	phi, F := FPhi(f.PoreVolume, r.Travel)
	if len(phi) != f.Grid.N()+1 {
		t.Fatalf("F-Phi curve over %d cells, want %d", len(phi)-1, f.Grid.N())
	}
	if l := Lorenz(phi, F); math.Abs(l) > 1e-12 {
		t.Errorf("Lorenz coefficient %g, want 0", l)
	}
	tD, Ev := Sweep(phi, F)
	if len(tD) != 2 || math.Abs(tD[1]-1) > 1e-12 || math.Abs(Ev[1]-1) > 1e-12 {
		t.Errorf("sweep (%v, %v), want (0, 1) and (0, 1)", tD, Ev)
	}
}

// twoChannels is two non-communicating layers of equal pore volume, rows 0
// and 2 of a three-row grid, separated by row 1 that carries no flux
// (sealed, or inactive). Under one pressure drop the flux is proportional
// to permeability, so the fast layer carries r/(1+r) of the flow.
func twoChannels(nx int, r float64, sealedInactive bool) *Field {
	g := reservoir.Grid{NX: nx, NY: 3, DX: 80, DY: 40}
	f := &Field{Grid: g, PoreVolume: make([]float64, g.N()), FluxX: make([]float64, g.NXFaces()), FluxY: make([]float64, g.NYFaces())}
	const pv, q = 640, 10.0
	for k := range f.PoreVolume {
		f.PoreVolume[k] = pv
	}
	if sealedInactive {
		f.Active = make([]bool, g.N())
		for k := range f.Active {
			f.Active[k] = k/nx != 1
		}
	}
	for _, c := range []struct {
		row  int
		rate float64
	}{{0, r * q}, {2, q}} {
		row, rate := c.row, c.rate
		for i := 1; i < nx; i++ {
			f.FluxX[g.XFace(i, row)] = rate
		}
		f.Wells = append(f.Wells, Well{Name: "I", Cell: g.Index(0, row), Q: rate}, Well{Name: "P", Cell: g.Index(nx-1, row), Q: -rate})
	}
	return f
}

// TestLorenzTwoLayers checks the closed form from the definition of the
// F-Phi curve (Shook and Mitchell 2009 give the construction; derivation
// here): with equal pore-volume halves the curve rises to F1 = r/(1+r) at
// Phi = 1/2 and then to 1, so the area under it is
// (1/2)(F1/2) + (1/2)(F1+1)/2 = F1/2 + 1/4 and
// L = 2*(area - 1/2) = F1 - 1/2 = (r-1)/(2(r+1)).
// Sweep: the fast layer breaks through at tD1 = (1/2)/F1 = (1+r)/(2r), when
// Ev = 1/2 + (1-F1)*tD1 = 1/2 + 1/(2r); the slow one at tD2 = (1+r)/2,
// Ev = 1.
func TestLorenzTwoLayers(t *testing.T) {
	for _, inactive := range []bool{false, true} {
		for _, r := range []float64{1, 2, 5, 10, 100} {
			f := twoChannels(25, r, inactive)
			res, err := Trace(f, Settings{Count: 60})
			if err != nil {
				t.Fatal(err)
			}
			for i := 0; i < f.Grid.NX; i++ {
				k := f.Grid.Index(i, 1)
				if !math.IsNaN(res.Travel[k]) || res.Stagnant[k] == inactive {
					t.Errorf("r=%g inactive=%v: sealed cell %d: travel %g, stagnant %v", r, inactive, k, res.Travel[k], res.Stagnant[k])
				}
			}
			phi, F := FPhi(f.PoreVolume, res.Travel)
			want := (r - 1) / (2 * (r + 1))
			if l := Lorenz(phi, F); math.Abs(l-want) > 1e-12 {
				t.Errorf("r=%g inactive=%v: Lorenz %.15g, closed form %.15g", r, inactive, l, want)
			}
			tD, Ev := Sweep(phi, F)
			wantT := []float64{0, (1 + r) / (2 * r), (1 + r) / 2}
			wantE := []float64{0, 0.5 + 0.5/r, 1}
			if r == 1 {
				wantT, wantE = []float64{0, 1}, []float64{0, 1}
			}
			if len(tD) != len(wantT) {
				t.Fatalf("r=%g: sweep curve %v, %v; want %v, %v", r, tD, Ev, wantT, wantE)
			}
			for m := range tD {
				if math.Abs(tD[m]-wantT[m]) > 1e-12*wantT[m] || math.Abs(Ev[m]-wantE[m]) > 1e-12 {
					t.Errorf("r=%g: sweep point %d (%g, %g), want (%g, %g)", r, m, tD[m], Ev[m], wantT[m], wantE[m])
				}
			}
		}
	}
}

// TestSortByTravel checks the radix sort of FPhi against the standard
// library's stable sort of the cell numbers by travel time (sort.SliceStable),
// on times with many ties, times spread over many orders of magnitude and
// cells left out (zero, negative, NaN and infinite values).
func TestSortByTravel(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, n := range []int{1, 7, 1000, 50000} {
		for _, spread := range []string{"ties", "wide", "narrow"} {
			pv := make([]float64, n)
			tr := make([]float64, n)
			for k := range tr {
				pv[k] = rng.Float64()
				switch spread {
				case "ties":
					tr[k] = float64(rng.IntN(20))
				case "wide":
					tr[k] = math.Exp(rng.NormFloat64() * 30)
				default:
					tr[k] = 1 + rng.Float64()*1e-9
				}
				switch rng.IntN(40) {
				case 0:
					tr[k] = math.NaN()
				case 1:
					tr[k] = math.Inf(1)
				case 2:
					pv[k] = 0
				case 3:
					tr[k] = -tr[k]
				}
			}
			var want []int32
			for k := range tr {
				if pv[k] > 0 && finite(pv[k]) && tr[k] > 0 && finite(tr[k]) {
					want = append(want, int32(k))
				}
			}
			sort.SliceStable(want, func(a, b int) bool { return tr[want[a]] < tr[want[b]] })
			got := sortByTravel(pv, tr)
			if !slices.Equal(got, want) {
				t.Fatalf("n=%d %s: radix order differs from the stable sort", n, spread)
			}
		}
	}
}

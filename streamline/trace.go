package streamline

import (
	"math"

	"floodtrace/reservoir"
)

// Faces of a cell, in the order used for launch points and well anchors.
const (
	west = iota
	east
	south
	north
)

// tracer holds the read-only state shared by all streamlines.
type tracer struct {
	g        reservoir.Grid
	fx, fy   []float64
	pv       []float64 // pore volume, floored so that no active cell has zero
	active   []bool    // nil = all
	wellAt   []int32   // well with a non-zero rate in each cell, or -1
	q        []float64 // well rates
	cellOf   []int32   // well cells
	in, out  []float64 // forward inflow and outflow of each cell through its faces
	maxSteps int
	paths    bool
	maxPath  int
}

func newTracer(f *Field, s Settings) *tracer {
	g := f.Grid
	n := g.N()
	t := &tracer{
		g: g, fx: f.FluxX, fy: f.FluxY, active: f.Active,
		pv: make([]float64, n), wellAt: make([]int32, n),
		q: make([]float64, len(f.Wells)), cellOf: make([]int32, len(f.Wells)),
		in: make([]float64, n), out: make([]float64, n),
		maxSteps: s.MaxSteps, paths: s.KeepPaths, maxPath: s.MaxPathPoints,
	}
	// A floor on pore volume keeps velocities finite in active cells of
	// zero porosity: flux crosses them in negligible time.
	total, cnt := 0.0, 0
	for k, v := range f.PoreVolume {
		if f.active(k) {
			total += v
			cnt++
		}
	}
	floor := math.SmallestNonzeroFloat64
	if total > 0 {
		floor = 1e-12 * total / float64(cnt)
	}
	for k, v := range f.PoreVolume {
		t.pv[k] = math.Max(v, floor)
		t.wellAt[k] = -1
	}
	for w, wl := range f.Wells {
		t.q[w] = wl.Q
		t.cellOf[w] = int32(wl.Cell)
		if wl.Q != 0 {
			t.wellAt[wl.Cell] = int32(w)
		}
	}
	for k := 0; k < n; k++ {
		for face := west; face <= north; face++ {
			if q := t.outward(k, face); q > 0 {
				t.out[k] += q
			} else {
				t.in[k] -= q
			}
		}
	}
	return t
}

func (t *tracer) isActive(k int) bool { return t.active == nil || t.active[k] }

// outward returns the forward flux leaving cell k through the given face.
func (t *tracer) outward(k, face int) float64 {
	nx := t.g.NX
	i, j := k%nx, k/nx
	switch face {
	case west:
		return -t.fx[j*(nx+1)+i]
	case east:
		return t.fx[j*(nx+1)+i+1]
	case south:
		return -t.fy[k]
	default:
		return t.fy[k+nx]
	}
}

// neighbour returns the cell across the given face of k, or -1 at the grid
// edge, and the face of the neighbour that is crossed.
func (t *tracer) neighbour(k, face int) (n, nface int) {
	nx := t.g.NX
	i, j := k%nx, k/nx
	switch face {
	case west:
		if i == 0 {
			return -1, east
		}
		return k - 1, east
	case east:
		if i == nx-1 {
			return -1, west
		}
		return k + 1, west
	case south:
		if j == 0 {
			return -1, north
		}
		return k - nx, north
	default:
		if j == t.g.NY-1 {
			return -1, south
		}
		return k + nx, south
	}
}

// effIn and effOut are the face inflow and outflow of cell k for a trace in
// direction sign (+1 forward, -1 backward).
func (t *tracer) effIn(k int, sign float64) float64 {
	if sign > 0 {
		return t.in[k]
	}
	return t.out[k]
}

func (t *tracer) effOut(k int, sign float64) float64 {
	if sign > 0 {
		return t.out[k]
	}
	return t.in[k]
}

// sinkWell returns the well that ends traces in direction sign in cell k
// (a producer forward, an injector backward), or -1.
func (t *tracer) sinkWell(k int, sign float64) int {
	w := t.wellAt[k]
	if w >= 0 && sign*t.q[w] < 0 {
		return int(w)
	}
	return -1
}

// residence is the time of flight charged to a streamline inside a well
// cell: the cell's mean residence time PV/Q with Q its throughput (common
// practice; Pollock's linear field cannot represent the point well, where
// the exact time to reach the well is infinite). Summed over the lines of
// the well, flux*tau then equals the pore volume of the cell.
func residence(pv, q float64) float64 {
	if q > 0 {
		return pv / q
	}
	return 0
}

// half is one direction of a streamline as it is traced.
type half struct {
	cells []int32
	tau   []float64
	path  [][2]float64
	end   EndReason
	well  int     // well reached, or -1
	face  int     // face of the well cell crossed on arrival, or -1
	s     float64 // position along that face in [0,1], west to east or south to north
}

func (h *half) reset() {
	h.cells, h.tau, h.path = h.cells[:0], h.tau[:0], h.path[:0]
	h.end, h.well, h.face, h.s = AtWell, -1, -1, 0
}

func (t *tracer) point(h *half, k int, xi, eta float64) {
	if t.paths {
		t.pointIJ(h, k%t.g.NX, k/t.g.NX, xi, eta)
	}
}

// pointIJ adds the point (xi, eta) of cell (i, j) to the path, when paths
// are kept.
func (t *tracer) pointIJ(h *half, i, j int, xi, eta float64) {
	if t.paths {
		h.path = append(h.path, [2]float64{t.g.X0 + (float64(i)+xi)*t.g.DX, t.g.Y0 + (float64(j)+eta)*t.g.DY})
	}
}

func (h *half) add(k int, tau float64) {
	h.cells = append(h.cells, int32(k))
	h.tau = append(h.tau, tau)
}

// captures decides whether a trace entering the sink cell k of well w at
// position s along a face ends at the well. When the well takes all the
// cell's inflow every trace ends there. A weak sink, whose cell passes flow
// on, takes the share |Q|/inflow of each face: the traces entering the
// middle of the face (nearest the well) in that proportion.
func (t *tracer) captures(k, w int, s, sign float64) bool {
	qin := t.effIn(k, sign)
	c := math.Abs(t.q[w]) / qin
	if !(c < 1-1e-9) {
		return true
	}
	return math.Abs(s-0.5) <= 0.5*c
}

// enter moves a trace into cell n across its face nface at local (xi, eta).
// It reports whether the trace ended there: at the grid edge, in an
// inactive cell, or captured by a well.
func (t *tracer) enter(h *half, n, nface int, xi, eta, sign float64) bool {
	if n < 0 || !t.isActive(n) {
		h.end = Boundary
		return true
	}
	if w := t.sinkWell(n, sign); w >= 0 {
		s := eta
		if nface >= south {
			s = xi
		}
		if t.captures(n, w, s, sign) {
			t.capture(h, n, w, nface, s, sign)
			return true
		}
	}
	return false
}

func (t *tracer) capture(h *half, k, w, face int, s, sign float64) {
	h.add(k, residence(t.pv[k], t.effIn(k, sign)))
	t.point(h, k, 0.5, 0.5)
	h.end, h.well, h.face, h.s = AtWell, w, face, s
}

// launch starts a trace on face `face` of the well cell k at position s,
// charging the well cell's residence time first.
func (t *tracer) launch(h *half, k, face int, s, sign float64) {
	h.add(k, residence(t.pv[k], t.effOut(k, sign)))
	t.point(h, k, 0.5, 0.5)
	n, nface := t.neighbour(k, face)
	var xi, eta float64
	switch nface {
	case west:
		xi, eta = 0, s
	case east:
		xi, eta = 1, s
	case south:
		xi, eta = s, 0
	default:
		xi, eta = s, 1
	}
	if n >= 0 {
		t.point(h, n, xi, eta)
	}
	if t.enter(h, n, nface, xi, eta, sign) {
		return
	}
	t.run(h, n, xi, eta, sign, nface, s)
}

// run traces from local position (xi, eta) of cell k, in the direction of
// the flux (sign +1) or against it (sign -1), until the trace ends.
// entryFace and entryS tell where the trace entered k (-1 for a start
// inside the cell). The column i and row j of k are carried along with it,
// the neighbours being one column or row away.
func (t *tracer) run(h *half, k int, xi, eta, sign float64, entryFace int, entryS float64) {
	nx, ny := t.g.NX, t.g.NY
	i, j := k%nx, k/nx
	lastFace, lastS := entryFace, entryS
	for step := 0; ; step++ {
		if step >= t.maxSteps {
			h.end = StepCap
			return
		}
		inv := sign / t.pv[k]
		xf := k + j // j*(nx+1) + i
		vW, vE := t.fx[xf]*inv, t.fx[xf+1]*inv
		vS, vN := t.fy[k]*inv, t.fy[k+nx]*inv
		dtx, dirx := exitTime(xi, vW, vE)
		dty, diry := exitTime(eta, vS, vN)
		if dirx == 0 && diry == 0 {
			// No way out: the trace approaches a stagnation point, which in
			// a sink cell is the well itself.
			if w := t.sinkWell(k, sign); w >= 0 {
				t.capture(h, k, w, lastFace, lastS, sign)
				return
			}
			h.end = Stagnation
			return
		}
		var dt float64
		// The cell n across the exit face (-1 at the grid edge), the face
		// of n crossed, and the local position there.
		n, nface := -1, 0
		if dtx <= dty {
			dt = dtx
			eta = advance(eta, vS, vN, dt)
			if dirx > 0 {
				xi = 1
				t.pointIJ(h, i, j, xi, eta)
				nface, xi = west, 0
				if i < nx-1 {
					n = k + 1
					i++
				}
			} else {
				xi = 0
				t.pointIJ(h, i, j, xi, eta)
				nface, xi = east, 1
				if i > 0 {
					n = k - 1
					i--
				}
			}
		} else {
			dt = dty
			xi = advance(xi, vW, vE, dt)
			if diry > 0 {
				eta = 1
				t.pointIJ(h, i, j, xi, eta)
				nface, eta = south, 0
				if j < ny-1 {
					n = k + nx
					j++
				}
			} else {
				eta = 0
				t.pointIJ(h, i, j, xi, eta)
				nface, eta = north, 1
				if j > 0 {
					n = k - nx
					j--
				}
			}
		}
		if dt > 0 {
			h.add(k, dt)
		}
		if t.enter(h, n, nface, xi, eta, sign) {
			return
		}
		k = n
		lastFace = nface
		if nface >= south {
			lastS = xi
		} else {
			lastS = eta
		}
	}
}

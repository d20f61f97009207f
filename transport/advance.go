package transport

import (
	"errors"
	"fmt"
	"math"
)

// Scheme selects the numerical scheme of Advance.
type Scheme int

// The schemes. The zero value is Upwind.
const (
	// Upwind is the first-order upwind (Godunov, for fw increasing in
	// saturation) finite-volume scheme with forward Euler steps (Godunov
	// 1959; LeVeque 2002, chapter 4).
	Upwind Scheme = iota
	// TVD is a MUSCL reconstruction with a slope limiter (van Leer 1979)
	// and the two-stage strong-stability-preserving Runge-Kutta (Heun)
	// time step (Shu and Osher 1988): second order where the solution is
	// smooth, without new extrema at fronts.
	TVD
)

// String names the scheme.
func (s Scheme) String() string {
	switch s {
	case Upwind:
		return "upwind"
	case TVD:
		return "tvd"
	}
	return fmt.Sprintf("Scheme(%d)", int(s))
}

// Limiter selects the slope limiter of the TVD scheme.
type Limiter int

// The limiters. The zero value is Minmod.
const (
	// Minmod takes the smaller of the one-sided slopes, zero at extrema
	// (Roe 1986; LeVeque 2002, section 6.9): the most diffusive TVD limiter.
	Minmod Limiter = iota
	// VanLeer takes the harmonic mean of the one-sided slopes (van Leer
	// 1974): sharper fronts; the reconstructed face values are also
	// clamped to the neighbouring averages on non-uniform segments.
	VanLeer
)

// Default CFL numbers and the default limit on sub-steps per call.
const (
	DefaultCFLUpwind = 0.9
	DefaultCFLTVD    = 0.5
	DefaultMaxSteps  = 1 << 20
)

// Settings controls Advance. The zero value is the upwind scheme at CFL 0.9.
type Settings struct {
	Scheme  Scheme
	Limiter Limiter // TVD only
	// CFL is the Courant number max|fw'| dt_sub / min dtau of the sub-steps;
	// 0 means 0.9 for Upwind and 0.5 for TVD. It must not exceed 1.
	CFL float64
	// MaxSteps bounds the number of sub-steps of one call; 0 means
	// DefaultMaxSteps. Very short segments force many sub-steps: merge or
	// Remap them onto a coarser tau grid first. With Local it bounds the
	// sub-steps of each segment.
	MaxSteps int
	// Local (Upwind only) gives every segment its own number of equal
	// sub-steps, the fewest its own length and the wave speeds of its own
	// and its upstream neighbour's saturations allow (local time stepping;
	// see Workspace.Advance), instead of the one count of the whole line
	// that its shortest segment and fastest speed set.
	Local bool
}

func (set Settings) cfl() float64 {
	if set.CFL > 0 {
		return set.CFL
	}
	if set.Scheme == TVD {
		return DefaultCFLTVD
	}
	return DefaultCFLUpwind
}

// ErrTooManySteps reports that the CFL condition needs more sub-steps than
// Settings.MaxSteps allows.
var ErrTooManySteps = errors.New("transport: too many sub-steps")

// Workspace holds the scratch memory of Advance so that repeated calls do
// not allocate. The zero value is ready to use; a Workspace must not be
// used by two goroutines at once (give each worker its own).
type Workspace struct {
	ratio []float64 // dt_sub / dtau
	invc  []float64 // 1 / centre distances (TVD)
	s1    []float64 // first stage (TVD)
	flux  []float64 // face fluxes (TVD)
	// Flux histories of local time stepping: entering, leaving, and the
	// entering one averaged onto a segment's own sub-steps.
	hin, hout, hmid []float64
	outflow         []float64 // outlet history of the last local call (OutflowParts)
}

// OutflowParts sets parts to the mean water fraction leaving the outlet
// over each of len(parts) equal parts of the interval of the last Advance,
// from the flux history of its last segments (exact averages of it, so
// their mean is Advance's outFw up to round-off), and reports true; it
// reports false, and leaves parts alone, unless that call used local time
// stepping (Settings.Local) with dt > 0.
func (w *Workspace) OutflowParts(parts []float64) bool {
	if w.outflow == nil || len(parts) == 0 {
		return false
	}
	resample(parts, w.outflow)
	return true
}

func grow(b []float64, n int) []float64 {
	if cap(b) < n {
		return make([]float64, n)
	}
	return b[:n]
}

// Advance solves dS/dt + d fw(S)/d tau = 0 along one streamline for a time
// dt (Buckley and Leverett 1942), with S = sInj entering at tau = 0. The
// streamline is the list of segments with time of flight dtau[i] > 0 (any
// lengths) and mean saturations s[i], updated in place. It chooses equal
// sub-steps with max|fw'| dt_sub / min(dtau) <= CFL, where max|fw'| bounds
// the speed over the saturations present (the schemes create no new
// extrema, so the bound holds for the whole call). With Settings.Local
// (upwind only) each segment instead takes its own equal sub-steps, as few
// as its own length and the speeds of its own and its upstream
// neighbour's saturations over the interval allow (local time stepping,
// Osher and Sanders 1983, from memory): a segment ahead of a front takes
// one. The curve fl must be increasing in saturation (flow from the inlet
// to the outlet).
//
// It returns outFw, the mean water fraction leaving the outlet over the
// interval (the time integral of fw at the outlet divided by dt), and the
// number of sub-steps (with Local, the largest of any segment; a bad
// saturation or time of flight is then found when its zone is reached, and
// the segments upstream of it have been advanced). The update is conservative: the water volume
// sum(s*dtau) changes by exactly (fw(sInj) - outFw)*dt up to round-off.
func (w *Workspace) Advance(s, dtau []float64, sInj, dt float64, fl *Flux, set Settings) (outFw float64, steps int, err error) {
	w.outflow = nil
	n := len(s)
	switch {
	case fl == nil:
		return 0, 0, errors.New("transport: Advance without a flux table")
	case n == 0:
		return 0, 0, errors.New("transport: Advance on an empty streamline")
	case len(dtau) != n:
		return 0, 0, fmt.Errorf("transport: %d saturations but %d segment times of flight", n, len(dtau))
	case !(dt >= 0) || math.IsInf(dt, 0):
		return 0, 0, fmt.Errorf("transport: time step %g must be finite and non-negative", dt)
	case !(sInj >= 0 && sInj <= 1):
		return 0, 0, fmt.Errorf("transport: injected saturation %g outside [0, 1]", sInj)
	case set.Scheme != Upwind && set.Scheme != TVD:
		return 0, 0, fmt.Errorf("transport: unknown scheme %v", set.Scheme)
	case set.Limiter != Minmod && set.Limiter != VanLeer:
		return 0, 0, fmt.Errorf("transport: unknown limiter %d", set.Limiter)
	case set.CFL < 0 || set.CFL > 1 || math.IsNaN(set.CFL):
		return 0, 0, fmt.Errorf("transport: CFL number %g outside (0, 1]", set.CFL)
	case set.Local && set.Scheme != Upwind:
		return 0, 0, fmt.Errorf("transport: local time stepping is for the upwind scheme, not %v", set.Scheme)
	}
	if set.Local && dt > 0 {
		// It checks the saturations and times of flight zone by zone.
		return w.upwindLocal(s, dtau, sInj, dt, fl, set)
	}
	smin, smax, hmin := sInj, sInj, math.Inf(1)
	for i, v := range s {
		if !(v >= 0 && v <= 1) {
			return 0, 0, fmt.Errorf("transport: saturation %g of segment %d outside [0, 1]", v, i)
		}
		h := dtau[i]
		if !(h > 0) || math.IsInf(h, 0) {
			return 0, 0, fmt.Errorf("transport: segment %d has time of flight %g; it must be positive", i, h)
		}
		// Plain comparisons: v and h are checked numbers, and math.Min
		// and math.Max cost a third of this loop.
		if v < smin {
			smin = v
		}
		if v > smax {
			smax = v
		}
		if h < hmin {
			hmin = h
		}
	}
	if dt == 0 {
		return fl.Fw(s[n-1]), 0, nil
	}
	vmax := fl.MaxSpeed(smin, smax)
	nsub := 1
	if vmax > 0 {
		x := math.Ceil(vmax * dt / (set.cfl() * hmin))
		maxSteps := set.MaxSteps
		if maxSteps <= 0 {
			maxSteps = DefaultMaxSteps
		}
		if !(x <= float64(maxSteps)) {
			return 0, 0, fmt.Errorf("%w: %.3g needed, limit %d (shortest segment %g, speed %g, dt %g)",
				ErrTooManySteps, x, maxSteps, hmin, vmax, dt)
		}
		nsub = max(int(x), 1)
	}
	dts := dt / float64(nsub)
	w.ratio = grow(w.ratio, n)
	for i, h := range dtau {
		w.ratio[i] = dts / h
	}
	fin := fl.Fw(sInj)
	var out float64
	if set.Scheme == Upwind {
		out = w.upwind(s, fin, nsub, fl)
	} else {
		out = w.muscl(s, dtau, sInj, fin, nsub, fl, set.Limiter)
	}
	return out / float64(nsub), nsub, nil
}

// Advance is Workspace.Advance with a fresh workspace (it allocates);
// callers advancing many streamlines should keep a Workspace per worker.
func Advance(s, dtau []float64, sInj, dt float64, fl *Flux, set Settings) (outFw float64, steps int, err error) {
	var w Workspace
	return w.Advance(s, dtau, sInj, dt, fl, set)
}

// upwind runs nsub forward-Euler upwind steps in place, sweeping from the
// outlet so each flux is computed from the old state. It returns the sum
// of the outlet fluxes.
func (w *Workspace) upwind(s []float64, fin float64, nsub int, fl *Flux) float64 {
	n := len(s)
	r := w.ratio[:n]
	out := 0.0
	for range nsub {
		fr := fl.Fw(s[n-1])
		out += fr
		for i := n - 1; i > 0; i-- {
			// fl.Fw(s[i-1]) with its table part inlined (cubic): the same
			// operations in the same order (bit for bit, TestUpwindInlineFw).
			fi := fl.cubic(s[i-1])
			if fi < 0 {
				fi = 0
			}
			if fi > 1 {
				fi = 1
			}
			s[i] -= r[i] * (fr - fi)
			fr = fi
		}
		s[0] -= r[0] * (fr - fin)
	}
	return out
}

// muscl runs nsub SSP-RK2 steps of the limited MUSCL scheme and returns
// the sum over steps of the stage-averaged outlet flux.
func (w *Workspace) muscl(s, dtau []float64, sInj, fin float64, nsub int, fl *Flux, lim Limiter) float64 {
	n := len(s)
	r := w.ratio[:n]
	w.invc = grow(w.invc, n)
	w.s1 = grow(w.s1, n)
	w.flux = grow(w.flux, n+1)
	invc, s1, F := w.invc, w.s1, w.flux
	// invc[i]: reciprocal distance between the centres of cells i-1 and i;
	// the inlet ghost cell has the width of the first segment.
	invc[0] = 1 / dtau[0]
	for i := 1; i < n; i++ {
		invc[i] = 2 / (dtau[i-1] + dtau[i])
	}
	out := 0.0
	for range nsub {
		faceFluxes(F, s, dtau, invc, sInj, fin, fl, lim)
		for i := range s {
			s1[i] = s[i] - r[i]*(F[i+1]-F[i])
		}
		out += 0.5 * F[n]
		faceFluxes(F, s1, dtau, invc, sInj, fin, fl, lim)
		for i := range s {
			s[i] = 0.5 * (s[i] + s1[i] - r[i]*(F[i+1]-F[i]))
		}
		out += 0.5 * F[n]
	}
	return out
}

// faceFluxes fills F[i] (the flux entering segment i) and F[n] (the
// outflow) from the limited upwind-side reconstruction of u.
func faceFluxes(F, u, dtau, invc []float64, sInj, fin float64, fl *Flux, lim Limiter) {
	n := len(u)
	F = F[:n+1]
	dtau = dtau[:n]
	invc = invc[:n]
	F[0] = fin
	prev := sInj
	vanLeer := lim == VanLeer
	for i := 0; i < n-1; i++ {
		ui, next := u[i], u[i+1]
		dl := (ui - prev) * invc[i]
		dr := (next - ui) * invc[i+1]
		face := ui
		if dl*dr > 0 {
			var slope float64
			switch {
			case vanLeer:
				slope = 2 * dl * dr / (dl + dr)
			case dl > 0:
				slope = min(dl, dr)
			default:
				slope = max(dl, dr)
			}
			face += 0.5 * dtau[i] * slope
			if vanLeer {
				// Keep the face value between the neighbouring averages.
				face = min(max(face, min(ui, next)), max(ui, next))
			}
		}
		F[i+1] = fl.Fw(face)
		prev = ui
	}
	// Outlet: zero-gradient extrapolation, first order.
	F[n] = fl.Fw(u[n-1])
}

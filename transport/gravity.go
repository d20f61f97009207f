package transport

import (
	"errors"
	"fmt"
	"math"
)

// Gravity holds the phase mobilities that the gravity term of the
// fractional flow needs: Lw(s) = krw/mu_w and Lo(s) = kro/mu_o, and Lip,
// a bound of |Lw'| and |Lo'| over [0, 1] (see NewGravity).
type Gravity struct {
	Lw, Lo func(s float64) float64
	Lip    float64
}

// NewGravity returns the Gravity of the phase mobilities lw and lo, with
// Lip sampled on 2000 intervals of [0, 1] and raised by 10% for what the
// sampling misses.
func NewGravity(lw, lo func(float64) float64) *Gravity {
	const n = 2000
	dw, do := 0.0, 0.0
	for k := 0; k < n; k++ {
		s0, s1 := float64(k)/n, float64(k+1)/n
		dw = math.Max(dw, math.Abs(lw(s1)-lw(s0))*n)
		do = math.Max(do, math.Abs(lo(s1)-lo(s0))*n)
	}
	return &Gravity{Lw: lw, Lo: lo, Lip: 1.1 * math.Max(dw, do)}
}

// Flux returns the counter-current gravity flux c Lw Lo / (Lw + Lt) from
// the state a to the state b (positive: water from a to b, oil back),
// with each mobility upwinded in its own phase's direction: for c > 0 the
// water's from a and the oil's from b, for c < 0 the reverse (Brenier and
// Jaffre 1991, from memory). It is monotone (increasing in a, decreasing
// in b) and vanishes where either phase is immobile.
func (g *Gravity) Flux(c, a, b float64) float64 {
	if c == 0 {
		return 0
	}
	if c < 0 {
		a, b = b, a
	}
	w, o := g.Lw(clamp01(a)), g.Lo(clamp01(b))
	if !(w+o > 0) {
		return 0
	}
	return c * w * o / (w + o)
}

func clamp01(s float64) float64 { return math.Min(1, math.Max(0, s)) }

// AdvanceGravity is Advance with gravity: it solves
//
//	dS/dt + d/dtau [ fw(S) + G(tau) lw lo / lt (S) ] = 0
//
// along one streamline, the fractional flow of Buckley and Leverett (1942)
// with its gravity term, where G = c K (rho_w - rho_o) gamma (dD/ds) / |u|
// is the dimensionless gravity coefficient of each segment (g[i]; the
// depth gradient along the streamline's direction over the total Darcy
// velocity, times the viscosity unit), positive where the line runs
// down-dip. fw is upwinded in the flow direction and the gravity term, on
// the faces between segments with the mean of their coefficients, by
// Gravity.Flux; at the inlet and the outlet only fw flows (the wells take
// the total flux). First-order upwind with equal forward-Euler sub-steps,
// (max|fw'| + |G_i| Lip) dt_sub / dtau_i <= CFL on every segment. The
// update is conservative: sum(s*dtau) changes by (fw(sInj) - outFw)*dt up
// to round-off. It returns the mean outlet fw and the sub-step count.
func (w *Workspace) AdvanceGravity(s, dtau, g []float64, sInj, dt float64, fl *Flux, gr *Gravity, set Settings) (outFw float64, steps int, err error) {
	n := len(s)
	switch {
	case fl == nil || gr == nil:
		return 0, 0, errors.New("transport: AdvanceGravity without a flux table or gravity mobilities")
	case n == 0:
		return 0, 0, errors.New("transport: AdvanceGravity on an empty streamline")
	case len(dtau) != n || len(g) != n:
		return 0, 0, fmt.Errorf("transport: %d saturations, %d segment times of flight, %d gravity coefficients", n, len(dtau), len(g))
	case !(dt >= 0) || math.IsInf(dt, 0):
		return 0, 0, fmt.Errorf("transport: time step %g must be finite and non-negative", dt)
	case !(sInj >= 0 && sInj <= 1):
		return 0, 0, fmt.Errorf("transport: injected saturation %g outside [0, 1]", sInj)
	case set.CFL < 0 || set.CFL > 1 || math.IsNaN(set.CFL):
		return 0, 0, fmt.Errorf("transport: CFL number %g outside (0, 1]", set.CFL)
	}
	smin, smax := sInj, sInj
	for i, v := range s {
		if !(v >= -1e-12 && v <= 1+1e-12) {
			return 0, 0, fmt.Errorf("transport: saturation %g of segment %d outside [0, 1]", v, i)
		}
		if h := dtau[i]; !(h > 0) || math.IsInf(h, 0) {
			return 0, 0, fmt.Errorf("transport: segment %d has time of flight %g; it must be positive", i, h)
		}
		if !finite(g[i]) {
			return 0, 0, fmt.Errorf("transport: segment %d has gravity coefficient %g", i, g[i])
		}
		smin, smax = math.Min(smin, v), math.Max(smax, v)
	}
	if dt == 0 {
		return fl.Fw(s[n-1]), 0, nil
	}
	vfw := fl.MaxSpeed(clamp01(smin), clamp01(smax))
	rate := 0.0 // largest (speed / dtau) over the segments
	for i := range s {
		gi := math.Abs(g[i])
		if i > 0 {
			gi = math.Max(gi, 0.5*math.Abs(g[i-1]+g[i]))
		}
		rate = math.Max(rate, (vfw+2*gi*gr.Lip)/dtau[i])
	}
	nsub := 1
	if rate > 0 {
		x := math.Ceil(rate * dt / set.cfl())
		maxSteps := set.MaxSteps
		if maxSteps <= 0 {
			maxSteps = DefaultMaxSteps
		}
		if !(x <= float64(maxSteps)) {
			return 0, 0, fmt.Errorf("%w: %.3g needed, limit %d (dt %g)", ErrTooManySteps, x, maxSteps, dt)
		}
		nsub = max(int(x), 1)
	}
	dts := dt / float64(nsub)
	w.ratio = grow(w.ratio, n)
	for i, h := range dtau {
		w.ratio[i] = dts / h
	}
	w.flux = grow(w.flux, n+1)
	F := w.flux
	fin := fl.Fw(sInj)
	out := 0.0
	for range nsub {
		// Face i is the inlet side of segment i; face n the outlet.
		F[0] = fin
		for i := 1; i < n; i++ {
			F[i] = fl.Fw(clamp01(s[i-1])) + gr.Flux(0.5*(g[i-1]+g[i]), s[i-1], s[i])
		}
		F[n] = fl.Fw(clamp01(s[n-1]))
		out += F[n]
		for i := range n {
			s[i] -= w.ratio[i] * (F[i+1] - F[i])
		}
	}
	return out / float64(nsub), nsub, nil
}

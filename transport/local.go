package transport

import (
	"fmt"
	"math"
)

// localZone is the number of consecutive segments that share one count of
// sub-steps under local time stepping. Counted on the pressure-update
// benchmark of docs/PERFORMANCE.md (20 updates, 32 M segment visits):
// zones of 4, 8, 16, 32 and 64 segments took 109, 125, 148, 183 and 237 M
// segment sub-steps against 390 M with one count per line; 8 balances the
// steps against the work per zone.
const localZone = 8

// upwindLocal is the upwind scheme with local time stepping
// (Settings.Local): a conservative scheme on locally varying time steps
// (Osher and Sanders 1983, from memory), marched in space. Flow runs from
// segment 0 to the outlet, so a run of segments (a zone of localZone) can
// be advanced over the whole interval once the history of the flux
// entering it is known, and that is the history of the flux leaving the
// zone upstream. Zone by zone from the inlet:
//
//   - the entering flux is known as a piecewise constant history over m'
//     equal parts of dt (at the inlet one part, fw(sInj)), together with
//     the range of the saturations it was computed from;
//   - the zone takes m equal sub-steps, the fewest with
//     max|fw'| (dt/m) / min dtau <= CFL over the zone, the speed bounded
//     over the zone's saturations and the entering range;
//   - the entering history is averaged onto the m parts (exact integer
//     overlaps, so the water entering is the water that left upstream),
//     and m forward-Euler upwind steps give the zone's new saturations and
//     the history of the flux leaving its last segment, with the range of
//     that segment's saturation at the starts of the sub-steps.
//
// Each averaged entering flux lies between fluxes of upstream states, so
// it is fw of a saturation in the entering range, and under the zone's CFL
// condition each sub-step is a convex combination: no new extrema, as with
// the global step, and the speed bound holds. The water of each segment
// changes by exactly the difference of the time integrals of the fluxes at
// its faces (up to round-off), so the line conserves water. Zones ahead of
// a front (saturations at which fw' is near zero) take one sub-step, and
// zones behind it as many as their own speeds need, where the global
// scheme takes as many everywhere as the fastest segment needs.
func (w *Workspace) upwindLocal(s, dtau []float64, sInj, dt float64, fl *Flux, set Settings) (float64, int, error) {
	n := len(s)
	dtau = dtau[:n]
	cfl := set.cfl()
	maxSteps := set.MaxSteps
	if maxSteps <= 0 {
		maxSteps = DefaultMaxSteps
	}
	w.hin = grow(w.hin, 1)
	w.hin[0] = fl.Fw(sInj)
	hin := w.hin[:1]
	upLo, upHi := sInj, sInj
	most := 0
	for a := 0; a < n; a += localZone {
		e := min(a+localZone, n)
		lo, hi, hmin := upLo, upHi, math.Inf(1)
		for j, v := range s[a:e] {
			h := dtau[a+j]
			if !(v >= 0 && v <= 1) {
				return 0, 0, fmt.Errorf("transport: saturation %g of segment %d outside [0, 1]", v, a+j)
			}
			if !(h > 0) || math.IsInf(h, 0) {
				return 0, 0, fmt.Errorf("transport: segment %d has time of flight %g; it must be positive", a+j, h)
			}
			lo, hi, hmin = min(lo, v), max(hi, v), min(hmin, h)
		}
		m := 1
		if v := fl.speed(lo, hi); v > 0 {
			x := math.Ceil(v * dt / (cfl * hmin))
			if !(x <= float64(maxSteps)) {
				return 0, 0, fmt.Errorf("%w: %.3g needed for segments %d to %d, limit %d (time of flight %g, speed %g, dt %g)",
					ErrTooManySteps, x, a, e-1, maxSteps, hmin, v, dt)
			}
			m = max(int(x), 1)
		}
		most = max(most, m)
		fin := hin
		if m != len(hin) {
			w.hmid = grow(w.hmid, m)
			fin = w.hmid[:m]
			resample(fin, hin)
		}
		dts := dt / float64(m)
		w.ratio = grow(w.ratio, e-a)
		for i, h := range dtau[a:e] {
			w.ratio[i] = dts / h
		}
		w.hout = grow(w.hout, m)
		upLo, upHi = w.upwindHistory(s[a:e], fin, fl, w.hout[:m], !fl.clampFree(lo, hi))
		w.hin, w.hout = w.hout, w.hin
		hin = w.hin[:m]
	}
	sum := 0.0
	for _, f := range hin {
		sum += f
	}
	w.outflow = hin
	return sum / float64(len(hin)), most, nil
}

// upwindHistory runs len(hist) upwind steps of the global scheme on s (the
// ratios in w.ratio), records the flux leaving the last segment at each
// step in hist, and returns the range of the last segment's saturation at
// the starts of the steps.
//
// Without clamp it leaves out Fw's clamp to [0, 1] in the sweep, for zones
// whose saturations lie where it cannot act (Flux.clampFree): the same
// numbers, fewer instructions.
func (w *Workspace) upwindHistory(s []float64, fin []float64, fl *Flux, hist []float64, clamp bool) (lo, hi float64) {
	n := len(s)
	r := w.ratio[:n]
	lo, hi = s[n-1], s[n-1]
	for k := range hist {
		last := s[n-1]
		lo, hi = min(lo, last), max(hi, last)
		fr := clampFw(fl.cubic(last)) // fl.Fw(last), inlined
		hist[k] = fr
		// fl.Fw(s[i-1]) with its table part inlined, as in upwind; the
		// loop without the clamp is written apart, for the compiler to
		// leave the test out of it.
		if clamp {
			for i := n - 1; i > 0; i-- {
				fi := min(max(fl.cubic(s[i-1]), 0), 1)
				s[i] -= r[i] * (fr - fi)
				fr = fi
			}
		} else {
			for i := n - 1; i > 0; i-- {
				fi := fl.cubic(s[i-1])
				s[i] -= r[i] * (fr - fi)
				fr = fi
			}
		}
		s[0] -= r[0] * (fr - fin[k])
	}
	return lo, hi
}

// resample sets dst to the averages of the piecewise constant history src
// (len(src) equal parts of an interval) over len(dst) equal parts of the
// same interval. The overlaps are counted in integer units of
// 1/(len(src)*len(dst)) of the interval, so the integral is kept to
// round-off.
func resample(dst, src []float64) {
	m, mp := len(dst), len(src)
	switch {
	case m%mp == 0:
		r := m / mp
		for j, v := range src {
			for k := j * r; k < (j+1)*r; k++ {
				dst[k] = v
			}
		}
	case mp%m == 0:
		r := mp / m
		inv := float64(r)
		for k := range dst {
			acc := 0.0
			for _, v := range src[k*r : (k+1)*r] {
				acc += v
			}
			dst[k] = acc / inv
		}
	default:
		// Source part j covers units [j*m, (j+1)*m), destination part k
		// covers [k*mp, (k+1)*mp).
		j, pos := 0, 0
		inv := float64(mp)
		for k := range dst {
			end := (k + 1) * mp
			acc := 0.0
			for pos < end {
				e := min((j+1)*m, end)
				acc += src[j] * float64(e-pos)
				pos = e
				if e == (j+1)*m {
					j++
				}
			}
			dst[k] = acc / inv
		}
	}
}

package flood

import (
	"math"

	"floodtrace/transport"
)

// blTable evaluates a Buckley-Leverett Riemann solution quickly: inside
// each fan, S and fw(S) are tabulated against xi = tau/t at evenly spaced
// speeds and interpolated linearly; shocks and constant states are exact.
// A run evaluates the solution millions of times (every streamline segment
// at every map time), so the root solve of transport.Riemann.Saturation is
// done once per table node instead. With 4096 nodes per fan the saturation
// error is below 1e-6 for Corey curves.
type blTable struct {
	rs         *transport.Riemann
	sInj, fInj float64
	sInit, f0  float64
	waves      []transport.Wave
	fans       []fanTab
	front      float64 // speed of the leading wave
}

type fanTab struct {
	lo, hi float64 // speed range
	inv    float64 // (n-1)/(hi-lo)
	s, fw  []float64
}

const fanNodes = 4096

func newBLTable(rs *transport.Riemann, ff transport.Curve) *blTable {
	b := &blTable{rs: rs, sInj: rs.InjectedSaturation(), sInit: rs.InitialSaturation(), waves: rs.Waves()}
	b.fInj, b.f0 = ff.Fw(b.sInj), ff.Fw(b.sInit)
	b.fans = make([]fanTab, len(b.waves))
	for i, w := range b.waves {
		if w.Kind != transport.Fan || !(w.FastSpeed > w.SlowSpeed) {
			continue
		}
		ft := fanTab{lo: w.SlowSpeed, hi: w.FastSpeed, s: make([]float64, fanNodes), fw: make([]float64, fanNodes)}
		ft.inv = float64(fanNodes-1) / (ft.hi - ft.lo)
		for k := 0; k < fanNodes; k++ {
			xi := ft.lo + (ft.hi-ft.lo)*float64(k)/float64(fanNodes-1)
			var s float64
			switch k {
			case 0:
				s = w.Behind
			case fanNodes - 1:
				s = w.Ahead
			default:
				s = rs.Saturation(xi)
			}
			ft.s[k], ft.fw[k] = s, ff.Fw(s)
		}
		b.fans[i] = ft
	}
	if n := len(b.waves); n > 0 {
		b.front = b.waves[n-1].FastSpeed
	}
	return b
}

// eval returns S and fw(S) at xi = tau/t.
func (b *blTable) eval(xi float64) (s, fw float64) {
	for i := range b.waves {
		w := &b.waves[i]
		if xi <= w.SlowSpeed {
			if i == 0 {
				return b.sInj, b.fInj
			}
			return w.Behind, b.fans[i-1].tailFw(b, i, w)
		}
		if xi < w.FastSpeed {
			ft := &b.fans[i]
			if ft.s == nil { // degenerate
				return w.Behind, b.rs.Curve().Fw(w.Behind)
			}
			x := (xi - ft.lo) * ft.inv
			k := int(x)
			if k >= fanNodes-1 {
				k = fanNodes - 2
			}
			f := x - float64(k)
			return ft.s[k] + f*(ft.s[k+1]-ft.s[k]), ft.fw[k] + f*(ft.fw[k+1]-ft.fw[k])
		}
	}
	return b.sInit, b.f0
}

// tailFw returns fw of the state between wave i-1 and wave i.
func (ft *fanTab) tailFw(b *blTable, i int, w *transport.Wave) float64 {
	if ft.fw != nil {
		return ft.fw[fanNodes-1]
	}
	return b.rs.Curve().Fw(w.Behind)
}

// cumSat returns the integral of S over [0, tau] at time t:
// tau*S2 + t*(fw(Sinj) - fw(S2)) with S2 = S(tau/t) (Welge 1952).
func (b *blTable) cumSat(tau, t float64) float64 {
	if tau <= 0 {
		return 0
	}
	if !(t > 0) {
		return tau * b.sInit
	}
	s, fw := b.eval(tau / t)
	return tau*s + t*(b.fInj-fw)
}

// outletFw returns fw at the end of a streamline of time of flight tau.
func (b *blTable) outletFw(tau, t float64) float64 {
	if !(t > 0) {
		return b.f0
	}
	if !(tau > 0) {
		return b.fInj
	}
	_, fw := b.eval(tau / t)
	return fw
}

// outlet returns outletFw(tau, t) and cumSat(tau, t) together, with one
// evaluation of the similarity solution where both need it: the same
// values, bit for bit.
func (b *blTable) outlet(tau, t float64) (fw, cum float64) {
	if t > 0 && tau > 0 {
		s, fw := b.eval(tau / t)
		return fw, tau*s + t*(b.fInj-fw)
	}
	return b.outletFw(tau, t), b.cumSat(tau, t)
}

// breakthrough returns the arrival time of the leading front at tau.
func (b *blTable) breakthrough(tau float64) float64 {
	if !(b.front > 0) {
		return math.Inf(1)
	}
	return tau / b.front
}

package streamline

import "math"

// Pollock's (1988) semi-analytical step. Inside a cell each velocity
// component varies linearly in its own direction only. In the local
// coordinate p in [0,1] along one axis the rate of change is
//
//	dp/dt = v(p) = vLo + (vHi-vLo)*p,  vLo = qLo/PV, vHi = qHi/PV,
//
// where qLo and qHi are the fluxes (volume per day, positive towards
// increasing p) of the two faces across that axis and PV is the pore volume
// of the cell. With this scaling a cell of uniform flux q is crossed in
// PV/q days, so time of flight comes out in days directly: it is the same
// as dividing the Darcy velocity by porosity and integrating ds/|v|.
// The solution is v(t) = v(0)*exp(a*t) with a = vHi-vLo, which gives the
// exit time t = ln(v_exit/v_now)/a and the straight-line limit
// t = distance/v as a -> 0.

// exitTime returns the time a particle at p takes to reach the face it is
// heading for, and that face: +1 for p = 1, -1 for p = 0. dir is 0 and dt
// +Inf when it never gets there: zero velocity, or a velocity that changes
// sign before the face (the particle approaches a stagnation coordinate).
func exitTime(p, vLo, vHi float64) (dt float64, dir int) {
	a := vHi - vLo
	v := vLo + a*p
	var dist float64
	switch {
	case v > 0:
		if !(vHi > 0) {
			return math.Inf(1), 0
		}
		dist, dir = 1-p, 1
	case v < 0:
		if !(vLo < 0) {
			return math.Inf(1), 0
		}
		dist, dir = -p, -1
	default:
		return math.Inf(1), 0
	}
	// ln(v_exit/v)/a = (dist/v) * ln(1+r)/r with r = a*dist/v = v_exit/v - 1,
	// which stays accurate when a is tiny or zero.
	r := a * dist / v
	dt = dist / v * log1pOverX(r)
	if !(dt < math.Inf(1)) { // overflow from a vanishing velocity
		return math.Inf(1), 0
	}
	return dt, dir
}

// advance returns the coordinate reached from p after time t:
// p + v*(exp(a*t)-1)/a with v = v(p), clamped to [0,1].
func advance(p, vLo, vHi, t float64) float64 {
	a := vHi - vLo
	v := vLo + a*p
	p += v * t * expm1OverX(a*t)
	if p < 0 {
		return 0
	}
	if p > 1 {
		return 1
	}
	return p
}

// log1pOverX returns ln(1+x)/x, with its Taylor series near 0.
func log1pOverX(x float64) float64 {
	if math.Abs(x) < 1e-4 {
		return 1 - x*(0.5-x*(1.0/3-x*0.25))
	}
	return math.Log1p(x) / x
}

// expm1OverX returns (exp(x)-1)/x, with its Taylor series near 0.
func expm1OverX(x float64) float64 {
	if math.Abs(x) < 1e-4 {
		return 1 + x*(0.5+x*(1.0/6+x/24))
	}
	return math.Expm1(x) / x
}

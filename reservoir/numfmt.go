package reservoir

import (
	"math"
	"strconv"
)

// pow10 holds the powers of ten that are exact in float64.
var pow10 = [...]float64{1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11,
	1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22}

// appendG appends strconv.AppendFloat(buf, v, 'g', prec, 64) for prec in
// 1..15; other precisions go to strconv. Values of magnitude in
// [1e-4, 10^prec), written without an exponent, take a fast path: v is
// scaled by an exact power of ten to a prec-digit integer and rounded to
// nearest. The scaling rounds once (relative error below 2^-52), so the
// rounding direction is certain unless the scaled value lies within that
// error of a half-way point: such values, and all others, go to strconv,
// which rounds the exact binary value.
func appendG(buf []byte, v float64, prec int) []byte {
	a := math.Abs(v)
	if prec < 1 || prec > 15 || !(a >= 1e-4 && a < pow10[prec]) {
		return strconv.AppendFloat(buf, v, 'g', prec, 64)
	}
	// e: the decimal exponent, 10^e <= a < 10^(e+1), from -4 up.
	e := -4
	for e+1 < prec && a >= decade(e+1) {
		e++
	}
	lo, hi := pow10[prec-1], pow10[prec]
	scaled := a * pow10[prec-1-e]
	if scaled < lo && e > -4 { // decade(e) rounded up past a
		e--
		scaled = a * pow10[prec-1-e]
	}
	if scaled >= hi {
		e++
		scaled = a * pow10[prec-1-e]
	}
	fl := math.Floor(scaled)
	frac := scaled - fl
	if math.Abs(frac-0.5) <= 4e-16*scaled || scaled < lo || scaled >= hi {
		return strconv.AppendFloat(buf, v, 'g', prec, 64)
	}
	m := uint64(fl)
	if frac > 0.5 {
		m++
	}
	if m == uint64(hi) { // rounded up to the next decade
		m = uint64(lo)
		e++
		if e >= prec {
			return strconv.AppendFloat(buf, v, 'g', prec, 64)
		}
	}
	// The prec digits of m, trailing zeros dropped.
	var d [16]byte
	nd := prec
	for i := prec - 1; i >= 0; i-- {
		d[i] = byte('0' + m%10)
		m /= 10
	}
	for nd > 1 && d[nd-1] == '0' {
		nd--
	}
	if math.Signbit(v) {
		buf = append(buf, '-')
	}
	dp := e + 1 // digits before the decimal point
	if dp <= 0 {
		buf = append(buf, '0', '.')
		for ; dp < 0; dp++ {
			buf = append(buf, '0')
		}
		return append(buf, d[:nd]...)
	}
	if nd <= dp {
		buf = append(buf, d[:nd]...)
		for i := nd; i < dp; i++ {
			buf = append(buf, '0')
		}
		return buf
	}
	buf = append(buf, d[:dp]...)
	buf = append(buf, '.')
	return append(buf, d[dp:nd]...)
}

// decade returns 10^e for e in -4..22 (the negative ones rounded).
func decade(e int) float64 {
	if e >= 0 {
		return pow10[e]
	}
	return [...]float64{1e-4, 1e-3, 1e-2, 1e-1}[e+4]
}

func ftoa(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

package reservoir

import (
	"math"
	"math/big"
	"math/bits"
	"sync"
)

// parseDecimal parses a plain decimal number, [+-]digits[.digits][(e|E)
// [+-]digits], of at most 19 significant digits and a decimal exponent
// within pow10Range, the form of nearly every value of a map file, to the
// float64 nearest to it: the value strconv.ParseFloat gives. It reports
// false for anything else (other forms, more digits, the rare inputs the
// algorithm cannot decide), which the caller hands to strconv.ParseFloat.
//
// An exact mantissa and power of ten are divided or multiplied as
// floats; any other value takes the algorithm of Eisel and Lemire (Lemire 2021,
// "Number parsing at a gigabyte per second", Software: Practice and
// Experience 51(8)), as Go's strconv implements it; the digits are read
// by a loop for this one form, which costs less than strconv's general
// reader (underscores, hexadecimal, infinities), the larger part of the
// time of strconv.ParseFloat on a map's values. TestParseDecimal holds it
// to strconv.ParseFloat, bit for bit.
func parseDecimal(s string) (float64, bool) {
	i := 0
	neg := false
	if i < len(s) && (s[i] == '-' || s[i] == '+') {
		neg = s[i] == '-'
		i++
	}
	var man uint64
	nd, exp10 := 0, 0 // significant digits read; decimal exponent of man
	digits, dot := false, false
	for ; i < len(s); i++ {
		c := s[i]
		switch {
		case c >= '0' && c <= '9':
			digits = true
			if c == '0' && nd == 0 {
				// A leading zero: only shifts the point.
				if dot {
					exp10--
				}
				continue
			}
			if nd == 19 {
				return 0, false
			}
			man = man*10 + uint64(c-'0')
			nd++
			if dot {
				exp10--
			}
		case c == '.' && !dot:
			dot = true
		default:
			goto exponent
		}
	}
exponent:
	if !digits {
		return 0, false
	}
	if i < len(s) {
		if s[i] != 'e' && s[i] != 'E' {
			return 0, false
		}
		i++
		eneg := false
		if i < len(s) && (s[i] == '-' || s[i] == '+') {
			eneg = s[i] == '-'
			i++
		}
		if i == len(s) || len(s)-i > 4 {
			return 0, false
		}
		e := 0
		for ; i < len(s); i++ {
			c := s[i]
			if c < '0' || c > '9' {
				return 0, false
			}
			e = e*10 + int(c-'0')
		}
		if eneg {
			e = -e
		}
		exp10 += e
	}
	if man == 0 {
		if neg {
			return math.Copysign(0, -1), true
		}
		return 0, true
	}
	if man < 1<<53 && exp10 >= -22 && exp10 <= 22 {
		// Both man and 10^|exp10| are exact float64s: one correctly
		// rounded product or quotient (Clinger 1990, the exact case of
		// strconv).
		f := float64(man)
		if exp10 >= 0 {
			f *= exact10[exp10]
		} else {
			f /= exact10[-exp10]
		}
		if neg {
			f = -f
		}
		return f, true
	}
	return eiselLemire(man, exp10, neg)
}

// exact10 are the powers of ten that float64 holds exactly.
var exact10 = [...]float64{1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11,
	1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22}

// pow10Range bounds the decimal exponents parseDecimal converts itself:
// 10^-pow10Range to 10^pow10Range.
const pow10Range = 64

// pow10Table holds 10^e for |e| <= pow10Range as the 128-bit truncation
// of 10^e * 2^(127 - floor(log2 10^e)) (the leading bit set), Hi then Lo,
// made once with math/big.
var (
	pow10Once  sync.Once
	pow10Table [2*pow10Range + 1][2]uint64
)

func makePow10Table() {
	ten := big.NewInt(10)
	mask := new(big.Int).Sub(new(big.Int).Lsh(big.NewInt(1), 64), big.NewInt(1))
	d := new(big.Int)
	for e := -pow10Range; e <= pow10Range; e++ {
		p := new(big.Int).Exp(ten, big.NewInt(int64(abs(e))), nil)
		l := p.BitLen() // 2^(l-1) <= p < 2^l
		switch {
		case e >= 0 && l <= 128:
			d.Lsh(p, uint(128-l)) // p * 2^(128-l) is in [2^127, 2^128)
		case e >= 0:
			d.Rsh(p, uint(l-128))
		default:
			// 2^(127+l) / p is in (2^127, 2^128) when p is not a power of 2.
			d.Quo(new(big.Int).Lsh(big.NewInt(1), uint(127+l)), p)
		}
		lo := new(big.Int).And(d, mask).Uint64()
		hi := new(big.Int).Rsh(d, 64).Uint64()
		pow10Table[e+pow10Range] = [2]uint64{hi, lo}
	}
}

func abs(e int) int {
	if e < 0 {
		return -e
	}
	return e
}

// eiselLemire converts man * 10^exp10 (man > 0) to the nearest float64,
// or reports false when it cannot decide (a half-way case, or out of its
// range). The steps and their names are those of Go's strconv
// (atofeisel.go), after Lemire (2021).
func eiselLemire(man uint64, exp10 int, neg bool) (float64, bool) {
	if exp10 < -pow10Range || exp10 > pow10Range {
		return 0, false
	}
	pow10Once.Do(makePow10Table)
	pow := pow10Table[exp10+pow10Range]
	const bias = 1023              // of float64 exponents
	exp2 := 1 + (exp10*108853)>>15 // 1 + floor(exp10 * log2(10)), exact for |exp10| <= 500
	// Normalization.
	clz := bits.LeadingZeros64(man)
	man <<= uint(clz)
	retExp2 := uint64(exp2+63+bias) - uint64(clz)
	// Multiplication.
	xHi, xLo := bits.Mul64(man, pow[0])
	// Wider approximation.
	if xHi&0x1FF == 0x1FF && xLo+man < man {
		yHi, yLo := bits.Mul64(man, pow[1])
		mergedHi, mergedLo := xHi, xLo+yHi
		if mergedLo < xLo {
			mergedHi++
		}
		if mergedHi&0x1FF == 0x1FF && mergedLo+1 == 0 && yLo+man < man {
			return 0, false
		}
		xHi, xLo = mergedHi, mergedLo
	}
	// Shifting to 54 bits.
	msb := xHi >> 63
	retMantissa := xHi >> (msb + 9)
	retExp2 -= 1 ^ msb
	// Half-way ambiguity.
	if xLo == 0 && xHi&0x1FF == 0 && retMantissa&3 == 1 {
		return 0, false
	}
	// From 54 to 53 bits.
	retMantissa += retMantissa & 1
	retMantissa >>= 1
	if retMantissa>>53 > 0 {
		retMantissa >>= 1
		retExp2++
	}
	// Subnormal, infinite or NaN results are left to strconv.
	if retExp2-1 >= 0x7FF-1 {
		return 0, false
	}
	b := retExp2<<52 | retMantissa&(1<<52-1)
	if neg {
		b |= 1 << 63
	}
	return math.Float64frombits(b), true
}

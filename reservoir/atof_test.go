package reservoir

import (
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"
)

// TestParseDecimal holds parseDecimal to strconv.ParseFloat (the
// reference), bit for bit, on every value it accepts: random float64s
// written by strconv in its shortest form and with 1 to 19 digits in the
// 'e', 'f' and 'g' formats, random digit strings with a point anywhere
// and an exponent, the values near powers of ten and half-way between two
// float64s, signed zeros, and forms it must leave to strconv.
func TestParseDecimal(t *testing.T) {
	rng := rand.New(rand.NewPCG(19, 1))
	accepted, total := 0, 0
	check := func(s string) {
		t.Helper()
		total++
		got, ok := parseDecimal(s)
		want, err := strconv.ParseFloat(s, 64)
		if !ok {
			return
		}
		accepted++
		if err != nil {
			t.Fatalf("%q: parseDecimal gave %v, strconv refuses it (%v)", s, got, err)
		}
		if math.Float64bits(got) != math.Float64bits(want) {
			t.Fatalf("%q: parseDecimal %v (%#x), strconv %v (%#x)", s, got, math.Float64bits(got), want, math.Float64bits(want))
		}
	}
	for n := 0; n < 300000; n++ {
		// A float64 over a wide range of magnitudes.
		v := math.Ldexp(rng.Float64()+0.5, rng.IntN(440)-220)
		if rng.IntN(2) == 0 {
			v = -v
		}
		check(strconv.FormatFloat(v, 'g', -1, 64))
		prec := 1 + rng.IntN(19)
		check(strconv.FormatFloat(v, 'e', prec-1, 64))
		check(strconv.FormatFloat(v, 'g', prec, 64))
		check(strconv.FormatFloat(v, 'f', rng.IntN(20), 64))
		// Half-way between v and the next float64, to 19 digits.
		h := v + (math.Nextafter(v, math.Inf(1))-v)/2
		check(strconv.FormatFloat(h, 'e', 18, 64))
		// Random digits with a point anywhere and an exponent.
		var sb strings.Builder
		if rng.IntN(3) == 0 {
			sb.WriteByte("+-"[rng.IntN(2)])
		}
		nd := 1 + rng.IntN(21)
		pt := rng.IntN(nd + 1)
		for i := 0; i < nd; i++ {
			if i == pt {
				sb.WriteByte('.')
			}
			sb.WriteByte(byte('0' + rng.IntN(10)))
		}
		if rng.IntN(2) == 0 {
			sb.WriteString("eE"[rng.IntN(2):][:1] + strconv.Itoa(rng.IntN(140)-70))
		}
		check(sb.String())
	}
	// Powers of ten, their neighbours, zeros and the range ends.
	for e := -pow10Range - 2; e <= pow10Range+2; e++ {
		for _, m := range []string{"1", "9999999999999999999", "4503599627370497", "9007199254740993", "5"} {
			check(m + "e" + strconv.Itoa(e))
		}
	}
	for _, s := range []string{"0", "-0", "+0", "0.000", "-0.0e5", ".5", "5.", "00012.5000", "1e-0", "-9999", "0.1", "2.2250738585072014e-308",
		"1.7976931348623157e308", "4.9e-324"} {
		check(s)
	}
	// Forms left to strconv (which parses or refuses them).
	for _, s := range []string{"", "-", ".", "e5", "1e", "1e+", "1e12345", "NaN", "inf", "-Inf", "0x1p-2", "1_000", "1.2.3", "1,5",
		"12345678901234567890", "1e-400", "1e400", "3 "} {
		if _, ok := parseDecimal(s); ok {
			t.Errorf("%q: parseDecimal accepted it", s)
		}
	}
	if got, ok := parseDecimal("-0"); !ok || !math.Signbit(got) {
		t.Errorf("-0: got %v, %v; want negative zero", got, ok)
	}
	// Every value of the kind a map holds is taken by the fast path:
	// magnitudes from 1e-10 to 1e10 in the shortest form or to 7 digits.
	for n := 0; n < 100000; n++ {
		v := math.Pow(10, 20*rng.Float64()-10)
		for _, s := range []string{strconv.FormatFloat(v, 'g', -1, 64), strconv.FormatFloat(-v, 'g', 7, 64)} {
			if _, ok := parseDecimal(s); !ok {
				t.Fatalf("%q: left to strconv", s)
			}
			check(s)
		}
	}
	t.Logf("%d of %d strings parsed by parseDecimal, all equal to strconv.ParseFloat", accepted, total)
}

package reservoir

import (
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"sync/atomic"
	"testing"
	"unsafe"

	"floodtrace/internal/parallel"
)

// The reader of map rows before the value counts moved into the parallel
// pass (kept as the reference of TestReadRowsSameAsBefore): the shape of
// every row is checked in file order, then the values parsed in bands.

// readRowsSerialRef is readRows as it was.
func readRowsSerialRef(lr *lineReader, nx, ny int, nodata float64, hasNoData bool, what string) ([]float64, error) {
	var first []string // a row the header reader pushed back
	if lr.pending != nil {
		first, _ = lr.next()
	}
	var arena []byte // the text of the rows after first
	var ends []int   // end of each row in arena
	var shapeErr error
	rows := 0
	if first != nil {
		rows = 1
		if len(first) != nx {
			shapeErr = &InputError{Path: lr.name, Line: lr.line, Msg: fmt.Sprintf("row %d has %d values; expected %d", 1, len(first), nx)}
		}
	}
	for shapeErr == nil {
		b, err := lr.nextLine()
		if err != nil {
			shapeErr = err
			break
		}
		if b == nil {
			break
		}
		nf, msg := countFieldsRef(b)
		if msg != "" {
			shapeErr = &InputError{Path: lr.name, Line: lr.line, Msg: msg}
			break
		}
		rows++
		if rows > ny {
			shapeErr = &InputError{Path: lr.name, Line: lr.line, Msg: fmt.Sprintf("more than %d rows; expected %d (%s)", ny, ny, what)}
			break
		}
		if nf != nx {
			shapeErr = &InputError{Path: lr.name, Line: lr.line, Msg: fmt.Sprintf("row %d has %d values; expected %d", rows, nf, nx)}
			break
		}
		if arena == nil {
			// Room for the rows still expected if they are like this one
			// (at most 256 MiB up front: a header may overstate them).
			expect := min(ny-rows+1, (256<<20)/(len(b)+len(b)/8))
			arena = make([]byte, 0, expect*(len(b)+len(b)/8))
			ends = make([]int, 0, expect)
		}
		arena = append(arena, b...)
		ends = append(ends, len(arena))
	}
	nfirst := 0
	if first != nil && len(first) == nx {
		nfirst = 1
	}
	nrows := nfirst + len(ends)
	vals := make([]float64, nrows*nx)
	// Row r (north first) goes to j = ny-1-r when the file is complete;
	// otherwise the values are dropped anyway.
	dst := func(r int) []float64 {
		if nrows == ny {
			return vals[(ny-1-r)*nx : (ny-r)*nx]
		}
		return vals[r*nx : (r+1)*nx]
	}
	if nfirst == 1 {
		out := dst(0)
		for c, tok := range first {
			v, msg := parseValue(tok, nodata, hasNoData)
			if msg != "" {
				return nil, &InputError{Path: lr.name, Row: 1, Col: c + 1, Msg: msg}
			}
			out[c] = v
		}
	}
	if err := parseRowsRef(arena, ends, func(r int) []float64 { return dst(nfirst + r) }, nodata, hasNoData, func(r, col int, msg string) error {
		return &InputError{Path: lr.name, Row: nfirst + r + 1, Col: col, Msg: msg}
	}); err != nil {
		return nil, err
	}
	if shapeErr != nil {
		return nil, shapeErr
	}
	if rows < ny {
		return nil, &InputError{Path: lr.name, Msg: fmt.Sprintf("only %d rows; expected %d (%s)", rows, ny, what)}
	}
	return vals, nil
}

// parseRowsParallel parses rows arena[ends[r-1]:ends[r]] (each already
// known to hold the right number of values) into dst(r), in bands of rows
// on up to GOMAXPROCS goroutines. On bad values it returns fail for the
// first one in row order.
func parseRowsRef(arena []byte, ends []int, dst func(r int) []float64, nodata float64, hasNoData bool, fail func(r, col int, msg string) error) error {
	n := len(ends)
	if n == 0 {
		return nil
	}
	const band = 16
	nb := (n + band - 1) / band
	type bad struct {
		row, col int
		msg      string
	}
	errs := make([]bad, nb)
	parseRow := func(r int) (int, string) {
		lo := 0
		if r > 0 {
			lo = ends[r-1]
		}
		line := arena[lo:ends[r]]
		out := dst(r)
		if bytes.IndexByte(line, ',') >= 0 || !isASCII(line) {
			f, _ := splitFields(string(line))
			for c, tok := range f {
				v, msg := parseValue(tok, nodata, hasNoData)
				if msg != "" {
					return c + 1, msg
				}
				out[c] = v
			}
			return 0, ""
		}
		c := 0
		for i := 0; i < len(line); {
			for i < len(line) && asciiSpace(line[i]) {
				i++
			}
			j := i
			for j < len(line) && !asciiSpace(line[j]) {
				j++
			}
			if j == i {
				break
			}
			// The token is only read during the call: no copy needed.
			v, msg := parseValue(unsafe.String(&line[i], j-i), nodata, hasNoData)
			if msg != "" {
				return c + 1, msg
			}
			out[c] = v
			c++
			i = j
		}
		return 0, ""
	}
	var stop atomic.Int64 // lowest band with an error, plus one (0: none)
	parallel.Each(nb, 0, 1, func(_, b int) {
		if s := stop.Load(); s > 0 && int(s) <= b {
			return // an earlier band already failed
		}
		for r := b * band; r < min((b+1)*band, n); r++ {
			if col, msg := parseRow(r); msg != "" {
				errs[b] = bad{r, col, msg}
				for {
					s := stop.Load()
					if (s > 0 && int(s) <= b+1) || stop.CompareAndSwap(s, int64(b+1)) {
						break
					}
				}
				break
			}
		}
	})
	for _, e := range errs {
		if e.msg != "" {
			return fail(e.row, e.col, e.msg)
		}
	}
	return nil
}

// countFieldsRef is countFields as it was.
func countFieldsRef(b []byte) (int, string) {
	if bytes.IndexByte(b, ',') >= 0 || !isASCII(b) {
		f, msg := splitFields(string(b))
		return len(f), msg
	}
	n, in := 0, false
	for _, c := range b {
		sp := asciiSpace(c)
		if !sp && !in {
			n++
		}
		in = !sp
	}
	return n, ""
}

// TestReadRowsSameAsBefore: the reader with the counts in the parallel
// pass gives the same values and the same error (message, line, row and
// column) as the reader that checked every row's shape in file order
// first, on random small grids with random defects: rows too short or too
// long, bad and non-finite values, NODATA, commas and empty values between
// them, non-ASCII white space, blank lines, too many and too few rows.
func TestReadRowsSameAsBefore(t *testing.T) {
	rng := rand.New(rand.NewPCG(19, 19))
	tokens := []string{"1", "-2.5", "3e2", "0.1234567890123456", "-9999", "x", "NaN", "inf", "1e999", "7", "8", "9"}
	seps := []string{" ", " ", " ", "\t", "  ", ", ", ",", ",,", "\u00a0", "\u2003"}
	differ, failed := 0, map[string]int{}
	for trial := 0; trial < 20000; trial++ {
		nx, ny := 1+rng.IntN(5), 1+rng.IntN(5)
		defects := rng.IntN(3)
		var sb strings.Builder
		rows := ny
		if defects > 0 && rng.IntN(4) == 0 {
			rows += rng.IntN(3) - 1
		}
		sep := " "
		if defects > 0 && rng.IntN(3) == 0 {
			sep = seps[rng.IntN(len(seps))]
		}
		for r := 0; r < rows; r++ {
			n := nx
			if defects > 0 && rng.IntN(6) == 0 {
				n += rng.IntN(3) - 1
			}
			if defects > 0 && rng.IntN(8) == 0 {
				sb.WriteString("\n")
			}
			for c := 0; c < n; c++ {
				if c > 0 {
					sb.WriteString(sep)
				}
				tok := tokens[rng.IntN(4)]
				if defects > 0 && rng.IntN(10) == 0 {
					tok = tokens[rng.IntN(len(tokens))]
				}
				sb.WriteString(tok)
			}
			sb.WriteString("\n")
		}
		text := sb.String()
		hasNoData := rng.IntN(2) == 0
		read := func(f func(*lineReader, int, int, float64, bool, string) ([]float64, error)) ([]float64, string) {
			lr := newLineReader(strings.NewReader(text), "m.txt", true)
			v, err := f(lr, nx, ny, -9999, hasNoData, "ny")
			if err != nil {
				return nil, err.Error()
			}
			return v, ""
		}
		want, wantErr := read(readRowsSerialRef)
		got, gotErr := read(readRows)
		if wantErr != "" {
			// The kind of defect: the message without its numbers.
			kind := strings.Map(func(r rune) rune {
				if r >= '0' && r <= '9' {
					return -1
				}
				return r
			}, wantErr)
			failed[kind[:min(len(kind), 30)]]++
		}
		if gotErr != wantErr || len(got) != len(want) {
			differ++
			if differ <= 5 {
				t.Errorf("%d x %d, %q:\nbefore %q (%d values)\nnow    %q (%d values)", nx, ny, text, wantErr, len(want), gotErr, len(got))
			}
			continue
		}
		for k := range want {
			if !(got[k] == want[k] || math.IsNaN(got[k]) && math.IsNaN(want[k])) {
				t.Fatalf("%q: value %d is %v, was %v", text, k, got[k], want[k])
			}
		}
	}
	if differ > 0 {
		t.Errorf("%d of 20000 inputs read differently", differ)
	}
	n := 0
	for _, c := range failed {
		n += c
	}
	// Both readers must have been exercised on errors and on good files.
	if n < 4000 || n > 16000 || len(failed) < 6 {
		t.Errorf("%d of 20000 inputs refused, %d kinds of defect: %v", n, len(failed), failed)
	}
	t.Logf("%d refused; %v", n, failed)
}

// TestReadRowsSameAsBeforeLarge: the same on grids of many bands, with one
// defect placed at random.
func TestReadRowsSameAsBeforeLarge(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 19))
	for trial := 0; trial < 200; trial++ {
		nx, ny := 1+rng.IntN(40), 1+rng.IntN(200)
		lines := make([]string, ny)
		for r := range lines {
			f := make([]string, nx)
			for c := range f {
				f[c] = fmt.Sprintf("%.6g", rng.Float64()*100)
			}
			lines[r] = strings.Join(f, " ")
		}
		for d := rng.IntN(3); d > 0; d-- {
			r := rng.IntN(ny)
			switch rng.IntN(3) {
			case 0:
				lines[r] += " 1"
			case 1:
				lines[r] = strings.Replace(lines[r], " ", " bad ", 1)
			case 2:
				lines[r] = strings.Replace(lines[r], " ", ",", 1)
			}
		}
		text := strings.Join(lines, "\n") + "\n"
		var res [2]string
		var vals [2][]float64
		for i, f := range []func(*lineReader, int, int, float64, bool, string) ([]float64, error){readRowsSerialRef, readRows} {
			v, err := f(newLineReader(strings.NewReader(text), "m.txt", false), nx, ny, 0, false, "nrows")
			if err != nil {
				res[i] = err.Error()
			}
			vals[i] = v
		}
		if res[0] != res[1] || len(vals[0]) != len(vals[1]) {
			t.Fatalf("%d x %d: before %q, now %q", nx, ny, res[0], res[1])
		}
		for k := range vals[0] {
			if vals[0][k] != vals[1][k] {
				t.Fatalf("%d x %d: value %d differs", nx, ny, k)
			}
		}
	}
}

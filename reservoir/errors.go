package reservoir

import (
	"errors"
	"fmt"
	"strconv"
	"strings"

	"floodtrace/internal/yamldoc"
)

// InputError is a problem with an input file: the case file, a map or a
// relative permeability table. Path names the file as the user gave it
// (map paths joined to the directory of the case file). Line is the line in
// that file (0 if unknown). Row and Col are the 1-based row (counted from
// the top of the file, that is from the north) and column of a value in a
// map file, 0 when the problem is not one value. Err, if set, is the
// underlying cause (for example fs.ErrNotExist or ErrTooLarge).
type InputError struct {
	Path     string
	Line     int
	Row, Col int
	Msg      string
	Err      error
}

// Error prints "path:line: msg", "path: row R, column C: msg" or
// "path: msg" (a line and a row together print as "path:line: row R, ...").
func (e *InputError) Error() string {
	var b strings.Builder
	b.WriteString(e.Path)
	if e.Line > 0 {
		b.WriteString(":")
		b.WriteString(strconv.Itoa(e.Line))
	}
	b.WriteString(": ")
	switch {
	case e.Row > 0 && e.Col > 0:
		fmt.Fprintf(&b, "row %d, column %d: ", e.Row, e.Col)
	case e.Row > 0:
		fmt.Fprintf(&b, "row %d: ", e.Row)
	}
	b.WriteString(e.Msg)
	return b.String()
}

// Unwrap returns the underlying cause.
func (e *InputError) Unwrap() error { return e.Err }

// ErrTooLarge is wrapped by the errors that refuse a grid or a file too
// large to load.
var ErrTooLarge = errors.New("too large")

// ErrorList is several input problems found in one pass. Error prints one
// per line; errors.As and errors.Is look into every element.
type ErrorList []error

// Error prints the problems, one per line.
func (l ErrorList) Error() string {
	s := make([]string, len(l))
	for i, e := range l {
		s[i] = e.Error()
	}
	return strings.Join(s, "\n")
}

// Unwrap returns the problems.
func (l ErrorList) Unwrap() []error { return l }

// maxReported is the number of problems reported by one pass; further ones
// are summarised in a count.
const maxReported = 20

// collector gathers problems up to maxReported.
type collector struct {
	errs    []error
	dropped int
}

func (c *collector) add(err error) {
	if err == nil {
		return
	}
	if len(c.errs) >= maxReported {
		c.dropped++
		return
	}
	c.errs = append(c.errs, err)
}

func (c *collector) ok() bool { return len(c.errs) == 0 }

// err returns nil, the single problem, or an ErrorList.
func (c *collector) err() error {
	switch {
	case len(c.errs) == 0:
		return nil
	case len(c.errs) == 1 && c.dropped == 0:
		return c.errs[0]
	}
	l := ErrorList(append([]error(nil), c.errs...))
	if c.dropped > 0 {
		l = append(l, fmt.Errorf("... and %d more problems", c.dropped))
	}
	return l
}

// Nearest returns the candidate closest to s by edit distance (Levenshtein
// 1966, compared in lower case; ties go to the earlier candidate), and
// whether it is close enough to suggest: at most 2 edits, or half the
// length of the longer word. The command line and the screening spec use
// it for their suggestions too.
func Nearest(s string, candidates []string) (string, bool) { return nearest(s, candidates) }

func nearest(s string, candidates []string) (string, bool) { return yamldoc.Nearest(s, candidates) }

package yamldoc

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"regexp"
	"slices"
	"strconv"
	"strings"

	"gopkg.in/yaml.v3"
)

// MaxAliasDepth bounds how many aliases Deref follows, so alias loops
// cannot hang a reader.
const MaxAliasDepth = 100

// ParseError is a problem found while parsing: the 1-based line (0 when
// unknown) and what is wrong. Empty and Multiple tell the two structural
// problems apart from syntax errors, so callers can name their file kind.
type ParseError struct {
	Line     int
	Msg      string
	Empty    bool // no document (or only null)
	Multiple bool // a second document follows the first
	Err      error
}

// Error returns the message with its line.
func (e *ParseError) Error() string {
	if e.Line > 0 {
		return fmt.Sprintf("line %d: %s", e.Line, e.Msg)
	}
	return e.Msg
}

// Unwrap returns the YAML parser's error, if any.
func (e *ParseError) Unwrap() error { return e.Err }

var (
	lineRE   = regexp.MustCompile(`^yaml: line (\d+): (.*)$`)
	anchorRE = regexp.MustCompile(`unknown anchor '([^']*)' referenced`)
)

// Parse returns the root node of the single YAML document in data. A
// syntax error gets its line and a hint where one helps (tabs in the
// indentation); a panic of the YAML parser becomes an error.
func Parse(data []byte) (root *yaml.Node, perr *ParseError) {
	defer func() {
		if r := recover(); r != nil {
			root, perr = nil, &ParseError{Msg: fmt.Sprintf("YAML parser failed: %v", r)}
		}
	}()
	if len(bytes.TrimSpace(data)) == 0 {
		return nil, &ParseError{Msg: "empty", Empty: true}
	}
	dec := yaml.NewDecoder(bytes.NewReader(data))
	var doc yaml.Node
	if err := dec.Decode(&doc); err != nil {
		if errors.Is(err, io.EOF) {
			return nil, &ParseError{Msg: "empty", Empty: true}
		}
		return nil, syntaxError(err, data)
	}
	var extra yaml.Node
	if err := dec.Decode(&extra); err == nil {
		return nil, &ParseError{Line: extra.Line, Msg: "more than one YAML document (a second '---')", Multiple: true}
	} else if !errors.Is(err, io.EOF) {
		return nil, syntaxError(err, data)
	}
	if len(doc.Content) == 0 || IsNull(doc.Content[0]) {
		return nil, &ParseError{Msg: "empty", Empty: true}
	}
	return doc.Content[0], nil
}

// syntaxError turns a YAML parser error into a ParseError with the line.
func syntaxError(err error, data []byte) *ParseError {
	msg := err.Error()
	if m := lineRE.FindStringSubmatch(msg); m != nil {
		line, _ := strconv.Atoi(m[1])
		text := m[2]
		switch {
		case strings.HasPrefix(text, "did not find expected"):
			line++ // yaml.v3 reports these zero-based
		case strings.Contains(text, "tab character"):
			if l := lineWhere(data, tabIndented); l > 0 {
				line = l
			}
			text += " (indent with spaces, not tabs)"
		case strings.Contains(text, "cannot start any token"):
			if lines := strings.Split(string(data), "\n"); line >= 1 && line <= len(lines) && tabIndented(lines[line-1]) {
				text += " (a tab: indent with spaces, not tabs)"
			}
		}
		return &ParseError{Line: line, Msg: "YAML syntax: " + text, Err: err}
	}
	if m := anchorRE.FindStringSubmatch(msg); m != nil {
		line := lineWhere(data, func(s string) bool { return strings.Contains(s, "*"+m[1]) })
		return &ParseError{Line: line, Msg: fmt.Sprintf("YAML syntax: unknown anchor %q referenced", m[1]), Err: err}
	}
	return &ParseError{Msg: "YAML syntax: " + strings.TrimPrefix(msg, "yaml: "), Err: err}
}

// tabIndented reports whether the indentation of line s holds a tab.
func tabIndented(s string) bool {
	return strings.Contains(s[:len(s)-len(strings.TrimLeft(s, " \t"))], "\t")
}

// lineWhere returns the 1-based number of the first line of data for
// which match is true, or 0.
func lineWhere(data []byte, match func(string) bool) int {
	for i, l := range strings.Split(string(data), "\n") {
		if match(l) {
			return i + 1
		}
	}
	return 0
}

// Deref follows aliases (at most MaxAliasDepth).
func Deref(n *yaml.Node) *yaml.Node {
	for i := 0; n != nil && n.Kind == yaml.AliasNode && i < MaxAliasDepth; i++ {
		n = n.Alias
	}
	return n
}

// IsNull reports whether n is a YAML null (an empty value, ~ or null).
func IsNull(n *yaml.Node) bool {
	return n != nil && n.Kind == yaml.ScalarNode && n.Tag == "!!null"
}

// Describe names what a node holds, for messages: "a mapping", "a list",
// "nothing", or the scalar quoted (cut at 40 characters).
func Describe(n *yaml.Node) string {
	switch {
	case n == nil:
		return "nothing"
	case n.Kind == yaml.MappingNode:
		return "a mapping"
	case n.Kind == yaml.SequenceNode:
		return "a list"
	case n.Kind == yaml.ScalarNode:
		if IsNull(n) {
			return "nothing"
		}
		v := n.Value
		if len(v) > 40 {
			v = v[:40] + "..."
		}
		return fmt.Sprintf("%q", v)
	}
	return "something else"
}

// Number reads a scalar as a finite number (see the package comment for
// the accepted forms). msg is "" for a number, otherwise a phrase such as
// "has no value; expected a number" to follow the key's name.
func Number(n *yaml.Node) (v float64, msg string) {
	n = Deref(n)
	if n == nil || IsNull(n) {
		return 0, "has no value; expected a number"
	}
	if n.Kind != yaml.ScalarNode {
		return 0, "must be a number, found " + Describe(n)
	}
	switch n.Tag {
	case "!!int", "!!float", "!!str":
	default:
		return 0, "must be a number, found " + Describe(n)
	}
	text := strings.TrimSpace(n.Value)
	v, err := strconv.ParseFloat(strings.ReplaceAll(text, "_", ""), 64)
	if err != nil {
		var ne *strconv.NumError
		if errors.As(err, &ne) && errors.Is(ne.Err, strconv.ErrRange) {
			return 0, fmt.Sprintf("%q is out of range", n.Value)
		}
		// Integers in other bases: 0x1f, 0o17, 0b101.
		if i, err := strconv.ParseInt(strings.ReplaceAll(text, "_", ""), 0, 64); err == nil {
			return float64(i), ""
		}
		if n.Tag == "!!float" {
			return 0, fmt.Sprintf("%q is not a finite number", n.Value)
		}
		return 0, "must be a number, found " + Describe(n)
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Sprintf("%q is not a finite number", n.Value)
	}
	return v, ""
}

// Map is a checked mapping: its value and key nodes by key (aliases
// followed).
type Map struct {
	Node *yaml.Node
	Vals map[string]*yaml.Node
	Keys map[string]*yaml.Node
}

// Has reports whether the mapping gives key with a value (not null).
func (m *Map) Has(key string) bool {
	if m == nil {
		return false
	}
	v, ok := m.Vals[key]
	return ok && !IsNull(v)
}

// Given reports whether key is written at all (perhaps with no value).
func (m *Map) Given(key string) bool {
	if m == nil {
		return false
	}
	_, ok := m.Vals[key]
	return ok
}

// ProblemKind says what is wrong with a mapping.
type ProblemKind int

// The problems Mapping finds.
const (
	NotMapping   ProblemKind = iota // the node is not a mapping (Node is it)
	BadKey                          // a key is not a plain scalar
	UnknownKey                      // Key is not allowed here; Suggest is the nearest allowed key
	DuplicateKey                    // Key is given twice; FirstLine is the first
	MissingKey                      // a required Key is absent (Node is the mapping)
)

// Problem is one problem of a mapping, at Node's line.
type Problem struct {
	Kind      ProblemKind
	Node      *yaml.Node
	Key       string
	Suggest   string // for UnknownKey: the nearest allowed key ("" if none is close)
	FirstLine int    // for DuplicateKey
}

// Mapping checks that n is a mapping whose keys are all in allowed, given
// once each, and that every required key is present. It returns the map
// (nil when n is not a mapping) and the problems in the order of the
// file; keys with a problem are left out of the map.
func Mapping(n *yaml.Node, allowed, required []string) (*Map, []Problem) {
	n = Deref(n)
	if n == nil || n.Kind != yaml.MappingNode {
		return nil, []Problem{{Kind: NotMapping, Node: n}}
	}
	m := &Map{Node: n, Vals: map[string]*yaml.Node{}, Keys: map[string]*yaml.Node{}}
	var probs []Problem
	for i := 0; i+1 < len(n.Content); i += 2 {
		kn, vn := Deref(n.Content[i]), Deref(n.Content[i+1])
		if kn == nil || kn.Kind != yaml.ScalarNode {
			probs = append(probs, Problem{Kind: BadKey, Node: n.Content[i]})
			continue
		}
		key := kn.Value
		if !slices.Contains(allowed, key) {
			sug, ok := Nearest(key, allowed)
			if !ok {
				sug = ""
			}
			probs = append(probs, Problem{Kind: UnknownKey, Node: kn, Key: key, Suggest: sug})
			continue
		}
		if prev, dup := m.Keys[key]; dup {
			probs = append(probs, Problem{Kind: DuplicateKey, Node: kn, Key: key, FirstLine: prev.Line})
			continue
		}
		m.Keys[key], m.Vals[key] = kn, vn
	}
	for _, k := range required {
		if _, ok := m.Vals[k]; !ok {
			probs = append(probs, Problem{Kind: MissingKey, Node: n, Key: k})
		}
	}
	return m, probs
}

// Nearest returns the candidate closest to s by edit distance (ignoring
// case; of equally distant ones, the one sharing the longest beginning
// with s, so an abbreviation finds its word), and whether it is close
// enough to suggest: within half the longer word's length, and at least 2.
func Nearest(s string, candidates []string) (string, bool) {
	best, bestD, bestP := "", -1, 0
	ls := strings.ToLower(s)
	for _, c := range candidates {
		lc := strings.ToLower(c)
		d := levenshtein(ls, lc)
		p := commonPrefix(ls, lc)
		if bestD < 0 || d < bestD || (d == bestD && p > bestP) {
			best, bestD, bestP = c, d, p
		}
	}
	if bestD < 0 {
		return "", false
	}
	limit := max(2, max(len(s), len(best))/2)
	return best, bestD <= limit
}
func levenshtein(a, b string) int {
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			cost := 1
			if a[i-1] == b[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
		}
		prev, cur = cur, prev
	}
	return prev[len(b)]
}

// commonPrefix returns the length of the longest common beginning of a
// and b, in bytes.
func commonPrefix(a, b string) int {
	n := 0
	for n < len(a) && n < len(b) && a[n] == b[n] {
		n++
	}
	return n
}

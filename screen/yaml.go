package screen

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"gopkg.in/yaml.v3"

	"floodtrace/internal/yamldoc"
)

// SpecError is a problem with a screening spec: the file, the line (0 if
// unknown) and what is wrong.
type SpecError struct {
	Path string
	Line int
	Msg  string
	Err  error // underlying cause, if any
}

// Error prints "path:line: msg" (or "path: msg" without a line).
func (e *SpecError) Error() string {
	if e.Line > 0 {
		return e.Path + ":" + strconv.Itoa(e.Line) + ": " + e.Msg
	}
	return e.Path + ": " + e.Msg
}

// Unwrap returns the underlying cause.
func (e *SpecError) Unwrap() error { return e.Err }

// yparser walks the YAML tree of a spec and turns problems into
// SpecErrors naming the line. It stops at the first problem: err is
// sticky and later calls do nothing.
type yparser struct {
	path string
	err  error
}

func (p *yparser) failf(n *yaml.Node, format string, a ...any) {
	if p.err != nil {
		return
	}
	line := 0
	if n != nil {
		line = n.Line
	}
	p.err = &SpecError{Path: p.path, Line: line, Msg: fmt.Sprintf(format, a...)}
}

func (p *yparser) ok() bool { return p.err == nil }

// ymap is a checked YAML mapping: its values and key nodes by name.
type ymap struct {
	where string // "value", "candidates.infill", "layouts[2].wells[1]"
	node  *yaml.Node
	vals  map[string]*yaml.Node
	keys  map[string]*yaml.Node
	m     *yamldoc.Map
}

// has reports whether key is written; the readers refuse a key written
// with no value ("has no value"), as case files do (internal/yamldoc).
func (m *ymap) has(k string) bool {
	if m == nil {
		return false
	}
	return m.m.Given(k)
}

func (m *ymap) label(k string) string {
	if m.where == "" {
		return k
	}
	return m.where + "." + k
}

// mapping checks that n is a mapping whose keys are all allowed (an
// unknown key is reported with its line and the nearest allowed key) and
// that the required ones are present.
func (p *yparser) mapping(n *yaml.Node, where string, allowed, required []string) *ymap {
	n = yamldoc.Deref(n)
	if !p.ok() || n == nil {
		return nil
	}
	name := where
	if name == "" {
		name = "the spec"
	}
	ym, probs := yamldoc.Mapping(n, allowed, required)
	for _, pr := range probs {
		switch pr.Kind {
		case yamldoc.NotMapping:
			p.failf(n, "%s must be a mapping (key: value lines), found %s", name, yamldoc.Describe(n))
		case yamldoc.BadKey:
			p.failf(pr.Node, "%s: a key must be a plain name, found %s", name, yamldoc.Describe(yamldoc.Deref(pr.Node)))
		case yamldoc.UnknownKey:
			if pr.Suggest != "" {
				p.failf(pr.Node, "unknown key %q in %s; did you mean %q? (allowed: %s)", pr.Key, name, pr.Suggest, strings.Join(allowed, ", "))
			} else {
				p.failf(pr.Node, "unknown key %q in %s (allowed: %s)", pr.Key, name, strings.Join(allowed, ", "))
			}
		case yamldoc.DuplicateKey:
			p.failf(pr.Node, "key %q appears twice in %s (first on line %d)", pr.Key, name, pr.FirstLine)
		case yamldoc.MissingKey:
			p.failf(n, "%s: missing key %q", name, pr.Key)
		}
		return nil
	}
	return &ymap{where: where, node: n, vals: ym.Vals, keys: ym.Keys, m: ym}
}

// number reads a finite number; check returns "" or what is wrong.
func (p *yparser) number(m *ymap, key string, def float64, check func(float64) string) float64 {
	if !p.ok() || !m.has(key) {
		return def
	}
	n := m.vals[key]
	v, msg := yamldoc.Number(n)
	if msg == "" && check != nil {
		msg = check(v)
	}
	if msg != "" {
		p.failf(n, "%s %s", m.label(key), msg)
		return def
	}
	return v
}

func (p *yparser) integer(m *ymap, key string, def, lo, hi int) int {
	if !p.ok() || !m.has(key) {
		return def
	}
	n := m.vals[key]
	v, msg := yamldoc.Number(n)
	if msg == "" && v != math.Trunc(v) {
		msg = "must be a whole number, found " + yamldoc.Describe(n)
	}
	if msg == "" && (v < float64(lo) || v > float64(hi)) {
		msg = fmt.Sprintf("= %s is outside [%d, %d]", n.Value, lo, hi)
	}
	if msg != "" {
		p.failf(n, "%s %s", m.label(key), msg)
		return def
	}
	return int(v)
}

func (p *yparser) str(m *ymap, key string) string {
	if !p.ok() || !m.has(key) {
		return ""
	}
	n := m.vals[key]
	if yamldoc.IsNull(n) {
		p.failf(m.keys[key], "%s has no value; expected text", m.label(key))
		return ""
	}
	if n.Kind != yaml.ScalarNode {
		p.failf(n, "%s must be text, found %s", m.label(key), yamldoc.Describe(n))
		return ""
	}
	return strings.TrimSpace(n.Value)
}

// pair reads [a, b].
func (p *yparser) pair(m *ymap, key string, def [2]float64, check func(float64) string) [2]float64 {
	if !p.ok() || !m.has(key) {
		return def
	}
	n := m.vals[key]
	if n.Kind != yaml.SequenceNode || len(n.Content) != 2 {
		p.failf(n, "%s must be a pair [a, b], found %s", m.label(key), yamldoc.Describe(n))
		return def
	}
	var out [2]float64
	for i, c := range n.Content {
		c = yamldoc.Deref(c)
		v, msg := yamldoc.Number(c)
		if msg == "" && check != nil {
			msg = check(v)
		}
		if msg != "" {
			p.failf(c, "%s[%d] %s", m.label(key), i+1, msg)
			return def
		}
		out[i] = v
	}
	return out
}

// list returns the items of a sequence (a single non-list value is an
// error).
func (p *yparser) list(m *ymap, key string) []*yaml.Node {
	if !p.ok() || !m.has(key) {
		return nil
	}
	n := m.vals[key]
	if n.Kind != yaml.SequenceNode {
		p.failf(n, "%s must be a list, found %s", m.label(key), yamldoc.Describe(n))
		return nil
	}
	out := make([]*yaml.Node, len(n.Content))
	for i, c := range n.Content {
		out[i] = yamldoc.Deref(c)
	}
	return out
}

func positive(v float64) string {
	if v > 0 {
		return ""
	}
	return fmt.Sprintf("= %g must be positive", v)
}

func nonNegative(v float64) string {
	if v >= 0 {
		return ""
	}
	return fmt.Sprintf("= %g must not be negative", v)
}

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

// nearest returns the element of list closest to s (yamldoc.Nearest),
// whether or not it is close.
func nearest(s string, list []string) string {
	best, _ := yamldoc.Nearest(s, list)
	return best
}

package reservoir

import (
	"fmt"
	"math"
	"strings"

	"gopkg.in/yaml.v3"

	"floodtrace/internal/yamldoc"
)

// section is one YAML mapping of the case file, checked against its
// allowed keys.
type section struct {
	name string // "rock", "wells[2]", "" at the top level
	well string // well name, for well sections (messages become WellErrors)
	node *yaml.Node
	vals map[string]*yaml.Node
	keys map[string]*yaml.Node
}

// where names a section in messages.
func (s *section) where() string {
	if s.name == "" {
		return "at the top level"
	}
	return "in " + s.name
}

// label names a key of a section in messages: "rock.perm", or just "rate"
// for a well (the well name is printed by the WellError).
func (s *section) label(key string) string {
	if s.well != "" || s.name == "" {
		return key
	}
	return s.name + "." + key
}

// fail records a problem at node n of section s (s may be nil).
func (d *decoder) fail(s *section, n *yaml.Node, format string, a ...any) {
	line := 0
	if n != nil {
		line = n.Line
	}
	msg := fmt.Sprintf(format, a...)
	if s != nil && s.well != "" {
		d.errs.add(&WellError{Path: d.path, Line: line, Well: s.well, Msg: msg})
		return
	}
	d.errs.add(&InputError{Path: d.path, Line: line, Msg: msg})
}

// section checks that n is a mapping whose keys are all in allowed and
// that every required key is given. It returns nil (after recording the
// problem) if n is not a mapping.
func (d *decoder) section(n *yaml.Node, name, well string, allowed, required []string) *section {
	n = yamldoc.Deref(n)
	s := &section{name: name, well: well, node: n, vals: map[string]*yaml.Node{}, keys: map[string]*yaml.Node{}}
	if n == nil || n.Kind != yaml.MappingNode {
		what := name
		if what == "" {
			what = "the case"
		}
		if n != nil && n.Kind == yaml.ScalarNode && n.Tag == "!!null" {
			d.fail(s, n, "%s is empty; expected keys %s", what, strings.Join(allowed, ", "))
		} else {
			found := "nothing"
			if n != nil {
				found = yamldoc.Describe(n)
			}
			d.fail(s, n, "%s must be a mapping of keys (%s), found %s", what, strings.Join(allowed, ", "), found)
		}
		return nil
	}
	m, probs := yamldoc.Mapping(n, allowed, required)
	for _, pr := range probs {
		switch pr.Kind {
		case yamldoc.BadKey:
			d.fail(s, pr.Node, "a key %s must be a plain word", s.where())
		case yamldoc.UnknownKey:
			msg := fmt.Sprintf("unknown key %q %s", pr.Key, s.where())
			if pr.Suggest != "" {
				msg += fmt.Sprintf("; did you mean %q?", pr.Suggest)
			} else {
				msg += "; valid keys: " + strings.Join(allowed, ", ")
			}
			d.fail(s, pr.Node, "%s", msg)
		case yamldoc.DuplicateKey:
			d.fail(s, pr.Node, "key %q given twice %s (first on line %d)", pr.Key, s.where(), pr.FirstLine)
		case yamldoc.MissingKey:
			d.fail(s, n, "missing key %q %s", pr.Key, s.where())
		}
	}
	s.vals, s.keys = m.Vals, m.Keys
	return s
}

// has reports whether the section gives key (with a non-null value).
func (s *section) has(key string) bool {
	if s == nil {
		return false
	}
	v, ok := s.vals[key]
	return ok && !(v.Kind == yaml.ScalarNode && v.Tag == "!!null")
}

// number reads the number at key: ok is false when the key is absent or
// its value is not a finite number (what, "a number" or "a whole number",
// says what a key without a value lacks; the problem is recorded).
func (d *decoder) number(s *section, key, what string) (v float64, n *yaml.Node, ok bool) {
	if !s.has(key) {
		if s != nil && s.vals[key] != nil {
			d.fail(s, s.keys[key], "%s has no value; expected %s", s.label(key), what)
		}
		return 0, nil, false
	}
	n = s.vals[key]
	v, msg := yamldoc.Number(n)
	if msg != "" {
		d.fail(s, n, "%s %s", s.label(key), msg)
		return 0, n, false
	}
	return v, n, true
}

// num returns the number at key, or def if the key is absent. check, if
// not nil, returns a phrase such as "is not positive" for a bad value.
// Problems are recorded and def is returned.
func (d *decoder) num(s *section, key string, def float64, check func(float64) string) float64 {
	v, n, ok := d.number(s, key, "a number")
	if !ok {
		return def
	}
	if check != nil {
		if m := check(v); m != "" {
			d.fail(s, n, "%s = %s %s", s.label(key), n.Value, m)
			return def
		}
	}
	return v
}

// integer returns the whole number at key in [lo, hi], or def if absent.
func (d *decoder) integer(s *section, key string, def, lo, hi int64) int64 {
	v, n, ok := d.number(s, key, "a whole number")
	if !ok {
		return def
	}
	if v != math.Trunc(v) {
		d.fail(s, n, "%s = %s is not a whole number", s.label(key), n.Value)
		return def
	}
	if v < float64(lo) || v > float64(hi) {
		d.fail(s, n, "%s = %s is outside [%d, %d]", s.label(key), n.Value, lo, hi)
		return def
	}
	return int64(v)
}

// str returns the text at key ("" if absent).
func (d *decoder) str(s *section, key string) string {
	if !s.has(key) {
		return ""
	}
	n := s.vals[key]
	if n.Kind != yaml.ScalarNode {
		d.fail(s, n, "%s must be text, found %s", s.label(key), yamldoc.Describe(n))
		return ""
	}
	return n.Value
}

// boolean returns the true/false value at key (false if absent).
func (d *decoder) boolean(s *section, key string) bool {
	if !s.has(key) {
		return false
	}
	n := s.vals[key]
	var b bool
	if n.Kind != yaml.ScalarNode || n.Tag != "!!bool" || n.Decode(&b) != nil {
		d.fail(s, n, "%s must be true or false, found %s", s.label(key), yamldoc.Describe(n))
		return false
	}
	return b
}

// list returns the items of the list at key (nil if absent or not a list).
func (d *decoder) list(s *section, key string) []*yaml.Node {
	if !s.has(key) {
		return nil
	}
	n := s.vals[key]
	if n.Kind != yaml.SequenceNode {
		d.fail(s, n, "%s must be a list, found %s", s.label(key), yamldoc.Describe(n))
		return nil
	}
	out := make([]*yaml.Node, len(n.Content))
	for i, c := range n.Content {
		out[i] = yamldoc.Deref(c)
	}
	return out
}

// numbers returns a list of numbers at key.
func (d *decoder) numbers(s *section, key string) ([]float64, []*yaml.Node) {
	items := d.list(s, key)
	out := make([]float64, 0, len(items))
	nodes := make([]*yaml.Node, 0, len(items))
	for i, it := range items {
		v, msg := yamldoc.Number(it)
		if msg != "" {
			d.fail(s, it, "%s item %d %s", s.label(key), i+1, msg)
			continue
		}
		out = append(out, v)
		nodes = append(nodes, it)
	}
	return out, nodes
}

// Value checks for num: each returns "" for a good value or a phrase.
func positive(v float64) string {
	if v > 0 {
		return ""
	}
	return "is not positive"
}

func nonNegative(v float64) string {
	if v >= 0 {
		return ""
	}
	return "is negative"
}

func anyValue(float64) string { return "" }

func inRange(lo, hi float64, loOpen, hiOpen bool) func(float64) string {
	return func(v float64) string {
		bad := v < lo || v > hi || (loOpen && v == lo) || (hiOpen && v == hi)
		if !bad {
			return ""
		}
		l, r := "[", "]"
		if loOpen {
			l = "("
		}
		if hiOpen {
			r = ")"
		}
		return fmt.Sprintf("is outside %s%g, %g%s", l, lo, hi, r)
	}
}

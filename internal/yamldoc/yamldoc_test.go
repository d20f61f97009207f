package yamldoc

import (
	"strings"
	"testing"

	"gopkg.in/yaml.v3"
)

func root(t *testing.T, text string) *yaml.Node {
	t.Helper()
	n, perr := Parse([]byte(text))
	if perr != nil {
		t.Fatalf("parse %q: %v", text, perr)
	}
	return n
}

// TestNumber: the one rule for numbers in case files and specs.
func TestNumber(t *testing.T) {
	for _, tc := range []struct {
		text string
		want float64
		msg  string // part of the message; "" = a number
	}{
		{"150", 150, ""},
		{"-2.5e3", -2500, ""},
		{`"150"`, 150, ""},
		{"' 0.25 '", 0.25, ""},
		{"1_000", 1000, ""},
		{"0x1f", 31, ""},
		{"0o17", 15, ""},
		{"", 0, "has no value"},
		{"~", 0, "has no value"},
		{"null", 0, "has no value"},
		{".inf", 0, "finite"},
		{".nan", 0, "finite"},
		{`"inf"`, 0, "finite"},
		{"1e400", 0, "out of range"},
		{"abc", 0, "must be a number"},
		{"true", 0, "must be a number"},
		{"[1, 2]", 0, "must be a number, found a list"},
		{"{a: 1}", 0, "must be a number, found a mapping"},
	} {
		doc := root(t, "v: "+tc.text)
		v, msg := Number(doc.Content[1])
		if tc.msg == "" {
			if msg != "" || v != tc.want {
				t.Errorf("%q: %g %q, want %g", tc.text, v, msg, tc.want)
			}
		} else if !strings.Contains(msg, tc.msg) {
			t.Errorf("%q: message %q, want one containing %q", tc.text, msg, tc.msg)
		}
	}
}

// TestMapping: unknown keys with a suggestion, duplicates with the first
// line, missing keys, null values, aliases.
func TestMapping(t *testing.T) {
	doc := root(t, "base: &b 1\nhorizn: 3\nbase: 2\nempty:\nalias: *b\n")
	m, probs := Mapping(doc, []string{"base", "horizon", "empty", "alias", "objective"}, []string{"objective"})
	kinds := []ProblemKind{UnknownKey, DuplicateKey, MissingKey}
	if len(probs) != len(kinds) {
		t.Fatalf("problems %+v", probs)
	}
	for i, k := range kinds {
		if probs[i].Kind != k {
			t.Errorf("problem %d is %d, want %d", i, probs[i].Kind, k)
		}
	}
	if probs[0].Suggest != "horizon" || probs[0].Node.Line != 2 {
		t.Errorf("unknown key: %+v", probs[0])
	}
	if probs[1].FirstLine != 1 || probs[1].Node.Line != 3 {
		t.Errorf("duplicate: %+v", probs[1])
	}
	if !m.Given("empty") || m.Has("empty") {
		t.Error("a key with no value is given but has no value")
	}
	if v, msg := Number(m.Vals["alias"]); msg != "" || v != 1 {
		t.Errorf("alias: %g %q", v, msg)
	}
	if _, probs := Mapping(root(t, "[1, 2]"), nil, nil); len(probs) != 1 || probs[0].Kind != NotMapping {
		t.Errorf("a list as a mapping: %+v", probs)
	}
}

// TestParse: empty input, two documents, syntax errors with lines.
func TestParse(t *testing.T) {
	for _, tc := range []struct {
		text     string
		empty    bool
		multiple bool
		line     int
		msg      string
	}{
		{"", true, false, 0, "empty"},
		{"  \n# only a comment\n", true, false, 0, "empty"},
		{"~\n", true, false, 0, "empty"},
		{"a: 1\n---\nb: 2\n", false, true, 2, "more than one"},
		{"a: 1\n\tb: 2\n", false, false, 2, "tab"},
		{"a: [1, 2\nb: 3\n", false, false, 0, "YAML syntax"},
		{"a: *nope\n", false, false, 1, "unknown anchor"},
	} {
		_, perr := Parse([]byte(tc.text))
		if perr == nil {
			t.Errorf("%q: no error", tc.text)
			continue
		}
		if perr.Empty != tc.empty || perr.Multiple != tc.multiple || !strings.Contains(perr.Msg, tc.msg) || (tc.line > 0 && perr.Line != tc.line) {
			t.Errorf("%q: %+v", tc.text, perr)
		}
	}
}

// TestNearest: suggestions only when close (common practice: edit
// distance within half the word).
func TestNearest(t *testing.T) {
	keys := []string{"min_bhp", "min_distance", "spacing"}
	if s, ok := Nearest("min_dist", keys); !ok || s != "min_distance" {
		t.Errorf("min_dist -> %q %v", s, ok)
	}
	if _, ok := Nearest("zzzzzzzz", keys); ok {
		t.Error("a far word gets a suggestion")
	}
}

func TestLevenshtein(t *testing.T) {
	// Levenshtein (1966) distances, worked by hand: kitten -> sitting
	// needs two substitutions and one insertion.
	for _, c := range []struct {
		a, b string
		d    int
	}{{"kitten", "sitting", 3}, {"", "abc", 3}, {"flaw", "lawn", 2}, {"same", "same", 0}} {
		if got := levenshtein(c.a, c.b); got != c.d {
			t.Errorf("levenshtein(%q, %q) = %d, want %d", c.a, c.b, got, c.d)
		}
	}
	if got, ok := Nearest("prem", []string{"perm", "perm_y", "porosity"}); got != "perm" || !ok {
		t.Errorf("Nearest(prem) = %q, %v", got, ok)
	}
}

func FuzzParse(f *testing.F) {
	for _, s := range []string{"a: 1", "a: &x [1, *x]", "---\n---", "a:\n\t- b", "{a: {b: {c: *d}}}"} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		n, perr := Parse(data)
		if (n == nil) == (perr == nil) {
			t.Fatalf("root %v and error %v", n, perr)
		}
		if n != nil {
			Mapping(n, []string{"a"}, nil)
			for _, c := range n.Content {
				Number(c)
				Describe(c)
			}
		}
	})
}

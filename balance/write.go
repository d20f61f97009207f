package balance

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"unicode/utf8"

	"gopkg.in/yaml.v3"

	"floodtrace/flood"
	"floodtrace/internal/outdir"
	"floodtrace/internal/yamldoc"
	"floodtrace/reservoir"
	"floodtrace/runfolder"
)

// Write writes balance.csv, balance_forecast.csv, balance.json and
// case_balanced.yaml into d, whose folder is dir.
func (r *Result) Write(d *outdir.Dir, dir string) error {
	var b bytes.Buffer
	b.WriteString(runfolder.Header(runfolder.BalanceColumns))
	for _, in := range r.Injectors {
		fmt.Fprintf(&b, "%s,%s,%s,%s,%s,%s,%s\n", in.Name, runfolder.Num(in.RateNow), runfolder.Num(in.RateRecommended),
			runfolder.Num(in.RateRecommended-in.RateNow), runfolder.Num(in.EfficiencyNow), runfolder.Num(in.EfficiencyRecommended), in.Limit)
	}
	if err := d.Bytes(runfolder.BalanceFile, b.Bytes()); err != nil {
		return err
	}
	b.Reset()
	b.WriteString(runfolder.Header(runfolder.BalanceForecastColumns))
	for _, f := range []struct {
		name string
		r    *flood.Result
	}{{"now", r.Now.Run}, {"recommended", r.Recommended.Run}} {
		for k, t := range f.r.Times {
			fmt.Fprintf(&b, "%s,%s,%s,%s,%s,%s,%s\n", runfolder.Num(t), f.name, runfolder.Num(f.r.FieldOilRate[k]), runfolder.Num(f.r.FieldWaterRate[k]),
				runfolder.Num(f.r.FieldWaterCut[k]), runfolder.Num(f.r.FieldCumOil[k]), runfolder.Num(f.r.FieldCumWater[k]))
		}
	}
	if err := d.Bytes(runfolder.BalanceForecastFile, b.Bytes()); err != nil {
		return err
	}
	if r.Model.Path != "" {
		src, err := os.ReadFile(r.Model.Path)
		if err != nil {
			return &reservoir.InputError{Path: r.Model.Path, Msg: "reading the case again for case_balanced.yaml", Err: err}
		}
		rates := r.caseRates()
		out, err := BalancedCase(src, r.Model.Path, dir, rates)
		if err != nil {
			return err
		}
		if err := d.Bytes(runfolder.BalancedCaseFile, out); err != nil {
			return err
		}
	}
	js, err := json.MarshalIndent(r.Summary(), "", "  ")
	if err != nil {
		return err
	}
	return d.Bytes(runfolder.BalanceJSONFile, append(js, '\n'))
}

// Summary is the content of balance.json.
type Summary struct {
	Objective struct {
		Name        string          `json:"name"`
		Now         runfolder.Float `json:"now"`
		Recommended runfolder.Float `json:"recommended"`
		Improved    bool            `json:"improved"`
	} `json:"objective"`
	HorizonDays runfolder.Float `json:"horizon_days"`
	// HistoryEndDays is the end of the case's history, where the rates
	// set start; absent without a history.
	HistoryEndDays *runfolder.Float `json:"history_end_days,omitempty"`
	TotalInjection struct {
		Now         runfolder.Float `json:"now"`
		Recommended runfolder.Float `json:"recommended"`
		Held        bool            `json:"held"`
	} `json:"total_injection"`
	ActiveLimits []ActiveLimit `json:"active_limits"`
	// ProducersAtMaxRate names the producers held at their max_rate in
	// the recommended forecast; absent when none is.
	ProducersAtMaxRate []string `json:"producers_at_max_rate,omitempty"`
	Method             struct {
		Name         string          `json:"name"`
		Exponent     runfolder.Float `json:"exponent"`
		MaxStep      runfolder.Float `json:"max_step"`
		MinStep      runfolder.Float `json:"min_step"`
		GradientStep runfolder.Float `json:"gradient_step"`
		Forecasts    int             `json:"forecasts"`
		Iterations   []IterationJSON `json:"iterations"`
	} `json:"method"`
	FlaggedProducers []FlaggedJSON `json:"flagged_producers"`
}

// ActiveLimit is an injector at a bound of its recommended rate.
type ActiveLimit struct {
	Injector string `json:"injector"`
	Limit    string `json:"limit"`
}

// IterationJSON is one round of the search in balance.json.
type IterationJSON struct {
	N         int             `json:"n"`
	Method    string          `json:"method"`
	Step      runfolder.Float `json:"step"`
	Objective runfolder.Float `json:"objective"`
	Accepted  bool            `json:"accepted"`
	Forecasts int             `json:"forecasts"`
}

// FlaggedJSON is a flagged producer in balance.json.
type FlaggedJSON struct {
	Producer   string          `json:"producer"`
	Efficiency runfolder.Float `json:"efficiency"`
	Injectors  []string        `json:"injectors"`
}

// Summary returns balance.json.
func (r *Result) Summary() *Summary {
	F := func(v float64) runfolder.Float { return runfolder.Float(v) }
	s := &Summary{HorizonDays: F(r.Horizon), ActiveLimits: []ActiveLimit{}, FlaggedProducers: []FlaggedJSON{}}
	s.Objective.Name = string(r.Objective)
	s.ProducersAtMaxRate = r.Recommended.AtMaxRate
	if r.HistoryEnd > 0 {
		h := F(r.HistoryEnd)
		s.HistoryEndDays = &h
	}
	s.Objective.Now, s.Objective.Recommended, s.Objective.Improved = F(r.Now.Objective), F(r.Recommended.Objective), r.Improved
	s.TotalInjection.Now, s.TotalInjection.Recommended, s.TotalInjection.Held = F(r.TotalNow), F(r.TotalRecommended), !r.FreeTotal
	for _, in := range r.Injectors {
		if in.Limit != "" {
			s.ActiveLimits = append(s.ActiveLimits, ActiveLimit{Injector: in.Name, Limit: in.Limit})
		}
	}
	s.Method.Name = "efficiency-weighted reallocation (Thiele and Batycky 2006) and finite-difference gradient, each proposal checked by a forecast"
	s.Method.Exponent, s.Method.MaxStep, s.Method.MinStep, s.Method.GradientStep = F(r.Exponent), F(r.MaxStep), F(MinStep), F(gradientStep)
	s.Method.Forecasts = r.Forecasts
	s.Method.Iterations = []IterationJSON{}
	for _, it := range r.Iterations {
		s.Method.Iterations = append(s.Method.Iterations, IterationJSON{N: it.N, Method: it.Method, Step: F(it.Step), Objective: F(it.Objective), Accepted: it.Accepted, Forecasts: it.Forecasts})
	}
	for _, f := range r.Flagged {
		s.FlaggedProducers = append(s.FlaggedProducers, FlaggedJSON{Producer: f.Name, Efficiency: F(f.Efficiency), Injectors: f.Injectors})
	}
	return s
}

// BalancedCase returns the case file src (read from casePath) with the
// rate of each injector named in rates replaced, for a copy written into
// the folder outDir. The YAML node tree locates the values and the edit
// replaces their text in place, so comments, layout and every other value
// stay as the user wrote them; map, table, history, wells and faults file
// paths, relative to the case file, are rewritten relative to outDir so that the copy runs from there.
func BalancedCase(src []byte, casePath, outDir string, rates map[string]float64) ([]byte, error) {
	return editCase(src, casePath, outDir, rates, nil)
}

// CaseWithRock returns the case file src (read from casePath) for a copy
// written into outDir, as BalancedCase does, with the rock keys named in
// rock (perm, perm_y, ...) given the new text (a path relative to outDir
// or a number) and every other path, the history file's included,
// rewritten relative to outDir. floodtrace calibrate writes
// case_calibrated.yaml with it.
func CaseWithRock(src []byte, casePath, outDir string, rock map[string]string) ([]byte, error) {
	return editCase(src, casePath, outDir, nil, rock)
}

// editCase is BalancedCase and CaseWithRock.
func editCase(src []byte, casePath, outDir string, rates map[string]float64, rock map[string]string) ([]byte, error) {
	root, perr := yamldoc.Parse(src)
	if perr != nil {
		return nil, &reservoir.InputError{Path: casePath, Line: perr.Line, Msg: perr.Msg}
	}
	var edits []edit
	top := mapping(root)
	for _, w := range top["wells"].seq() {
		wm := mapping(w)
		name := wm["name"].scalar()
		q, ok := rates[name]
		if !ok || wm["rate"] == nil {
			continue
		}
		edits = append(edits, edit{n: wm["rate"].n, text: strconv.FormatFloat(round3(q), 'f', -1, 64)})
	}
	caseDir, _ := filepath.Abs(filepath.Dir(casePath))
	absOut, _ := filepath.Abs(outDir)
	relocate := func(v *node) {
		if v == nil || v.n.Kind != yaml.ScalarNode {
			return
		}
		if _, msg := yamldoc.Number(v.n); msg == "" {
			return
		}
		p := filepath.FromSlash(v.n.Value)
		if !filepath.IsAbs(p) {
			p = filepath.Join(caseDir, p)
		}
		np := p
		// Relative when the two folders are near each other, absolute
		// when the path would climb to the root.
		if rel, err := filepath.Rel(absOut, p); err == nil && strings.Count(rel, "..") <= 2 {
			np = filepath.ToSlash(rel)
		}
		if np != v.n.Value {
			edits = append(edits, edit{n: v.n, text: np})
		}
	}
	rm := mapping(top["rock"].get())
	for _, k := range []string{"perm", "perm_y", "porosity", "thickness", "active"} {
		if text, ok := rock[k]; ok {
			if v := rm[k]; v != nil && v.n.Kind == yaml.ScalarNode {
				edits = append(edits, edit{n: v.n, text: text})
				continue
			}
			return nil, &reservoir.InputError{Path: casePath, Msg: fmt.Sprintf("rock.%s is not written as a single value; the copy cannot point it at %s", k, text)}
		}
		relocate(rm[k])
	}
	relocate(mapping(top["relperm"].get())["table"])
	relocate(mapping(top["history"].get())["file"])
	relocate(top["wells"])  // a wells file (GeoJSON or CSV) instead of a list
	relocate(top["faults"]) // a faults file instead of a list
	return splice(src, edits)
}

// caseRates returns the recommended rates of the adjustable injectors as
// case_balanced.yaml gives them: to 0.001 of the rate unit, the rounding
// left over given to the largest so that the total stays the recommended
// total to within 0.0005.
func (r *Result) caseRates() map[string]float64 {
	rates := map[string]float64{}
	total, rounded, big := 0.0, 0.0, ""
	for _, in := range r.Injectors {
		if !in.Adjustable {
			continue
		}
		q := round3(in.RateRecommended)
		rates[in.Name] = q
		total += in.RateRecommended
		rounded += q
		if big == "" || q > rates[big] {
			big = in.Name
		}
	}
	if big != "" {
		rates[big] = round3(rates[big] + total - rounded)
	}
	return rates
}

// round3 rounds to three decimals.
func round3(q float64) float64 { return math.Round(q*1000) / 1000 }

type node struct{ n *yaml.Node }

func (v *node) get() *yaml.Node {
	if v == nil {
		return nil
	}
	return v.n
}

func (v *node) scalar() string {
	if v == nil || v.n.Kind != yaml.ScalarNode {
		return ""
	}
	return strings.TrimSpace(v.n.Value)
}

func (v *node) seq() []*yaml.Node {
	if v == nil || v.n.Kind != yaml.SequenceNode {
		return nil
	}
	return v.n.Content
}

// mapping returns the keys of a mapping node and their (unaliased) value
// nodes.
func mapping(n *yaml.Node) map[string]*node {
	out := map[string]*node{}
	if n = yamldoc.Deref(n); n == nil || n.Kind != yaml.MappingNode {
		return out
	}
	for i := 0; i+1 < len(n.Content); i += 2 {
		out[n.Content[i].Value] = &node{yamldoc.Deref(n.Content[i+1])}
	}
	return out
}

// edit replaces the text of scalar n.
type edit struct {
	n    *yaml.Node
	text string
}

// splice applies edits to src at their nodes' positions (line and column,
// 1-based, the column counted in characters), keeping the quotes of a
// quoted scalar.
func splice(src []byte, edits []edit) ([]byte, error) {
	lineStart := []int{0}
	for i, c := range src {
		if c == '\n' {
			lineStart = append(lineStart, i+1)
		}
	}
	type cut struct {
		lo, hi int
		text   string
	}
	var cuts []cut
	for _, e := range edits {
		if e.n.Line < 1 || e.n.Line > len(lineStart) {
			return nil, fmt.Errorf("case_balanced.yaml: value %q has no position in the case file", e.n.Value)
		}
		off := lineStart[e.n.Line-1]
		for c := 1; c < e.n.Column && off < len(src); c++ {
			_, sz := utf8.DecodeRune(src[off:])
			off += sz
		}
		lo, hi := off, off+len(e.n.Value)
		text := e.text
		if e.n.Style&(yaml.DoubleQuotedStyle|yaml.SingleQuotedStyle) != 0 && off < len(src) {
			q := src[off]
			end := bytes.IndexByte(src[off+1:], q)
			if end < 0 {
				return nil, fmt.Errorf("case_balanced.yaml: unterminated quoted value on line %d", e.n.Line)
			}
			hi = off + 1 + end + 1
			text = string(q) + text + string(q)
		}
		if hi > len(src) || string(src[lo:hi]) != e.n.Value && e.n.Style&(yaml.DoubleQuotedStyle|yaml.SingleQuotedStyle) == 0 {
			return nil, fmt.Errorf("case_balanced.yaml: the value %q on line %d is written in a form balance cannot edit in place", e.n.Value, e.n.Line)
		}
		cuts = append(cuts, cut{lo, hi, text})
	}
	// Apply from the end so earlier offsets stay valid.
	for i := range cuts {
		for j := i + 1; j < len(cuts); j++ {
			if cuts[j].lo > cuts[i].lo {
				cuts[i], cuts[j] = cuts[j], cuts[i]
			}
		}
	}
	out := append([]byte(nil), src...)
	for _, c := range cuts {
		out = append(out[:c.lo], append([]byte(c.text), out[c.hi:]...)...)
	}
	return out, nil
}

package render

import (
	"floodtrace/runfolder"
	"sync"

	"bytes"
	"encoding/base64"
	"fmt"
	"html/template"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
)

type kv struct{ Label, Value string }

type wellRow struct {
	Name, Type, Location, Cell, Control, Rate, BHP, CumOil, CumWater string
	Flag                                                             bool
}

type btRow struct{ Producer, TracerDays, TracerPVI, WaterDays, WaterPVI, FinalWC string }

type allocRow struct{ Injector, Producer, Rate, FracInj, FracProd, PV string }

type imgFig struct {
	Caption string
	Src     template.HTMLAttr // src="data:...": the embedded file, base64 (nothing to escape)
	Alt     string
}

type reportData struct {
	Title, Meta    string
	Figures        []kv
	Summary        []kv
	Alerts         []string
	Wells          []wellRow
	RateUnit       string
	PresUnit       string
	VolUnit        string
	Breakthrough   []btRow
	Allocation     []allocRow
	Charts, Maps   []imgFig
	Animation      *imgFig
	Warnings       []string
	Notes          []string
	Source         string
	HasAllocation  bool
	AllocationNote string // which pressure solve the table is from
	HasBreakthough bool
	History        *historyReport
}

// historyReport is the history section of the report: the match of each
// well with its history (summary.json's history object).
type historyReport struct {
	Intro string
	Wells []historyRow
	Field historyRow
}

type historyRow struct {
	Name, Type, ObservedBT, ModelBT, Error, WaterCutRMS, CumOil, CumWater, BHPRMS string
}

func fmtOpt(p *float64, dec int) string {
	if p == nil || math.IsNaN(*p) {
		return "not reached"
	}
	return FormatNumber(*p, dec)
}

func fmtNum(v float64, dec int) string {
	if math.IsNaN(v) {
		return "–"
	}
	return FormatNumber(v, dec)
}

func fmtPct(v float64) string {
	if math.IsNaN(v) {
		return "–"
	}
	return FormatNumber(100*v, 1) + " %"
}

func fmtSci(v float64) string {
	if math.IsNaN(v) {
		return "–"
	}
	return strconv.FormatFloat(v, 'e', 2, 64)
}

// dataURI embeds a written file as the attribute src="data:..."; the
// pictures drawPictures drew are embedded already.
func (r *run) dataURI(rel string) (template.HTMLAttr, error) {
	if src, ok := r.embedded[rel]; ok {
		return src, nil
	}
	b, err := os.ReadFile(filepath.Join(r.dir, rel))
	if err != nil {
		return "", fmt.Errorf("render: %w", err)
	}
	return embed(rel, b), nil
}

// embed returns the file rel holding b as the attribute src="data:...".
// The base64 text needs no escaping; passing it as a URL would have the
// template check every byte of several megabytes.
func embed(rel string, b []byte) template.HTMLAttr {
	mime := "image/png"
	switch strings.ToLower(filepath.Ext(rel)) {
	case ".svg":
		mime = "image/svg+xml"
	case ".gif":
		mime = "image/gif"
	}
	return template.HTMLAttr(`src="data:` + mime + ";base64," + base64.StdEncoding.EncodeToString(b) + `"`)
}

// report writes report.html: one self-contained file.
func (r *run) report() error {
	s := r.sum
	u := s.UnitLabels
	d := reportData{
		Title:    r.scene.Title,
		RateUnit: u.Rate, PresUnit: u.Pressure, VolUnit: u.Volume,
		Warnings: s.Warnings,
		Notes:    r.rep.Notes,
	}
	d.Meta = fmt.Sprintf("Waterflood screening run · %s units · %s engine · %s days simulated",
		s.Units, nonEmpty(s.Engine, "streamline"), FormatNumber(float64(s.EndDays), decimalsForDay(float64(s.EndDays))))
	if s.StartDate != "" {
		d.Meta += fmt.Sprintf(" (%s to %s)", s.StartDate, nonEmpty(s.EndDate, dateOf(s.StartDate, float64(s.EndDays))))
	}
	if s.CaseFile != "" {
		d.Source = s.CaseFile
	}

	lc := runfolder.Value(s.LorenzCoefficient)
	mb := float64(s.MassBalanceError)
	d.Figures = []kv{
		{"Recovery factor", fmtPct(float64(s.Field.FinalRecoveryFactor))},
		{"Field water cut", fmtPct(float64(s.Field.FinalWaterCut))},
		{"Pore volumes injected", fmtNum(float64(s.Field.FinalPVI), 2)},
		{"Lorenz coefficient", fmtNum(lc, 3)},
	}
	g := s.Grid
	d.Summary = []kv{
		{"Case", d.Title},
		{"Units", fmt.Sprintf("%s (lengths %s, rates %s, volumes %s, pressures %s)", s.Units, u.Length, u.Rate, u.Volume, u.Pressure)},
		{"Grid", fmt.Sprintf("%d × %d cells of %s × %s %s, origin (%s, %s)", g.NX, g.NY, trimNum(float64(g.DX)), trimNum(float64(g.DY)), u.Length, trimNum(float64(g.X0)), trimNum(float64(g.Y0)))},
		{"Pore volume", fmtNum(float64(s.PoreVolume), 0) + " " + u.Volume},
		{"Original oil in place", fmtNum(float64(s.OOIP), 0) + " " + u.Volume},
		{"Simulated time", FormatNumber(float64(s.EndDays), decimalsForDay(float64(s.EndDays))) + " days" + r.dateSuffix(float64(s.EndDays), s.EndDate)},
		{"Final recovery factor", fmtPct(float64(s.Field.FinalRecoveryFactor))},
		{"Final water cut", fmtPct(float64(s.Field.FinalWaterCut))},
		{"Final pore volumes injected", fmtNum(float64(s.Field.FinalPVI), 3)},
		{"Lorenz coefficient", fmtNum(lc, 3)},
		{"Mass balance error", fmtSci(mb)},
		{"Streamlines", FormatNumber(float64(s.Streamlines), 0)},
		{"Pressure solver", fmt.Sprintf("%d solve(s), %d iterations, relative residual %s",
			s.PressureSolver.Solves, s.PressureSolver.Iterations, fmtSci(float64(s.PressureSolver.RelativeResidual)))},
	}
	d.Summary = append(d.Summary, gravityRows(s)...)
	// Economic limits, only when one was reached (a case without limits
	// has the report it had).
	var shut []string
	for _, p := range s.Producers {
		if p.LimitDays != nil {
			shut = append(shut, fmt.Sprintf("%s on day %s%s (%s)", p.Name, FormatNumber(*p.LimitDays, decimalsForDay(*p.LimitDays)), r.dateSuffix(*p.LimitDays, ""), p.Limit))
		}
	}
	if len(shut) > 0 {
		d.Summary = append(d.Summary, kv{"Shut in at economic limits", strings.Join(shut, ", ")})
	}
	if s.FieldLimitDays != nil {
		d.Summary = append(d.Summary, kv{"Run ended by economic limits", "day " + FormatNumber(*s.FieldLimitDays, decimalsForDay(*s.FieldLimitDays)) + r.dateSuffix(*s.FieldLimitDays, "")})
	}

	// Last reported control, rate and BHP of each well.
	last := map[string]int{}
	var wt *Table
	if p := filepath.Join(r.dir, runfolder.WellsFile); exists(p) {
		t, err := readTable(p)
		if err != nil {
			return err
		}
		wt = t
		for i := range t.Rows {
			last[t.Str(i, "well")] = i
		}
	}
	prod := map[string]int{}
	for i, p := range s.Producers {
		prod[p.Name] = i
	}
	inj := map[string]int{}
	for i, w := range s.Injectors {
		inj[w.Name] = i
		if w.MaxBHPReached {
			d.Alerts = append(d.Alerts, w.Name)
		}
	}
	for _, w := range s.Wells {
		row := wellRow{Name: w.Name, Type: w.Type, Location: trimNum(float64(w.X)) + ", " + trimNum(float64(w.Y)),
			Cell: fmt.Sprintf("%d, %d", w.I, w.J), Control: "–", Rate: "–", BHP: "–", CumOil: "–", CumWater: "–"}
		if i, ok := last[w.Name]; ok && wt != nil {
			row.Control = nonEmpty(wt.Str(i, "control"), "–")
			rate := wt.Num(i, runfolder.ColLiquidRate)
			if math.IsNaN(rate) {
				rate = wt.Num(i, runfolder.ColRate) // a run folder of an earlier version
			}
			row.Rate = fmtNum(rate, 0)
			row.BHP = fmtNum(wt.Num(i, "bhp"), 0)
		}
		if i, ok := prod[w.Name]; ok {
			row.CumOil = fmtNum(float64(s.Producers[i].CumOil), 0)
			row.CumWater = fmtNum(float64(s.Producers[i].CumWater), 0)
		}
		if i, ok := inj[w.Name]; ok {
			row.CumWater = fmtNum(float64(s.Injectors[i].CumWater), 0)
			row.Flag = s.Injectors[i].MaxBHPReached
		}
		d.Wells = append(d.Wells, row)
	}
	for _, p := range s.Producers {
		d.Breakthrough = append(d.Breakthrough, btRow{p.Name,
			fmtOpt(p.TracerBreakthroughDays, 0), fmtOpt(p.TracerBreakthroughPVI, 3),
			fmtOpt(p.BreakthroughDays, 0) + r.optDateSuffix(p.BreakthroughDays), fmtOpt(p.BreakthroughPVI, 3), fmtPct(float64(p.FinalWaterCut))})
	}
	d.HasBreakthough = len(d.Breakthrough) > 0
	if p := filepath.Join(r.dir, runfolder.AllocationFile); exists(p) {
		t, err := readTable(p)
		if err != nil {
			return err
		}
		// One block per traced pressure solve: the table shows the last,
		// the allocation in force at the end of the run.
		last, blocks := math.Inf(-1), map[float64]bool{}
		for i := range t.Rows {
			if v := t.Num(i, runfolder.ColTime); !math.IsNaN(v) {
				last = math.Max(last, v)
				blocks[v] = true
			}
		}
		if len(blocks) > 1 {
			d.AllocationNote = fmt.Sprintf("From the streamlines of the pressure solve of day %s, the last of %d traced solves (allocation.csv has every one).", trimNum(last), len(blocks))
		}
		for i := range t.Rows {
			if v := t.Num(i, runfolder.ColTime); len(blocks) > 1 && v != last {
				continue
			}
			d.Allocation = append(d.Allocation, allocRow{t.Str(i, "injector"), t.Str(i, "producer"),
				fmtNum(t.Num(i, "rate"), 0), fmtPct(t.Num(i, "fraction_of_injector")),
				fmtPct(t.Num(i, "fraction_of_producer")), fmtNum(t.Num(i, "pore_volume"), 0)})
		}
	}
	d.HasAllocation = len(d.Allocation) > 0
	d.History = r.historyReport()
	for _, f := range r.charts {
		src, err := r.dataURI(f.File)
		if err != nil {
			return err
		}
		d.Charts = append(d.Charts, imgFig{f.Caption, src, filepath.Base(f.File)})
	}
	for _, f := range r.maps {
		src, err := r.dataURI(f.File)
		if err != nil {
			return err
		}
		d.Maps = append(d.Maps, imgFig{f.Caption, src, filepath.Base(f.File)})
	}
	if r.gif != "" {
		src, err := r.dataURI(r.gif)
		if err != nil {
			return err
		}
		d.Animation = &imgFig{"Water saturation over the run; each frame gives its day and pore volumes injected.", src, "saturation animation"}
	}
	var b bytes.Buffer
	if err := reportTemplate().Execute(&b, d); err != nil {
		return fmt.Errorf("render: report.html: %w", err)
	}
	if err := writeFileAtomic(filepath.Join(r.dir, runfolder.ReportFile), b.Bytes()); err != nil {
		return err
	}
	r.rep.Files = append(r.rep.Files, runfolder.ReportFile)
	return nil
}

func nonEmpty(s, def string) string {
	if s == "" {
		return def
	}
	return s
}

var reportTemplate = sync.OnceValue(func() *template.Template {
	return template.Must(template.New("report").Parse(`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>{{.Title}} · waterflood screening</title>
<style>
:root { --ink:#1f2328; --soft:#5b6470; --rule:#d8dce2; --paper:#ffffff; --wash:#f3f4f6;
        --accent:#0b5f8a; --warm:#b45309; --alarm:#b3261e; }
* { box-sizing: border-box; }
body { margin:0; background:var(--wash); color:var(--ink);
       font: 15px/1.5 "Segoe UI", "Helvetica Neue", Arial, "DejaVu Sans", sans-serif; }
main { max-width: 1180px; margin: 0 auto; padding: 28px 28px 60px; }
header.top { border-left: 6px solid var(--accent); background: var(--paper); padding: 20px 26px;
             box-shadow: 0 1px 2px rgba(0,0,0,.06); }
header.top .kicker { letter-spacing: .14em; text-transform: uppercase; font-size: 12px; color: var(--accent); font-weight: 600; }
header.top h1 { margin: 4px 0 6px; font-size: 30px; line-height: 1.2; }
header.top .meta { color: var(--soft); }
section { background: var(--paper); margin-top: 22px; padding: 18px 26px 22px; box-shadow: 0 1px 2px rgba(0,0,0,.06); }
h2 { font-size: 19px; margin: 0 0 12px; padding-bottom: 6px; border-bottom: 1px solid var(--rule); }
.tiles { display: grid; grid-template-columns: repeat(auto-fit, minmax(200px, 1fr)); gap: 14px; margin-top: 22px; }
.tile { background: var(--paper); padding: 14px 18px; box-shadow: 0 1px 2px rgba(0,0,0,.06); border-top: 3px solid var(--accent); }
.tile .v { font-size: 28px; font-weight: 600; font-variant-numeric: tabular-nums; }
.tile .l { color: var(--soft); font-size: 13px; }
table { border-collapse: collapse; width: 100%; font-variant-numeric: tabular-nums; }
th, td { padding: 6px 10px; text-align: left; border-bottom: 1px solid var(--rule); vertical-align: top; }
th { font-size: 13px; color: var(--soft); font-weight: 600; background: #f7f8fa; }
td.n, th.n { text-align: right; }
tr.flag td { background: #fdecea; }
table.kv td:first-child { color: var(--soft); width: 260px; }
.badge { display: inline-block; padding: 1px 8px; border-radius: 10px; font-size: 12px; font-weight: 600; }
.badge.inj { background: #e0eef7; color: #0b4f75; }
.badge.prod { background: #fbe9dd; color: #8a3b06; }
.badge.alarm { background: var(--alarm); color: #fff; }
.alert { margin-top: 22px; background: #fdecea; border: 2px solid var(--alarm); padding: 14px 22px; }
.alert strong { color: var(--alarm); }
figure { margin: 0 0 26px; }
figure img { display: block; width: 100%; height: auto; border: 1px solid var(--rule); background: #fff; }
figcaption { color: var(--soft); font-size: 13.5px; margin-top: 6px; }
.caution { border-left: 5px solid var(--warm); background: #fff8eb; padding: 12px 18px; }
ul.plain { margin: 0; padding-left: 20px; }
footer { color: var(--soft); font-size: 12.5px; margin-top: 26px; }
@media print { body { background: #fff; } section, .tile, header.top { box-shadow: none; } figure { break-inside: avoid; } }
</style>
</head>
<body>
<main>
<header class="top">
  <div class="kicker">Waterflood screening report</div>
  <h1>{{.Title}}</h1>
  <div class="meta">{{.Meta}}</div>
</header>
{{if .Alerts}}
<div class="alert" id="max-bhp-alert"><strong>Injection pressure limit reached.</strong>
  {{range $i, $a := .Alerts}}{{if $i}}, {{end}}<b>{{$a}}</b>{{end}} reached its maximum bottom-hole pressure (fracture or permit limit) and was held at that limit, so it injected less than planned. Review the injection plan and the limit before relying on these results; see Cautions.</div>
{{end}}
<div class="tiles">
{{range .Figures}}  <div class="tile"><div class="v">{{.Value}}</div><div class="l">{{.Label}}</div></div>
{{end}}</div>

<section id="summary">
<h2>Case summary</h2>
<table class="kv">
{{range .Summary}}<tr><td>{{.Label}}</td><td>{{.Value}}</td></tr>
{{end}}</table>
</section>

<section id="wells">
<h2>Wells</h2>
<table>
<tr><th>Well</th><th>Type</th><th class="n">Location (x, y)</th><th class="n">Cell (i, j)</th><th>Last control</th><th class="n">Last rate ({{.RateUnit}})</th><th class="n">Last BHP ({{.PresUnit}})</th><th class="n">Cum. oil ({{.VolUnit}})</th><th class="n">Cum. water ({{.VolUnit}})</th></tr>
{{range .Wells}}<tr{{if .Flag}} class="flag"{{end}}><td><b>{{.Name}}</b>{{if .Flag}} <span class="badge alarm">max BHP reached</span>{{end}}</td><td><span class="badge {{if eq .Type "injector"}}inj{{else}}prod{{end}}">{{.Type}}</span></td><td class="n">{{.Location}}</td><td class="n">{{.Cell}}</td><td>{{.Control}}</td><td class="n">{{.Rate}}</td><td class="n">{{.BHP}}</td><td class="n">{{.CumOil}}</td><td class="n">{{.CumWater}}</td></tr>
{{end}}</table>
</section>

{{if .HasBreakthough}}
<section id="breakthrough">
<h2>Breakthrough</h2>
<table>
<tr><th>Producer</th><th class="n">Tracer (days)</th><th class="n">Tracer (PVI)</th><th class="n">Water (days)</th><th class="n">Water (PVI)</th><th class="n">Final water cut</th></tr>
{{range .Breakthrough}}<tr><td><b>{{.Producer}}</b></td><td class="n">{{.TracerDays}}</td><td class="n">{{.TracerPVI}}</td><td class="n">{{.WaterDays}}</td><td class="n">{{.WaterPVI}}</td><td class="n">{{.FinalWC}}</td></tr>
{{end}}</table>
<p class="meta">Tracer breakthrough is the shortest time of flight from an injector to the producer; water breakthrough is the first arrival of the injected water front.</p>
</section>
{{end}}

{{with .History}}<section id="history">
<h2>Model against history</h2>
<p>{{.Intro}}</p>
<table>
<tr><th>Well</th><th>Type</th><th class="n">Observed breakthrough</th><th class="n">Model breakthrough</th><th class="n">Breakthrough error</th><th class="n">Water-cut RMS</th><th class="n">Cum oil error</th><th class="n">Cum water error</th><th class="n">BHP RMS</th></tr>
{{range .Wells}}<tr><td><b>{{.Name}}</b></td><td>{{.Type}}</td><td class="n">{{.ObservedBT}}</td><td class="n">{{.ModelBT}}</td><td class="n">{{.Error}}</td><td class="n">{{.WaterCutRMS}}</td><td class="n">{{.CumOil}}</td><td class="n">{{.CumWater}}</td><td class="n">{{.BHPRMS}}</td></tr>
{{end}}{{with .Field}}<tr><td><b>{{.Name}}</b></td><td>{{.Type}}</td><td class="n">{{.ObservedBT}}</td><td class="n">{{.ModelBT}}</td><td class="n">{{.Error}}</td><td class="n">{{.WaterCutRMS}}</td><td class="n">{{.CumOil}}</td><td class="n">{{.CumWater}}</td><td class="n">{{.BHPRMS}}</td></tr>{{end}}
</table>
<p class="meta">Breakthrough is the first history period whose water cut exceeds the threshold; the error is model minus observed (negative: the model's water arrives early). Cumulative errors are fractions of the observed volume at the end of the history; match.csv has every period.</p>
</section>

{{end}}{{if .HasAllocation}}
<section id="allocation">
<h2>Well-pair allocation</h2>
{{if .AllocationNote}}<p>{{.AllocationNote}}</p>{{end}}
<table>
<tr><th>Injector</th><th>Producer</th><th class="n">Rate ({{.RateUnit}})</th><th class="n">Share of injector</th><th class="n">Share of producer</th><th class="n">Pore volume ({{.VolUnit}})</th></tr>
{{range .Allocation}}<tr><td>{{.Injector}}</td><td>{{.Producer}}</td><td class="n">{{.Rate}}</td><td class="n">{{.FracInj}}</td><td class="n">{{.FracProd}}</td><td class="n">{{.PV}}</td></tr>
{{end}}</table>
</section>
{{end}}

{{if .Charts}}
<section id="charts">
<h2>Charts</h2>
{{range .Charts}}<figure><img {{.Src}} alt="{{.Alt}}"><figcaption>{{.Caption}}</figcaption></figure>
{{end}}</section>
{{end}}

{{if .Maps}}
<section id="maps">
<h2>Maps</h2>
{{range .Maps}}<figure><img {{.Src}} alt="{{.Alt}}"><figcaption>{{.Caption}}</figcaption></figure>
{{end}}</section>
{{end}}

{{with .Animation}}
<section id="animation">
<h2>Saturation over time</h2>
<figure><img {{.Src}} alt="{{.Alt}}"><figcaption>{{.Caption}}</figcaption></figure>
</section>
{{end}}

<section id="warnings">
<h2>Warnings</h2>
{{if .Warnings}}<ul class="plain">{{range .Warnings}}<li>{{.}}</li>{{end}}</ul>{{else}}<p>The run reported no warning.</p>{{end}}
{{if .Notes}}<p>Not drawn:</p><ul class="plain">{{range .Notes}}<li>{{.}}</li>{{end}}</ul>{{end}}
</section>

<section id="cautions">
<h2>Cautions</h2>
<div class="caution">
<p><b>These are screening estimates for planning.</b> They come from a two-dimensional, incompressible
streamline model with the simplifications of the method (no capillary pressure, gravity only along
the layer's dip where the case gives a depth, fluid and rock properties as entered). They rank and compare flood layouts; they are not forecasts for
regulatory filings, safety cases or investment decisions, which follow local regulations and a licensed
engineering review of a full reservoir study.</p>
{{if .Alerts}}<p><b style="color:var(--alarm)">Pressure limit:</b> {{range $i, $a := .Alerts}}{{if $i}}, {{end}}{{$a}}{{end}}
reached the maximum bottom-hole pressure given in the case (its fracture or permit limit). Injection above
such a limit is not allowed; the run held the well at the limit. Confirm the limit and the planned rate with
the responsible engineer before using these numbers.</p>{{else}}<p>No injector reached its maximum bottom-hole pressure.</p>{{end}}
<p>Breakthrough times, water cuts and recoveries depend on the permeability map, the relative-permeability
curves and the well controls entered; check their sensitivity before drawing conclusions.</p>
</div>
</section>

<footer>Drawn by floodtrace from the run outputs{{if .Source}} of {{.Source}}{{end}}. Every picture is embedded in this file.</footer>
</main>
</body>
</html>
`))
})

// dateSuffix returns " (YYYY-MM-DD)", the date of a day (date when
// given, else the day's date from start_date), or "" without start_date.
func (r *run) dateSuffix(day float64, date string) string {
	if r.sum.StartDate == "" {
		return ""
	}
	if date == "" {
		date = dateOf(r.sum.StartDate, day)
	}
	if date == "" {
		return ""
	}
	return " (" + date + ")"
}

// optDateSuffix is dateSuffix of a day that may not be reached.
func (r *run) optDateSuffix(p *float64) string {
	if p == nil || math.IsNaN(*p) {
		return ""
	}
	return r.dateSuffix(*p, "")
}

// historyReport builds the history section from the summary's history
// object, or nil without one.
func (r *run) historyReport() *historyReport {
	h := r.sum.History
	if h == nil {
		return nil
	}
	bt := func(days *float64, date string) string {
		if days == nil {
			return "none"
		}
		if date != "" {
			return date
		}
		return "day " + FormatNumber(*days, decimalsForDay(*days))
	}
	opt := func(p *float64, dec int) string {
		if p == nil {
			return "–"
		}
		return FormatNumber(*p, dec)
	}
	pct := func(p *float64) string {
		if p == nil {
			return "–"
		}
		return fmt.Sprintf("%+.1f%%", 100**p)
	}
	row := func(w runfolder.HistoryWell, name string) historyRow {
		e := "–"
		if w.BreakthroughErrorDays != nil {
			e = signedDays(*w.BreakthroughErrorDays)
		}
		return historyRow{Name: name, Type: nonEmpty(w.Type, "field"), ObservedBT: bt(w.ObservedBreakthroughDays, w.ObservedBreakthroughDate),
			ModelBT: bt(w.ModelBreakthroughDays, w.ModelBreakthroughDate), Error: e, WaterCutRMS: opt(w.WaterCutRMS, 3),
			CumOil: pct(w.CumOilError), CumWater: pct(w.CumWaterError), BHPRMS: opt(w.BHPRMS, 0)}
	}
	hr := &historyReport{Intro: fmt.Sprintf("The run against its production history to %s (%d rows, %d periods, wells driven by %s; %d pressure solves in the history window). Breakthrough threshold: water cut %s.",
		r.dayText(float64(h.EndDays), h.EndDate), h.Rows, h.Periods, nonEmpty(h.Drive, "rates"), h.PressureSolves, FormatNumber(float64(h.BreakthroughThreshold), 2))}
	for _, w := range h.Wells {
		hr.Wells = append(hr.Wells, row(w, w.Name))
	}
	hr.Field = row(h.Field, "Field")
	return hr
}

package render

import (
	"fmt"
	"html/template"
	"image"
	"image/color"
	"math"
	"sync"
)

// colChangeLines is the colour of the streamlines over the change map:
// a translucent near black that reads on both ends of the diverging scale
// and on its white middle.
var colChangeLines = color.RGBA{R: 28, G: 30, B: 36, A: 150}

// maxChangeLines is the most streamlines drawn over the change map; more
// would hide the colours near the wells, so every k-th line is drawn.
const maxChangeLines = 150

// drawFieldLines draws values as DrawField does, with the streamlines
// lines over the cells (thin, one translucent colour, under the wells;
// every k-th line when there are more than maxChangeLines) and a legend
// entry for them.
func drawFieldLines(s Scene, values []float64, sc Scale, lines []Polyline, w, h int) (*image.RGBA, error) {
	if err := checkScene(s); err != nil {
		return nil, err
	}
	if len(values) != s.Grid.N() {
		return nil, fmt.Errorf("render: %d values for a %dx%d grid", len(values), s.Grid.NX, s.Grid.NY)
	}
	for n, ln := range lines {
		if len(ln.X) != len(ln.Y) {
			return nil, fmt.Errorf("render: streamline %d has %d x and %d y values", n, len(ln.X), len(ln.Y))
		}
	}
	sc, err := sc.Resolve(values, s.Active)
	if err != nil {
		return nil, err
	}
	c, err := newMapCanvas(s, w, h)
	if err != nil {
		return nil, err
	}
	c.fillCells(cellColours(s, values, sc))
	c.depthContours()
	dc := c.dc
	c.clipMap()
	dc.SetLineCapRound()
	dc.SetLineJoinRound()
	step := (len(lines) + maxChangeLines - 1) / maxChangeLines
	drawn := 0
	dc.SetLineWidth(math.Max(0.6, 0.9*c.l.S))
	dc.SetColor(colChangeLines)
	for n := 0; n < len(lines); n += max(1, step) {
		ln := lines[n]
		drawn++
		if len(ln.X) < 2 {
			continue
		}
		for i := range ln.X {
			x, y := c.l.ToPixel(ln.X[i], ln.Y[i])
			if i == 0 {
				dc.MoveTo(x, y)
			} else {
				dc.LineTo(x, y)
			}
		}
		dc.Stroke()
	}
	dc.ResetClip()
	c.outline()
	c.faults(false)
	c.wells()
	c.faultLabels()
	c.contourLabels()
	c.header()
	noData := ""
	if hasNoData(s, values) {
		noData = "No value (no flow)"
	}
	c.panelHeading(sc.Label, sc.Unit)
	c.colourBar(sc)
	entries := c.standardEntries(noData)
	label := fmt.Sprintf("%s streamlines", FormatNumber(float64(drawn), 0))
	if drawn < len(lines) {
		label = fmt.Sprintf("%s of %s streamlines", FormatNumber(float64(drawn), 0), FormatNumber(float64(len(lines)), 0))
	}
	entries = append(entries, legendEntry{label, func(x, y float64) {
		c.swatch(x, y, color.RGBA{R: 247, G: 247, B: 247, A: 255}, false)
		c.dc.SetColor(colChangeLines)
		c.dc.SetLineWidth(math.Max(1, 2*c.l.S))
		c.dc.DrawLine(x-13*c.l.S, y+5*c.l.S, x+13*c.l.S, y-5*c.l.S)
		c.dc.Stroke()
	}})
	c.symbolLegend(float64(c.l.Bar.Max.Y)+56*c.l.S, entries)
	c.northAndScale()
	return c.img, nil
}

// CalibrationRow is one matched producer's row of the calibration
// report, formatted by the caller, in the order of the water-cut charts.
type CalibrationRow struct {
	Producer, ShiftBefore, ShiftAfter, BreakthroughBefore, BreakthroughAfter, WaterCutBefore, WaterCutAfter string
}

// CalibrationReport is the text of the calibration report: the headline
// lines, the producer table, the part of the map the data constrain, the
// warnings and the method.
type CalibrationReport struct {
	Title       string
	Headline    []string
	Rows        []CalibrationRow
	Constrained string
	Warnings    []string
	Method      []string
}

// WriteCalibrationReport writes report.html into the calibration folder
// dir: the headline, the misfit before and after per producer, the part
// of the map the data constrain, warnings, the method and the pictures
// (files relative to dir, drawn before, embedded). It returns the
// report's name relative to dir.
func WriteCalibrationReport(dir string, rep CalibrationReport, files []string) (string, error) {
	caption := map[string]string{
		CalibrationPriorMap:      "The given permeability along x (log scale, the same as the calibrated map's).",
		CalibrationCalibratedMap: "The calibrated permeability along x.",
		CalibrationChangeMap:     "The change, calibrated over given permeability, on a diverging scale centred on 1 (red raised, blue lowered), with the streamlines of the calibrated map: only the cells they cross toward the matched producers can change.",
		CalibrationMisfitChart:   "Travel-time misfit (root mean square of the producers' time shifts) against iteration.",
	}
	for k, r := range rep.Rows {
		caption[CalibrationWaterCutChart(k, r.Producer)] = "Producer " + r.Producer + ": water cut observed (period midpoints), with the given map and with the calibrated map."
	}
	figs, err := embedFigures(dir, files, caption)
	if err != nil {
		return "", err
	}
	return writePage(dir, calibrationTemplate(), struct {
		CalibrationReport
		Figures []pageFigure
	}{rep, figs}, "calibration")
}

var calibrationTemplate = sync.OnceValue(func() *template.Template {
	return template.Must(template.New("calibration").Parse(`` + pageHead("calibration") + `<body><main>
<header><div class="kicker">Calibration to the history</div><h1>{{.Title}}</h1>
{{range .Headline}}<div>{{.}}</div>{{end}}</header>
<section><h2>Producers</h2>
<table><tr><th>producer</th><th class="n">time shift before (days)</th><th class="n">after</th><th class="n">breakthrough error before (days)</th><th class="n">after</th><th class="n">water-cut RMS before</th><th class="n">after</th></tr>
{{range .Rows}}<tr><td>{{.Producer}}</td><td class="n">{{.ShiftBefore}}</td><td class="n">{{.ShiftAfter}}</td><td class="n">{{.BreakthroughBefore}}</td><td class="n">{{.BreakthroughAfter}}</td><td class="n">{{.WaterCutBefore}}</td><td class="n">{{.WaterCutAfter}}</td></tr>
{{end}}</table>
<p>{{.Constrained}}</p></section>
{{if .Warnings}}<section><h2>Warnings</h2>
{{range .Warnings}}<div class="flag">{{.}}</div>{{end}}</section>{{end}}
<section><h2>Pictures</h2>
{{range .Figures}}<figure><img src="{{.Src}}" alt=""><figcaption>{{.Caption}}</figcaption></figure>
{{end}}</section>
<section><h2>Method</h2>{{range .Method}}<p>{{.}}</p>{{end}}</section>
</main></body></html>
`))
})

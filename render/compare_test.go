package render

import (
	"bytes"
	"fmt"
	"regexp"
	"strings"
	"testing"
)

// TestPairSeriesChart: a pair chart draws each pair's A line solid and its
// B line dashed in the pair's colour, names each pair once in the legend,
// and keys the two line styles (legend lines only, no data).
func TestPairSeriesChart(t *testing.T) {
	var pairs []Pair
	for n, name := range []string{"PRD-1", "PRD-2", "PRD-3"} {
		p := Pair{Name: name}
		for d := 0.0; d <= 1800; d += 60 {
			p.AX, p.AY = append(p.AX, d), append(p.AY, float64(n+1)*d/10000)
			p.BX, p.BY = append(p.BX, d+15), append(p.BY, float64(n+1)*d/11000)
		}
		pairs = append(pairs, p)
	}
	c := Chart{Title: "Water cut of two runs", XLabel: "Time (days)", YLabel: "Water cut (fraction)",
		LegendTitle: "Producer", Series: PairSeries(pairs, "run A", "run B"), YMin: 0, YMax: 1}
	var b bytes.Buffer
	if err := WriteChart(&b, c, 1200, 700, "svg"); err != nil {
		t.Fatal(err)
	}
	svg := b.String()
	texts := svgTexts(svg)
	count := func(s string) int {
		n := 0
		for _, x := range texts {
			if x == s {
				n++
			}
		}
		return n
	}
	for _, name := range []string{"PRD-1", "PRD-2", "PRD-3", "run A", "run B"} {
		if got := count(name); got != 1 {
			t.Errorf("legend names %q %d times, want once", name, got)
		}
	}
	strokes := func(col string, dashed bool) int {
		re := regexp.MustCompile(`style="fill:none;stroke:` + col + `;stroke-width:[0-9.]+(;stroke-dasharray:[0-9.,]+)?"`)
		n := 0
		for _, m := range re.FindAllStringSubmatch(svg, -1) {
			if (m[1] != "") == dashed {
				n++
			}
		}
		return n
	}
	for i := range pairs {
		col, _ := SeriesStyle(i)
		hx := strings.ToUpper(hexString(col))
		// Solid: the A line and its legend key; dashed: the B line only.
		if s, d := strokes(hx, false), strokes(hx, true); s != 2 || d != 1 {
			t.Errorf("pair %d (%s): %d solid and %d dashed strokes, want 2 and 1", i, hx, s, d)
		}
	}
	grey := strings.ToUpper(hexString(pairKeyColor))
	if s, d := strokes(grey, false), strokes(grey, true); s != 1 || d != 1 {
		t.Errorf("style keys: %d solid and %d dashed grey strokes, want 1 and 1", s, d)
	}
	// pairDashes scale with the chart: 8 points at 810 points high, so
	// 8 x 525/810 = 5.185 at 700 pixels (525 points).
	if want := fmt.Sprintf("stroke-dasharray:%.3s", fmt.Sprint(pairDashes[0]*525/810)); !strings.Contains(svg, want) {
		t.Errorf("no dash pattern scaled from pairDashes: want %q", want)
	}
}

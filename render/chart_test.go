package render

import (
	"bytes"
	"fmt"
	"image/png"
	"math"
	"regexp"
	"strings"
	"testing"
)

func sampleChart(names ...string) Chart {
	c := Chart{Title: "Water cut by producer", Subtitle: "Quillback Ridge pilot", XLabel: "Time (days)",
		YLabel: "Water cut (fraction)", LegendTitle: "Producer", YMin: 0, YMax: 1}
	for n, name := range names {
		s := Series{Name: name}
		for d := 0.0; d <= 1800; d += 30 {
			s.X = append(s.X, d)
			s.Y = append(s.Y, math.Max(0, 1-math.Exp(-(d-200*float64(n))/600)))
		}
		c.Series = append(c.Series, s)
	}
	return c
}

// svgTexts returns the text content of every <text> element.
func svgTexts(svg string) []string {
	re := regexp.MustCompile(`(?s)<text[^>]*>(.*?)</text>`)
	var out []string
	for _, m := range re.FindAllStringSubmatch(svg, -1) {
		out = append(out, m[1])
	}
	return out
}

// TestChartSVGListsEveryName: every series name is a text element of the
// SVG (the legend), and the SVG has the requested size in CSS pixels.
func TestChartSVGListsEveryName(t *testing.T) {
	names := []string{"P-1", "P-2", "North flank 3", "PRD-4", "W&7 <east>", "P-6", "P-7", "P-8", "P-9"}
	var b bytes.Buffer
	if err := WriteChart(&b, sampleChart(names...), 1200, 700, "svg"); err != nil {
		t.Fatal(err)
	}
	svg := b.String()
	if !strings.Contains(svg, `<svg width="1200" height="700"`) {
		t.Errorf("SVG size attributes missing: %.200s", svg)
	}
	texts := strings.Join(svgTexts(svg), "\n")
	for _, n := range names {
		esc := strings.NewReplacer("&", "&amp;", "<", "&lt;", ">", "&gt;").Replace(n)
		if !strings.Contains(texts, esc) {
			t.Errorf("legend lacks %q", n)
		}
	}
	if !strings.Contains(svg, "sans-serif") {
		t.Error("no font fallback in the SVG")
	}
}

func TestChartPNG(t *testing.T) {
	for _, sz := range [][2]int{{1920, 1080}, {800, 500}} {
		var b bytes.Buffer
		if err := WriteChart(&b, sampleChart("P-1", "P-2"), sz[0], sz[1], ""); err != nil {
			t.Fatal(err)
		}
		img, err := png.Decode(&b)
		if err != nil {
			t.Fatal(err)
		}
		if img.Bounds().Dx() != sz[0] || img.Bounds().Dy() != sz[1] {
			t.Errorf("chart size %v, want %v", img.Bounds(), sz)
		}
		if n := distinctColours(img, 20); n < 20 {
			t.Errorf("chart has %d colours", n)
		}
	}
	// No data at all still draws axes and the legend.
	var b bytes.Buffer
	if err := WriteChart(&b, Chart{Title: "empty", Series: []Series{{Name: "P-1"}}}, 640, 400, "png"); err != nil {
		t.Fatal(err)
	}
}

func TestChartErrors(t *testing.T) {
	var b bytes.Buffer
	if err := WriteChart(&b, sampleChart("A"), 800, 600, "jpeg"); err == nil {
		t.Error("jpeg accepted")
	}
	if err := WriteChart(&b, sampleChart("A"), 10, 600, "png"); err == nil {
		t.Error("10 pixels wide accepted")
	}
}

// TestSeriesStylesDistinct: colour and dash together tell the first 64
// series apart.
func TestSeriesStylesDistinct(t *testing.T) {
	seen := map[string]int{}
	for i := range 64 {
		c, d := SeriesStyle(i)
		key := fmt.Sprint(c, d)
		if j, ok := seen[key]; ok {
			t.Fatalf("series %d looks like series %d", i, j)
		}
		seen[key] = i
	}
}

// TestSweepRange: the sweep chart's axis ends where the curve carries
// information, read from a curve shaped like a run's (fast rise, then a
// creep over thousands of pore volumes).
func TestSweepRange(t *testing.T) {
	var tD, sw []float64
	for x := 0.0; x < 20000; x = x*1.1 + 0.01 {
		tD = append(tD, x)
		sw = append(sw, 1-0.5*math.Exp(-x)-0.3/(1+x/50))
	}
	tD = append(tD, 20000)
	sw = append(sw, 1)
	for _, c := range []struct {
		end, want float64
	}{
		{0.94, 5.94}, // creeping curve: 5 pore volumes past the end
		{0, 0},       // no end given: where it settles (checked below)
		{30000, 20000},
	} {
		got := sweepRange(tD, sw, c.end)
		if c.end == 0 {
			k := 0
			for sw[len(sw)-1]-sw[k] > 0.02 {
				k++
			}
			c.want = tD[k]
		}
		if math.Abs(got-c.want) > 1e-9 {
			t.Errorf("end %g: axis to %g, want %g", c.end, got, c.want)
		}
	}
	// A curve that settles early ends the axis at twice the run's end.
	if got := sweepRange([]float64{0, 0.5, 1, 100}, []float64{0, 0.99, 1, 1}, 2); got != 4 {
		t.Errorf("settled curve: axis to %g, want 4", got)
	}
	if got := sweepRange(nil, nil, 1); got != 0 {
		t.Errorf("no data: %g", got)
	}
}

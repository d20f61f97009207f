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

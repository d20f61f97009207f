package render

import (
	"bytes"
	"context"
	htmlpkg "html"
	"image"
	"image/gif"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"testing"
	"time"

	"floodtrace/runfolder"
)

// outDir returns a fresh folder for a synthetic run; with
// FLOODTRACE_RENDER_KEEP set, the folder is made there and kept for
// inspection.
func outDir(t *testing.T, name string) string {
	t.Helper()
	if keep := os.Getenv("FLOODTRACE_RENDER_KEEP"); keep != "" {
		d := filepath.Join(keep, name)
		must(t, os.RemoveAll(d))
		must(t, os.MkdirAll(d, 0o755))
		return d
	}
	return t.TempDir()
}

var wantMaps = []string{"saturation_365", "saturation_1095", "saturation_1825", "streamlines", "tof",
	"injector_partition", "producer_partition", "pressure"}
var wantCharts = []string{"water_cut", "oil_rate", "cumulative_oil", "field_performance", "dynamic_curves", "f_phi", "sweep"}

func decodePNG(t *testing.T, path string) image.Image {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return img
}

func checkGIF(t *testing.T, path string, w, h, frames int) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	g, err := gif.DecodeAll(f)
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	if len(g.Image) != frames {
		t.Errorf("%s: %d frames, want %d", path, len(g.Image), frames)
	}
	for i, fr := range g.Image {
		if fr.Bounds().Dx() != w || fr.Bounds().Dy() != h {
			t.Errorf("frame %d size %v, want %dx%d", i, fr.Bounds(), w, h)
		}
		if n := distinctColours(fr, 20); n < 20 {
			t.Errorf("frame %d has %d colours", i, n)
		}
	}
	// Frames differ: the flood moves.
	if len(g.Image) > 1 && bytes.Equal(g.Image[0].Pix, g.Image[len(g.Image)-1].Pix) {
		t.Error("first and last frames are identical")
	}
}

// checkReport: one self-contained file (no network reference, no script,
// every image a data URI) holding the tables, names and cautions.
func checkReport(t *testing.T, path string, imgs int) {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	html := string(b)
	for _, bad := range []string{"http://", "https://", "<script", "<link", "@import", "url("} {
		if strings.Contains(html, bad) {
			t.Errorf("report holds %q", bad)
		}
	}
	srcs := regexp.MustCompile(`<img src="([^"]*)"`).FindAllStringSubmatch(html, -1)
	if len(srcs) != imgs {
		t.Errorf("report has %d images, want %d", len(srcs), imgs)
	}
	for _, s := range srcs {
		if !strings.HasPrefix(s[1], "data:image/") || !strings.Contains(s[1][:40], ";base64,") {
			t.Errorf("image source %.40q is not a data URI", s[1])
		}
	}
	for _, want := range []string{`id="summary"`, `id="wells"`, `id="breakthrough"`, `id="allocation"`, `id="cautions"`,
		`id="max-bhp-alert"`, "max BHP reached", "Quillback Ridge pilot, pattern B", "I-1", "P-1", "P-2",
		"not reached", "1,200,000 bbl", "960,000 bbl", "0.375", "Mass balance error", "licensed", "regulat"} {
		if !strings.Contains(html, want) {
			t.Errorf("report lacks %q", want)
		}
	}
}

// TestRunDefault draws a whole synthetic run at the default size and
// checks every output, then draws it again and compares the bytes.
func TestRunDefault(t *testing.T) {
	dir := outDir(t, "default")
	newSynthCase().write(t, dir)
	rep, err := Run(dir, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Notes) != 0 {
		t.Errorf("notes on a complete run: %v", rep.Notes)
	}
	for _, m := range wantMaps {
		img := decodePNG(t, filepath.Join(dir, "maps", m+".png"))
		if b := img.Bounds(); b.Dx() != 1920 || b.Dy() != 1080 {
			t.Errorf("map %s size %v", m, b)
		}
		if n := distinctColours(img, 20); n < 20 {
			t.Errorf("map %s has %d colours", m, n)
		}
	}
	for _, c := range wantCharts {
		img := decodePNG(t, filepath.Join(dir, "charts", c+".png"))
		if b := img.Bounds(); b.Dx() != 1920 || b.Dy() != 1080 {
			t.Errorf("chart %s size %v", c, b)
		}
		if n := distinctColours(img, 20); n < 20 {
			t.Errorf("chart %s has %d colours", c, n)
		}
	}
	checkGIF(t, filepath.Join(dir, "saturation.gif"), 960, 540, 12)
	checkReport(t, filepath.Join(dir, "report.html"), len(wantMaps)+len(wantCharts)+1)
	want := len(wantMaps) + len(wantCharts) + 2
	if len(rep.Files) != want {
		t.Errorf("report lists %d files, want %d: %v", len(rep.Files), want, rep.Files)
	}
	for _, f := range rep.Files {
		if _, err := os.Stat(filepath.Join(dir, f)); err != nil {
			t.Error(err)
		}
	}
	leftovers, _ := filepath.Glob(filepath.Join(dir, "*", ".*tmp*"))
	if len(leftovers) > 0 {
		t.Errorf("temporary files left: %v", leftovers)
	}

	// Deterministic bytes: a second drawing is identical.
	first := map[string][]byte{}
	for _, f := range rep.Files {
		b, err := os.ReadFile(filepath.Join(dir, f))
		must(t, err)
		first[f] = b
	}
	rep2, err := Run(dir, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(rep.Files, rep2.Files) {
		t.Errorf("second run wrote %v", rep2.Files)
	}
	for _, f := range rep2.Files {
		b, err := os.ReadFile(filepath.Join(dir, f))
		must(t, err)
		if !bytes.Equal(b, first[f]) {
			t.Errorf("%s differs between two drawings", f)
		}
	}
}

// TestRunSizeFormatFrames: a non-default size, SVG charts and a chosen
// frame count.
func TestRunSizeFormatFrames(t *testing.T) {
	dir := outDir(t, "svg")
	newSynthCase().write(t, dir)
	if _, err := Run(dir, Options{Width: 1000, Height: 700, Format: "svg", Frames: 4}); err != nil {
		t.Fatal(err)
	}
	for _, m := range wantMaps {
		img := decodePNG(t, filepath.Join(dir, "maps", m+".png"))
		if b := img.Bounds(); b.Dx() != 1000 || b.Dy() != 700 {
			t.Errorf("map %s size %v", m, b)
		}
	}
	for _, c := range []string{"water_cut", "oil_rate", "cumulative_oil", "dynamic_curves"} {
		b, err := os.ReadFile(filepath.Join(dir, "charts", c+".svg"))
		must(t, err)
		if !bytes.Contains(b, []byte(`<svg width="1000" height="700"`)) {
			t.Errorf("%s: wrong size", c)
		}
		texts := strings.Join(svgTexts(string(b)), "\n")
		for _, p := range []string{"P-1", "P-2"} {
			if !strings.Contains(texts, p) {
				t.Errorf("chart %s lacks producer %s", c, p)
			}
		}
	}
	b, err := os.ReadFile(filepath.Join(dir, "charts", "f_phi.svg"))
	must(t, err)
	if !strings.Contains(strings.Join(svgTexts(string(b)), " "), "0.375") {
		t.Error("F-Phi chart lacks the Lorenz coefficient")
	}
	checkGIF(t, filepath.Join(dir, "saturation.gif"), 500, 350, 4)
	html, err := os.ReadFile(filepath.Join(dir, "report.html"))
	must(t, err)
	if !strings.Contains(htmlpkg.UnescapeString(string(html)), "data:image/svg+xml;base64,") {
		t.Error("report does not embed the SVG charts")
	}
}

// TestRunPartialFolder: pictures whose inputs are absent are skipped and
// noted; the rest is drawn.
func TestRunPartialFolder(t *testing.T) {
	dir := outDir(t, "partial")
	newSynthCase().write(t, dir)
	for _, f := range []string{"streamlines.geojson", "f_phi.csv", "sweep.csv", "producer_partition.asc"} {
		must(t, os.Remove(filepath.Join(dir, f)))
	}
	must(t, os.RemoveAll(filepath.Join(dir, "frames")))
	rep, err := Run(dir, Options{Width: 640, Height: 360})
	if err != nil {
		t.Fatal(err)
	}
	notes := strings.Join(rep.Notes, "\n")
	for _, w := range []string{"streamlines.geojson", "f_phi.csv", "sweep.csv", "producer_partition.asc"} {
		if !strings.Contains(notes, w) {
			t.Errorf("notes lack %s: %v", w, rep.Notes)
		}
	}
	// The animation falls back to the snapshots.
	checkGIF(t, filepath.Join(dir, "saturation.gif"), 320, 180, 3)
	if _, err := os.Stat(filepath.Join(dir, "maps", "streamlines.png")); err == nil {
		t.Error("streamline map drawn without streamlines")
	}
}

// TestRunFramesNone: Frames runfolder.FramesNone (the rule of --frames
// none) draws every picture but the animation.
func TestRunFramesNone(t *testing.T) {
	dir := t.TempDir()
	newSynthCase().write(t, dir)
	rep, err := Run(dir, Options{Width: 640, Height: 400, Frames: runfolder.FramesNone})
	if err != nil {
		t.Fatal(err)
	}
	if slices.Contains(rep.Files, runfolder.AnimationFile) {
		t.Errorf("frames none drew %s", runfolder.AnimationFile)
	}
	if _, err := os.Stat(filepath.Join(dir, runfolder.AnimationFile)); err == nil {
		t.Errorf("frames none wrote %s", runfolder.AnimationFile)
	}
	if !slices.Contains(rep.Files, runfolder.ReportFile) {
		t.Errorf("frames none: no %s in %v", runfolder.ReportFile, rep.Files)
	}
}

func TestRunErrors(t *testing.T) {
	empty := t.TempDir()
	if _, err := Run(empty, Options{}); err == nil || !strings.Contains(err.Error(), "summary.json") {
		t.Errorf("empty folder: %v", err)
	}
	dir := t.TempDir()
	newSynthCase().write(t, dir)
	for _, o := range []Options{{Format: "bmp"}, {Width: 5, Height: 5}, {GIFWidth: 20000, GIFHeight: 10}} {
		if _, err := Run(dir, o); err == nil {
			t.Errorf("options %+v accepted", o)
		}
	}
	must(t, os.WriteFile(filepath.Join(dir, "tof.asc"), []byte("ncols 3\nnrows 3\ncellsize 1\n1 2 3\n"), 0o644))
	if _, err := Run(dir, Options{}); err == nil || !strings.Contains(err.Error(), "tof.asc") {
		t.Errorf("bad raster: %v", err)
	}
	bad := t.TempDir()
	must(t, os.WriteFile(filepath.Join(bad, "summary.json"), []byte(`{"grid": {"nx": 0}}`), 0o644))
	if _, err := Run(bad, Options{}); err == nil {
		t.Error("grid 0 accepted")
	}
	must(t, os.WriteFile(filepath.Join(bad, "summary.json"), []byte(`{"grid":`), 0o644))
	if _, err := Run(bad, Options{}); err == nil {
		t.Error("broken JSON accepted")
	}
}

// TestReportInChromium loads report.html in headless Chromium with the
// network disabled, takes a screenshot and checks it rendered.
func TestReportInChromium(t *testing.T) {
	const chromium = "/usr/bin/chromium"
	if _, err := os.Stat(chromium); err != nil {
		t.Skip("headless Chromium check skipped: /usr/bin/chromium not installed (apt-get install -y chromium)")
	}
	dir := outDir(t, "chromium")
	newSynthCase().write(t, dir)
	if _, err := Run(dir, Options{Width: 960, Height: 540, Frames: 3}); err != nil {
		t.Fatal(err)
	}
	tmp := t.TempDir()
	shot := filepath.Join(tmp, "shot.png")
	ctx, cancel := context.WithTimeout(context.Background(), 120*time.Second)
	defer cancel()
	abs, err := filepath.Abs(filepath.Join(dir, "report.html"))
	must(t, err)
	cmd := exec.CommandContext(ctx, chromium, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic",
		"--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync",
		"--user-data-dir="+filepath.Join(tmp, "profile"), "--screenshot="+shot, "--window-size=1280,2000",
		"file://"+abs)
	out, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("chromium: %v\n%s", err, out)
	}
	img := decodePNG(t, shot)
	if b := img.Bounds(); b.Dx() != 1280 || b.Dy() != 2000 {
		t.Errorf("screenshot size %v", b)
	}
	if n := distinctColours(img, 40); n < 40 {
		t.Errorf("screenshot has %d colours: blank page?", n)
	}
	// The title block (dark text on white) is at the top: the top band is
	// not a single colour.
	top := img.(interface {
		SubImage(image.Rectangle) image.Image
	}).SubImage(image.Rect(0, 0, 1280, 200))
	if n := distinctColours(top, 10); n < 10 {
		t.Errorf("screenshot top band has %d colours", n)
	}
}

package render

import (
	"bytes"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"testing"
)

// TestRunSameBytesAnyCoreCount draws the synthetic run with GOMAXPROCS 1,
// 2 and 3: the pictures are drawn in parallel (and the animation frames
// within), so every file, the list of files and the report must be the
// same byte for byte whatever the number of cores.
func TestRunSameBytesAnyCoreCount(t *testing.T) {
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(0))
	var ref *Report
	var refDir string
	for _, procs := range []int{1, 2, 3} {
		dir := t.TempDir()
		newSynthCase().write(t, dir)
		runtime.GOMAXPROCS(procs)
		rep, err := Run(dir, Options{Width: 960, Height: 540})
		if err != nil {
			t.Fatal(err)
		}
		if ref == nil {
			ref, refDir = rep, dir
			if !slices.Contains(rep.Files, "saturation.gif") || !slices.Contains(rep.Files, "report.html") {
				t.Fatalf("files %v lack the animation or the report", rep.Files)
			}
			continue
		}
		if !slices.Equal(rep.Files, ref.Files) || !slices.Equal(rep.Notes, ref.Notes) {
			t.Fatalf("GOMAXPROCS %d: files %v notes %v, with 1: %v %v", procs, rep.Files, rep.Notes, ref.Files, ref.Notes)
		}
		for _, f := range rep.Files {
			a, err := os.ReadFile(filepath.Join(refDir, f))
			must(t, err)
			b, err := os.ReadFile(filepath.Join(dir, f))
			must(t, err)
			if !bytes.Equal(a, b) {
				t.Errorf("GOMAXPROCS %d: %s differs from the picture drawn on one core", procs, f)
			}
		}
	}
}

// TestLayeredFrameMatchesDrawField compares an animation frame (cells
// under a layer drawn once, then the subtitle) with the same map drawn in
// full by DrawField: they may differ only by the rounding of blending the
// antialiased edges over the map once instead of stroke by stroke (a few
// units of 255; measured 2), and only in a few pixels.
func TestLayeredFrameMatchesDrawField(t *testing.T) {
	c := newSynthCase()
	s := c.scene()
	s.Subtitle = "Water saturation · day 1,095"
	v := c.satValues(1095)
	sc := Scale{Label: "Water saturation", Min: 0.2, Max: 0.8, Map: &SaturationColors}
	want, err := DrawField(s, v, sc, 960, 540)
	must(t, err)
	layer, err := fieldLayer(s, sc, hasNoData(s, v), 960, 540)
	must(t, err)
	got, err := layeredFrame(s, v, sc, layer, newFaces())
	must(t, err)
	maxd, n := 0, 0
	for i := range want.Pix {
		d := int(want.Pix[i]) - int(got.Pix[i])
		d = max(d, -d)
		if d > 0 {
			n++
		}
		maxd = max(maxd, d)
	}
	t.Logf("%d channel values differ, by at most %d", n, maxd)
	if maxd > 6 || n > len(want.Pix)/100 {
		t.Errorf("frame differs from DrawField's map in %d channel values, by up to %d", n, maxd)
	}
}

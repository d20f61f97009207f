package main

import (
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestCompareTwoRuns: compare prints a line per common producer and draws
// the chart through render at the requested size; a chart name that is
// neither .png nor .svg is a usage error.
func TestCompareTwoRuns(t *testing.T) {
	tmp := t.TempDir()
	a, b := filepath.Join(tmp, "a"), filepath.Join(tmp, "b")
	for dir, n := range map[string]string{a: "200", b: "400"} {
		if code, _, e := run(t, "run", demo, "--out", dir, "--streamlines", n, "--pictures", "none", "-q"); code != 0 {
			t.Fatalf("run %s: code %d: %s", dir, code, e)
		}
	}
	chart := filepath.Join(tmp, "cmp.png")
	code, out, e := run(t, "compare", a, b, "--out", chart, "--size", "800x500")
	if code != 0 {
		t.Fatalf("compare: code %d: %s", code, e)
	}
	for _, want := range []string{"producer", "RMS water", "\nall ", "chart: " + chart} {
		if !strings.Contains(out, want) {
			t.Errorf("compare output lacks %q:\n%s", want, out)
		}
	}
	f, err := os.Open(chart)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatal(err)
	}
	if img.Bounds().Dx() != 800 || img.Bounds().Dy() != 500 {
		t.Errorf("chart is %v, want 800x500", img.Bounds())
	}
	if code, _, _ := run(t, "compare", a, b, "--out", filepath.Join(tmp, "cmp.txt")); code != 2 {
		t.Errorf("--out cmp.txt: code %d, want the usage code 2", code)
	}
}

package render

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"
)

// TestRunMinimal: Options.Minimal draws the last saturation snapshot and
// nothing else. Its colour scale comes from the snapshots only; in the
// synthetic case the last snapshot spans the widest range, so the picture
// is the same as the one a full drawing makes.
func TestRunMinimal(t *testing.T) {
	full := outDir(t, "minimal-full")
	newSynthCase().write(t, full)
	if _, err := Run(full, Options{}); err != nil {
		t.Fatal(err)
	}
	dir := outDir(t, "minimal")
	newSynthCase().write(t, dir)
	rep, err := Run(dir, Options{Minimal: true})
	if err != nil {
		t.Fatal(err)
	}
	want := filepath.Join("maps", "saturation_1825.png")
	if len(rep.Files) != 1 || rep.Files[0] != want {
		t.Fatalf("minimal drawing wrote %v, want [%s]", rep.Files, want)
	}
	for _, absent := range []string{"report.html", "saturation.gif", filepath.Join("maps", "tof.png"), filepath.Join("charts", "water_cut.png")} {
		if _, err := os.Stat(filepath.Join(dir, absent)); err == nil {
			t.Errorf("minimal drawing wrote %s", absent)
		}
	}
	a, err := os.ReadFile(filepath.Join(dir, want))
	must(t, err)
	b, err := os.ReadFile(filepath.Join(full, want))
	must(t, err)
	if !bytes.Equal(a, b) {
		t.Errorf("%s differs from the full drawing's", want)
	}
}

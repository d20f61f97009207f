package main

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"floodtrace/flood"
	"floodtrace/internal/outdir"
	"floodtrace/pressure"
	"floodtrace/reservoir"
)

// TestExitFor: each kind of failure gets its own exit code, and the
// message says whose fault it is.
func TestExitFor(t *testing.T) {
	for _, tc := range []struct {
		name string
		err  error
		code int
		says string
	}{
		{"input", &reservoir.InputError{Path: "c.yaml", Line: 3, Msg: "rock.perm is negative"}, exitInput, "c.yaml:3"},
		{"wrapped input", fmt.Errorf("run: %w", &reservoir.InputError{Path: "c.yaml", Msg: "x"}), exitInput, "c.yaml"},
		{"solver", fmt.Errorf("pressure: %w", &pressure.SolverError{Err: errors.New("breakdown")}), exitInternal, "please report"},
		{"unphysical", &flood.UnphysicalError{Msg: "injector I-1 produces"}, exitInternal, "internal error"},
		{"write", &outdir.WriteError{Path: "out/field.csv", Err: errors.New("no space left on device")}, exitWrite, "input is not at fault"},
		{"wrapped write", fmt.Errorf("writing: %w", &outdir.WriteError{Path: "p", Err: errors.New("x")}), exitWrite, "cannot write p"},
	} {
		code, msg := exitFor(tc.err)
		if code != tc.code || !strings.Contains(msg, tc.says) {
			t.Errorf("%s: exit %d %q, want %d and %q", tc.name, code, msg, tc.code, tc.says)
		}
	}
}

// TestWriteFailureExit: an output folder that cannot be made (its parent
// is a file) is a write failure, exit 4, not bad input.
func TestWriteFailureExit(t *testing.T) {
	dir := t.TempDir()
	blocker := filepath.Join(dir, "a-file")
	if err := os.WriteFile(blocker, []byte("x"), 0o644); err != nil {
		t.Fatal(err)
	}
	code, _, errOut := run(t, "run", filepath.Join("..", "..", "examples", "vardel", "case.yaml"), "--out", filepath.Join(blocker, "run"), "--pictures", "none", "-q")
	if code != exitWrite || !strings.Contains(errOut, "cannot write") {
		t.Errorf("exit %d, stderr %q; want %d and a write failure", code, errOut, exitWrite)
	}
}

// TestRenderReplacesPictures: a second render with another format or
// size replaces the set of pictures: no chart of the old format stays, the
// animation of a render without frames is gone, and the run's data files
// stay.
func TestRenderReplacesPictures(t *testing.T) {
	dir := t.TempDir()
	demo := filepath.Join("..", "..", "examples", "vardel", "case.yaml")
	if code, _, e := run(t, "run", demo, "--out", dir, "-q", "--streamlines", "300", "--size", "640x360"); code != 0 {
		t.Fatalf("run: %d %s", code, e)
	}
	count := func(sub, ext string) int {
		ents, _ := os.ReadDir(filepath.Join(dir, sub))
		n := 0
		for _, e := range ents {
			if strings.HasSuffix(e.Name(), ext) {
				n++
			}
		}
		return n
	}
	if count("charts", ".png") == 0 {
		t.Fatal("the run drew no PNG chart")
	}
	if code, _, e := run(t, "render", dir, "--format", "svg", "--size", "800x450", "--frames", "none"); code != 0 {
		t.Fatalf("render: %d %s", code, e)
	}
	if n := count("charts", ".png"); n != 0 {
		t.Errorf("%d PNG chart(s) of the first render stayed beside the SVG ones", n)
	}
	if count("charts", ".svg") == 0 {
		t.Error("no SVG chart drawn")
	}
	if _, err := os.Stat(filepath.Join(dir, "saturation.gif")); err == nil {
		t.Error("the old animation stayed")
	}
	for _, f := range []string{"summary.json", "field.csv", "f_phi.csv", "pressure.asc"} {
		if _, err := os.Stat(filepath.Join(dir, f)); err != nil {
			t.Errorf("the redraw removed %s", f)
		}
	}
	man, _ := os.ReadFile(filepath.Join(dir, outdir.Manifest))
	if strings.Contains(string(man), "charts/water_cut.png") {
		t.Errorf("the manifest still lists old charts:\n%s", man)
	}
}

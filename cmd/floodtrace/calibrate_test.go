package main

import (
	"path/filepath"
	"strings"
	"testing"
)

// TestCalibrateInputErrors: calibrate on a case without a history, or
// with a calibration block the loader refuses, exits 1 naming the file.
func TestCalibrateInputErrors(t *testing.T) {
	for _, c := range []struct{ name, path, want string }{
		{"no history", filepath.Join("..", "..", "examples", "vardel", "case.yaml"), "calibrate needs a production history"},
		{"block without history", filepath.Join("..", "..", "testdata", "bad", "calibration_without_history", "case.yaml"), "calibration: needs a production history"},
		{"dry history", filepath.Join("..", "..", "testdata", "bad", "calibration_dry_history", "case.yaml"), "no producer ever shows water"},
	} {
		t.Run(c.name, func(t *testing.T) {
			code, _, errOut := run(t, "calibrate", c.path, "--out", t.TempDir(), "-q")
			if code != 1 || !strings.Contains(errOut, c.want) {
				t.Errorf("exit %d, stderr %q; want 1 and %q", code, errOut, c.want)
			}
		})
	}
	if code, _, _ := run(t, "calibrate", "x.yaml"); code != 2 {
		t.Errorf("calibrate without --out: exit %d, want 2", code)
	}
}

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

package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strings"
	"testing"

	"floodtrace/pressure"
)

func run(t *testing.T, args ...string) (code int, out, errOut string) {
	t.Helper()
	var o, e bytes.Buffer
	code = runMain(args, &o, &e)
	return code, o.String(), e.String()
}

// TestBadInputCorpus runs `check` on every malformed case of
// testdata/bad: each must end with exit code 1 and a message naming the
// file and the culprit (the text of its expect.txt).
func TestBadInputCorpus(t *testing.T) {
	dirs, err := filepath.Glob("../../testdata/bad/*")
	if err != nil {
		t.Fatal(err)
	}
	if len(dirs) < 30 {
		t.Fatalf("only %d malformed cases in testdata/bad", len(dirs))
	}
	for _, d := range dirs {
		t.Run(filepath.Base(d), func(t *testing.T) {
			want, err := os.ReadFile(filepath.Join(d, "expect.txt"))
			if err != nil {
				t.Fatal(err)
			}
			for _, cmd := range []string{"check", "run"} {
				args := []string{cmd, filepath.Join(d, "case.yaml")}
				// The output folder holds an earlier result: a refused
				// case must leave it as it was, even with --force.
				out := t.TempDir()
				sentinel := filepath.Join(out, "summary.json")
				if err := os.WriteFile(sentinel, []byte("earlier run\n"), 0o644); err != nil {
					t.Fatal(err)
				}
				if cmd == "run" {
					args = append(args, "--out", out, "--no-pictures", "--force")
				}
				code, _, e := run(t, args...)
				if b, err := os.ReadFile(sentinel); err != nil || string(b) != "earlier run\n" {
					t.Errorf("%s: the earlier summary.json was overwritten or removed (%v)", cmd, err)
				}
				if ents, _ := os.ReadDir(out); len(ents) != 1 {
					t.Errorf("%s: the output folder has %d entries, want the earlier file only", cmd, len(ents))
				}
				if code != exitInput {
					t.Errorf("%s: exit code %d, want 1; stderr:\n%s", cmd, code, e)
				}
				if w := strings.TrimSpace(string(want)); !strings.Contains(e, w) {
					t.Errorf("%s: message %q does not contain %q", cmd, e, w)
				}
				if strings.Contains(e, "goroutine ") || strings.Contains(e, "panic") {
					t.Errorf("%s: a stack trace reached the user:\n%s", cmd, e)
				}
			}
		})
	}
}

func TestUsageErrors(t *testing.T) {
	for _, args := range [][]string{
		{},
		{"nosuch"},
		{"run"},
		{"run", "a.yaml"},
		{"check", "a", "b"},
		{"run", "a.yaml", "--out", "x", "--size", "12"},
		{"run", "a.yaml", "--bogus"},
	} {
		code, _, e := run(t, args...)
		if code != exitUsage {
			t.Errorf("%v: exit code %d, want 2 (%s)", args, code, e)
		}
	}
	code, _, e := run(t, "rnu")
	if code != exitUsage || !strings.Contains(e, `did you mean "run"`) {
		t.Errorf("a misspelt command should be suggested: %d %s", code, e)
	}
}

func TestHelpEverywhere(t *testing.T) {
	for name := range commands {
		code, out, _ := run(t, name, "--help")
		if code != exitOK || !strings.Contains(out, "usage: floodtrace "+name) || !strings.Contains(out, "Example") {
			t.Errorf("%s --help: code %d, output:\n%s", name, code, out)
		}
	}
	if code, out, _ := run(t, "--version"); code != 0 || !strings.HasPrefix(out, "floodtrace ") {
		t.Errorf("--version: %d %q", code, out)
	}
}

// TestPanicBecomesInternalError checks that a panic reaches the user as a
// short message and exit code 3, with the stack only under --debug.
func TestPanicBecomesInternalError(t *testing.T) {
	register(&command{Name: "zz-panic", Usage: "zz-panic", Short: "test", Long: "Example: none", Run: func([]string) error {
		var m map[string]int
		m["x"] = 1 // a nil-map write panics
		return nil
	}})
	defer delete(commands, "zz-panic")
	code, _, e := run(t, "zz-panic")
	if code != exitInternal || !strings.Contains(e, "internal error") || !strings.Contains(e, "please report") || strings.Contains(e, "goroutine") {
		t.Errorf("code %d, stderr:\n%s", code, e)
	}
	code, _, e = run(t, "zz-panic", "--debug")
	if code != exitInternal || !strings.Contains(e, "goroutine") {
		t.Errorf("--debug should print the stack: code %d, stderr:\n%s", code, e)
	}
}

const demo = "../../examples/vardel/case.yaml"

func TestCheckDemo(t *testing.T) {
	code, out, e := run(t, "check", demo)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, e)
	}
	for _, w := range []string{"Vardel Flats", "INJ-1", "PRD-5", "OOIP", "memory"} {
		if !strings.Contains(out, w) {
			t.Errorf("check output lacks %q:\n%s", w, out)
		}
	}
}

// TestOutputFolderSafety: a folder holding someone else's files is refused
// unless --force, and with --force those files are left alone; a rerun into
// floodtrace's own folder needs no --force.
func TestOutputFolderSafety(t *testing.T) {
	dir := t.TempDir()
	mine := filepath.Join(dir, "notes.txt")
	if err := os.WriteFile(mine, []byte("keep me"), 0o644); err != nil {
		t.Fatal(err)
	}
	code, _, e := run(t, "run", demo, "--out", dir, "--no-pictures", "-q")
	if code != exitInput || !strings.Contains(e, "notes.txt") || !strings.Contains(e, "--force") {
		t.Fatalf("code %d: %s", code, e)
	}
	if _, err := os.Stat(filepath.Join(dir, "summary.json")); err == nil {
		t.Fatal("a refused run wrote files")
	}
	if code, _, e = run(t, "run", demo, "--out", dir, "--no-pictures", "-q", "--force"); code != 0 {
		t.Fatalf("--force: code %d: %s", code, e)
	}
	if b, _ := os.ReadFile(mine); string(b) != "keep me" {
		t.Fatal("the user's file was changed")
	}
	out := filepath.Join(t.TempDir(), "run")
	for i := 0; i < 2; i++ {
		if code, _, e = run(t, "run", demo, "--out", out, "--no-pictures", "-q"); code != 0 {
			t.Fatalf("run %d into floodtrace's own folder: code %d: %s", i, code, e)
		}
	}
	ents, _ := os.ReadDir(out)
	for _, e := range ents {
		if strings.Contains(e.Name(), "floodtrace-tmp") {
			t.Errorf("temporary file left behind: %s", e.Name())
		}
	}
}

// TestDeterministicOutputs runs the demo with 1, 2 and 8 cores and
// requires byte-identical data files.
func TestDeterministicOutputs(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the demo three times")
	}
	prev := runtime.GOMAXPROCS(0)
	defer runtime.GOMAXPROCS(prev)
	var ref map[string][]byte
	for _, procs := range []int{1, 2, 8} {
		runtime.GOMAXPROCS(procs)
		dir := t.TempDir()
		if code, _, e := run(t, "run", demo, "--out", dir, "--no-pictures", "-q"); code != 0 {
			t.Fatalf("GOMAXPROCS=%d: code %d: %s", procs, code, e)
		}
		files := map[string][]byte{}
		filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
			if err == nil && !d.IsDir() {
				rel, _ := filepath.Rel(dir, p)
				files[rel], _ = os.ReadFile(p)
			}
			return nil
		})
		if ref == nil {
			ref = files
			if len(ref) < 10 {
				t.Fatalf("only %d files written", len(ref))
			}
			continue
		}
		for name, b := range ref {
			if !bytes.Equal(files[name], b) {
				t.Errorf("GOMAXPROCS=%d: %s differs from the 1-core run", procs, name)
			}
		}
	}
}

// TestSummaryWrittenLast: summary.json marks a finished run, so it must be
// the last file the run writes (pictures included).
func TestSummaryWrittenLast(t *testing.T) {
	dir := t.TempDir()
	if code, _, e := run(t, "run", demo, "--out", dir, "-q", "--size", "640x360"); code != 0 {
		t.Fatalf("code %d: %s", code, e)
	}
	st, err := os.Stat(filepath.Join(dir, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err != nil || d.IsDir() || filepath.Base(p) == "summary.json" || filepath.Base(p) == ".floodtrace-files" {
			return nil
		}
		n++
		if fi, err := d.Info(); err == nil && fi.ModTime().After(st.ModTime()) {
			t.Errorf("%s was written after summary.json", p)
		}
		return nil
	})
	if n < 20 {
		t.Errorf("only %d files besides summary.json", n)
	}
}

// TestFramesFlag: --frames takes one rule in run and render (auto, none
// or a count; runfolder.FramesAuto and FramesNone), 0 and negative counts
// are usage errors, --no-pictures is an alias of --pictures none, and
// --pictures minimal keeps no frames unless given a count.
func TestFramesFlag(t *testing.T) {
	dir := t.TempDir()
	if code, _, e := run(t, "run", demo, "--out", dir, "-q", "--pictures", "none", "--frames", "none"); code != 0 {
		t.Fatalf("code %d: %s", code, e)
	}
	if _, err := os.Stat(filepath.Join(dir, "frames")); err == nil {
		t.Error("--frames none wrote animation frames")
	}
	dir = t.TempDir()
	if code, _, e := run(t, "run", demo, "--out", dir, "-q", "--no-pictures", "--frames", "5"); code != 0 {
		t.Fatalf("code %d: %s", code, e)
	}
	if ents, _ := os.ReadDir(filepath.Join(dir, "frames")); len(ents) != 5 {
		t.Errorf("--frames 5 wrote %d frames", len(ents))
	}
	if _, err := os.Stat(filepath.Join(dir, "report.html")); err == nil {
		t.Error("--no-pictures drew the report")
	}
	auto := t.TempDir()
	if code, _, e := run(t, "run", demo, "--out", auto, "-q", "--pictures", "none", "--frames", "auto"); code != 0 {
		t.Fatalf("code %d: %s", code, e)
	}
	// The demo has 122 report times: auto keeps 40 (the cap, flood/fixed.go).
	if ents, _ := os.ReadDir(filepath.Join(auto, "frames")); len(ents) != 40 {
		t.Errorf("--frames auto wrote %d frames, want 40", len(ents))
	}
	// --pictures minimal draws no animation: auto keeps no frames then,
	// a count still keeps that many (its data files: TestDataFlag).
	minimal := t.TempDir()
	if code, _, e := run(t, "run", demo, "--out", minimal, "-q", "--pictures", "minimal"); code != 0 {
		t.Fatalf("code %d: %s", code, e)
	}
	if _, err := os.Stat(filepath.Join(minimal, "frames")); err == nil {
		t.Error("--pictures minimal wrote animation frames")
	}
	minimal = t.TempDir()
	if code, _, e := run(t, "run", demo, "--out", minimal, "-q", "--pictures", "minimal", "--frames", "3"); code != 0 {
		t.Fatalf("code %d: %s", code, e)
	}
	if ents, _ := os.ReadDir(filepath.Join(minimal, "frames")); len(ents) != 3 {
		t.Errorf("--pictures minimal --frames 3 wrote %d frames", len(ents))
	}
	for _, bad := range [][]string{{"--frames", "-3"}, {"--frames", "0"}, {"--frames", "lots"}, {"--no-pictures", "--pictures", "minimal"}} {
		args := append([]string{"run", demo, "--out", t.TempDir()}, bad...)
		if code, _, e := run(t, args...); code != exitUsage {
			t.Errorf("%v: exit %d, want 2", bad, code)
		} else if bad[1] == "0" && !strings.Contains(e, "none") {
			t.Errorf("--frames 0: message %q does not point at none", e)
		}
	}
	if code, _, e := run(t, "render", dir, "--size", "640x400", "--frames", "none"); code != 0 {
		t.Fatalf("render --frames none: code %d: %s", code, e)
	}
	if _, err := os.Stat(filepath.Join(dir, "saturation.gif")); err == nil {
		t.Error("render --frames none drew the animation")
	}
	if _, err := os.Stat(filepath.Join(dir, "report.html")); err != nil {
		t.Error("render --frames none drew no report")
	}
	if code, _, _ := run(t, "render", dir, "--frames", "0"); code != exitUsage {
		t.Errorf("render --frames 0: exit %d, want 2", code)
	}
}

// TestSolverErrorIsInternal checks that a breakdown of the pressure solver
// on a validated case reaches the user as an internal error, exit code 3,
// saying what broke.
// TestDataFlag: --data chooses the rasters and polylines beside the
// tables (runfolder.Data). auto writes them all with --pictures all or
// none and only the snapshots with --pictures minimal; a list writes
// exactly its groups; every file written is byte-identical to the same
// file of a run that writes them all; render and compare work on a folder
// of tables only; an unknown group is a usage error.
func TestDataFlag(t *testing.T) {
	heavy := []string{"pressure.asc", "tof.asc", "tof_producers.asc", "injector_partition.asc", "producer_partition.asc", "streamlines.geojson", "saturation_3650.asc"}
	folder := func(args ...string) (string, map[string][]byte) {
		t.Helper()
		dir := t.TempDir()
		if code, _, e := run(t, append([]string{"run", demo, "--out", dir, "-q", "--frames", "none"}, args...)...); code != 0 {
			t.Fatalf("%v: code %d: %s", args, code, e)
		}
		files := map[string][]byte{}
		ents, _ := os.ReadDir(dir)
		for _, e := range ents {
			if !e.IsDir() && !strings.HasPrefix(e.Name(), ".") {
				b, err := os.ReadFile(filepath.Join(dir, e.Name()))
				if err != nil {
					t.Fatal(err)
				}
				files[e.Name()] = b
			}
		}
		return dir, files
	}
	_, all := folder("--pictures", "none")
	for _, name := range heavy {
		if all[name] == nil {
			t.Fatalf("--pictures none (data auto) did not write %s", name)
		}
	}
	for _, c := range []struct {
		args []string
		want []string // of heavy
	}{
		{[]string{"--pictures", "minimal"}, []string{"saturation_3650.asc"}},
		{[]string{"--pictures", "minimal", "--data", "all"}, heavy},
		{[]string{"--pictures", "none", "--data", "tof,streamlines"}, []string{"tof.asc", "tof_producers.asc", "streamlines.geojson"}},
		{[]string{"--pictures", "none", "--data", "Pressure, partitions"}, []string{"pressure.asc", "injector_partition.asc", "producer_partition.asc"}},
		{[]string{"--pictures", "none", "--data", "tables"}, nil},
	} {
		dir, files := folder(c.args...)
		for _, name := range heavy {
			if got, want := files[name] != nil, slices.Contains(c.want, name); got != want {
				t.Errorf("%v: %s written %v, want %v", c.args, name, got, want)
			}
		}
		for name, b := range files {
			if name == "summary.json" {
				continue
			}
			if !bytes.Equal(b, all[name]) {
				t.Errorf("%v: %s differs from the run that writes every file", c.args, name)
			}
		}
		for _, name := range []string{"summary.json", "producers.csv", "field.csv", "wells.csv", "sweep.csv", "f_phi.csv", "allocation.csv"} {
			if files[name] == nil {
				t.Errorf("%v: no %s", c.args, name)
			}
		}
		// The summary names a snapshot file only when it is written.
		var sum struct {
			Snapshots []struct{ File string } `json:"snapshots"`
		}
		if err := json.Unmarshal(files["summary.json"], &sum); err != nil || len(sum.Snapshots) == 0 {
			t.Fatalf("%v: summary.json: %v", c.args, err)
		}
		for _, sn := range sum.Snapshots {
			if written := slices.Contains(c.want, "saturation_3650.asc"); (sn.File != "") != written {
				t.Errorf("%v: snapshot file %q, written %v", c.args, sn.File, written)
			}
		}
		if slices.Contains(c.args, "minimal") {
			if m, _ := filepath.Glob(filepath.Join(dir, "maps", "saturation_*.png")); len(m) != 1 {
				t.Errorf("%v: %d saturation maps drawn, want 1", c.args, len(m))
			}
		}
		if slices.Contains(c.args, "tables") {
			// What the folder lacks is noted, not an error.
			if code, _, e := run(t, "render", dir, "--size", "640x360"); code != 0 {
				t.Errorf("render of a tables-only folder: code %d: %s", code, e)
			}
			if code, _, e := run(t, "compare", dir, dir, "--out", filepath.Join(t.TempDir(), "compare.png")); code != 0 {
				t.Errorf("compare of a tables-only folder: code %d: %s", code, e)
			}
		}
	}
	// A run into the folder of an earlier one draws nothing from the
	// earlier run's files that it leaves out, and removes them.
	dir := t.TempDir()
	for _, data := range []string{"all", "pressure"} {
		if code, _, e := run(t, "run", demo, "--out", dir, "-q", "--frames", "none", "--size", "640x360", "--data", data); code != 0 {
			t.Fatalf("--data %s: code %d: %s", data, code, e)
		}
	}
	for _, name := range []string{"tof.asc", "streamlines.geojson", "saturation_3650.asc", "maps/tof.png", "maps/streamlines.png", "maps/saturation_3650.png", "maps/injector_partition.png"} {
		if _, err := os.Stat(filepath.Join(dir, name)); err == nil {
			t.Errorf("rerun with --data pressure: %s is in the folder", name)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "maps", "pressure.png")); err != nil {
		t.Errorf("rerun with --data pressure: %v", err)
	}
	for _, bad := range []string{"maps", "", "tof,,pressure"} {
		if code, _, e := run(t, "run", demo, "--out", t.TempDir(), "--data", bad); code != exitUsage || !strings.Contains(e, "snapshots") {
			t.Errorf("--data %q: exit %d, want 2 and the known groups; stderr %q", bad, code, e)
		}
	}
}

func TestSolverErrorIsInternal(t *testing.T) {
	register(&command{Name: "zz-solver", Usage: "zz-solver", Short: "test", Long: "Example: none", Run: func([]string) error {
		return fmt.Errorf("flood: solve at day 0: %w", &pressure.SolverError{Stage: "preconditioner", Unknowns: 12, Err: errors.New("sparse: incomplete Cholesky: diagonal entry 0 is +Inf, not positive")})
	}})
	defer delete(commands, "zz-solver")
	code, _, e := run(t, "zz-solver")
	if code != exitInternal {
		t.Errorf("exit code %d, want 3", code)
	}
	for _, w := range []string{"internal error", "pressure solver broke down: preconditioner of 12 unknowns", "diagonal entry 0 is +Inf", "please report"} {
		if !strings.Contains(e, w) {
			t.Errorf("stderr lacks %q:\n%s", w, e)
		}
	}
}

// TestCaseWarningsReachTheUser checks that a warning of the case (here a
// fault multiplier above 1) is listed by check, printed by run and kept in
// summary.json, and that the demo has none.
func TestCaseWarningsReachTheUser(t *testing.T) {
	base, err := os.ReadFile("../../testdata/bad/fault_multiplier_absurd/case.yaml")
	if err != nil {
		t.Fatal(err)
	}
	text := strings.Replace(string(base), "multiplier: 1e5", "multiplier: 5", 1)
	dir := t.TempDir()
	p := filepath.Join(dir, "case.yaml")
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	want := p + `:15: fault "F-1": multiplier 5 is above 1: the fault is a conduit`
	code, out, e := run(t, "check", p)
	if code != exitOK || !strings.Contains(out, "warnings    1") || !strings.Contains(out, want) {
		t.Errorf("check: exit %d, output:\n%s%s", code, out, e)
	}
	outDir := filepath.Join(dir, "out")
	code, _, e = run(t, "run", p, "--out", outDir, "--no-pictures")
	if code != exitOK || !strings.Contains(e, "warning: "+want) {
		t.Errorf("run: exit %d, stderr:\n%s", code, e)
	}
	sum, err := os.ReadFile(filepath.Join(outDir, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	var s struct{ Warnings []string }
	if err := json.Unmarshal(sum, &s); err != nil {
		t.Fatal(err)
	}
	if len(s.Warnings) == 0 || !strings.HasPrefix(s.Warnings[0], want) {
		t.Errorf("summary.json warnings %q do not start with %q", s.Warnings, want)
	}
	if _, out, _ := run(t, "check", demo); strings.Contains(out, "warnings") {
		t.Errorf("the demo has warnings:\n%s", out)
	}
}

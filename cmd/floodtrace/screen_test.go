package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestScreenCommand runs the screen command on the small test spec: a
// whole run, a second run into the same folder (nothing left to do), two
// shards merged (same ranking), and the refusals.
func TestScreenCommand(t *testing.T) {
	dir := t.TempDir()
	src := filepath.Join("..", "..", "screen", "testdata")
	for _, f := range []string{"case.yaml", "spec.yaml", "maps/perm_1.asc", "maps/perm_2.asc"} {
		b, err := os.ReadFile(filepath.Join(src, filepath.FromSlash(f)))
		if err != nil {
			t.Fatal(err)
		}
		dst := filepath.Join(dir, "in", filepath.FromSlash(f))
		os.MkdirAll(filepath.Dir(dst), 0o755)
		if err := os.WriteFile(dst, b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	spec := filepath.Join(dir, "in", "spec.yaml")
	whole := filepath.Join(dir, "whole")
	code, out, errOut := run(t, "screen", spec, "--out", whole, "--workers", "2")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	if !strings.Contains(out, "ranked by the mean of oil") || !strings.Contains(out, "base (base case)") {
		t.Errorf("output (want the ranking with the base case marked):\n%s", out)
	}
	want, err := os.ReadFile(filepath.Join(whole, "ranking.csv"))
	if err != nil {
		t.Fatal(err)
	}
	// The base case is ranked with the candidates, with zero increments.
	if n := strings.Count(string(want), ",base,0,0,0\n"); n != 1 {
		t.Errorf("ranking.csv has %d base rows with zero increments, want 1:\n%s", n, want)
	}
	for _, f := range []string{"runs.csv", "screen.json", "results.jsonl", "maps/objective.png"} {
		if _, err := os.Stat(filepath.Join(whole, filepath.FromSlash(f))); err != nil {
			t.Error(err)
		}
	}
	if code, _, errOut := run(t, "screen", spec, "--out", whole, "-q", "--no-pictures"); code != 0 {
		t.Fatalf("second run: exit %d: %s", code, errOut)
	}
	if got, _ := os.ReadFile(filepath.Join(whole, "ranking.csv")); string(got) != string(want) {
		t.Error("a second run into the same folder changed the ranking")
	}
	var parts []string
	for _, k := range []string{"1/2", "2/2"} {
		part := filepath.Join(dir, "part"+k[:1])
		parts = append(parts, part)
		if code, _, errOut := run(t, "screen", spec, "--out", part, "--shard", k, "-q"); code != 0 {
			t.Fatalf("shard %s: exit %d: %s", k, code, errOut)
		}
	}
	merged := filepath.Join(dir, "merged")
	if code, _, errOut := run(t, "screen", "merge", parts[0], "--out", merged, "-q"); code != 1 || !strings.Contains(errOut, "missing") {
		t.Errorf("merge of one shard of two: exit %d: %s", code, errOut)
	}
	if code, _, errOut := run(t, "screen", "merge", parts[0], parts[1], "--out", merged, "-q"); code != 0 {
		t.Fatalf("merge: exit %d: %s", code, errOut)
	}
	if got, _ := os.ReadFile(filepath.Join(merged, "ranking.csv")); string(got) != string(want) {
		t.Errorf("merged ranking differs:\n%s\nwant\n%s", got, want)
	}
	if _, err := os.Stat(filepath.Join(merged, "maps", "objective.png")); err != nil {
		t.Error("merge did not draw the objective map from the recorded spec:", err)
	}

	// Refusals: bad rank, bad shard, a spec with an unknown key.
	if code, _, _ := run(t, "screen", spec, "--out", filepath.Join(dir, "x"), "--rank", "p99"); code != 2 {
		t.Errorf("--rank p99: exit %d, want 2", code)
	}
	if code, _, _ := run(t, "screen", spec, "--out", filepath.Join(dir, "x"), "--shard", "3/2"); code != 2 {
		t.Errorf("--shard 3/2: exit %d, want 2", code)
	}
	text, _ := os.ReadFile(spec)
	bad := filepath.Join(filepath.Dir(spec), "bad_spec_test.yaml")
	os.WriteFile(bad, []byte(strings.Replace(string(text), "streamlines:", "streamline:", 1)), 0o644)
	code, _, errOut = run(t, "screen", bad, "--out", filepath.Join(dir, "x"))
	if code != 1 || !strings.Contains(errOut, "bad_spec_test.yaml:4:") || !strings.Contains(errOut, `did you mean "streamlines"`) {
		t.Errorf("unknown key: exit %d: %s", code, errOut)
	}
	// Another spec into a folder holding results is refused.
	other := filepath.Join(filepath.Dir(spec), "other_spec_test.yaml")
	os.WriteFile(other, []byte(strings.Replace(string(text), "horizon: 1200", "horizon: 1100", 1)), 0o644)
	code, _, errOut = run(t, "screen", other, "--out", whole, "-q")
	if code != 1 || !strings.Contains(errOut, "another spec") {
		t.Errorf("other spec into the same folder: exit %d: %s", code, errOut)
	}
}

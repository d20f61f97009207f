package render

import (
	"os"
	"testing"
)

// outDir returns a fresh folder for a synthetic run; with
// FLOODTRACE_RENDER_KEEP set, the folder is kept there for inspection.
func outDir(t *testing.T, name string) string {
	t.Helper()
	if keep := os.Getenv("FLOODTRACE_RENDER_KEEP"); keep != "" {
		d := keep + "/" + name
		must(t, os.RemoveAll(d))
		must(t, os.MkdirAll(d, 0o755))
		return d
	}
	return t.TempDir()
}

func TestRunSynthetic(t *testing.T) {
	dir := outDir(t, "default")
	newSynthCase().write(t, dir)
	rep, err := Run(dir, Options{})
	if err != nil {
		t.Fatal(err)
	}
	t.Log(rep.Files, rep.Notes)
}

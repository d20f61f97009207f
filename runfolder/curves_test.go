package runfolder

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func writeRun(t *testing.T, dir, summary, producers string) {
	t.Helper()
	if err := os.MkdirAll(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	if summary != "" {
		if err := os.WriteFile(filepath.Join(dir, SummaryFile), []byte(summary), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if err := os.WriteFile(filepath.Join(dir, ProducersFile), []byte(producers), 0o644); err != nil {
		t.Fatal(err)
	}
}

func TestCompareBadFolders(t *testing.T) {
	dir := t.TempDir()
	head := "time_days,pvi,well,water_cut\n"
	for name, c := range map[string]struct{ summary, csv, want string }{
		"unfinished": {"", head, "not a finished"},
		"nonumber":   {`{}`, head + "ten,0,P,0.1\n", "producers.csv:2"},
		"backwards":  {`{}`, head + "10,0,P,0.1\n5,0,P,0.2\n", "does not increase"},
		"nocolumn":   {`{}`, "time_days,well\n", "water_cut"},
		"badjson":    {`{`, head, "summary.json"},
	} {
		d := filepath.Join(dir, name)
		writeRun(t, d, c.summary, c.csv)
		_, err := ReadRunCurves(d)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one mentioning %q", name, err, c.want)
		}
	}
}

// TestEngineSetup: each side of a comparison names its engine and
// settings, so a run with pressure updates is not called fixed.
func TestEngineSetup(t *testing.T) {
	for _, c := range []struct {
		engine       string
		lines, solve int
		want         string
	}{
		{"streamline", 2000, 1, "fixed streamlines (2000 lines, 1 pressure solve)"},
		{"streamline", 2000, 5, "streamlines with pressure updates (2000 lines, 5 pressure solves)"},
		{"", 800, 0, "fixed streamlines (800 lines, 1 pressure solve)"},
		{"grid", 2000, 185, "grid engine (IMPES, 185 pressure solves)"},
	} {
		s := &Summary{Engine: c.engine, Streamlines: c.lines, PressureSolver: Solver{Solves: c.solve}}
		if got := EngineSetup(s); got != c.want {
			t.Errorf("%+v: %q, want %q", c, got, c.want)
		}
	}
}

package flood

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"floodtrace/internal/outdir"
	"floodtrace/runfolder"
)

func writeRun(t *testing.T, dir, summary, producers string) {
	t.Helper()
	if err := os.MkdirAll(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	if summary != "" {
		if err := os.WriteFile(filepath.Join(dir, "summary.json"), []byte(summary), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if err := os.WriteFile(filepath.Join(dir, "producers.csv"), []byte(producers), 0o644); err != nil {
		t.Fatal(err)
	}
}

// TestCompareHandComputed checks the RMS difference on the union of report
// times against a value worked by hand. A: (10, 0), (20, 0.5), (30, 1);
// B: (15, 0.2), (30, 0.8). The common span is [15, 30] and the union of
// times in it {15, 20, 30}; linear interpolation gives A = 0.25, 0.5, 1
// and B = 0.2, 0.4, 0.8, so the differences are 0.05, 0.1, 0.2 and the
// RMS sqrt(0.0525/3) (definition of the RMS, common practice).
func TestCompareHandComputed(t *testing.T) {
	dir := t.TempDir()
	a, b := filepath.Join(dir, "a"), filepath.Join(dir, "b")
	head := "time_days,pvi,well,water_cut,oil_rate,water_rate,cum_oil,cum_water\n"
	writeRun(t, a, `{"title":"A","engine":"streamline","producers":[{"name":"P-1","breakthrough_days":12.5},{"name":"P-2","breakthrough_days":null}]}`,
		head+"10,0.1,P-1,0,1,0,1,0\n10,0.1,P-2,0,1,0,1,0\n20,0.2,P-1,0.5,1,1,2,1\n20,0.2,P-2,0,1,0,2,0\n30,0.3,P-1,1,0,1,2,2\n30,0.3,P-2,0,1,0,3,0\n")
	writeRun(t, b, `{"title":"B","engine":"grid","producers":[{"name":"P-1","breakthrough_days":14},{"name":"P-3","breakthrough_days":20}]}`,
		head+"15,0.1,P-1,0.2,1,0,1,0\n15,0.1,P-3,0,1,0,1,0\n30,0.3,P-1,0.8,0,1,2,2\n30,0.3,P-3,0.1,1,0,3,0\n")
	ra, err := runfolder.ReadRunCurves(a)
	if err != nil {
		t.Fatal(err)
	}
	rb, err := runfolder.ReadRunCurves(b)
	if err != nil {
		t.Fatal(err)
	}
	c := Compare(ra, rb)
	if len(c.Producers) != 1 || c.Producers[0].Name != "P-1" {
		t.Fatalf("compared %+v", c.Producers)
	}
	p := c.Producers[0]
	if want := math.Sqrt(0.0525 / 3); math.Abs(p.RMS-want) > 1e-12 || p.Points != 3 {
		t.Errorf("RMS %g over %d points, want %g over 3", p.RMS, p.Points, want)
	}
	if p.BreakthroughDiff != 1.5 {
		t.Errorf("breakthrough difference %g, want 1.5", p.BreakthroughDiff)
	}
	if strings.Join(c.OnlyA, ",") != "P-2" || strings.Join(c.OnlyB, ",") != "P-3" {
		t.Errorf("only in A %v, only in B %v", c.OnlyA, c.OnlyB)
	}
	if rb.Engine != "grid" || ra.Title != "A" {
		t.Errorf("engine %q title %q", rb.Engine, ra.Title)
	}
	// A producer without breakthrough in one run has no difference.
	c = Compare(ra, ra)
	if !math.IsNaN(c.Producers[1].BreakthroughDiff) || c.RMS != 0 {
		t.Errorf("self comparison: %+v", c.Producers[1])
	}
}

// TestCompareRunFolders compares two real runs written by the output
// writer: a run compared with itself differs by nothing, and a grid run of
// the same case differs by a small amount.
func TestCompareRunFolders(t *testing.T) {
	m := heteroCase(t, 16, 2, 0.4, 0.5, 0.9, 5)
	dir := t.TempDir()
	var dirs []string
	for _, engine := range []Engine{EngineStreamline, EngineGrid} {
		r, err := Run(m, Settings{Engine: engine, Frames: -1})
		if err != nil {
			t.Fatal(err)
		}
		p := filepath.Join(dir, engine.String())
		d, err := outdir.Open(p, false)
		if err != nil {
			t.Fatal(err)
		}
		if err := r.WriteData(d); err != nil {
			t.Fatal(err)
		}
		if err := r.WriteSummary(d); err != nil {
			t.Fatal(err)
		}
		if err := d.Close(); err != nil {
			t.Fatal(err)
		}
		dirs = append(dirs, p)
	}
	a, err := runfolder.ReadRunCurves(dirs[0])
	if err != nil {
		t.Fatal(err)
	}
	b, err := runfolder.ReadRunCurves(dirs[1])
	if err != nil {
		t.Fatal(err)
	}
	if self := Compare(a, a); self.RMS != 0 || len(self.Producers) != 4 {
		t.Errorf("self comparison RMS %g over %d producers", self.RMS, len(self.Producers))
	}
	c := Compare(a, b)
	if len(c.Producers) != 4 || !(c.RMS > 0 && c.RMS < 0.15) {
		t.Errorf("streamline vs grid: %d producers, RMS %g", len(c.Producers), c.RMS)
	}
	for _, p := range c.Producers {
		if p.Points != len(a.Producers[0].Time) {
			t.Errorf("%s: %d points, want %d (same report times)", p.Name, p.Points, len(a.Producers[0].Time))
		}
	}
}

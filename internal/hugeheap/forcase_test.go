package hugeheap

import (
	"os"
	"runtime/debug"
	"testing"
)

// TestForCase: a small case gets the larger collector percent, a large
// one keeps the default, and GOGC in the environment is left alone.
func TestForCase(t *testing.T) {
	t.Setenv("FLOODTRACE_HUGEPAGES", "off") // the percent only, no reservation
	t.Setenv("GOGC", "")                    // restored at the end
	os.Unsetenv("GOGC")
	old := debug.SetGCPercent(100)
	defer debug.SetGCPercent(old)
	small := SmallCase / PerCell
	for _, tc := range []struct {
		name  string
		cells int
		gogc  string // "" = not set
		want  int
	}{
		{"100x100", 100 * 100, "", SmallCaseGCPercent},
		{"largest small case", small, "", SmallCaseGCPercent},
		{"one cell more", small + 1, "", 100},
		{"1000x1000", 1000 * 1000, "", 100},
		{"GOGC set", 100 * 100, "150", 100},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if tc.gogc != "" {
				t.Setenv("GOGC", tc.gogc)
			}
			debug.SetGCPercent(100)
			ForCase(tc.cells)
			if got := debug.SetGCPercent(100); got != tc.want {
				t.Errorf("ForCase(%d): GC percent %d, want %d", tc.cells, got, tc.want)
			}
		})
	}
}

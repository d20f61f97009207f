package reservoir

import (
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

// TestCalibrationBlock reads the calibration: block: defaults for absent
// keys, given values kept, unknown well names refused.
func TestCalibrationBlock(t *testing.T) {
	base, err := os.ReadFile(filepath.Join("..", "testdata", "bad", "calibration_dry_history", "case.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	hist := "well,date,oil,water,injected,bhp\nP-1,2020-01-31,800,10,,\nP-1,2020-02-29,700,300,,\n"
	cases := []struct {
		name, block string
		want        *Calibration
		err         string
	}{
		{"defaults", "calibration: {}", &Calibration{Iterations: 5, Damping: 0.1, Smoothness: 1, MinMultiplier: 0.1, MaxMultiplier: 10}, ""},
		{"given", "calibration: {iterations: 2, damping: 0, smoothness: 3, min_multiplier: 0.5, max_multiplier: 4, keep_near_wells: [I-1], radius: 150, wells: [P-1]}",
			&Calibration{Iterations: 2, Smoothness: 3, MinMultiplier: 0.5, MaxMultiplier: 4, KeepNearWells: []string{"I-1"}, Radius: 150, Wells: []string{"P-1"}}, ""},
		{"unknown keep well", "calibration: {keep_near_wells: [P-2]}", nil, `calibration.keep_near_wells: no well "P-2" in the case; did you mean "P-1"?`},
		{"injector in wells", "calibration: {wells: [I-1]}", nil, "calibration.wells: I-1 is an injector"},
		{"bounds exclude 1", "calibration: {min_multiplier: 1.5}", nil, "exclude 1"},
		{"unknown key", "calibration: {dampng: 1}", nil, `did you mean "damping"?`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			text := strings.Replace(string(base), "calibration: {iterations: 3}", c.block, 1)
			if err := os.WriteFile(filepath.Join(dir, "case.yaml"), []byte(text), 0o644); err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(filepath.Join(dir, "history.csv"), []byte(hist), 0o644); err != nil {
				t.Fatal(err)
			}
			m, err := Load(filepath.Join(dir, "case.yaml"))
			if c.err != "" {
				if err == nil || !strings.Contains(err.Error(), c.err) {
					t.Fatalf("error %v, want one containing %q", err, c.err)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			got := *m.Calibration
			got.Line = 0
			if !reflect.DeepEqual(&got, c.want) {
				t.Errorf("got %+v, want %+v", got, *c.want)
			}
		})
	}
}

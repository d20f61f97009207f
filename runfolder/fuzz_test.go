package runfolder

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// FuzzReadRunCurves feeds damaged producers.csv files to the reader used
// by `floodtrace compare`: errors are fine, panics are not.
func FuzzReadRunCurves(f *testing.F) {
	f.Add([]byte("time_days,pvi,well,water_cut,oil_rate,water_rate,cum_oil,cum_water\n30,0.1,P-1,0.2,10,2,300,60\n"))
	f.Add([]byte("time_days,well\n1\n"))
	f.Add([]byte(""))
	f.Fuzz(func(t *testing.T, data []byte) {
		dir := t.TempDir()
		sum := `{"title":"x","engine":"streamline","producers":[{"name":"P-1","breakthrough_days":10}]}`
		if err := os.WriteFile(filepath.Join(dir, "summary.json"), []byte(sum), 0o644); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, "producers.csv"), data, 0o644); err != nil {
			t.Fatal(err)
		}
		ReadRunCurves(dir)
	})
}

// FuzzReadSummary feeds damaged summary.json files to the reader and
// the check render relies on: errors are fine, panics are not.
func FuzzReadSummary(f *testing.F) {
	f.Add([]byte(`{"title":"x","units":"field","grid":{"nx":2,"ny":2,"dx":10,"dy":10},"wells":[{"name":"I","type":"injector","x":5,"y":5}],"producers":[],"snapshots":[{"time_days":1,"file":"saturation_1.asc"}]}`))
	f.Add([]byte(`{"grid":{"nx":-5}}`))
	f.Add([]byte(`{`))
	f.Fuzz(func(t *testing.T, data []byte) {
		if s, err := ParseSummary("summary.json", data); err == nil {
			s.Check("summary.json")
		}
	})
}

// FuzzParseMatch feeds damaged match.csv files to the reader render
// draws the history pictures from: errors are fine, panics are not, and
// every row read has a well and a finite time.
func FuzzParseMatch(f *testing.F) {
	head := strings.Join(MatchColumns, ",") + "\n"
	f.Add([]byte(head + "P-1,2020-01-31,31,0,0.01,200,190,0,2,6200,5890,0,62,,\nI-1,2020-01-31,31,,,,,600,600,,,18600,18600,,\n"))
	f.Add([]byte(head + "P-1,,31,x\n"))
	f.Add([]byte("well\n"))
	f.Add([]byte(""))
	f.Fuzz(func(t *testing.T, data []byte) {
		rows, err := ParseMatch("match.csv", bytes.NewReader(data))
		if err != nil {
			return
		}
		for _, r := range rows {
			if r.Well == "" || math.IsNaN(r.Time) || math.IsInf(r.Time, 0) {
				t.Fatalf("row %+v accepted", r)
			}
		}
	})
}

package runfolder

import (
	"math"
	"strings"
	"testing"
)

// TestParseMatch reads a match.csv written the way flood writes it (blank
// for a value not defined) and refuses damaged files naming the line and
// the column.
func TestParseMatch(t *testing.T) {
	head := strings.Join(MatchColumns, ",") + "\n"
	good := head + "P-1,2020-02-29,60,0.1,0.2,180,160,20,40,11600,11200,20,40,,1500\nI-1,2020-02-29,60,,,,,600,600,,,36000,36000,3100,\n"
	rows, err := ParseMatch("match.csv", strings.NewReader(good))
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 2 || rows[0].Well != "P-1" || rows[0].Date != "2020-02-29" || rows[0].Time != 60 ||
		rows[0].ModWaterCut != 0.2 || rows[0].ModCumWater != 40 || !math.IsNaN(rows[0].ObsBHP) || rows[0].ModBHP != 1500 {
		t.Errorf("rows %+v", rows)
	}
	if !math.IsNaN(rows[1].ObsWaterCut) || rows[1].ObsCumWater != 36000 || rows[1].ObsBHP != 3100 {
		t.Errorf("injector row %+v", rows[1])
	}
	for _, c := range []struct{ name, text, want string }{
		{"missing column", "well,date,time_days\nP-1,,1\n", "match.csv:1: no observed_water_cut column"},
		{"not a number", head + "P-1,,31,abc,0,0,0,0,0,0,0,0,0,,\n", "match.csv:2: column observed_water_cut: \"abc\""},
		{"infinite", head + "P-1,,31,0,Inf,0,0,0,0,0,0,0,0,,\n", "match.csv:2: column model_water_cut"},
		{"short row", head + "P-1,,31\n", "match.csv:2: 3 fields"},
		{"no time", head + "P-1,,,0,0,0,0,0,0,0,0,0,0,,\n", "match.csv:2: column time_days: no time"},
		{"no well", head + ",,31,0,0,0,0,0,0,0,0,0,0,,\n", "match.csv:2: column well"},
		{"time back", head + "P-1,,31,0,0,0,0,0,0,0,0,0,0,,\nP-1,,20,0,0,0,0,0,0,0,0,0,0,,\n", "match.csv:3: well P-1: time 20 does not increase"},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := ParseMatch("match.csv", strings.NewReader(c.text))
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %v, want %q", err, c.want)
			}
		})
	}
}

// TestSameObserved: the same observed columns are the same history,
// whatever the model columns; one observed value, a period end or a well
// changed is another history, and no rows is none.
func TestSameObserved(t *testing.T) {
	head := strings.Join(MatchColumns, ",") + "\n"
	read := func(body string) []MatchRow {
		rows, err := ParseMatch("match.csv", strings.NewReader(head+body))
		if err != nil {
			t.Fatal(err)
		}
		return rows
	}
	a := read("P-1,,31,0.1,0.2,180,160,20,40,5580,4960,620,1240,,\n")
	for _, c := range []struct {
		name string
		body string
		want bool
	}{
		{"other model values", "P-1,,31,0.1,0.3,180,150,20,50,5580,4650,620,1550,,1200\n", true},
		{"one observed value", "P-1,,31,0.1,0.2,180,160,20,40,5580,4960,621,1240,,\n", false},
		{"period end", "P-1,,30,0.1,0.2,180,160,20,40,5580,4960,620,1240,,\n", false},
		{"well", "P-2,,31,0.1,0.2,180,160,20,40,5580,4960,620,1240,,\n", false},
		{"observed bhp", "P-1,,31,0.1,0.2,180,160,20,40,5580,4960,620,1240,3000,\n", false},
	} {
		if got := SameObserved(a, read(c.body)); got != c.want {
			t.Errorf("%s: SameObserved %v, want %v", c.name, got, c.want)
		}
	}
	if SameObserved(nil, nil) {
		t.Error("two runs without history have the same history")
	}
}

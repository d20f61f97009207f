package reservoir

import (
	"errors"
	"math"
	"slices"
	"strings"
	"testing"
	"time"
)

// historyModel is a small model with one injector, one producer that
// opens on day 10 and a conversion of the injector to a producer on day
// 400, starting on 2020-01-01 (a leap year).
func historyModel() *Model {
	return &Model{
		Wells: []Well{
			{Name: "I-1", Type: Injector},
			{Name: "P-1", Type: Producer, Open: 10},
		},
		Schedule:  []Event{{Time: 400, Well: "I-1", Convert: Producer, Rate: math.NaN(), BHP: math.NaN()}},
		Run:       RunSettings{End: 1000},
		StartDate: time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC),
	}
}

// TestDayOf: calendar arithmetic (common practice: the Gregorian calendar;
// 2020 is a leap year, 2100 is not).
func TestDayOf(t *testing.T) {
	start := time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC)
	for _, tc := range []struct {
		date string
		want float64
	}{
		{"2020-01-01", 0},
		{"2020-01-31", 30},
		{"2020-02-29", 59}, // leap day
		{"2020-03-01", 60},
		{"2020-12-31", 365},
		{"2021-01-01", 366},
		{"2021-03-01", 425}, // 366 + 59: February 2021 has 28 days
	} {
		got, err := DayOf(start, tc.date)
		if err != nil || got != tc.want {
			t.Errorf("DayOf(%s) = %g, %v; want %g", tc.date, got, err, tc.want)
		}
		m := &Model{StartDate: start}
		if back := m.Date(got); back != tc.date {
			t.Errorf("Date(%g) = %s, want %s", got, back, tc.date)
		}
	}
	for _, bad := range []string{"2021-02-29", "2100-02-29", "2020-13-01", "2019-12-31"} {
		if _, err := DayOf(start, bad); err == nil {
			t.Errorf("DayOf(%s): no error", bad)
		}
	}
	if _, err := DayOf(time.Time{}, "2020-01-31"); err == nil || !strings.Contains(err.Error(), "start_date") {
		t.Errorf("a date without a start date: %v", err)
	}
}

// TestParseHistory: periods of different length (month ends of a leap
// year; a date is the end of its day, so 2020-01-31 ends day 31 and
// 2020-02-29 day 60), periods starting where the well's previous row
// ended or at its opening day, blanks as NaN, a conversion period with
// both kinds.
func TestParseHistory(t *testing.T) {
	m := historyModel()
	data := "well,date,oil,water,injected,bhp\n" +
		"P-1,2020-01-31,100,1,,\n" +
		"I-1,2020-01-31,,,3000,3100\n" +
		"P-1,2020-02-29,200,,,900\n" +
		"I-1,2020-02-29,,,2900,\n" +
		"I-1,2021-03-01,50,10,40000,\n" + // day 425: converted on day 400
		"P-1,2020-03-31,300,5,,\n"
	rows, err := ParseHistory("h.csv", []byte(data), m)
	if err != nil {
		t.Fatal(err)
	}
	want := []struct {
		well       string
		start, end float64
	}{{"P-1", 10, 31}, {"I-1", 0, 31}, {"P-1", 31, 60}, {"I-1", 31, 60}, {"I-1", 60, 426}, {"P-1", 60, 91}}
	if len(rows) != len(want) {
		t.Fatalf("%d rows, want %d", len(rows), len(want))
	}
	for i, w := range want {
		r := rows[i]
		if r.Well != w.well || r.Start != w.start || r.End != w.end || r.Line != i+2 {
			t.Errorf("row %d: %s [%g, %g) line %d; want %s [%g, %g) line %d", i, r.Well, r.Start, r.End, r.Line, w.well, w.start, w.end, i+2)
		}
	}
	if !math.IsNaN(rows[2].Water) || rows[2].BHP != 900 || !math.IsNaN(rows[0].Injected) {
		t.Errorf("blanks: %+v %+v", rows[2], rows[0])
	}
}

// TestParseHistoryRefusals: each refusal names the file, the line and the
// column.
func TestParseHistoryRefusals(t *testing.T) {
	for _, tc := range []struct{ name, data, want string }{
		{"unknown well", "well,day,oil\nP-9,20,1\n", "h.csv:2: column well: unknown well"},
		{"producer injects", "well,day,oil,injected\nP-1,20,1,5\n", "h.csv:2: column injected"},
		{"injector produces", "well,day,oil,injected\nI-1,20,1,5\n", "h.csv:2: column oil"},
		{"negative", "well,day,oil,bhp\nP-1,20,1,-5\n", "h.csv:2: column bhp: -5 is negative"},
		{"order", "well,day,oil\nP-1,40,1\nP-1,30,1\n", "h.csv:3: column day"},
		{"before opening", "well,day,oil\nP-1,5,1\n", "not after the well opens (day 10)"},
		{"past end", "well,day,oil\nP-1,1001,1\n", "h.csv:2: column day: day 1001 is past the end"},
		{"both times", "well,day,date\n", "h.csv:1: the header gives both date and day"},
		{"no time", "well,oil\n", "h.csv:1: the header has no date"},
		{"quote", "well,day,oil\nP-1,20,\"1\n", "h.csv:"},
		{"binary", "well,day\x00", "not a text file"},
		{"no rows", "well,day\n", "no row"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ParseHistory("h.csv", []byte(tc.data), historyModel())
			var ie *InputError
			if !errors.As(err, &ie) || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v, want an InputError containing %q", err, tc.want)
			}
		})
	}
}

// FuzzParseHistory: any text gives rows or an *InputError, never a panic,
// and the rows it accepts obey the file's rules.
func FuzzParseHistory(f *testing.F) {
	f.Add("well,date,oil,water,injected,bhp\nP-1,2020-01-31,100,1,,\nI-1,2020-02-29,,,3000,3100\n")
	f.Add("well,day,oil\nP-1,20,1\nP-1,30,2\n")
	f.Add("well,day,oil,injected\nI-1,420,1,5\n")
	f.Add("\ufeffwell,day\n\"P-1\",1e400\n")
	f.Fuzz(func(t *testing.T, data string) {
		m := historyModel()
		rows, err := ParseHistory("h.csv", []byte(data), m)
		if err != nil {
			var ie *InputError
			if !errors.As(err, &ie) {
				t.Fatalf("error of type %T: %v", err, err)
			}
			return
		}
		last := map[string]float64{}
		for _, r := range rows {
			if m.WellIndex(r.Well) < 0 || !(r.End > r.Start) || r.End > m.Run.End || r.Start < last[r.Well] {
				t.Fatalf("accepted a bad row %+v", r)
			}
			for _, v := range []float64{r.Oil, r.Water, r.Injected, r.BHP} {
				if v < 0 || math.IsInf(v, 0) {
					t.Fatalf("accepted value %g in %+v", v, r)
				}
			}
			last[r.Well] = r.End
		}
	})
}

// TestDescribeSurfaceOOIP: check gives the oil in place in reservoir and
// surface volumes (surface = reservoir / Bo, the definition of the
// formation volume factor, common practice), the start date and the
// history.
func TestDescribeSurfaceOOIP(t *testing.T) {
	m := loadGood(t, "matrix_metric")
	m.Fluids.OilFVF = 1.25
	m.StartDate = time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC)
	m.History = &History{Drive: DriveRates, Rows: []HistoryRow{{Well: "PRD-1", End: 31}}}
	s := Describe(m)
	if got, want := m.OOIPSurface(), m.OOIP()/1.25; got != want {
		t.Errorf("surface OOIP %g, want %g", got, want)
	}
	for _, want := range []string{
		"OOIP        105805 m3 (reservoir volume",
		"84644.4 standard m3 (surface volume, oil formation volume factor 1.25)",
		"start date  2020-01-01 (day 0)",
		"history     1 rows to day 31 (2020-01-31), drive: rates",
	} {
		if !strings.Contains(s, want) {
			t.Errorf("description lacks %q:\n%s", want, s)
		}
	}
}

// TestCaseDates: with start_date, run.end, snapshots, update times, a
// well's opening and event times given as dates load as the same day
// numbers (2020 is a leap year: 2020-03-01 is day 60, 2021-01-01 day 366;
// Gregorian calendar, common practice).
func TestCaseDates(t *testing.T) {
	body := func(start, end, snaps, upd, open, when string) string {
		return start + `title: dates
units: field
grid: {nx: 10, ny: 8, dx: 100, dy: 100}
rock: {perm: 150, porosity: 0.2, thickness: 25}
fluids: {water_viscosity: 0.5, oil_viscosity: 3, initial_water_saturation: 0.2}
relperm:
  corey: {swc: 0.2, sor: 0.25, krw_max: 0.35, kro_max: 0.9, nw: 2.5, no: 2}
wells:
  - {name: I-1, type: injector, x: 150, y: 150, rate: 1000, max_bhp: 4000}
  - {name: P-1, type: producer, x: 850, y: 650, bhp: 800, open: ` + open + `}
  - {name: P-2, type: producer, x: 850, y: 150, bhp: 800}
schedule:
  - {time: ` + when + `, well: P-1, bhp: 700}
run: {end: ` + end + `, snapshots: [` + snaps + `], update_times: [` + upd + `]}
`
	}
	byDate, err := Parse("d.yaml", []byte(body("start_date: 2020-01-01\n", "2022-01-01", "2020-03-01, 2021-01-01", "2020-02-29", "2020-01-31", "2021-01-01")))
	if err != nil {
		t.Fatal(err)
	}
	byDay, err := Parse("d.yaml", []byte(body("", "731", "60, 366", "59", "30", "366")))
	if err != nil {
		t.Fatal(err)
	}
	if byDate.Run.End != byDay.Run.End || !slices.Equal(byDate.Run.Snapshots, byDay.Run.Snapshots) ||
		!slices.Equal(byDate.Run.UpdateTimes, byDay.Run.UpdateTimes) || byDate.Wells[1].Open != byDay.Wells[1].Open ||
		byDate.Schedule[0].Time != byDay.Schedule[0].Time {
		t.Errorf("by date %+v %v %v, by day %+v %v %v", byDate.Run, byDate.Wells[1].Open, byDate.Schedule[0].Time,
			byDay.Run, byDay.Wells[1].Open, byDay.Schedule[0].Time)
	}
	if byDate.Run.End != 731 || byDate.Schedule[0].Time != 366 {
		t.Errorf("end %g, event %g; want 731 and 366", byDate.Run.End, byDate.Schedule[0].Time)
	}
}

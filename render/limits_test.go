package render

import (
	"bytes"
	"slices"
	"strings"
	"testing"

	"floodtrace/runfolder"
)

// TestLimitMarks: a producer that reached its economic limit (summary.json
// limit_days) gets a ring at the row of that day, and its water-cut curve
// stops there; a producer without a limit gets none, and a chart with a
// ring draws it (the picture differs from the one without).
func TestLimitMarks(t *testing.T) {
	csv := "time_days,pvi,well,water_cut,oil_rate,water_rate,cum_oil,cum_water\n" +
		"10,0.1,P-1,0.2,80,20,800,200\n10,0.1,P-2,0,100,0,1000,0\n" +
		"20,0.2,P-1,0.95,5,95,850,1150\n20,0.2,P-2,0.1,90,10,1900,100\n" +
		"30,0.3,P-1,0,0,0,850,1150\n30,0.3,P-2,0.3,70,30,2600,400\n"
	tab, err := parseTable("producers.csv", strings.NewReader(csv))
	if err != nil {
		t.Fatal(err)
	}
	day := 20.0
	r := &run{sum: &runfolder.Summary{Producers: []runfolder.Producer{{Name: "P-1", Limit: "max_water_cut", LimitDays: &day}, {Name: "P-2"}}}}
	wc := r.markLimits(tab, "time_days", "water_cut", r.perWell(tab, "time_days", "water_cut"), true)
	if !slices.Equal(wc[0].Marks, []int{1}) || !slices.Equal(wc[0].X, []float64{10, 20}) {
		t.Fatalf("P-1 water cut: marks %v, x %v; want a ring at day 20 and the curve stopping there", wc[0].Marks, wc[0].X)
	}
	if wc[1].Marks != nil || len(wc[1].X) != 3 {
		t.Fatalf("P-2 water cut: marks %v, %d points; want none and 3", wc[1].Marks, len(wc[1].X))
	}
	oil := r.markLimits(tab, "time_days", "oil_rate", r.perWell(tab, "time_days", "oil_rate"), false)
	if !slices.Equal(oil[0].Marks, []int{1}) || len(oil[0].X) != 3 {
		t.Fatalf("P-1 oil rate: marks %v, %d points; want a ring at day 20 on the whole curve", oil[0].Marks, len(oil[0].X))
	}
	draw := func(s []Series) []byte {
		var b bytes.Buffer
		if err := WriteChart(&b, Chart{Title: "t", Series: s}, 400, 300, "png"); err != nil {
			t.Fatal(err)
		}
		return b.Bytes()
	}
	plain := slices.Clone(oil)
	plain[0].Marks = nil
	if bytes.Equal(draw(oil), draw(plain)) {
		t.Fatal("the ring is not drawn")
	}
}

package streamline_test

import (
	"testing"

	"floodtrace/streamline"
)

// BenchmarkTrace300 traces 5000 streamlines (plus the cell-centre lines
// that fill the gaps) on a 300 x 300 heterogeneous field with 9 injectors
// and 16 producers. The pressure solve is not timed.
func BenchmarkTrace300(b *testing.B) {
	f := solve(b, heterogeneous(b, 300, 7))
	var r *streamline.Result
	for b.Loop() {
		var err error
		if r, err = streamline.Trace(f, streamline.Settings{Count: 5000}); err != nil {
			b.Fatal(err)
		}
	}
	fill := 0
	for i := range r.Lines {
		if r.Lines[i].Launch != streamline.FromInjector {
			fill++
		}
	}
	b.ReportMetric(float64(len(r.Lines)), "lines")
	b.ReportMetric(float64(fill), "fill-lines")
}

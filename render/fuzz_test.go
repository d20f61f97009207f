package render

import (
	"bytes"
	"testing"

	"floodtrace/reservoir"
)

// The readers of a run folder must never panic on a damaged file. The
// targets call the parsers on bytes (the Read functions only add opening
// the file), so each input costs no file-system work.

func FuzzReadASC(f *testing.F) {
	f.Add([]byte("ncols 2\nnrows 2\nxllcorner 0\nyllcorner 0\ncellsize 10\nNODATA_value -9999\n1 2\n3 -9999\n"))
	f.Add([]byte("ncols 2\nnrows 2\nxllcenter 5\nyllcenter 5\ndx 10\ndy 10\n1 2\n3\n"))
	f.Add([]byte("ncols -1\nnrows 99999999999\n"))
	g := reservoir.Grid{NX: 2, NY: 2, DX: 10, DY: 10}
	f.Fuzz(func(t *testing.T, data []byte) {
		v, err := parseASC(bytes.NewReader(data), g)
		if err == nil && len(v) != g.N() {
			t.Fatalf("%d values for %d cells", len(v), g.N())
		}
	})
}

func FuzzReadTable(f *testing.F) {
	f.Add([]byte("time_days,well,water_cut\n30,P-1,0.1\n60,P-1,0.2\n"))
	f.Add([]byte("a,b\n1\n\"x,y\",2\n"))
	f.Add([]byte(""))
	f.Fuzz(func(t *testing.T, data []byte) {
		parseTable("t.csv", bytes.NewReader(data))
	})
}

func FuzzReadStreamlines(f *testing.F) {
	f.Add([]byte(`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"injector":"I","producer":"P","flux":1,"tof_days":10},"geometry":{"type":"LineString","coordinates":[[0,0],[1,1]]}}]}`))
	f.Add([]byte(`{"type":"FeatureCollection","features":[{"geometry":{"type":"LineString","coordinates":[[0]]}}]}`))
	f.Add([]byte(`[]`))
	f.Fuzz(func(t *testing.T, data []byte) {
		parseStreamlines("s.geojson", data)
	})
}

package main

import (
	"bytes"
	"testing"
)

const gisDemo = "../../examples/vardel-gis/case.yaml"

// TestGISDemoSameRun: the demo in GIS formats (examples/vardel-gis:
// GeoTIFF maps, GeoJSON wells, fault and outline) gives the same files as
// the demo, byte for byte, except the case path in summary.json.
func TestGISDemoSameRun(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the demo twice")
	}
	ref := runFiles(t, demo)
	got := runFiles(t, gisDemo)
	if len(ref) < 10 || len(got) != len(ref) {
		t.Fatalf("%d files, want %d", len(got), len(ref))
	}
	for name, b := range ref {
		g := got[name]
		if name == "summary.json" {
			b = bytes.ReplaceAll(b, []byte("examples/vardel/"), []byte("examples/vardel-gis/"))
		}
		if !bytes.Equal(g, b) {
			t.Errorf("%s differs from the demo's", name)
		}
	}
}

package runfolder

import (
	"strings"
	"testing"
)

// TestParseData: the names of the groups, all and tables, in any case and
// with spaces, and String writing what ParseData reads back.
func TestParseData(t *testing.T) {
	for _, c := range []struct {
		in   string
		want Data
		str  string
	}{
		{"all", DataAll, "all"},
		{" ALL ", DataAll, "all"},
		{"tables", DataTables, "tables"},
		{"snapshots", DataSnapshots, "snapshots"},
		{"tof, Streamlines", DataTOF | DataStreamlines, "tof,streamlines"},
		{"streamlines,tof,tof", DataTOF | DataStreamlines, "tof,streamlines"},
		{"snapshots,pressure,tof,partitions,streamlines,depth", DataAll, "all"},
	} {
		got, err := ParseData(c.in)
		if err != nil || got != c.want {
			t.Errorf("ParseData(%q) = %v, %v; want %v", c.in, got, err, c.want)
			continue
		}
		if s := got.String(); s != c.str {
			t.Errorf("String of %q = %q, want %q", c.in, s, c.str)
		}
		if back, err := ParseData(got.String()); err != nil || back != got {
			t.Errorf("ParseData(String(%q)) = %v, %v", c.in, back, err)
		}
	}
	for _, bad := range []string{"", "maps", "tof,,pressure", "auto", "tof;pressure"} {
		if _, err := ParseData(bad); err == nil || !strings.Contains(err.Error(), "snapshots, pressure, tof, partitions, streamlines, depth") {
			t.Errorf("ParseData(%q): error %v, want one listing the groups", bad, err)
		}
	}
	if !DataAll.Has(DataMinimal) || DataMinimal.Has(DataTOF) || !DataTables.Has(DataTables) {
		t.Error("Has")
	}
}

package runfolder

import (
	"fmt"
	"strings"
)

// Data is a set of the optional data groups of a run folder (the --data
// flag of `floodtrace run`, docs/OUTPUTS.md). The tables (summary.json and
// every CSV file) are always written; each group below is a raster or the
// polylines, heavy at a million cells (9 MB per raster, 80 MB of
// polylines), and may be left out. The animation frames (frames/) follow
// --frames, not this set.
type Data uint

// The data groups, with their names in ParseData and String.
const (
	// DataSnapshots: the saturation maps saturation_<day> (SnapshotName).
	DataSnapshots Data = 1 << iota
	// DataPressure: pressure.asc.
	DataPressure
	// DataTOF: tof.asc and tof_producers.asc.
	DataTOF
	// DataPartitions: injector_partition.asc and producer_partition.asc.
	DataPartitions
	// DataStreamlines: streamlines.geojson.
	DataStreamlines
	// DataDepth: depth.asc, for a case whose rock.depth is a map.
	DataDepth

	// DataTables is the empty set: the tables only.
	DataTables Data = 0
	// DataAll is every group: the folder of a run before the --data flag,
	// and the default of `floodtrace run` with --pictures all or none.
	DataAll = DataSnapshots | DataPressure | DataTOF | DataPartitions | DataStreamlines | DataDepth
	// DataMinimal is the default of `floodtrace run --pictures minimal`:
	// the snapshots, from which the one picture is drawn.
	DataMinimal = DataSnapshots
)

// dataNames are the group names, in the order of the bits.
var dataNames = []struct {
	name string
	bit  Data
}{
	{"snapshots", DataSnapshots},
	{"pressure", DataPressure},
	{"tof", DataTOF},
	{"partitions", DataPartitions},
	{"streamlines", DataStreamlines},
	{"depth", DataDepth},
}

// DataGroupNames lists the names ParseData accepts in a list, in order.
func DataGroupNames() []string {
	out := make([]string, len(dataNames))
	for i, d := range dataNames {
		out[i] = d.name
	}
	return out
}

// Has reports whether every group of g is in d.
func (d Data) Has(g Data) bool { return d&g == g }

// String writes d as ParseData reads it: "all", "tables", or the names
// of its groups joined by commas.
func (d Data) String() string {
	switch d & DataAll {
	case DataAll:
		return "all"
	case DataTables:
		return "tables"
	}
	var names []string
	for _, n := range dataNames {
		if d.Has(n.bit) {
			names = append(names, n.name)
		}
	}
	return strings.Join(names, ",")
}

// ParseData reads a data set: "all", "tables" (no group: the tables
// only), or a comma-separated list of group names (snapshots, pressure,
// tof, partitions, streamlines, depth), in any order and case; the tables
// are written in any case. An unknown name is an error that lists the
// known ones.
func ParseData(s string) (Data, error) {
	s = strings.ToLower(strings.TrimSpace(s))
	switch s {
	case "all":
		return DataAll, nil
	case "tables":
		return DataTables, nil
	case "":
		return 0, fmt.Errorf("empty data set: say all, tables or a list of %s", strings.Join(DataGroupNames(), ", "))
	}
	var d Data
	for _, f := range strings.Split(s, ",") {
		f = strings.TrimSpace(f)
		found := false
		for _, n := range dataNames {
			if f == n.name {
				d |= n.bit
				found = true
			}
		}
		if !found {
			return 0, fmt.Errorf("unknown data group %q: want all, tables or a list of %s", f, strings.Join(DataGroupNames(), ", "))
		}
	}
	return d, nil
}

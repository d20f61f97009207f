package reservoir

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
	"github.com/paulmach/orb/planar"
	"gopkg.in/yaml.v3"
)

// GIS inputs: wells, faults and the active outline from GeoJSON files, and
// wells from a CSV table. Wells and faults are turned into the YAML nodes
// the case file would hold, so they are checked by the same code and give
// the same model; messages name the file (and, for CSV, the line).

// isGeoJSONPath reports a .geojson or .json file name.
func isGeoJSONPath(p string) bool {
	e := strings.ToLower(filepath.Ext(p))
	return e == ".geojson" || e == ".json"
}

// srcPath is the file a well or fault came from: src, or the case file.
func (d *decoder) srcPath(src string) string {
	if src != "" {
		return src
	}
	return d.path
}

// fileList reads the file named by a scalar wells or faults key into a
// YAML sequence of mappings; ok is false when the key is not a file name
// (a list, or an error already reported).
func (d *decoder) fileList(top *section, key string) (seq *yaml.Node, path string, ok bool) {
	v := top.vals[key]
	if v == nil || v.Kind != yaml.ScalarNode || v.Tag == "!!null" {
		return nil, "", false
	}
	path = d.rel(v.Value)
	ext := strings.ToLower(filepath.Ext(path))
	if !isGeoJSONPath(path) && !(key == "wells" && ext == ".csv") {
		return nil, "", false
	}
	data, err := os.ReadFile(path)
	if err != nil {
		if errors.Is(err, os.ErrNotExist) {
			d.fail(top, v, "%s: file not found: %s", key, path)
		} else {
			d.errs.add(openError(path, err))
		}
		return nil, path, false
	}
	switch {
	case ext == ".csv":
		seq, err = WellsCSVNodes(data, path)
	case key == "wells":
		seq, err = WellsGeoJSONNodes(data, path)
	default:
		seq, err = FaultsGeoJSONNodes(data, path)
	}
	if err != nil {
		d.errs.add(err)
		return nil, path, false
	}
	return seq, path, true
}

// readListOrFile runs read on the list at key, or, when key names a well
// or fault file (fileList), on that file's entries with messages naming
// the file, then calls mark with the file's path.
func (d *decoder) readListOrFile(top *section, key string, read func(), mark func(src string)) {
	seq, path, ok := d.fileList(top, key)
	if !ok {
		if path == "" {
			read()
		}
		return
	}
	saved := top.vals[key]
	savedPath := d.path
	top.vals[key], d.path = seq, path
	read()
	top.vals[key], d.path = saved, savedPath
	mark(path)
}

// scalarNode returns a YAML scalar for a text value: tagged a number when
// it parses as one, else a string.
func scalarNode(s string, line int) *yaml.Node {
	n := &yaml.Node{Kind: yaml.ScalarNode, Value: s, Tag: "!!str", Line: line}
	if _, err := strconv.ParseInt(s, 10, 64); err == nil {
		n.Tag = "!!int"
	} else if _, err := strconv.ParseFloat(s, 64); err == nil {
		n.Tag = "!!float"
	} else if s == "true" || s == "false" {
		n.Tag = "!!bool"
	}
	return n
}

func numNode(v float64, line int) *yaml.Node {
	return &yaml.Node{Kind: yaml.ScalarNode, Value: strconv.FormatFloat(v, 'g', -1, 64), Tag: "!!float", Line: line}
}

func addPair(m *yaml.Node, key string, val *yaml.Node) {
	m.Content = append(m.Content, &yaml.Node{Kind: yaml.ScalarNode, Value: key, Tag: "!!str", Line: val.Line}, val)
}

// propertyNode converts a GeoJSON property value to a YAML node; nested
// objects and lists are refused.
func propertyNode(v any, line int) (*yaml.Node, bool) {
	switch x := v.(type) {
	case string:
		return &yaml.Node{Kind: yaml.ScalarNode, Value: x, Tag: "!!str", Line: line}, true
	case float64:
		return numNode(x, line), true
	case bool:
		return &yaml.Node{Kind: yaml.ScalarNode, Value: strconv.FormatBool(x), Tag: "!!bool", Line: line}, true
	case nil:
		return nil, true
	}
	return nil, false
}

// decodeFeatures parses a GeoJSON FeatureCollection (orb/geojson).
func decodeFeatures(data []byte, path string) (*geojson.FeatureCollection, error) {
	fc, err := geojson.UnmarshalFeatureCollection(data)
	if err != nil {
		return nil, &InputError{Path: path, Msg: "not a GeoJSON FeatureCollection: " + err.Error(), Err: err}
	}
	if len(fc.Features) == 0 {
		return nil, &InputError{Path: path, Msg: "the FeatureCollection has no features"}
	}
	return fc, nil
}

// featureName labels feature i (from 1) for messages.
func featureName(f *geojson.Feature, i int) string {
	if n, ok := f.Properties["name"].(string); ok && n != "" {
		return fmt.Sprintf("feature %d (%s)", i, n)
	}
	return fmt.Sprintf("feature %d", i)
}

// WellsGeoJSONNodes turns a GeoJSON FeatureCollection of Point features
// into the wells list of a case: each feature's properties are the well's
// keys (name, type, rate, bhp, max_bhp, ...) and its point gives x and y.
func WellsGeoJSONNodes(data []byte, path string) (*yaml.Node, error) {
	fc, err := decodeFeatures(data, path)
	if err != nil {
		return nil, err
	}
	seq := &yaml.Node{Kind: yaml.SequenceNode, Tag: "!!seq"}
	for i, f := range fc.Features {
		pt, ok := f.Geometry.(orb.Point)
		if !ok {
			return nil, &InputError{Path: path, Msg: fmt.Sprintf("%s: a well must be a Point, found %s", featureName(f, i+1), geomType(f.Geometry))}
		}
		m := &yaml.Node{Kind: yaml.MappingNode, Tag: "!!map"}
		keys := make([]string, 0, len(f.Properties))
		for k := range f.Properties {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		for _, k := range keys {
			if k == "x" || k == "y" {
				return nil, &InputError{Path: path, Msg: fmt.Sprintf("%s: property %q: x and y come from the point", featureName(f, i+1), k)}
			}
			n, ok := propertyNode(f.Properties[k], 0)
			if !ok {
				return nil, &InputError{Path: path, Msg: fmt.Sprintf("%s: property %q must be a number, text or true/false", featureName(f, i+1), k)}
			}
			if n != nil {
				addPair(m, k, n)
			}
		}
		addPair(m, "x", numNode(pt[0], 0))
		addPair(m, "y", numNode(pt[1], 0))
		seq.Content = append(seq.Content, m)
	}
	return seq, nil
}

// WellsCSVNodes turns a CSV table of wells into the wells list of a case:
// the header names the well keys (name,type,x,y,rate,bhp,max_bhp,...), one
// well a row; an empty cell leaves its key out. Lines starting with '#'
// are skipped. Node lines are the CSV lines.
func WellsCSVNodes(data []byte, path string) (*yaml.Node, error) {
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	r := csv.NewReader(bytes.NewReader(data))
	r.Comment = '#'
	r.TrimLeadingSpace = true
	header, err := r.Read()
	if err == io.EOF {
		return nil, &InputError{Path: path, Msg: "empty well table"}
	}
	if err != nil {
		return nil, csvError(path, err)
	}
	for i := range header {
		header[i] = strings.ToLower(strings.TrimSpace(header[i]))
		if header[i] == "" {
			return nil, &InputError{Path: path, Line: 1, Msg: fmt.Sprintf("column %d has no name", i+1)}
		}
	}
	r.FieldsPerRecord = len(header)
	seq := &yaml.Node{Kind: yaml.SequenceNode, Tag: "!!seq"}
	for {
		rec, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, csvError(path, err)
		}
		line, _ := r.FieldPos(0)
		m := &yaml.Node{Kind: yaml.MappingNode, Tag: "!!map", Line: line}
		for c, v := range rec {
			if v = strings.TrimSpace(v); v != "" {
				addPair(m, header[c], scalarNode(v, line))
			}
		}
		seq.Content = append(seq.Content, m)
	}
	if len(seq.Content) == 0 {
		return nil, &InputError{Path: path, Msg: "the well table has a header but no wells"}
	}
	return seq, nil
}

// FaultsGeoJSONNodes turns a GeoJSON FeatureCollection of LineString
// features (properties name and multiplier) into the faults list of a
// case.
func FaultsGeoJSONNodes(data []byte, path string) (*yaml.Node, error) {
	fc, err := decodeFeatures(data, path)
	if err != nil {
		return nil, err
	}
	seq := &yaml.Node{Kind: yaml.SequenceNode, Tag: "!!seq"}
	for i, f := range fc.Features {
		ls, ok := f.Geometry.(orb.LineString)
		if !ok {
			return nil, &InputError{Path: path, Msg: fmt.Sprintf("%s: a fault must be a LineString, found %s", featureName(f, i+1), geomType(f.Geometry))}
		}
		m := &yaml.Node{Kind: yaml.MappingNode, Tag: "!!map"}
		for _, k := range []string{"name", "multiplier"} {
			v, has := f.Properties[k]
			if !has {
				continue
			}
			n, ok := propertyNode(v, 0)
			if !ok {
				return nil, &InputError{Path: path, Msg: fmt.Sprintf("%s: property %q must be a number or text", featureName(f, i+1), k)}
			}
			if n != nil {
				addPair(m, k, n)
			}
		}
		tr := &yaml.Node{Kind: yaml.SequenceNode, Tag: "!!seq"}
		for _, p := range ls {
			tr.Content = append(tr.Content, &yaml.Node{Kind: yaml.SequenceNode, Tag: "!!seq", Content: []*yaml.Node{numNode(p[0], 0), numNode(p[1], 0)}})
		}
		addPair(m, "trace", tr)
		seq.Content = append(seq.Content, m)
	}
	return seq, nil
}

func geomType(g orb.Geometry) string {
	if g == nil {
		return "no geometry"
	}
	return "a " + g.GeoJSONType()
}

// ReadOutline reads a GeoJSON outline (Polygon and MultiPolygon features,
// holes honoured) and returns the active map of grid g: 1 in the cells
// whose centre is inside (a centre on the outer boundary is inside, one on
// a hole's boundary outside), 0 elsewhere. An outline that holds no cell
// centre is an error.
func ReadOutline(data []byte, path string, g Grid) ([]float64, error) {
	fc, err := decodeFeatures(data, path)
	if err != nil {
		return nil, err
	}
	var mp orb.MultiPolygon
	for i, f := range fc.Features {
		switch x := f.Geometry.(type) {
		case orb.Polygon:
			mp = append(mp, x)
		case orb.MultiPolygon:
			mp = append(mp, x...)
		default:
			return nil, &InputError{Path: path, Msg: fmt.Sprintf("%s: an outline must be a Polygon or MultiPolygon, found %s", featureName(f, i+1), geomType(f.Geometry))}
		}
	}
	for _, p := range mp {
		if len(p) == 0 {
			return nil, &InputError{Path: path, Msg: "a polygon has no rings"}
		}
		for _, r := range p {
			if len(r) < 4 {
				return nil, &InputError{Path: path, Msg: fmt.Sprintf("a polygon ring has %d positions; a closed ring needs at least 4", len(r))}
			}
			for _, q := range r {
				if math.IsNaN(q[0]) || math.IsNaN(q[1]) || math.IsInf(q[0], 0) || math.IsInf(q[1], 0) {
					return nil, &InputError{Path: path, Msg: "a polygon has a coordinate that is not finite"}
				}
			}
		}
	}
	vals := make([]float64, g.N())
	inside := 0
	b := mp.Bound()
	for k := range vals {
		x, y := g.Center(k)
		pt := orb.Point{x, y}
		if b.Contains(pt) && planar.MultiPolygonContains(mp, pt) {
			vals[k] = 1
			inside++
		}
	}
	if inside == 0 {
		return nil, &InputError{Path: path, Msg: fmt.Sprintf("the outline holds no cell centre of the grid (x from %g to %g, y from %g to %g); check its coordinates and the grid origin",
			g.X0, g.X0+g.Width(), g.Y0, g.Y0+g.Height())}
	}
	return vals, nil
}

package runfolder

import (
	"encoding/json"
	"math"
	"os"
	"reflect"
	"regexp"
	"strings"
	"testing"
)

// TestSummaryNaNEncodes: a summary with a NaN Lorenz coefficient, a NaN
// breakthrough and NaN in plain number fields encodes (encoding/json
// refuses NaN, so null is written) and reads back as absent.
func TestSummaryNaNEncodes(t *testing.T) {
	nan := math.NaN()
	s := &Summary{Title: "t", Grid: Grid{NX: 2, NY: 2, DX: 10, DY: 10},
		LorenzCoefficient: &nan, MassBalanceError: Float(nan),
		Field:     Field{FinalWaterCut: Float(math.Inf(1)), FinalPVI: 0.5},
		Producers: []Producer{{Name: "P", BreakthroughDays: &nan, TracerBreakthroughDays: Opt(12.5)}}}
	b, err := s.Encode()
	if err != nil {
		t.Fatalf("encoding a NaN: %v", err)
	}
	for _, want := range []string{`"lorenz_coefficient": null`, `"mass_balance_error": null`, `"final_water_cut": null`, `"breakthrough_days": null`, `"tracer_breakthrough_days": 12.5`, `"final_pvi": 0.5`} {
		if !strings.Contains(string(b), want) {
			t.Errorf("no %s in\n%s", want, b)
		}
	}
	if s.LorenzCoefficient == nil || !math.IsNaN(*s.LorenzCoefficient) {
		t.Error("Encode changed the summary it encodes")
	}
	r, err := ParseSummary(SummaryFile, b)
	if err != nil {
		t.Fatal(err)
	}
	if r.LorenzCoefficient != nil || r.Producers[0].BreakthroughDays != nil {
		t.Errorf("null pointers read back as %v, %v", r.LorenzCoefficient, r.Producers[0].BreakthroughDays)
	}
	if !math.IsNaN(float64(r.MassBalanceError)) || !math.IsNaN(float64(r.Field.FinalWaterCut)) {
		t.Errorf("null numbers read back as %v, %v", r.MassBalanceError, r.Field.FinalWaterCut)
	}
	if r.Field.FinalPVI != 0.5 || Value(r.Producers[0].TracerBreakthroughDays) != 12.5 {
		t.Errorf("finite values read back as %v, %v", r.Field.FinalPVI, Value(r.Producers[0].TracerBreakthroughDays))
	}
}

// fillNaN sets every number reachable from v (a settable value) to NaN:
// float fields, pointers to floats, and one element of every slice.
func fillNaN(v reflect.Value) {
	switch v.Kind() {
	case reflect.Float64:
		v.SetFloat(math.NaN())
	case reflect.Pointer:
		if v.Type().Elem().Kind() == reflect.Float64 { // *float64 or *Float
			p := reflect.New(v.Type().Elem())
			p.Elem().SetFloat(math.NaN())
			v.Set(p)
		}
	case reflect.Struct:
		for i := range v.NumField() {
			fillNaN(v.Field(i))
		}
	case reflect.Slice:
		v.Set(reflect.MakeSlice(v.Type(), 1, 1))
		fillNaN(v.Index(0))
	case reflect.Array:
		for i := range v.Len() {
			fillNaN(v.Index(i))
		}
	}
}

// TestSummaryAllNaN: NaN in every number of the summary, including fields
// added later, never makes encoding fail.
func TestSummaryAllNaN(t *testing.T) {
	var s Summary
	fillNaN(reflect.ValueOf(&s).Elem())
	b, err := s.Encode()
	if err != nil {
		t.Fatalf("encoding an all-NaN summary: %v", err)
	}
	if strings.Contains(string(b), "NaN") {
		t.Errorf("NaN written:\n%s", b)
	}
	if _, err := ParseSummary(SummaryFile, b); err != nil {
		t.Errorf("reading it back: %v", err)
	}
}

// TestFloatLikeFloat64: a finite Float encodes byte for byte as
// encoding/json encodes a float64 (summary.json stays byte-identical).
func TestFloatLikeFloat64(t *testing.T) {
	for _, v := range []float64{0, -0.0, 1, 0.1, 1e-7, 123456789.123, 1e21, -3.5e-12, 2000} {
		want, _ := json.Marshal(v)
		got, err := json.Marshal(Float(v))
		if err != nil || string(got) != string(want) {
			t.Errorf("Float(%v) = %s, %v; want %s", v, got, err, want)
		}
	}
}

// jsonKeys lists the JSON keys of every field of t and of the types it
// holds.
func jsonKeys(t reflect.Type, out map[string]bool) {
	switch t.Kind() {
	case reflect.Pointer, reflect.Slice, reflect.Array:
		jsonKeys(t.Elem(), out)
	case reflect.Struct:
		for i := range t.NumField() {
			f := t.Field(i)
			if k, _, _ := strings.Cut(f.Tag.Get("json"), ","); k != "" && k != "-" {
				out[k] = true
			}
			jsonKeys(f.Type, out)
		}
	}
}

// TestOutputsDocumentsSummary: docs/OUTPUTS.md shows every key of
// summary.json, and no key the type lacks.
func TestOutputsDocumentsSummary(t *testing.T) {
	b, err := os.ReadFile("../docs/OUTPUTS.md")
	if err != nil {
		t.Fatal(err)
	}
	doc := string(b)
	start := strings.Index(doc, "## summary.json")
	if start < 0 {
		t.Fatal("docs/OUTPUTS.md has no summary.json section")
	}
	block := doc[start:]
	block = block[strings.Index(block, "```json"):]
	block = block[:strings.Index(block[3:], "```")+3]
	keys := map[string]bool{}
	jsonKeys(reflect.TypeOf(Summary{}), keys)
	for k := range keys {
		if !strings.Contains(block, `"`+k+`":`) {
			t.Errorf("docs/OUTPUTS.md does not show summary.json key %q", k)
		}
	}
	for _, m := range regexp.MustCompile(`"([a-z_0-9]+)":`).FindAllStringSubmatch(block, -1) {
		if !keys[m[1]] {
			t.Errorf("docs/OUTPUTS.md shows key %q that summary.json does not have", m[1])
		}
	}
}

func TestSnapshotName(t *testing.T) {
	for _, c := range []struct {
		day  float64
		name string
	}{{365, "saturation_365.asc"}, {0, "saturation_0.asc"}, {12.5, "saturation_12.5.asc"}, {1825.25, "saturation_1825.25.asc"}} {
		if got := SnapshotName(c.day); got != c.name {
			t.Errorf("SnapshotName(%v) = %s, want %s", c.day, got, c.name)
		}
		if d, ok := SnapshotDay(c.name); !ok || d != c.day {
			t.Errorf("SnapshotDay(%s) = %v, %v", c.name, d, ok)
		}
	}
	for _, bad := range []string{"saturation_x.asc", "pressure.asc", "saturation_1.png"} {
		if _, ok := SnapshotDay(bad); ok {
			t.Errorf("SnapshotDay(%s) accepted", bad)
		}
	}
}

func TestFinished(t *testing.T) {
	dir := t.TempDir()
	if err := Finished(dir); err == nil || !strings.Contains(err.Error(), "not a finished") {
		t.Errorf("empty folder: %v", err)
	}
	if _, err := ReadSummary(dir); err == nil || !strings.Contains(err.Error(), "not a finished") {
		t.Errorf("ReadSummary of an empty folder: %v", err)
	}
	writeRun(t, dir, `{"title":"x"}`, "")
	if err := Finished(dir); err != nil {
		t.Errorf("finished folder: %v", err)
	}
}

func TestSummaryCheck(t *testing.T) {
	good := Summary{Grid: Grid{NX: 2, NY: 3, DX: 1, DY: 1}, Wells: []Well{{Name: "I", Type: "injector"}}}
	if err := good.Check("s.json"); err != nil {
		t.Errorf("good summary: %v", err)
	}
	for name, s := range map[string]Summary{
		"no cells":  {Grid: Grid{NX: 0, NY: 3, DX: 1, DY: 1}},
		"nan dx":    {Grid: Grid{NX: 2, NY: 3, DX: Float(math.NaN()), DY: 1}},
		"too large": {Grid: Grid{NX: 100000, NY: 100000, DX: 1, DY: 1}},
		"well type": {Grid: Grid{NX: 2, NY: 3, DX: 1, DY: 1}, Wells: []Well{{Name: "W", Type: "observer"}}},
	} {
		if err := s.Check("s.json"); err == nil || !strings.Contains(err.Error(), "s.json") {
			t.Errorf("%s: %v", name, err)
		}
	}
}

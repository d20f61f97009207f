package flood

import (
	"bufio"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strconv"

	"floodtrace/internal/outdir"
	"floodtrace/internal/parallel"
	"floodtrace/reservoir"
)

// Summary is the content of summary.json (docs/OUTPUTS.md).
type Summary struct {
	Title      string            `json:"title"`
	CaseFile   string            `json:"case_file"`
	Units      string            `json:"units"`
	UnitLabels map[string]string `json:"unit_labels"`
	Grid       SummaryGrid       `json:"grid"`
	Wells      []SummaryWell     `json:"wells"`
	Faults     []SummaryFault    `json:"faults"`
	Engine     string            `json:"engine"`
	EndDays    float64           `json:"end_days"`
	PoreVolume float64           `json:"pore_volume"`
	OOIP       float64           `json:"ooip"`
	Producers  []SummaryProducer `json:"producers"`
	Injectors  []SummaryInjector `json:"injectors"`
	Field      SummaryField      `json:"field"`
	Lorenz     float64           `json:"lorenz_coefficient"`
	MassBal    float64           `json:"mass_balance_error"`
	Lines      int               `json:"streamlines"`
	Solver     SummarySolver     `json:"pressure_solver"`
	Snapshots  []SummarySnapshot `json:"snapshots"`
	Warnings   []string          `json:"warnings"`
}

// SummaryGrid is the grid block of summary.json.
type SummaryGrid struct {
	NX int     `json:"nx"`
	NY int     `json:"ny"`
	DX float64 `json:"dx"`
	DY float64 `json:"dy"`
	X0 float64 `json:"x0"`
	Y0 float64 `json:"y0"`
}

// SummaryWell is a well's place in summary.json.
type SummaryWell struct {
	Name string  `json:"name"`
	Type string  `json:"type"`
	X    float64 `json:"x"`
	Y    float64 `json:"y"`
	I    int     `json:"i"`
	J    int     `json:"j"`
}

// SummaryFault is a fault trace in summary.json.
type SummaryFault struct {
	Name  string       `json:"name"`
	Trace [][2]float64 `json:"trace"`
}

// SummaryProducer is one producer's results in summary.json; breakthrough
// times are null when the event does not happen within the run.
type SummaryProducer struct {
	Name             string   `json:"name"`
	TracerBTDays     *float64 `json:"tracer_breakthrough_days"`
	TracerBTPVI      *float64 `json:"tracer_breakthrough_pvi"`
	BreakthroughDays *float64 `json:"breakthrough_days"`
	BreakthroughPVI  *float64 `json:"breakthrough_pvi"`
	FinalWaterCut    float64  `json:"final_water_cut"`
	CumOil           float64  `json:"cum_oil"`
	CumWater         float64  `json:"cum_water"`
}

// SummaryInjector is one injector's totals in summary.json.
type SummaryInjector struct {
	Name          string  `json:"name"`
	CumWater      float64 `json:"cum_water"`
	MaxBHPReached bool    `json:"max_bhp_reached"`
}

// SummaryField holds the field totals at the end of the run.
type SummaryField struct {
	FinalPVI            float64 `json:"final_pvi"`
	FinalRecoveryFactor float64 `json:"final_recovery_factor"`
	FinalWaterCut       float64 `json:"final_water_cut"`
	FinalCumOil         float64 `json:"final_cum_oil"`
	FinalCumWater       float64 `json:"final_cum_water"`
}

// SummarySolver reports the pressure solves.
type SummarySolver struct {
	Iterations       int     `json:"iterations"`
	RelativeResidual float64 `json:"relative_residual"`
	Solves           int     `json:"solves"`
}

// SummarySnapshot names a saturation map.
type SummarySnapshot struct {
	Time float64 `json:"time_days"`
	PVI  float64 `json:"pvi"`
	File string  `json:"file"`
}

func opt(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}

// Summary returns the run's summary.
func (r *Result) Summary() *Summary {
	m := r.Model
	length, _, _, rate, pres, vol := m.Units.Labels()
	s := &Summary{Title: m.Title, Units: string(m.Units), Engine: r.Engine, EndDays: m.Run.End,
		UnitLabels: map[string]string{"length": length, "rate": rate, "volume": vol, "pressure": pres},
		Grid:       SummaryGrid{NX: m.Grid.NX, NY: m.Grid.NY, DX: m.Grid.DX, DY: m.Grid.DY, X0: m.Grid.X0, Y0: m.Grid.Y0},
		PoreVolume: r.PoreVolume, OOIP: r.OOIP, Lorenz: r.Lorenz, MassBal: r.MassBalanceError,
		Lines: r.StreamlineCount, Solver: SummarySolver{Iterations: r.Iterations, RelativeResidual: r.RelResidual, Solves: r.Solves},
		Warnings: append([]string{}, r.Warnings...), Wells: []SummaryWell{}, Faults: []SummaryFault{},
		Producers: []SummaryProducer{}, Injectors: []SummaryInjector{}, Snapshots: []SummarySnapshot{}}
	if m.Path != "" {
		if abs, err := filepath.Abs(m.Path); err == nil {
			s.CaseFile = abs
		}
	}
	for _, w := range m.Wells {
		s.Wells = append(s.Wells, SummaryWell{Name: w.Name, Type: string(w.Type), X: w.X, Y: w.Y, I: w.I, J: w.J})
	}
	for _, f := range m.Faults {
		s.Faults = append(s.Faults, SummaryFault{Name: f.Name, Trace: f.Trace})
	}
	injRate := 0.0
	for _, in := range r.Injectors {
		injRate += in.Rate
		s.Injectors = append(s.Injectors, SummaryInjector{Name: in.Name, CumWater: in.CumWater, MaxBHPReached: in.MaxBHPReached})
	}
	// PVI at any time: interpolated on the report times (injection rates
	// may change with pressure updates and schedule events); beyond the
	// last report time, extrapolated at the final injection rate.
	pvi := func(t float64) float64 {
		if math.IsNaN(t) || len(r.Times) == 0 {
			return injRate * t / r.PoreVolume
		}
		last := len(r.Times) - 1
		if t > r.Times[last] {
			return r.PVI[last] + injRate*(t-r.Times[last])/r.PoreVolume
		}
		return Interpolate(append([]float64{0}, r.Times...), append([]float64{0}, r.PVI...), t)
	}
	last := len(r.Times) - 1
	for _, p := range r.Producers {
		sp := SummaryProducer{Name: p.Name, TracerBTDays: opt(p.TracerBreakthrough), TracerBTPVI: opt(pvi(p.TracerBreakthrough)),
			BreakthroughDays: opt(p.Breakthrough), BreakthroughPVI: opt(pvi(p.Breakthrough))}
		if last >= 0 {
			sp.FinalWaterCut, sp.CumOil, sp.CumWater = p.WaterCut[last], p.CumOil[last], p.CumWater[last]
		}
		s.Producers = append(s.Producers, sp)
	}
	if last >= 0 {
		s.Field = SummaryField{FinalPVI: r.PVI[last], FinalRecoveryFactor: r.RecoveryFactor[last], FinalWaterCut: r.FieldWaterCut[last],
			FinalCumOil: r.FieldCumOil[last], FinalCumWater: r.FieldCumWater[last]}
	}
	for _, sn := range r.Snapshots {
		s.Snapshots = append(s.Snapshots, SummarySnapshot{Time: sn.Time, PVI: sn.PVI, File: SnapshotName(sn.Time)})
	}
	return s
}

// SnapshotName returns the raster name of the saturation map at day t.
func SnapshotName(t float64) string { return "saturation_" + dayLabel(t) + ".asc" }

func dayLabel(t float64) string {
	if t == math.Trunc(t) {
		return strconv.FormatFloat(t, 'f', 0, 64)
	}
	return strconv.FormatFloat(t, 'f', -1, 64)
}

func num(v float64) string {
	if math.IsNaN(v) {
		return ""
	}
	return strconv.FormatFloat(v, 'g', 10, 64)
}

// WriteData writes every data file of the run (all but summary.json and
// the pictures) into d.
func (r *Result) WriteData(d *outdir.Dir) error {
	m := r.Model
	csv := func(name string, body func(w *bufio.Writer)) error {
		return d.Create(name, func(w io.Writer) error {
			bw := bufio.NewWriter(w)
			body(bw)
			return bw.Flush()
		})
	}
	if err := csv("wells.csv", func(w *bufio.Writer) {
		w.WriteString("time_days,well,type,control,rate,bhp\n")
		for _, x := range r.WellLog {
			fmt.Fprintf(w, "%s,%s,%s,%s,%s,%s\n", num(x.Time), x.Well, x.Type, x.Control, num(x.Rate), num(x.BHP))
		}
	}); err != nil {
		return err
	}
	if err := csv("producers.csv", func(w *bufio.Writer) {
		w.WriteString("time_days,pvi,well,water_cut,oil_rate,water_rate,cum_oil,cum_water\n")
		for k, t := range r.Times {
			for _, p := range r.Producers {
				fmt.Fprintf(w, "%s,%s,%s,%s,%s,%s,%s,%s\n", num(t), num(r.PVI[k]), p.Name, num(p.WaterCut[k]), num(p.OilRate[k]),
					num(p.WaterRate[k]), num(p.CumOil[k]), num(p.CumWater[k]))
			}
		}
	}); err != nil {
		return err
	}
	if err := csv("field.csv", func(w *bufio.Writer) {
		w.WriteString("time_days,pvi,water_cut,oil_rate,water_rate,cum_oil,cum_water,recovery_factor\n")
		for k, t := range r.Times {
			fmt.Fprintf(w, "%s,%s,%s,%s,%s,%s,%s,%s\n", num(t), num(r.PVI[k]), num(r.FieldWaterCut[k]), num(r.FieldOilRate[k]),
				num(r.FieldWaterRate[k]), num(r.FieldCumOil[k]), num(r.FieldCumWater[k]), num(r.RecoveryFactor[k]))
		}
	}); err != nil {
		return err
	}
	if err := csv("effective_curves.csv", func(w *bufio.Writer) {
		w.WriteString("time_days,well,avg_water_saturation,water_cut\n")
		for k, t := range r.Times {
			for _, p := range r.Producers {
				fmt.Fprintf(w, "%s,%s,%s,%s\n", num(t), p.Name, num(p.AvgSw[k]), num(p.WaterCut[k]))
			}
		}
	}); err != nil {
		return err
	}
	if r.Trace != nil {
		if err := csv("allocation.csv", func(w *bufio.Writer) {
			w.WriteString("injector,producer,rate,fraction_of_injector,fraction_of_producer,pore_volume\n")
			for _, p := range r.Trace.Pairs {
				fmt.Fprintf(w, "%s,%s,%s,%s,%s,%s\n", m.Wells[p.Injector].Name, m.Wells[p.Producer].Name, num(p.Rate),
					num(p.FractionOfInjector), num(p.FractionOfProducer), num(p.PoreVolume))
			}
		}); err != nil {
			return err
		}
	}
	if err := d.Create("diagnostics.csv", func(w io.Writer) error {
		if _, err := io.WriteString(w, "phi,F,tD,sweep\n"); err != nil {
			return err
		}
		n := max(len(r.Phi), len(r.TD))
		cell := func(buf []byte, s []float64, k int) []byte {
			if k < len(s) {
				return appendNum(buf, s[k])
			}
			return buf
		}
		return writeBands(w, n, 8192, func(lo, hi int, buf []byte) []byte {
			for k := lo; k < hi; k++ {
				buf = cell(buf, r.Phi, k)
				buf = append(buf, ',')
				buf = cell(buf, r.F, k)
				buf = append(buf, ',')
				buf = cell(buf, r.TD, k)
				buf = append(buf, ',')
				buf = cell(buf, r.Sweep, k)
				buf = append(buf, '\n')
			}
			return buf
		})
	}); err != nil {
		return err
	}
	raster := func(name string, v []float64) error {
		return d.Create(name, func(w io.Writer) error {
			return reservoir.WriteASCIIRasterDigits(w, m.Grid, v, m.Active, -9999, 7)
		})
	}
	if r.Pressure != nil {
		if err := raster("pressure.asc", r.Pressure.P); err != nil {
			return err
		}
	}
	if r.Trace != nil {
		if err := raster("tof.asc", r.Trace.TOF); err != nil {
			return err
		}
		if err := raster("tof_producers.asc", r.Trace.BackTOF); err != nil {
			return err
		}
		for name, part := range map[string][]int{"injector_partition.asc": r.Trace.InjectorPartition, "producer_partition.asc": r.Trace.ProducerPartition} {
			v := make([]float64, len(part))
			for k, p := range part {
				v[k] = float64(p + 1)
			}
			if err := raster(name, v); err != nil {
				return err
			}
		}
		if err := d.Create("streamlines.geojson", r.writeGeoJSON); err != nil {
			return err
		}
	}
	for _, sn := range r.Snapshots {
		if err := raster(SnapshotName(sn.Time), sn.Sw); err != nil {
			return err
		}
	}
	for _, sn := range r.Frames {
		if err := raster("frames/"+SnapshotName(sn.Time), sn.Sw); err != nil {
			return err
		}
	}
	return nil
}

// WriteSummary writes summary.json; call it last.
func (r *Result) WriteSummary(d *outdir.Dir) error {
	b, err := r.SummaryJSON()
	if err != nil {
		return err
	}
	return d.Bytes("summary.json", b)
}

// SummaryJSON returns the content of summary.json.
func (r *Result) SummaryJSON() ([]byte, error) {
	b, err := json.MarshalIndent(r.Summary(), "", "  ")
	if err != nil {
		return nil, err
	}
	return append(b, '\n'), nil
}

func (r *Result) writeGeoJSON(w io.Writer) error {
	m := r.Model
	if _, err := io.WriteString(w, `{"type":"FeatureCollection","features":[`); err != nil {
		return err
	}
	name := func(buf []byte, i int) []byte {
		if i < 0 || i >= len(m.Wells) {
			return append(buf, "null"...)
		}
		return strconv.AppendQuote(buf, m.Wells[i].Name)
	}
	lines := r.Trace.Lines
	first := len(lines) // the first line written has no comma before it
	for i := range lines {
		if len(lines[i].Path) >= 2 {
			first = i
			break
		}
	}
	err := writeBands(w, len(lines), 64, func(lo, hi int, buf []byte) []byte {
		for i := lo; i < hi; i++ {
			l := &lines[i]
			if len(l.Path) < 2 {
				continue
			}
			if i != first {
				buf = append(buf, ',')
			}
			buf = append(buf, "\n{\"type\":\"Feature\",\"properties\":{\"injector\":"...)
			buf = name(buf, l.Injector)
			buf = append(buf, ",\"producer\":"...)
			buf = name(buf, l.Producer)
			buf = append(buf, ",\"flux\":"...)
			buf = appendJNum(buf, l.Flux)
			buf = append(buf, ",\"tof_days\":"...)
			buf = appendJNum(buf, l.TotalTau)
			buf = append(buf, "},\"geometry\":{\"type\":\"LineString\",\"coordinates\":["...)
			for k, p := range l.Path {
				if k > 0 {
					buf = append(buf, ',')
				}
				buf = append(buf, '[')
				buf = appendFixed(buf, p[0], 2)
				buf = append(buf, ',')
				buf = appendFixed(buf, p[1], 2)
				buf = append(buf, ']')
			}
			buf = append(buf, "]}}"...)
		}
		return buf
	})
	if err != nil {
		return err
	}
	_, err = io.WriteString(w, "\n]}\n")
	return err
}

// writeBands formats items [0, n) in bands of per items in parallel and
// writes the bands to w in order (parallel.Bands): the bytes do not
// depend on the number of goroutines.
func writeBands(w io.Writer, n, per int, format func(lo, hi int, buf []byte) []byte) error {
	nb := (n + per - 1) / per
	return parallel.Bands(w, nb, func(b int, buf []byte) ([]byte, error) {
		return format(b*per, min((b+1)*per, n), buf), nil
	})
}

// appendFixed appends strconv.AppendFloat(buf, v, 'f', dec, 64) for dec
// in 0..6. Magnitudes below 1e12 take a fast path: v is scaled by 10^dec
// (one rounding, relative error below 2^-52) and rounded to nearest; a
// scaled value within that error of a half-way point goes to strconv,
// which rounds the exact binary value, as do all other values.
func appendFixed(buf []byte, v float64, dec int) []byte {
	a := math.Abs(v)
	if dec < 0 || dec > 6 || !(a < 1e12) {
		return strconv.AppendFloat(buf, v, 'f', dec, 64)
	}
	p := 1.0
	for range dec {
		p *= 10
	}
	scaled := a * p
	fl := math.Floor(scaled)
	frac := scaled - fl
	if math.Abs(frac-0.5) <= 4e-16*scaled+1e-300 {
		return strconv.AppendFloat(buf, v, 'f', dec, 64)
	}
	m := uint64(fl)
	if frac > 0.5 {
		m++
	}
	if math.Signbit(v) {
		buf = append(buf, '-')
	}
	ip := m / uint64(p)
	buf = strconv.AppendUint(buf, ip, 10)
	if dec == 0 {
		return buf
	}
	buf = append(buf, '.')
	f := m - ip*uint64(p)
	var d [6]byte
	for i := dec - 1; i >= 0; i-- {
		d[i] = byte('0' + f%10)
		f /= 10
	}
	return append(buf, d[:dec]...)
}

// appendNum appends num(v).
func appendNum(buf []byte, v float64) []byte {
	if math.IsNaN(v) {
		return buf
	}
	return strconv.AppendFloat(buf, v, 'g', 10, 64)
}

// appendJNum appends v as a JSON number with 8 significant digits, or
// null when it is not finite.
func appendJNum(buf []byte, v float64) []byte {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return append(buf, "null"...)
	}
	return strconv.AppendFloat(buf, v, 'g', 8, 64)
}

package reservoir

import (
	"fmt"
	"math"
	"strings"
)

// BytesPerCell is the memory a run needs per grid cell, in bytes, used by
// EstimateMemory. It adds up (8-byte floats and ints):
//   - the case: four property arrays, the active flag and two face
//     multiplier arrays, about 49 bytes;
//   - the pressure solve: a five-point CSR matrix (values, column indices,
//     row pointers) and an incomplete-factor preconditioner of the same
//     pattern (176), the conjugate-gradient vectors (48), face
//     transmissibilities and fluxes (32) and the mobility (8), 264 bytes;
//   - streamlines and transport: forward and backward time of flight, well
//     partitions, saturation, per-cell accumulators and output buffers, about
//     80 bytes.
//
// The sum, 393, is rounded up to 400.
const BytesPerCell = 400

// bytesPerSegment is the memory of one cell crossing recorded along a
// streamline (cell number, time of flight in the cell, entry point), and
// streamlineOverhead the fixed memory per streamline.
const (
	bytesPerSegment    = 32
	streamlineOverhead = 128
)

// EstimateMemory returns an estimate, in bytes, of the memory a run needs
// on an nx x ny grid with the given number of streamlines: BytesPerCell per
// cell, plus for each streamline a record per crossed cell, taking a
// streamline to cross 2*(nx+ny) cells (twice a monotone path across the
// grid, a generous allowance for winding paths). It is an estimate for
// planning, not a bound; it saturates at math.MaxInt64.
func EstimateMemory(nx, ny, streamlines int) int64 {
	if nx < 0 {
		nx = 0
	}
	if ny < 0 {
		ny = 0
	}
	if streamlines < 0 {
		streamlines = 0
	}
	cells := float64(nx) * float64(ny)
	perLine := float64(streamlineOverhead) + float64(bytesPerSegment)*2*(float64(nx)+float64(ny))
	b := BytesPerCell*cells + float64(streamlines)*perLine
	if b >= math.MaxInt64 {
		return math.MaxInt64
	}
	return int64(b)
}

// formatBytes prints a byte count with a decimal unit (kB, MB, GB, TB).
func formatBytes(b float64) string {
	units := []string{"bytes", "kB", "MB", "GB", "TB", "PB"}
	u := 0
	for b >= 1000 && u < len(units)-1 {
		b /= 1000
		u++
	}
	if u == 0 {
		return fmt.Sprintf("%.0f bytes", b)
	}
	return fmt.Sprintf("%.3g %s", b, units[u])
}

// CellLabel names cell (i, j) for messages: "cell (i=12, j=7)", with i
// counting east and j north from 0 at the south-west corner, as in Grid.
func CellLabel(i, j int) string { return fmt.Sprintf("cell (i=%d, j=%d)", i, j) }

// Describe returns the short description of a model that "floodtrace
// check" prints: title and units, grid, cell counts, pore volume, OOIP,
// fluids and relative permeability, the wells with their cells and
// controls, faults, schedule, run settings, a memory estimate and the
// warnings of Load (Model.Warnings).
func Describe(m *Model) string {
	var b strings.Builder
	length, perm, visc, rate, pres, vol := m.Units.Labels()
	g := m.Grid
	active := 0
	for _, a := range m.Active {
		if a {
			active++
		}
	}
	title := m.Title
	if title == "" {
		title = "(untitled)"
	}
	fmt.Fprintf(&b, "%s\n", title)
	fmt.Fprintf(&b, "  units       %s (%s, %s, %s, %s, %s)\n", m.Units, length, perm, visc, rate, pres)
	fmt.Fprintf(&b, "  grid        %d x %d cells of %g x %g %s, south-west corner (%g, %g)\n", g.NX, g.NY, g.DX, g.DY, length, g.X0, g.Y0)
	fmt.Fprintf(&b, "  cells       %d, of which %d active (%.1f%%)\n", g.N(), active, 100*float64(active)/math.Max(1, float64(g.N())))
	pv := m.TotalPoreVolume()
	fmt.Fprintf(&b, "  pore volume %.6g %s\n", pv, vol)
	fmt.Fprintf(&b, "  OOIP        %.6g %s (reservoir volume, initial water saturation %g)\n", m.OOIP(), vol, m.Fluids.InitialSw)
	surf := "stock-tank bbl"
	if m.Units == Metric {
		surf = "standard m3"
	}
	fmt.Fprintf(&b, "              %.6g %s (surface volume, oil formation volume factor %g)\n", m.OOIPSurface(), surf, m.Fluids.Bo())
	if !m.StartDate.IsZero() {
		fmt.Fprintf(&b, "  start date  %s (day 0)\n", m.StartDate.Format(DateLayout))
	}
	if h := m.History; h != nil {
		fmt.Fprintf(&b, "  history     %d rows to day %g (%s), drive: %s\n", len(h.Rows), h.End(), m.PeriodEndDate(h.End()), h.Drive)
	}
	fmt.Fprintf(&b, "  fluids      water %g %s, oil %g %s (viscosity ratio oil/water %.3g)\n",
		m.Fluids.WaterViscosity, visc, m.Fluids.OilViscosity, visc, m.Fluids.OilViscosity/m.Fluids.WaterViscosity)
	switch rp := m.RelPerm.(type) {
	case Corey:
		fmt.Fprintf(&b, "  rel. perm.  Corey: swc %g, sor %g, krw max %g, kro max %g, nw %g, no %g\n", rp.Swc, rp.Sor, rp.KrwMax, rp.KroMax, rp.Nw, rp.No)
	case *Table:
		swc, sor := rp.Endpoints()
		fmt.Fprintf(&b, "  rel. perm.  table of %d rows (%s): swc %.4g, sor %.4g\n", len(rp.Sw), rp.Source, swc, sor)
	case nil:
	default:
		swc, sor := rp.Endpoints()
		fmt.Fprintf(&b, "  rel. perm.  swc %g, sor %g\n", swc, sor)
	}
	fmt.Fprintf(&b, "  wells       %d (cells counted from 0 at the south-west corner, i east, j north)\n", len(m.Wells))
	wn := 4
	for _, w := range m.Wells {
		wn = max(wn, len(w.Name))
	}
	for _, w := range m.Wells {
		ctl := ""
		if w.Control == RateControl {
			ctl = fmt.Sprintf("rate %g %s", w.Rate, rate)
		} else {
			ctl = fmt.Sprintf("BHP %g %s", w.BHP, pres)
		}
		if w.MaxBHP > 0 {
			ctl += fmt.Sprintf(", BHP limit %g %s", w.MaxBHP, pres)
		}
		if w.MinBHP > 0 {
			ctl += fmt.Sprintf(", BHP floor %g %s", w.MinBHP, pres)
		}
		if w.Open > 0 {
			ctl += fmt.Sprintf(", opens day %g", w.Open)
		}
		if w.MaxWaterCut > 0 {
			ctl += fmt.Sprintf(", shut at water cut %g", w.MaxWaterCut)
		}
		if w.MinOilRate > 0 {
			ctl += fmt.Sprintf(", shut below oil rate %g %s", w.MinOilRate, rate)
		}
		fmt.Fprintf(&b, "    %-*s  %-8s  %-18s  %s\n", wn, w.Name, w.Type, CellLabel(w.I, w.J), ctl)
	}
	if len(m.Faults) > 0 {
		fmt.Fprintf(&b, "  faults      %d\n", len(m.Faults))
		fn := 4
		for _, f := range m.Faults {
			fn = max(fn, len(f.Name))
		}
		for _, f := range m.Faults {
			fmt.Fprintf(&b, "    %-*s  multiplier %g, %d trace points\n", fn, f.Name, f.Multiplier, len(f.Trace))
		}
	}
	if len(m.Schedule) > 0 {
		late := 0
		for _, e := range m.Schedule {
			if e.Time > m.Run.End {
				late++
			}
		}
		fmt.Fprintf(&b, "  schedule    %d events", len(m.Schedule))
		if late > 0 {
			fmt.Fprintf(&b, " (%d after the end of the run, ignored)", late)
		}
		b.WriteString("\n")
	}
	b.WriteString(describeGravity(m))
	r := m.Run
	solves := fmt.Sprintf("%d pressure solve", r.PressureUpdates)
	if r.PressureUpdates != 1 {
		solves += "s"
	}
	var why []string
	if m.History != nil {
		why = append(why, "the history")
	}
	if len(m.Schedule) > 0 {
		why = append(why, "the schedule")
	}
	if m.HasGravity() {
		why = append(why, "the depth")
	}
	if len(why) > 0 {
		solves += " asked (runs with pressure updates for " + strings.Join(why, " and ") + ")"
	}
	fmt.Fprintf(&b, "  run         %g days, report every %g days, %d streamlines, %s\n", r.End, r.ReportEvery, r.Streamlines, solves)
	if r.MaxWaterCut > 0 || r.MinOilRate > 0 || r.FieldMaxWaterCut > 0 {
		var lims []string
		if r.MaxWaterCut > 0 {
			lims = append(lims, fmt.Sprintf("producers shut at water cut %g", r.MaxWaterCut))
		}
		if r.MinOilRate > 0 {
			lims = append(lims, fmt.Sprintf("producers shut below oil rate %g %s", r.MinOilRate, rate))
		}
		if r.FieldMaxWaterCut > 0 {
			lims = append(lims, fmt.Sprintf("run ends at field water cut %g", r.FieldMaxWaterCut))
		}
		fmt.Fprintf(&b, "  limits      %s (unless a producer gives its own; checked at the report times)\n", strings.Join(lims, ", "))
	}
	mem := EstimateMemory(g.NX, g.NY, r.Streamlines)
	fmt.Fprintf(&b, "  memory      about %s for a run (%d bytes, estimate)\n", formatBytes(float64(mem)), mem)
	if len(m.Warnings) > 0 {
		fmt.Fprintf(&b, "  warnings    %d (accepted; a run repeats them)\n", len(m.Warnings))
		for _, w := range m.Warnings {
			fmt.Fprintf(&b, "    %s\n", w)
		}
	}
	return b.String()
}

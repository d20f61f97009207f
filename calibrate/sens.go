package calibrate

import (
	"fmt"
	"math"
	"sort"

	"floodtrace/flood"
	"floodtrace/pressure"
	"floodtrace/reservoir"
	"floodtrace/streamline"
	"floodtrace/transport"
)

// FrontSpeed returns the speed of the leading Buckley-Leverett wave of
// the case's fluids (water injected at 1 - Sor into the initial water
// saturation), dfw/dS at the shock front (Buckley and Leverett 1942;
// Welge 1952): a streamline of time of flight tau sees water at
// tau / FrontSpeed.
func FrontSpeed(m *reservoir.Model) (float64, error) {
	ff := transport.NewFracFlow(m.RelPerm, m.Fluids.WaterViscosity, m.Fluids.OilViscosity)
	_, sor := m.RelPerm.Endpoints()
	rs, err := transport.NewRiemann(ff, m.Fluids.InitialSw, 1-sor)
	if err != nil {
		return 0, fmt.Errorf("fractional flow: %w", err)
	}
	v := rs.FrontSpeed()
	if !(v > 0) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("fractional flow: the water front does not move (speed %g)", v)
	}
	return v, nil
}

// Lines are the streamlines of one forward model with their time of
// flight rescaled to the cell pore volumes (streamline.Result.Rescale),
// the geometry the sensitivities hold fixed.
type Lines struct {
	Trace *streamline.Result
	Seg   *streamline.Segments
	// Front is FrontSpeed of the case.
	Front float64
}

// TraceModel solves the pressure of m with its wells at day 0 and traces
// count streamlines (m.Run.Streamlines when 0), keeping the cells and
// times of flight the sensitivities need.
func TraceModel(m *reservoir.Model, count int) (*Lines, error) {
	sol, err := pressure.Solve(pressure.Input{Model: m}, pressure.Settings{})
	if err != nil {
		return nil, err
	}
	if count <= 0 {
		count = m.Run.Streamlines
	}
	tr, err := streamline.Trace(flood.Field(m, sol), streamline.Settings{Count: count, Workers: 1})
	if err != nil {
		return nil, err
	}
	return linesOf(m, tr)
}

// linesOf rescales the lines of tr to the pore volumes of m.
func linesOf(m *reservoir.Model, tr *streamline.Result) (*Lines, error) {
	seg, err := tr.Rescale(m.PoreVolumes())
	if err != nil {
		return nil, err
	}
	front, err := FrontSpeed(m)
	if err != nil {
		return nil, err
	}
	return &Lines{Trace: tr, Seg: seg, Front: front}, nil
}

// Arrival returns the first water arrival at well w in the streamline
// model, the smallest rescaled time of flight of the lines with flux from
// an injector to w over the front speed, days, and the index of that line
// (-1 and NaN when no line reaches w).
func (ls *Lines) Arrival(w int) (float64, int) {
	best, at := math.Inf(1), -1
	for i := range ls.Trace.Lines {
		l := &ls.Trace.Lines[i]
		if l.Producer == w && l.Injector >= 0 && l.Flux > 0 && ls.Seg.Total[i] < best {
			best, at = ls.Seg.Total[i], i
		}
	}
	if at < 0 {
		return math.NaN(), -1
	}
	return best / ls.Front, at
}

// addLine adds weight times the arrival-time sensitivity of line i to
// row: the arrival of the line is its time of flight over the front
// speed, and with the streamline geometry and the pressure field held
// fixed the velocity in a cell is proportional to its permeability, so
// d tau / d ln k_cell = - (time of flight spent in the cell) (Vasco, Yoon
// and Datta-Gupta 1999, eq. 13) and d t / d ln k_cell = - tau_cell /
// front.
func (ls *Lines) addLine(row map[int]float64, i int, weight float64) {
	sg := ls.Seg
	for s := sg.Start[i]; s < sg.Start[i+1]; s++ {
		row[int(sg.Cell[s])] -= weight * (sg.Exit[s] - sg.Entry(i, s)) / ls.Front
	}
}

// ArrivalRow returns the sensitivity of the first water arrival at well
// w (Arrival) to each cell's log-permeability, days per unit ln k, as a
// map from cell to value (nil when no line reaches w). Its entries sum to
// minus the arrival time: scaling every permeability by e^ε at fixed
// pressure moves the arrival by -ε t.
func (ls *Lines) ArrivalRow(w int) map[int]float64 {
	_, at := ls.Arrival(w)
	if at < 0 {
		return nil
	}
	row := map[int]float64{}
	ls.addLine(row, at, 1)
	return row
}

// ShiftRow returns the sensitivity of a time shift of well w's water-cut
// curve to each cell's log-permeability: the flux-weighted mean of the
// arrival sensitivities of the lines that bring water to w by day window
// (the lines that make the water cut over the history), or of the first
// line when none arrives by then. A uniform shift of the arrivals of
// those lines moves the curve they make by the same time (He, Datta-Gupta
// and Yoon 2002, section 2). nil when no line reaches w.
func (ls *Lines) ShiftRow(w int, window float64) map[int]float64 {
	first, at := ls.Arrival(w)
	if at < 0 {
		return nil
	}
	limit := math.Max(window, first) * ls.Front
	var sum float64
	var use []int
	for i := range ls.Trace.Lines {
		l := &ls.Trace.Lines[i]
		if l.Producer == w && l.Injector >= 0 && l.Flux > 0 && ls.Seg.Total[i] <= limit {
			use = append(use, i)
			sum += l.Flux
		}
	}
	row := map[int]float64{}
	for _, i := range use {
		ls.addLine(row, i, ls.Trace.Lines[i].Flux/sum)
	}
	return row
}

// RateShiftRow is ShiftRow for a producer held at its rate. The pore
// volume it drains per unit of rate (the flux-weighted sum of its lines'
// times of flight) is then held to first order, so each line's time of
// flight changes by - tau_cell + tau_line S_cell, S_cell the share of the
// producer's flux-weighted time of flight spent in the cell: the
// fixed-pressure sensitivity projected so that scaling every cell changes
// nothing, as it does not at fixed rates. The flux-weighted mean arrival
// of all the producer's lines is then fixed too, so the row is the mean
// over the fastest lines carrying a third of its flux, those whose water
// makes the rise of the water cut. An approximation of this package, not
// of the references.
func (ls *Lines) RateShiftRow(w int) map[int]float64 {
	sg := ls.Seg
	var all []int
	share := map[int]float64{}
	var vol, q float64
	for i := range ls.Trace.Lines {
		l := &ls.Trace.Lines[i]
		if l.Producer != w || l.Injector < 0 || !(l.Flux > 0) {
			continue
		}
		all = append(all, i)
		vol += l.Flux * sg.Total[i]
		q += l.Flux
		for s := sg.Start[i]; s < sg.Start[i+1]; s++ {
			share[int(sg.Cell[s])] += l.Flux * (sg.Exit[s] - sg.Entry(i, s))
		}
	}
	if len(all) == 0 || !(vol > 0) {
		return nil
	}
	sort.SliceStable(all, func(a, b int) bool { return sg.Total[all[a]] < sg.Total[all[b]] })
	var use []int
	var useQ, useTau float64
	for _, i := range all {
		if useQ >= q/3 {
			break
		}
		use = append(use, i)
		useQ += ls.Trace.Lines[i].Flux
		useTau += ls.Trace.Lines[i].Flux * sg.Total[i]
	}
	row := map[int]float64{}
	for _, i := range use {
		ls.addLine(row, i, ls.Trace.Lines[i].Flux/useQ)
	}
	mean := useTau / useQ / ls.Front
	for c, v := range share {
		row[c] += mean * v / vol
	}
	return row
}

// Crossed marks the cells crossed by lines with flux from an injector to
// one of the wells: the part of the map their data constrain.
func (ls *Lines) Crossed(n int, wells map[int]bool) []bool {
	out := make([]bool, n)
	sg := ls.Seg
	for i := range ls.Trace.Lines {
		l := &ls.Trace.Lines[i]
		if !wells[l.Producer] || l.Injector < 0 || !(l.Flux > 0) {
			continue
		}
		for s := sg.Start[i]; s < sg.Start[i+1]; s++ {
			out[sg.Cell[s]] = true
		}
	}
	return out
}

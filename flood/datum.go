package flood

import (
	"fmt"
	"math"
	"strings"

	"floodtrace/pressure"
	"floodtrace/reservoir"
)

// datumOf returns the pressure datum of m (history.pressure_datum), 0
// when the case gives none.
func datumOf(m *reservoir.Model) float64 {
	if m.History == nil {
		return 0
	}
	return m.History.PressureDatum
}

// pressureRegions labels the active cells of m by the regions connected
// through faces of positive transmissibility (both cells active, the
// face's multiplier above 0), as package pressure groups them; -1 for an
// inactive cell.
func pressureRegions(m *reservoir.Model) []int {
	g := m.Grid
	lab := make([]int, g.N())
	for k := range lab {
		lab[k] = -1
	}
	n := 0
	stack := []int{}
	for k0 := range lab {
		if !m.Active[k0] || lab[k0] >= 0 {
			continue
		}
		lab[k0] = n
		stack = append(stack[:0], k0)
		for len(stack) > 0 {
			k := stack[len(stack)-1]
			stack = stack[:len(stack)-1]
			i, j := g.IJ(k)
			try := func(ni, nj int, mult float64) {
				if ni < 0 || nj < 0 || ni >= g.NX || nj >= g.NY || !(mult > 0) {
					return
				}
				c := g.Index(ni, nj)
				if m.Active[c] && lab[c] < 0 {
					lab[c] = n
					stack = append(stack, c)
				}
			}
			mx := func(f int) float64 {
				if m.TransMultX == nil {
					return 1
				}
				return m.TransMultX[f]
			}
			my := func(f int) float64 {
				if m.TransMultY == nil {
					return 1
				}
				return m.TransMultY[f]
			}
			try(i-1, j, mx(g.XFace(i, j)))
			try(i+1, j, mx(g.XFace(i+1, j)))
			try(i, j-1, my(g.YFace(i, j)))
			try(i, j+1, my(g.YFace(i, j+1)))
		}
		n++
	}
	return lab
}

// applyDatum sets the pressure level of every region of sol whose
// pressures are relative (every open well rate-controlled) so that its
// pore-volume-weighted average cell pressure is the case's
// history.pressure_datum: the cell pressures and the BHPs of the wells
// there are shifted by one constant (the flow does not change: only
// pressure differences drive it in an incompressible model). The wells
// stay marked Relative in sol (their controls were not checked against
// limits by the solve); the returned flags tell which wells were given
// absolute pressures (datum) and which of those are past their BHP limit
// (limit): an open producer below its min_bhp (or, without one,
// atmospheric pressure), an open injector above its max_bhp. wells are
// the wells in force at the solve. Without a datum, or without a relative
// region, nothing changes and nil is returned.
//
// Where the datum's level would leave a pressure below atmospheric in a
// region (an open well's BHP or a cell's pressure: the observed rates
// cannot be made at that average pressure), the region's level is raised
// until its lowest pressure is atmospheric, and notes says so, naming the
// well or cell and the day t: the physics holds, the datum does not.
func applyDatum(m *reservoir.Model, sol *pressure.Solution, wells []reservoir.Well, t float64) (datum, limit []bool, notes []string) {
	p0 := datumOf(m)
	if !(p0 > 0) {
		return nil, nil, nil
	}
	any := false
	for _, w := range sol.Wells {
		any = any || w.Relative
	}
	if !any {
		return nil, nil, nil
	}
	lab := pressureRegions(m)
	nreg := 0
	for _, l := range lab {
		nreg = max(nreg, l+1)
	}
	rel := make([]bool, nreg)
	for _, w := range sol.Wells {
		if w.Relative && lab[w.Cell] >= 0 {
			rel[lab[w.Cell]] = true
		}
	}
	sum, pv := make([]float64, nreg), make([]float64, nreg)
	for k, l := range lab {
		if l < 0 || !rel[l] || math.IsNaN(sol.P[k]) {
			continue
		}
		v := m.PoreVolume(k)
		sum[l] += v * sol.P[k]
		pv[l] += v
	}
	shift := make([]float64, nreg)
	for l := range shift {
		if rel[l] && pv[l] > 0 {
			shift[l] = p0 - sum[l]/pv[l]
		}
	}
	// The lowest pressure of each region at the datum's level, and what
	// holds it.
	atm := m.Units.Atmospheric()
	low := make([]float64, nreg)
	what := make([]string, nreg)
	for l := range low {
		low[l] = math.Inf(1)
	}
	for k, l := range lab {
		if l >= 0 && rel[l] && !math.IsNaN(sol.P[k]) && sol.P[k]+shift[l] < low[l] {
			low[l], what[l] = sol.P[k]+shift[l], reservoir.CellLabel(k%m.Grid.NX, k/m.Grid.NX)
		}
	}
	for i, w := range sol.Wells {
		if l := lab[w.Cell]; w.Relative && l >= 0 && !w.Shut && w.Q != 0 && i < len(wells) && w.BHP+shift[l] < low[l] {
			low[l], what[l] = w.BHP+shift[l], "well "+w.Name
		}
	}
	_, _, _, _, pres, _ := m.Units.Labels()
	for l := range shift {
		if rel[l] && low[l] < atm {
			notes = append(notes, fmt.Sprintf("history: at the pressure_datum of %g %s, %s would be at %.1f %s on day %g, below atmospheric: the observed rates cannot be made at that average pressure, so the pressure level there was raised by %.1f %s (%s at atmospheric pressure)",
				p0, pres, what[l], low[l], pres, math.Round(t*100)/100, atm-low[l], pres, what[l]))
			shift[l] += atm - low[l]
		}
	}
	for k, l := range lab {
		if l >= 0 && rel[l] && !math.IsNaN(sol.P[k]) {
			sol.P[k] += shift[l]
		}
	}
	datum, limit = make([]bool, len(sol.Wells)), make([]bool, len(sol.Wells))
	for i := range sol.Wells {
		w := &sol.Wells[i]
		if !w.Relative || lab[w.Cell] < 0 {
			continue
		}
		w.BHP += shift[lab[w.Cell]]
		datum[i] = true
		if w.Shut || w.Backflow || w.Q == 0 || i >= len(wells) {
			continue
		}
		cw := wells[i]
		switch w.Type {
		case reservoir.Producer:
			lim := cw.MinBHP
			if !(lim > 0) {
				lim = atm
			}
			limit[i] = w.BHP < lim
		case reservoir.Injector:
			limit[i] = cw.MaxBHP > 0 && w.BHP > cw.MaxBHP
		}
	}
	return datum, limit, notes
}

// datumWarning reports whether a warning of the pressure solve is one
// about relative pressures, which a pressure datum answers.
func datumWarning(msg string) bool {
	return strings.Contains(msg, "are relative")
}

// datumNote is the warning a run with a pressure datum gives once.
func datumNote(m *reservoir.Model) string {
	_, _, _, _, pres, _ := m.Units.Labels()
	return fmt.Sprintf("history: where every well of a region is rate-controlled, its pressure level is set by history.pressure_datum (average reservoir pressure %g %s, pore-volume weighted); BHP limits there are checked against it and reported, not enforced (the model is incompressible: the rates stay the observed ones)", datumOf(m), pres)
}

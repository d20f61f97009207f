package flood

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"

	"floodtrace/reservoir"
	"floodtrace/runfolder"
)

// HistoryTolerance is the relative rate change below which consecutive
// history periods share one pressure solve when a history drives the
// wells (history.drive: rates): periods are grouped while, for every well,
// each period's rate stays within HistoryTolerance of the group's
// time-weighted mean rate (and a well that is shut stays shut). Each well
// is given that mean rate over the group, so its volume over the group is
// the observed one exactly, and within a group its rate differs from the
// observed by at most this fraction.
const HistoryTolerance = 0.05

// HistoryBreakthrough is the water cut (surface volumes) that marks water
// breakthrough in the comparison with a history: the first history period
// of a producer whose water cut exceeds it, observed and in the model.
// Two percent is above the water a producer makes before injected water
// arrives in most fields (common practice).
const HistoryBreakthrough = 0.02

// HistoryResult compares a run with the case's production history.
type HistoryResult struct {
	End     float64 // end of the history, days
	Drive   reservoir.HistoryDrive
	Rows    int // rows of the history file
	Periods int // distinct history periods over all wells
	// Groups is the number of groups of periods whose rates drove the
	// wells (drive: rates; 0 with drive: controls), Solves the pressure
	// solves of the run before the end of the history.
	Groups, Solves int
	Match          []MatchRow
	Wells          []HistoryWell // in the order of Model.Wells, wells with history rows only
	Field          HistoryWell
}

// MatchRow is one row of match.csv: a well over one history period, the
// observed and model values side by side. Volumes and rates are surface
// volumes; the model's are averaged over the same period. An injector's
// injected water is in the water columns (its oil and water cut are
// NaN). NaN is a value not measured or not defined.
type MatchRow struct {
	Well                       string
	Start, End                 float64
	ObsWaterCut, ModWaterCut   float64
	ObsOilRate, ModOilRate     float64
	ObsWaterRate, ModWaterRate float64
	ObsCumOil, ModCumOil       float64
	ObsCumWater, ModCumWater   float64
	ObsBHP, ModBHP             float64
	Injector                   bool
}

// HistoryWell is the match of one well (or the field) with its history.
type HistoryWell struct {
	Name                 string
	Type                 reservoir.WellType
	WaterCutRMS          float64 // NaN when no period has both
	ObservedBreakthrough float64 // days, NaN when none
	ModelBreakthrough    float64 // days, NaN when none
	BreakthroughError    float64 // model - observed, days
	CumOilError          float64 // (model - observed) / observed at the last period
	CumWaterError        float64
	BHPRMS               float64
	LimitPeriods         [][2]float64 // spans [start, end] of consecutive periods in which the well was held at its BHP limit
}

// historyTimes returns the period starts and ends of the history of m
// after day 0 and up to the end of the run, sorted, without duplicates.
func historyTimes(m *reservoir.Model) []float64 {
	if m.History == nil {
		return nil
	}
	ts := make([]float64, 0, 2*len(m.History.Rows))
	for _, r := range m.History.Rows {
		for _, t := range []float64{r.Start, r.End} {
			if t > 0 && t <= m.Run.End {
				ts = append(ts, t)
			}
		}
	}
	slices.Sort(ts)
	return slices.Compact(ts)
}

// nz returns v, or 0 for a value not measured.
func nz(v float64) float64 {
	if math.IsNaN(v) {
		return 0
	}
	return v
}

// typeAt returns the type of well i of m at day t (its case type and the
// schedule's conversions up to t).
func typeAt(m *reservoir.Model, i int, t float64) reservoir.WellType {
	typ := m.Wells[i].Type
	for _, e := range m.Schedule {
		if e.Time <= t && e.Well == m.Wells[i].Name && e.Convert != "" {
			typ = e.Convert
		}
	}
	return typ
}

// historyPlan is the grouping of the history's periods: the boundaries
// B (0, every period start and end, sorted), and for each group [B[a],
// B[b]) the mean reservoir rate of every well (0: shut or no row).
type historyPlan struct {
	bounds []float64
	groups [][2]int
	rates  [][]float64 // per group, per well
}

// planHistory groups the periods of the history of m (HistoryTolerance).
func planHistory(m *reservoir.Model) *historyPlan {
	h := m.History
	bounds := append([]float64{0}, historyTimes(m)...)
	bounds = slices.Compact(bounds)
	nk, nw := len(bounds)-1, len(m.Wells)
	q := make([][]float64, nw) // reservoir rate per well per interval
	for i := range q {
		q[i] = make([]float64, max(nk, 0))
	}
	bo, bw := m.Fluids.Bo(), m.Fluids.Bw()
	for _, r := range h.Rows {
		i := m.WellIndex(r.Well)
		if i < 0 || r.End <= r.Start {
			continue
		}
		vol := nz(r.Oil)*bo + nz(r.Water)*bw
		if typeAt(m, i, r.Start) == reservoir.Injector {
			vol = nz(r.Injected) * bw
		}
		rate := vol / (r.End - r.Start)
		a, _ := slices.BinarySearch(bounds, r.Start)
		b, _ := slices.BinarySearch(bounds, r.End)
		for k := a; k < b && k < nk; k++ {
			q[i][k] = rate
		}
	}
	p := &historyPlan{bounds: bounds}
	sum := make([]float64, nw)
	lo, hi := make([]float64, nw), make([]float64, nw)
	for a := 0; a < nk; {
		for i := range sum {
			sum[i], lo[i], hi[i] = 0, math.Inf(1), math.Inf(-1)
		}
		b := a
		for b < nk {
			ok := true
			span := bounds[b+1] - bounds[a]
			for i := range nw {
				s := sum[i] + q[i][b]*(bounds[b+1]-bounds[b])
				l, u := math.Min(lo[i], q[i][b]), math.Max(hi[i], q[i][b])
				mean := s / span
				if u == 0 {
					continue
				}
				if l <= 0 || u > mean*(1+HistoryTolerance) || l < mean*(1-HistoryTolerance) {
					ok = false
					break
				}
			}
			if !ok && b > a {
				break
			}
			for i := range nw {
				sum[i] += q[i][b] * (bounds[b+1] - bounds[b])
				lo[i], hi[i] = math.Min(lo[i], q[i][b]), math.Max(hi[i], q[i][b])
			}
			b++
		}
		rates := make([]float64, nw)
		for i := range nw {
			rates[i] = sum[i] / (bounds[b] - bounds[a])
		}
		p.groups = append(p.groups, [2]int{a, b})
		p.rates = append(p.rates, rates)
		a = b
	}
	return p
}

// limitOf returns the BHP limit a well keeps when a history drives it:
// a producer its case bhp (when BHP-controlled) or min_bhp, an injector
// its case bhp or max_bhp.
func limitOf(w reservoir.Well) float64 {
	if w.Control == reservoir.BHPControl {
		return w.BHP
	}
	if w.Type == reservoir.Injector {
		return w.MaxBHP
	}
	return w.MinBHP
}

// historyModel returns m with its history turned into schedule events
// when the history drives the wells (drive: rates): over the history
// window each well gets, at the start of each group of periods
// (planHistory), its observed rate as a rate control with its BHP limit
// (limitOf), or is shut for a period with no volume; the case's own
// events there keep only their conversions. At the end of the history
// every well returns to the controls the case gives it then, and the
// case's schedule after it runs as written: the forecast. Otherwise m is
// returned itself.
//
// The model is incompressible: the rates of wells that are all
// rate-controlled must balance. In a group whose observed injection
// differs from the observed production (reservoir volumes), the
// injectors' rates are scaled to the production (the production is the
// better measured), and a warning gives the range of the factors;
// match.csv shows the injected water of the model beside the observed.
//
// A group in which the wells produce but none injects (or the reverse)
// cannot be balanced: it is refused (*reservoir.InputError naming the
// history file and the period).
func historyModel(m *reservoir.Model) (*reservoir.Model, []string, error) {
	h := m.History
	if h == nil || h.Drive == reservoir.DriveControls || len(h.Rows) == 0 {
		return m, nil, nil
	}
	hend := h.End()
	orig, err := newWellSchedule(m)
	if err != nil {
		return m, nil, nil // refused later, by the run's own schedule check
	}
	var warns []string
	var evs []reservoir.Event
	for _, e := range m.Schedule {
		if e.Time < hend {
			if e.Convert != "" {
				evs = append(evs, reservoir.Event{Time: e.Time, Well: e.Well, Convert: e.Convert, Rate: math.NaN(), BHP: math.NaN(), Line: e.Line})
			}
		}
	}
	p := planHistory(m)
	lo, hi, scaled := math.Inf(1), math.Inf(-1), 0
	for g, ab := range p.groups {
		ta := p.bounds[ab[0]]
		prod, inj := 0.0, 0.0
		for i := range m.Wells {
			if typeAt(m, i, ta) == reservoir.Injector {
				inj += p.rates[g][i]
			} else {
				prod += p.rates[g][i]
			}
		}
		if (prod > 0) != (inj > 0) {
			tb := p.bounds[ab[1]]
			what := "the producers produce but no injector injects"
			if inj > 0 {
				what = "the injectors inject but no producer produces"
			}
			when := fmt.Sprintf("from day %g to day %g", ta, tb)
			if d := m.Date(ta); d != "" {
				when += fmt.Sprintf(" (%s to %s)", d, m.PeriodEndDate(tb))
			}
			return nil, nil, &reservoir.InputError{Path: h.File, Msg: fmt.Sprintf("history: %s %s: the model is incompressible, so production must be balanced by injection in every period (primary production or a period of injection alone cannot be driven by rates; use history.drive: controls)", when, what)}
		}
		if prod > 0 && inj > 0 && math.Abs(inj-prod) > 1e-9*prod {
			f := prod / inj
			lo, hi = math.Min(lo, f), math.Max(hi, f)
			scaled++
			for i := range m.Wells {
				if typeAt(m, i, ta) == reservoir.Injector {
					p.rates[g][i] *= f
				}
			}
		}
	}
	if scaled > 0 {
		by := fmt.Sprintf("%.4g to %.4g", lo, hi)
		if by == fmt.Sprintf("%.4g to %.4g", lo, lo) {
			by = fmt.Sprintf("%.4g", lo)
		}
		warns = append(warns, fmt.Sprintf("history: in %d of %d groups of periods the observed injection does not balance the observed production (reservoir volumes); the injectors' rates were scaled by %s to balance it (the model is incompressible)",
			scaled, len(p.groups), by))
	}
	last := make([]float64, len(m.Wells))
	for i := range last {
		last[i] = -1
	}
	for g, ab := range p.groups {
		ta := p.bounds[ab[0]]
		for i, w := range m.Wells {
			rate := p.rates[g][i]
			if rate == last[i] {
				continue
			}
			last[i] = rate
			if rate > 0 {
				lim := limitOf(w)
				if typeAt(m, i, ta) != w.Type {
					lim = 0
				}
				evs = append(evs, reservoir.Event{Time: ta, Well: w.Name, Rate: rate, BHP: math.NaN(), Reopen: true, SetLimit: true, Limit: lim})
			} else if ta >= w.Open {
				evs = append(evs, reservoir.Event{Time: ta, Well: w.Name, Rate: math.NaN(), BHP: math.NaN(), Shut: true})
			}
		}
	}
	if hend < m.Run.End {
		st := orig.At(hend)
		for i, w := range st {
			e := reservoir.Event{Time: hend, Well: w.Name, Rate: math.NaN(), BHP: math.NaN(), SetLimit: true}
			if w.Type == reservoir.Injector {
				e.Limit = w.MaxBHP
			} else {
				e.Limit = w.MinBHP
			}
			if w.Control == reservoir.RateControl {
				e.Rate = w.Rate
			} else {
				e.BHP = w.BHP
			}
			switch {
			case !w.Shut:
				e.Reopen = true
			case !(m.Wells[i].Open > hend):
				e.Shut = true
			}
			evs = append(evs, e)
		}
	}
	for _, e := range m.Schedule {
		if e.Time >= hend {
			evs = append(evs, e)
		}
	}
	reservoir.SortEvents(evs)
	mm := *m
	mm.Schedule = evs
	return &mm, warns, nil
}

// wellSpan is a well's state from one pressure solve to the next.
type wellSpan struct {
	t0, t1    float64
	rate, bhp float64
	limit     bool
	relative  bool
}

// wellSpans returns the well log of each well as spans of time.
func wellSpans(r *Result) map[string][]wellSpan {
	out := map[string][]wellSpan{}
	end := r.Model.Run.End
	for _, x := range r.WellLog {
		s := out[x.Well]
		if n := len(s); n > 0 {
			s[n-1].t1 = x.Time
		}
		out[x.Well] = append(s, wellSpan{t0: x.Time, t1: end, rate: x.Rate, bhp: x.BHP, limit: x.Limit, relative: x.Relative})
	}
	return out
}

// integrate returns the volume of spans over [a, b), the time-weighted
// BHP of the spans that flow there with absolute pressures (NaN when
// none: a relative BHP is not compared with an observed one) and whether
// a span there held the well at its limit.
func integrate(spans []wellSpan, a, b float64) (vol, bhp float64, limit bool) {
	k := sort.Search(len(spans), func(i int) bool { return spans[i].t1 > a })
	wt, pb := 0.0, 0.0
	for ; k < len(spans) && spans[k].t0 < b; k++ {
		s := spans[k]
		d := math.Min(b, s.t1) - math.Max(a, s.t0)
		if d <= 0 {
			continue
		}
		vol += s.rate * d
		limit = limit || s.limit && s.rate > 0
		if s.rate > 0 && !s.relative {
			wt += d
			pb += s.bhp * d
		}
	}
	bhp = math.NaN()
	if wt > 0 {
		bhp = pb / wt
	}
	return vol, bhp, limit
}

// historyResult compares the run with its history (nil without one).
func (b *book) historyResult() *HistoryResult {
	m, r := b.m, b.r
	h := m.History
	if h == nil {
		return nil
	}
	bo, bw := m.Fluids.Bo(), m.Fluids.Bw()
	hr := &HistoryResult{End: h.End(), Drive: h.Drive, Rows: len(h.Rows), Periods: len(historyTimes(m))}
	if h.Drive != reservoir.DriveControls {
		hr.Groups = len(planHistory(m).groups)
	}
	seenSolve := map[float64]bool{}
	for _, x := range r.WellLog {
		if x.Time < hr.End {
			seenSolve[x.Time] = true
		}
	}
	hr.Solves = len(seenSolve)
	spans := wellSpans(r)
	cumAt := func(p int, t float64) (w, l float64) {
		if t <= 0 {
			return 0, 0
		}
		k, found := slices.BinarySearch(b.histT, t)
		if !found {
			return math.NaN(), math.NaN()
		}
		return b.histW[p][k], b.histL[p][k]
	}
	type acc struct {
		wcSq, bhpSq  float64
		nwc, nbhp    int
		obsBT, modBT float64
		obsOil, obsW float64
		modOil, modW float64
		limits       [][2]float64 // spans of consecutive periods at the limit
		limitRows    int          // periods at the limit
		rows         int
		injector     bool
	}
	per := make([]acc, len(m.Wells))
	for i := range per {
		per[i].obsBT, per[i].modBT = math.NaN(), math.NaN()
	}
	for _, row := range h.Rows {
		i := m.WellIndex(row.Well)
		a := &per[i]
		a.rows++
		span := row.End - row.Start
		mr := MatchRow{Well: row.Well, Start: row.Start, End: row.End, ObsBHP: row.BHP}
		vol, bhp, lim := integrate(spans[row.Well], row.Start, row.End)
		mr.ModBHP = bhp
		if lim {
			a.limitRows++
			if n := len(a.limits); n > 0 && a.limits[n-1][1] == row.Start {
				a.limits[n-1][1] = row.End // consecutive periods make one span
			} else {
				a.limits = append(a.limits, [2]float64{row.Start, row.End})
			}
		}
		inj := typeAt(m, i, row.Start) == reservoir.Injector
		p := b.prodOf[i]
		if inj || p < 0 {
			a.injector = true
			mr.Injector = true
			nan := math.NaN()
			mr.ObsWaterCut, mr.ModWaterCut, mr.ObsOilRate, mr.ModOilRate, mr.ObsCumOil, mr.ModCumOil = nan, nan, nan, nan, nan, nan
			a.obsW += nz(row.Injected)
			a.modW += vol / bw
			mr.ObsWaterRate, mr.ModWaterRate = row.Injected/span, vol/bw/span
			mr.ObsCumWater, mr.ModCumWater = a.obsW, a.modW
		} else {
			w0, l0 := cumAt(p, row.Start)
			w1, l1 := cumAt(p, row.End)
			mw, mo := (w1-w0)/bw, ((l1-w1)-(l0-w0))/bo
			a.obsOil += nz(row.Oil)
			a.obsW += nz(row.Water)
			a.modOil, a.modW = (l1-w1)/bo, w1/bw
			mr.ObsOilRate, mr.ObsWaterRate = row.Oil/span, row.Water/span
			mr.ModOilRate, mr.ModWaterRate = mo/span, mw/span
			mr.ObsCumOil, mr.ObsCumWater = a.obsOil, a.obsW
			mr.ModCumOil, mr.ModCumWater = a.modOil, a.modW
			mr.ObsWaterCut, mr.ModWaterCut = math.NaN(), math.NaN()
			if s := row.Oil + row.Water; s > 0 {
				mr.ObsWaterCut = row.Water / s
			}
			if s := mo + mw; s > 0 {
				mr.ModWaterCut = mw / s
			}
			if math.IsNaN(a.obsBT) && mr.ObsWaterCut > HistoryBreakthrough {
				a.obsBT = row.End
			}
			if math.IsNaN(a.modBT) && mr.ModWaterCut > HistoryBreakthrough {
				a.modBT = row.End
			}
			if !math.IsNaN(mr.ObsWaterCut) && !math.IsNaN(mr.ModWaterCut) {
				d := mr.ObsWaterCut - mr.ModWaterCut
				a.wcSq += d * d
				a.nwc++
			}
		}
		if !math.IsNaN(mr.ObsBHP) && !math.IsNaN(mr.ModBHP) {
			d := mr.ObsBHP - mr.ModBHP
			a.bhpSq += d * d
			a.nbhp++
		}
		hr.Match = append(hr.Match, mr)
	}
	rms := func(sq float64, n int) float64 {
		if n == 0 {
			return math.NaN()
		}
		return math.Sqrt(sq / float64(n))
	}
	frac := func(model, obs float64) float64 {
		if !(obs > 0) {
			return math.NaN()
		}
		return (model - obs) / obs
	}
	var f acc
	f.obsBT, f.modBT = math.NaN(), math.NaN()
	for i, a := range per {
		if a.rows == 0 {
			continue
		}
		w := m.Wells[i]
		hw := HistoryWell{Name: w.Name, Type: w.Type, WaterCutRMS: rms(a.wcSq, a.nwc), BHPRMS: rms(a.bhpSq, a.nbhp),
			ObservedBreakthrough: a.obsBT, ModelBreakthrough: a.modBT, BreakthroughError: a.modBT - a.obsBT,
			CumWaterError: frac(a.modW, a.obsW), CumOilError: math.NaN(), LimitPeriods: a.limits}
		if a.injector {
			hw.Type = reservoir.Injector
		}
		if !a.injector {
			hw.CumOilError = frac(a.modOil, a.obsOil)
			f.wcSq += a.wcSq
			f.nwc += a.nwc
			f.obsOil += a.obsOil
			f.modOil += a.modOil
			f.obsW += a.obsW
			f.modW += a.modW
			f.obsBT = nanMin(f.obsBT, a.obsBT)
			f.modBT = nanMin(f.modBT, a.modBT)
		}
		f.bhpSq += a.bhpSq
		f.nbhp += a.nbhp
		if len(a.limits) > 0 && h.Drive != reservoir.DriveControls {
			var ps []string
			for k, l := range a.limits {
				if k == 5 {
					ps = append(ps, fmt.Sprintf("and %d more", len(a.limits)-5))
					break
				}
				ps = append(ps, fmt.Sprintf("day %g to %g", l[0], l[1]))
			}
			if datumOf(m) > 0 {
				b.warn(fmt.Sprintf("history: well %s was at or past its BHP limit in %d history period(s) (%s), the pressure level set by history.pressure_datum or the limit holding it: the model cannot give it the observed rate within its limit there",
					w.Name, a.limitRows, strings.Join(ps, ", ")))
			} else {
				b.warn(fmt.Sprintf("history: well %s was held at its BHP limit in %d history period(s) (%s): the model could not give it the observed rate there",
					w.Name, a.limitRows, strings.Join(ps, ", ")))
			}
		}
		hr.Wells = append(hr.Wells, hw)
	}
	hr.Field = HistoryWell{Name: "field", WaterCutRMS: rms(f.wcSq, f.nwc), BHPRMS: rms(f.bhpSq, f.nbhp),
		ObservedBreakthrough: f.obsBT, ModelBreakthrough: f.modBT, BreakthroughError: f.modBT - f.obsBT,
		CumOilError: frac(f.modOil, f.obsOil), CumWaterError: frac(f.modW, f.obsW)}
	return hr
}

// nanMin returns the smaller of a and b, ignoring NaN.
func nanMin(a, b float64) float64 {
	switch {
	case math.IsNaN(a):
		return b
	case math.IsNaN(b):
		return a
	}
	return math.Min(a, b)
}

// historySummary returns the history object of summary.json (nil without
// a history).
func (r *Result) historySummary() *runfolder.History {
	h := r.History
	if h == nil {
		return nil
	}
	m := r.Model
	conv := func(w HistoryWell) runfolder.HistoryWell {
		o := runfolder.HistoryWell{Name: w.Name, Type: string(w.Type), WaterCutRMS: runfolder.Opt(w.WaterCutRMS),
			ObservedBreakthroughDays: runfolder.Opt(w.ObservedBreakthrough), ObservedBreakthroughDate: m.PeriodEndDate(w.ObservedBreakthrough),
			ModelBreakthroughDays: runfolder.Opt(w.ModelBreakthrough), ModelBreakthroughDate: m.PeriodEndDate(w.ModelBreakthrough),
			BreakthroughErrorDays: runfolder.Opt(w.BreakthroughError), CumOilError: runfolder.Opt(w.CumOilError),
			CumWaterError: runfolder.Opt(w.CumWaterError), BHPRMS: runfolder.Opt(w.BHPRMS)}
		for _, p := range w.LimitPeriods {
			o.LimitPeriods = append(o.LimitPeriods, [2]runfolder.Float{runfolder.Float(p[0]), runfolder.Float(p[1])})
		}
		return o
	}
	s := &runfolder.History{EndDays: runfolder.Float(h.End), EndDate: m.PeriodEndDate(h.End), Drive: string(h.Drive), Rows: h.Rows,
		Periods: h.Periods, GroupingTolerance: HistoryTolerance, RateGroups: h.Groups, PressureSolves: h.Solves,
		BreakthroughThreshold: HistoryBreakthrough, Wells: []runfolder.HistoryWell{}, Field: conv(h.Field)}
	for _, w := range h.Wells {
		s.Wells = append(s.Wells, conv(w))
	}
	return s
}

package balance

import (
	"cmp"
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"

	"floodtrace/flood"
	"floodtrace/internal/parallel"
	"floodtrace/reservoir"
)

// Objective is what balance increases.
type Objective string

// The objectives, both counted from the start of the forecast (day 0, or
// the end of the case's history) to the horizon: the field's oil
// recovered, or the discounted value of the case's value block (oil
// price, produced-water and injection costs, discount rate), see
// ForecastValue.
const (
	Oil   Objective = "oil"
	Value Objective = "value"
)

// Settings controls Balance. The zero value balances the case's own run
// (horizon run.end) for oil at the same total injection with the default
// exponent, step and iteration limits.
type Settings struct {
	// Horizon is the forecast length in days; 0 = the case's run.end.
	Horizon float64
	// Objective is Oil (the zero value means Oil) or Value.
	Objective Objective
	// FreeTotal lets the total injection change within the injectors'
	// limits; by default it stays what it is now.
	FreeTotal bool
	// Exponent is n of the reallocation q' = q (e/ē)^n; 0 = DefaultExponent.
	Exponent float64
	// MaxStep is the largest change of an injector's rate in one step, as
	// a fraction of its rate; 0 = DefaultMaxStep. Each failed step halves
	// it, down to MinStep.
	MaxStep float64
	// MaxIterations bounds the accepted steps; 0 = DefaultIterations.
	MaxIterations int
	// Workers is the number of forecasts run at once (0 = all cores).
	// Results do not depend on it.
	Workers int
	// Flood holds the engine settings of every forecast (Frames is set
	// to none).
	Flood flood.Settings
	// Log, when set, receives one line per forecast round.
	Log func(format string, args ...any)
}

// Defaults of Settings (common practice for a first pass of rate
// balancing: moves of at most half an injector's rate at a time, a linear
// response to efficiency, a handful of accepted steps).
const (
	DefaultExponent   = 1.0
	DefaultMaxStep    = 0.5
	MinStep           = 0.02
	DefaultIterations = 6
	// DefaultLowFactor and DefaultHighFactor bound an injector without
	// min_rate or max_rate: from a tenth of its current rate to three
	// times it.
	DefaultLowFactor  = 0.1
	DefaultHighFactor = 3.0
	// FlagEfficiency is the producer efficiency (its oil over the
	// injected water reaching it, over the last report interval before
	// the horizon of the forecast at the current rates) below which a producer is
	// flagged as mostly cycling water.
	FlagEfficiency = 0.05
	// gradientStep is the relative rate change of the finite differences.
	gradientStep = 0.05
)

// Forecast is one run of the case to the horizon with given injector
// rates.
type Forecast struct {
	// Rates are the rates set, one per adjustable injector (Result.Injectors order).
	Rates []float64
	// Achieved are the injectors' rates at the first pressure solve (below
	// Rates where an injector is held at its max_bhp).
	Achieved []float64
	// AtMaxBHP says which injectors ran at their max_bhp in some solve.
	AtMaxBHP []bool
	// MaxBHP is the highest bottom-hole pressure of each injector over
	// the forecast's solves.
	MaxBHP    []float64
	Objective float64
	Run       *flood.Result
	// Eff is the pair and injector efficiency over the horizon.
	Eff *flood.Efficiencies
	// AtMaxRate names the producers held at their max_rate (liquid
	// limit) in some solve of the forecast (after the end of the history),
	// in the order of the case.
	AtMaxRate []string
	// names are the adjustable injectors, in the order of Rates.
	names []string
}

// Injector is one injector's line of balance.csv.
type Injector struct {
	Name string
	Well int
	// Adjustable is false for an injector balance does not set (BHP
	// control, shut in); its rate is the forecast's.
	Adjustable                           bool
	Low, High                            float64
	RateNow                              float64
	RateRecommended                      float64
	EfficiencyNow, EfficiencyRecommended float64
	// Limit names the bound the recommended rate sits at: "min_rate",
	// "max_rate", "max_bhp", "bhp control", "shut", or "" for none.
	Limit string
}

// Iteration is one round of the search.
type Iteration struct {
	N int
	// Method is the proposal that won the round ("reallocation" or
	// "gradient"), or "" when neither beat the best rates.
	Method    string
	Step      float64
	Objective float64 // of the winning proposal (or the best of the two)
	Accepted  bool
	Forecasts int
}

// FlaggedProducer is a producer that mostly cycles water by the horizon
// at the current rates (over the last report interval of their forecast): a candidate for a rate cut, a shut-in or a conformance job (a
// flag for the engineer; balance changes no producer).
type FlaggedProducer struct {
	Name       string
	Efficiency float64 // oil over the water reaching it
	Injectors  []string
}

// Result is a finished balance.
type Result struct {
	Model     *reservoir.Model
	Objective Objective
	Horizon   float64
	// HistoryEnd is the end of the case's history (days), where the
	// forecasts' rates start; 0 without a history.
	HistoryEnd float64
	FreeTotal  bool
	Now        *Forecast
	// Recommended is the best forecast found; it is Now when nothing beat
	// the current rates (Improved false).
	Recommended                *Forecast
	Improved                   bool
	Injectors                  []Injector
	Iterations                 []Iteration
	Forecasts                  int
	TotalNow, TotalRecommended float64
	Flagged                    []FlaggedProducer
	Exponent, MaxStep          float64
}

// Balance searches for injector rates that increase the objective over the
// horizon. Rate-controlled, open injectors are adjusted within
// [min_rate, max_rate] (DefaultLowFactor and DefaultHighFactor of the
// current rate where not given); the total stays the same unless
// FreeTotal. Each proposal is forecast; see the package comment.
func Balance(m *reservoir.Model, s Settings) (*Result, error) {
	if s.Objective == "" {
		s.Objective = Oil
	}
	switch s.Objective {
	case Oil:
	case Value:
		if m.Value == nil {
			return nil, &reservoir.InputError{Path: m.Path, Msg: "objective value needs a value block in the case (value: {oil_price, water_cost, injection_cost, discount_rate}); add one or balance for oil (--objective oil)"}
		}
	default:
		return nil, fmt.Errorf("objective %q must be oil or value", s.Objective)
	}
	if s.Horizon == 0 {
		s.Horizon = m.Run.End
	}
	if !(s.Horizon > 0) || s.Horizon > 1e5 {
		return nil, &reservoir.InputError{Path: m.Path, Msg: fmt.Sprintf("horizon %g days must be positive and at most 100000", s.Horizon)}
	}
	hend := m.History.End()
	if hend > 0 && s.Horizon <= hend {
		when := ""
		if d := m.PeriodEndDate(hend); d != "" {
			when = " (" + d + ")"
		}
		return nil, &reservoir.InputError{Path: m.Path, Line: m.History.Line, Msg: fmt.Sprintf("horizon %g days is not after the end of the history, day %g%s: balance sets the rates from the end of the history on; give a later --horizon (or a later run.end)", s.Horizon, hend, when)}
	}
	if s.Exponent == 0 {
		s.Exponent = DefaultExponent
	}
	if s.MaxStep == 0 {
		s.MaxStep = DefaultMaxStep
	}
	if s.MaxIterations == 0 {
		s.MaxIterations = DefaultIterations
	}
	logf := s.Log
	if logf == nil {
		logf = func(string, ...any) {}
	}
	res := &Result{Model: m, Objective: s.Objective, Horizon: s.Horizon, HistoryEnd: hend, FreeTotal: s.FreeTotal, Exponent: s.Exponent, MaxStep: s.MaxStep}
	var adj []int // indices into res.Injectors
	allRateProducers := true
	for wi, w := range m.Wells {
		if w.Type == reservoir.Producer {
			if w.Control != reservoir.RateControl {
				allRateProducers = false
			}
			continue
		}
		in := Injector{Name: w.Name, Well: wi, RateNow: w.Rate}
		switch {
		case w.Shut:
			in.Limit = "shut"
		case w.Control != reservoir.RateControl:
			in.Limit = "bhp control"
		default:
			in.Adjustable = true
			in.Low, in.High = DefaultLowFactor*w.Rate, DefaultHighFactor*w.Rate
			if w.MinRate > 0 {
				in.Low = w.MinRate
			}
			if w.MaxRate > 0 {
				in.High = w.MaxRate
			}
			adj = append(adj, len(res.Injectors))
		}
		res.Injectors = append(res.Injectors, in)
	}
	if len(adj) == 0 {
		return nil, &reservoir.InputError{Path: m.Path, Msg: "no injector on rate control: balance sets injector rates (a BHP-controlled or shut injector keeps its control)"}
	}
	for _, e := range m.Schedule {
		for _, k := range adj {
			if e.Well == m.Wells[res.Injectors[k].Well].Name && e.Time < s.Horizon && e.Time >= hend {
				msg := "has a schedule event before the horizon; balance sets one constant rate per injector: remove the event or balance up to it (--horizon)"
				if hend > 0 {
					msg = fmt.Sprintf("has a schedule event between the end of the history (day %g) and the horizon; balance sets one constant rate per injector from the end of the history: remove the event or balance up to it (--horizon)", hend)
				}
				return nil, &reservoir.WellError{Path: m.Path, Line: e.Line, Well: e.Well, Msg: msg}
			}
		}
	}
	if s.FreeTotal && allRateProducers {
		return nil, &reservoir.InputError{Path: m.Path, Msg: "--total free needs a producer on BHP control: with every well on rate control the injection must equal the production"}
	}
	now := make([]float64, len(adj))
	lo := make([]float64, len(adj))
	hi := make([]float64, len(adj))
	for j, k := range adj {
		now[j], lo[j], hi[j] = res.Injectors[k].RateNow, res.Injectors[k].Low, res.Injectors[k].High
	}
	total := sum(now)
	fc := &forecaster{m: m, s: s, adj: adj, inj: res.Injectors, hend: hend}
	cur, err := fc.run(now)
	if err != nil {
		return nil, fmt.Errorf("forecast at the current rates: %w", err)
	}
	res.Now, res.Forecasts = cur, 1
	logf("current rates: objective %.6g", cur.Objective)
	best := cur
	step := s.MaxStep
	var grad []float64
	var gradAt *Forecast
	for it := 1; it <= s.MaxIterations && step >= MinStep; it++ {
		// Upper bounds the forecast showed: an injector held at max_bhp
		// cannot take more than it achieved.
		bhi := append([]float64(nil), hi...)
		for j := range adj {
			if best.AtMaxBHP[j] {
				bhi[j] = math.Max(lo[j], math.Min(hi[j], best.Achieved[j]))
			}
		}
		projB := func(y []float64) []float64 {
			if s.FreeTotal {
				return clip(y, lo, bhi)
			}
			return project(y, lo, bhi, total)
		}
		props := [][]float64{projB(reallocate(best, s.Exponent, step))}
		// The gradient is that of the best rates: computed again only
		// when a round moved them.
		nfd := 0
		if gradAt != best {
			g, n, err := fc.gradient(best, lo, bhi, s.Workers)
			if err != nil {
				return nil, err
			}
			grad, gradAt, nfd = g, best, n
			res.Forecasts += nfd
		}
		if g := gradientStepRates(best.Rates, grad, step, !s.FreeTotal); g != nil {
			props = append(props, projB(g))
		}
		names := []string{"reallocation", "gradient"}
		outs := make([]*Forecast, len(props))
		errs := make([]error, len(props))
		parallel.Each(len(props), s.Workers, 1, func(_, i int) {
			outs[i], errs[i] = fc.run(props[i])
		})
		if err := errors.Join(errs...); err != nil {
			return nil, err
		}
		res.Forecasts += len(props)
		win := 0
		for i := range outs {
			if outs[i].Objective > outs[win].Objective {
				win = i
			}
		}
		itr := Iteration{N: it, Step: step, Objective: outs[win].Objective, Forecasts: nfd + len(props)}
		if outs[win].Objective > best.Objective*(1+1e-9) {
			best = outs[win]
			itr.Method, itr.Accepted = names[win], true
			logf("round %d: %s, objective %.6g (step %.3g)", it, names[win], best.Objective, step)
		} else {
			step /= 2
			logf("round %d: no improvement (best proposal %.6g), step halved to %.3g", it, outs[win].Objective, step)
		}
		res.Iterations = append(res.Iterations, itr)
	}
	res.Recommended, res.Improved = best, best != cur
	res.TotalNow = total
	for j, k := range adj {
		in := &res.Injectors[k]
		in.RateRecommended = best.Rates[j]
		if best.AtMaxBHP[j] && best.Achieved[j] < in.RateRecommended {
			// Held at max_bhp: recommend what the well takes there.
			in.RateRecommended = best.Achieved[j]
		}
		switch {
		case best.AtMaxBHP[j]:
			in.Limit = "max_bhp"
		case best.Rates[j] <= lo[j]*(1+1e-9):
			in.Limit = "min_rate"
		case best.Rates[j] >= hi[j]*(1-1e-9):
			in.Limit = "max_rate"
		}
	}
	for k := range res.Injectors {
		in := &res.Injectors[k]
		if !in.Adjustable {
			in.RateNow = rateFrom(cur.Run, in.Name, hend)
			in.RateRecommended = rateFrom(best.Run, in.Name, hend)
		}
		in.EfficiencyNow = injectorEfficiency(cur.Eff, in.Name)
		in.EfficiencyRecommended = injectorEfficiency(best.Eff, in.Name)
	}
	for _, k := range adj {
		res.TotalRecommended += res.Injectors[k].RateRecommended
	}
	res.Flagged = flagProducers(cur.Run.Efficiencies(cur.Run.RunWindow()), cur.Run)
	return res, nil
}

// forecaster runs the case to the horizon with given rates.
type forecaster struct {
	m   *reservoir.Model
	s   Settings
	adj []int
	inj []Injector
	// hend is the end of the case's history (0 for none): the rates are
	// set from there on.
	hend float64
}

// run forecasts rates (one per adjustable injector).
func (f *forecaster) run(rates []float64) (*Forecast, error) {
	mm := *f.m
	if f.hend > 0 {
		// The history drives the wells up to its end (as a run does); the
		// rates apply from there on, as schedule events at its end listed
		// after the case's own.
		mm.Schedule = append([]reservoir.Event(nil), f.m.Schedule...)
		for j, k := range f.adj {
			mm.Schedule = append(mm.Schedule, reservoir.Event{Time: f.hend, Well: f.inj[k].Name, Rate: rates[j], BHP: math.NaN(), Line: f.m.History.Line})
		}
		slices.SortStableFunc(mm.Schedule, func(a, b reservoir.Event) int { return cmp.Compare(a.Time, b.Time) })
	} else {
		mm.Wells = append([]reservoir.Well(nil), f.m.Wells...)
		for j, k := range f.adj {
			mm.Wells[f.inj[k].Well].Rate = rates[j]
		}
	}
	mm.Run.End = f.s.Horizon
	if mm.Run.ReportEvery > mm.Run.End {
		mm.Run.ReportEvery = 0
	}
	mm.Run.Snapshots = nil
	var times []float64
	for _, t := range f.m.Run.UpdateTimes {
		if t < f.s.Horizon {
			times = append(times, t)
		}
	}
	if f.m.Run.UpdateTimes != nil {
		mm.Run.UpdateTimes = times
	}
	fs := f.s.Flood
	fs.Frames, fs.Log = -1, nil
	r, err := flood.Run(&mm, fs)
	if err != nil {
		return nil, err
	}
	n := len(r.Times)
	if n == 0 {
		return nil, fmt.Errorf("forecast has no report time")
	}
	obj := r.FieldCumOil[n-1] - at(r.Times, r.FieldCumOil, f.hend)
	if f.s.Objective == Value {
		if obj, err = ForecastValue(r, *f.m.Value, f.hend); err != nil {
			return nil, err
		}
	}
	out := &Forecast{Rates: append([]float64(nil), rates...), Run: r, Objective: obj, Eff: r.Efficiencies(f.hend, f.s.Horizon),
		Achieved: make([]float64, len(rates)), AtMaxBHP: make([]bool, len(rates)), MaxBHP: make([]float64, len(rates))}
	held := map[string]bool{}
	for _, w := range r.WellLog {
		if w.Type == reservoir.Producer && w.Control == reservoir.RateControl && w.Time >= f.hend {
			held[w.Well] = true
		}
	}
	for _, w := range f.m.Wells {
		if w.Type == reservoir.Producer && w.MaxRate > 0 && w.Control == reservoir.BHPControl && held[w.Name] {
			out.AtMaxRate = append(out.AtMaxRate, w.Name)
		}
	}
	for j, k := range f.adj {
		name := f.inj[k].Name
		out.names = append(out.names, name)
		first := true
		for _, w := range r.WellLog {
			if w.Well != name || w.Time < f.hend {
				continue
			}
			if first {
				out.Achieved[j], first = w.Rate, false
			}
			out.MaxBHP[j] = math.Max(out.MaxBHP[j], w.BHP)
			if w.Control == reservoir.BHPControl {
				out.AtMaxBHP[j] = true
			}
		}
		for _, in := range r.Injectors {
			if in.Name == name && in.MaxBHPReached && f.hend == 0 {
				out.AtMaxBHP[j] = true
			}
		}
	}
	return out, nil
}

// gradient returns the finite-difference derivative of the objective with
// respect to each adjustable rate at base: a forward difference of
// gradientStep times the rate (backward at the upper bound), one forecast
// per injector, run in parallel (internal/parallel), each forecast on
// one tracing worker.
func (f *forecaster) gradient(base *Forecast, lo, hi []float64, workers int) ([]float64, int, error) {
	n := len(base.Rates)
	g := make([]float64, n)
	errs := make([]error, n)
	one := *f
	one.s.Flood.Workers = 1
	parallel.Each(n, workers, 1, func(_, j int) {
		h := gradientStep * base.Rates[j]
		if base.Rates[j]+h > hi[j] {
			h = -h
		}
		if base.Rates[j]+h < lo[j] || h == 0 {
			return
		}
		x := append([]float64(nil), base.Rates...)
		x[j] += h
		fc, err := one.run(x)
		if err != nil {
			errs[j] = err
			return
		}
		g[j] = (fc.Objective - base.Objective) / h
	})
	return g, n, errors.Join(errs...)
}

// reallocate is the efficiency-weighted reallocation of Thiele and
// Batycky (2006, from memory): each injector's rate is scaled by its
// efficiency over the field's rate-weighted mean efficiency, raised to
// the exponent n, q' = q (e/ē)^n, and each change is limited to step
// times the current rate; injectors below the mean lose water, those
// above gain it. The caller projects the result onto the limits and the
// total.
func reallocate(f *Forecast, n, step float64) []float64 {
	var oil, water float64
	for _, in := range f.Eff.Injectors {
		oil += in.AttributedOil
		water += in.Rate
	}
	mean := ratio(oil, water)
	eff := f.adjustableEff()
	y := make([]float64, len(f.Rates))
	for j, q := range f.Rates {
		fac := 1.0
		if mean > 0 && !math.IsNaN(eff[j]) {
			fac = math.Pow(math.Max(eff[j], 0)/mean, n)
		}
		fac = math.Max(1-step, math.Min(1+step, fac))
		y[j] = q * fac
	}
	return y
}

// gradientStepRates moves rates along the gradient g (with its mean
// removed when the total is held), scaled so that the largest relative
// change is step; nil when the gradient is zero.
func gradientStepRates(x, g []float64, step float64, sameTotal bool) []float64 {
	d := append([]float64(nil), g...)
	if sameTotal {
		m := sum(d) / float64(len(d))
		for j := range d {
			d[j] -= m
		}
	}
	scale := 0.0
	for j := range d {
		if x[j] > 0 {
			scale = math.Max(scale, math.Abs(d[j])/x[j])
		}
	}
	if scale == 0 {
		return nil
	}
	y := make([]float64, len(x))
	for j := range x {
		y[j] = x[j] + step*d[j]/scale
	}
	return y
}

// clip bounds each y to [lo, hi].
func clip(y, lo, hi []float64) []float64 {
	out := make([]float64, len(y))
	for j := range y {
		out[j] = math.Max(lo[j], math.Min(hi[j], y[j]))
	}
	return out
}

// project returns the point clip(y + lambda, lo, hi) whose sum is total
// (the Euclidean projection onto the box cut by the plane of equal total),
// found by bisection on lambda; when the box cannot hold the total, the
// nearest corner.
func project(y, lo, hi []float64, total float64) []float64 {
	at := func(l float64) []float64 {
		x := make([]float64, len(y))
		for j := range y {
			x[j] = y[j] + l
		}
		return clip(x, lo, hi)
	}
	a, b := -total-1, total+1
	for j := range y {
		a = math.Min(a, lo[j]-y[j])
		b = math.Max(b, hi[j]-y[j])
	}
	for range 200 {
		mid := 0.5 * (a + b)
		if sum(at(mid)) < total {
			a = mid
		} else {
			b = mid
		}
	}
	return at(0.5 * (a + b))
}

// adjustableEff returns the injection efficiency of each adjustable
// injector of f, in the order of f.Rates.
func (f *Forecast) adjustableEff() []float64 {
	out := make([]float64, len(f.Rates))
	for j := range out {
		out[j] = math.NaN()
		if j < len(f.names) {
			out[j] = injectorEfficiency(f.Eff, f.names[j])
		}
	}
	return out
}

func injectorEfficiency(e *flood.Efficiencies, name string) float64 {
	if e == nil {
		return math.NaN()
	}
	for _, in := range e.Injectors {
		if in.Name == name {
			return in.Efficiency
		}
	}
	return math.NaN()
}

// flagProducers returns the producers whose oil over the water reaching
// them over e's window is below FlagEfficiency, with the injectors that
// feed them (largest water rate first).
func flagProducers(e *flood.Efficiencies, r *flood.Result) []FlaggedProducer {
	var out []FlaggedProducer
	for k, p := range r.Producers {
		eff := ratio(e.ProducerOil[k], e.ProducerInflow[k])
		if math.IsNaN(eff) || eff >= FlagEfficiency {
			continue
		}
		type feed struct {
			name string
			q    float64
		}
		var fs []feed
		for _, pe := range e.Pairs {
			if pe.Producer == p.Name && pe.WaterRate > 0 {
				fs = append(fs, feed{pe.Injector, pe.WaterRate})
			}
		}
		sort.SliceStable(fs, func(a, b int) bool { return fs[a].q > fs[b].q })
		fp := FlaggedProducer{Name: p.Name, Efficiency: eff, Injectors: []string{}}
		for _, x := range fs {
			fp.Injectors = append(fp.Injectors, x.name)
		}
		out = append(out, fp)
	}
	return out
}

func sum(x []float64) float64 {
	s := 0.0
	for _, v := range x {
		s += v
	}
	return s
}

func ratio(a, b float64) float64 {
	if b <= 0 {
		return math.NaN()
	}
	return a / b
}

// ForecastValue is the discounted value of run r from day from (the end
// of a history, or 0) to its end: the case's economics e priced on the
// oil, produced water and injected water of each report interval after
// from (reservoir.Economics.CashFlow, reservoir volumes), discounted to
// day from. The cumulative volumes at from are interpolated linearly
// between the report times around it.
func ForecastValue(r *flood.Result, e reservoir.Economics, from float64) (float64, error) {
	inj := make([]float64, len(r.PVI))
	for k := range inj {
		inj[k] = r.PVI[k] * r.PoreVolume
	}
	o0, w0, i0 := at(r.Times, r.FieldCumOil, from), at(r.Times, r.FieldCumWater, from), at(r.Times, inj, from)
	var t, o, w, q []float64
	for k, tk := range r.Times {
		if tk > from {
			t = append(t, tk-from)
			o = append(o, r.FieldCumOil[k]-o0)
			w = append(w, r.FieldCumWater[k]-w0)
			q = append(q, inj[k]-i0)
		}
	}
	return e.CashFlow(t, o, w, q, 0)
}

// at interpolates the cumulative curve y at the report times t linearly
// at time x (0 before the first report, which starts from 0 at day 0; the
// last value after the last).
func at(t, y []float64, x float64) float64 {
	if x <= 0 || len(t) == 0 {
		return 0
	}
	t0, y0 := 0.0, 0.0
	for k := range t {
		if t[k] >= x {
			if t[k] == t0 {
				return y[k]
			}
			return y0 + (y[k]-y0)*(x-t0)/(t[k]-t0)
		}
		t0, y0 = t[k], y[k]
	}
	return y0
}

// rateFrom is the rate of well name at the start of the forecast: at day
// 0 (flood.Result.InjectorRate) or, after a history, at its end (the last
// well-log record at or before it).
func rateFrom(r *flood.Result, name string, from float64) float64 {
	if from == 0 {
		return r.InjectorRate(name)
	}
	q := r.InjectorRate(name)
	for _, w := range r.WellLog {
		if w.Well == name && w.Time <= from {
			q = w.Rate
		}
	}
	return q
}

package flood

import (
	"math"
)

// PairEfficiency is one injector-producer pair over a window: the water
// the injector sends to the producer (the flux of the streamlines joining
// them), the producer's oil rate attributed to the injector (the
// producer's oil rate over the window shared among its injectors by their
// streamline fluxes into it) and their ratio, oil per unit of injected
// water (Thiele and Batycky 2006, well-pair injection efficiency).
// Volumes are reservoir volumes per day.
type PairEfficiency struct {
	Injector, Producer string
	// InjectorWell and ProducerWell are indices in Model.Wells.
	InjectorWell, ProducerWell int
	WaterRate, AttributedOil   float64
	// Efficiency is AttributedOil / WaterRate (NaN when WaterRate is 0).
	Efficiency float64
}

// InjectorEfficiency is one injector over a window: its rate at the
// solve whose streamlines give the pairs, the oil attributed to it over
// all its pairs, and the injection efficiency, attributed oil over
// injection (Thiele and Batycky 2006).
type InjectorEfficiency struct {
	Name          string
	Well          int
	Rate          float64
	AttributedOil float64
	// Efficiency is AttributedOil / Rate (NaN when Rate is 0).
	Efficiency float64
}

// Efficiencies is the pair and injector efficiency of a run over the
// window [From, To] days.
type Efficiencies struct {
	From, To  float64
	Pairs     []PairEfficiency
	Injectors []InjectorEfficiency
	// ProducerOil and ProducerInflow are each producer's average oil rate
	// over the window and the injected flux the streamlines bring it, in
	// the order of Result.Producers.
	ProducerOil, ProducerInflow []float64
}

// RunWindow returns the window pairs.csv and injectors.csv describe: the
// run's last report interval (from the report time before the end, or day
// 0, to the end of the run).
func (r *Result) RunWindow() (from, to float64) {
	n := len(r.Times)
	if n == 0 {
		return 0, 0
	}
	if n >= 2 {
		from = r.Times[n-2]
	}
	return from, r.Times[n-1]
}

// Efficiencies returns the pair and injector efficiencies over the window
// [from, to] days. The pair water rates are those of the allocation in
// force at the start of the window (the last traced solve at or before
// from); each producer's oil rate is its average over the window, from
// its cumulative oil interpolated linearly between report times, and is
// shared among the pairs that end at it in proportion to their water
// rates, so that the attributed oil of a producer's pairs adds up to its
// oil rate (when every streamline into it starts at an injector). An
// empty result when the run traced no streamlines.
func (r *Result) Efficiencies(from, to float64) *Efficiencies {
	e := &Efficiencies{From: from, To: to}
	if len(r.Allocation) == 0 || r.Model == nil {
		return e
	}
	b := r.Allocation[0]
	for _, a := range r.Allocation {
		if a.Time <= from {
			b = a
		}
	}
	wells := r.Model.Wells
	times := append([]float64{0}, r.Times...)
	prodIdx := map[int]int{}
	e.ProducerOil = make([]float64, len(r.Producers))
	e.ProducerInflow = make([]float64, len(r.Producers))
	for k, p := range r.Producers {
		prodIdx[p.Well] = k
		cum := append([]float64{0}, p.CumOil...)
		if to > from {
			e.ProducerOil[k] = (Interpolate(times, cum, to) - Interpolate(times, cum, from)) / (to - from)
		} else if len(p.OilRate) > 0 {
			e.ProducerOil[k] = p.OilRate[len(p.OilRate)-1]
		}
	}
	for _, p := range b.Pairs {
		if k, ok := prodIdx[p.Producer]; ok && p.Injector >= 0 {
			e.ProducerInflow[k] += p.Rate
		}
	}
	injIdx := map[int]int{}
	for _, in := range r.Injectors {
		injIdx[in.Well] = len(e.Injectors)
		e.Injectors = append(e.Injectors, InjectorEfficiency{Name: in.Name, Well: in.Well, Rate: r.rateAt(in.Name, b.Time)})
	}
	for _, p := range b.Pairs {
		if p.Injector < 0 || p.Producer < 0 || p.Injector >= len(wells) || p.Producer >= len(wells) {
			continue
		}
		k, ok := prodIdx[p.Producer]
		if !ok {
			continue
		}
		pe := PairEfficiency{Injector: wells[p.Injector].Name, Producer: wells[p.Producer].Name,
			InjectorWell: p.Injector, ProducerWell: p.Producer, WaterRate: p.Rate}
		if e.ProducerInflow[k] > 0 {
			pe.AttributedOil = e.ProducerOil[k] * p.Rate / e.ProducerInflow[k]
		}
		pe.Efficiency = ratio(pe.AttributedOil, pe.WaterRate)
		e.Pairs = append(e.Pairs, pe)
		if i, ok := injIdx[p.Injector]; ok {
			e.Injectors[i].AttributedOil += pe.AttributedOil
		}
	}
	for i := range e.Injectors {
		e.Injectors[i].Efficiency = ratio(e.Injectors[i].AttributedOil, e.Injectors[i].Rate)
	}
	return e
}

// rateAt returns a well's rate at the last well-log record at or before
// day t (the first record when none is).
func (r *Result) rateAt(name string, t float64) float64 {
	rate, found := 0.0, false
	for _, w := range r.WellLog {
		if w.Well != name {
			continue
		}
		if !found || w.Time <= t {
			rate, found = w.Rate, true
		}
	}
	return rate
}

// ratio is a/b, NaN when b is not positive.
func ratio(a, b float64) float64 {
	if b <= 0 {
		return math.NaN()
	}
	return a / b
}

// InjectorRate returns the rate of the named well at the run's first
// pressure solve, from the well log (0 when there is no such well).
func (r *Result) InjectorRate(name string) float64 { return r.rateAt(name, 0) }

package flood

import (
	"fmt"
	"math"
	"regexp"
	"slices"

	"floodtrace/pressure"
	"floodtrace/reservoir"
)

// book is the bookkeeping the pressure-update and grid engines share: the
// cell saturations, the producer and injector lists, per-period and
// cumulative volumes, warnings, and what is recorded at report, snapshot
// and frame times. Both engines embed it.
type book struct {
	m     *reservoir.Model
	r     *Result
	sched *WellSchedule
	seen  map[string]bool // warnings already given
	rep   map[string]*repeatedWarning

	pv, sw    []float64
	swi       float64
	partition []int // producer partition of the current trace

	prodOf, injOf []int     // model well -> producer / injector index, -1
	perW, perL    []float64 // per producer: water and liquid of the current report period
	cumW, cumL    []float64 // per producer: cumulative water and liquid
	rate          []float64 // per producer: rate of the solve in force
	cumInj        float64   // cumulative injected water
	otherProduced float64   // water leaving through wells that are not producers
	periodStart   float64
	nextReport    int
	limits        bool // the case has economic limits
	limitShut     bool // a producer was shut at its limit at the last stop
	ended         bool // the field limit ended the run at the last stop
	// The cumulative water and liquid of each producer at the period ends
	// of the history (histT), for match.csv.
	histT        []float64
	histW, histL [][]float64
	nextHist     int
	// An engine that maps its saturations to the cells only when they
	// are read (pressure updates) sets cells, which brings sw up to date,
	// and avgSw, which returns the saturation of a producer's partition
	// (the well's index) without the cells; nil for the grid engine.
	cells func()
	avgSw func(well int) float64
}

func newBook(m *reservoir.Model, sched *WellSchedule, engine Engine) book {
	return book{m: m, sched: sched, seen: map[string]bool{}, rep: map[string]*repeatedWarning{}, swi: m.Fluids.InitialSw,
		limits: m.HasProducerLimits() || m.Run.FieldMaxWaterCut > 0,
		r: &Result{Model: m, Engine: engine, PoreVolume: m.TotalPoreVolume(), OOIP: m.OOIP(),
			Warnings: append([]string(nil), m.Warnings...)}}
}

// warn adds a warning once.
func (b *book) warn(msg string) {
	if !b.seen[msg] {
		b.seen[msg] = true
		b.r.Warnings = append(b.r.Warnings, msg)
	}
}

// repeatedWarning counts a warning raised at several pressure solves.
type repeatedWarning struct {
	idx         int // in Result.Warnings
	n           int
	first, last float64
}

// numberRE matches the numbers of a message that stand alone (after a
// space, '(', '=', ',' or ':'; not the digits of a well name such as
// PRD-1), so that messages that differ only in them (a rate, a pressure,
// a day) count as one warning.
var numberRE = regexp.MustCompile(`(^|[\s(=,:])-?[0-9][0-9.]*(e[-+]?[0-9]+)?`)

// warnAt adds a warning raised by the pressure solve or the trace at day
// t. One raised again at later solves (the same words, perhaps other
// numbers) is given once, the first time's text, and finish adds how many
// solves raised it and the first and last day.
func (b *book) warnAt(t float64, msg string) {
	key := numberRE.ReplaceAllString(msg, "${1}#")
	if w, ok := b.rep[key]; ok {
		w.n++
		w.last = t
		return
	}
	b.rep[key] = &repeatedWarning{idx: len(b.r.Warnings), n: 1, first: t, last: t}
	b.r.Warnings = append(b.r.Warnings, msg)
}

// limitFlag marks the injector of model well wi as having reached its
// max_bhp when the solve held it at the limit, flowing or shut for
// backflow (the limit below the pressure it must overcome).
func (b *book) limitFlag(wi int, w pressure.WellResult) {
	if k := b.injOf[wi]; k >= 0 && w.Type == reservoir.Injector && !w.Shut &&
		w.LimitReached && w.Control == reservoir.BHPControl && (w.Q > 0 || w.Backflow) {
		b.r.Injectors[k].MaxBHPReached = true
	}
}

// setupWells builds the producer and injector lists: every well that is a
// producer (injector) at some time of the run, with nt report times.
func (b *book) setupWells(nt int) {
	m, r := b.m, b.r
	nw := len(m.Wells)
	b.prodOf, b.injOf = make([]int, nw), make([]int, nw)
	for i, w := range m.Wells {
		b.prodOf[i], b.injOf[i] = -1, -1
		if b.sched.EverType(i, reservoir.Producer, m.Run.End) {
			b.prodOf[i] = len(r.Producers)
			r.Producers = append(r.Producers, Producer{Name: w.Name, Well: i,
				WaterCut: make([]float64, nt), OilRate: make([]float64, nt), WaterRate: make([]float64, nt),
				CumOil: make([]float64, nt), CumWater: make([]float64, nt), AvgSw: make([]float64, nt),
				TracerBreakthrough: math.NaN(), Breakthrough: math.NaN()})
		}
		if b.sched.EverType(i, reservoir.Injector, m.Run.End) {
			b.injOf[i] = len(r.Injectors)
			r.Injectors = append(r.Injectors, Injector{Name: w.Name, Well: i})
		}
	}
	np := len(r.Producers)
	b.perW, b.perL = make([]float64, np), make([]float64, np)
	b.cumW, b.cumL = make([]float64, np), make([]float64, np)
	b.rate = make([]float64, np)
	b.histT = historyTimes(m)
	b.histW, b.histL = make([][]float64, np), make([][]float64, np)
	for p := range np {
		b.histW[p], b.histL[p] = make([]float64, len(b.histT)), make([]float64, len(b.histT))
	}
}

// atStop records what is due at time t: the report values (volumes of the
// period since the last report), snapshots and frames.
func (b *book) atStop(t float64, reports, snaps, frames []float64) {
	r := b.r
	if k := b.nextReport; k < len(reports) && t >= reports[k]*(1-1e-12) {
		b.nextReport++
		r.PVI[k] = b.cumInj / r.PoreVolume
		span := t - b.periodStart
		b.periodStart = t
		fieldW, fieldL := 0.0, 0.0
		for p := range r.Producers {
			fieldW += b.perW[p]
			fieldL += b.perL[p]
		}
		for p := range r.Producers {
			P := &r.Producers[p]
			b.cumW[p] += b.perW[p]
			b.cumL[p] += b.perL[p]
			if b.perL[p] > 0 && span > 0 {
				P.WaterCut[k] = b.perW[p] / b.perL[p]
				P.WaterRate[k] = b.perW[p] / span
				P.OilRate[k] = (b.perL[p] - b.perW[p]) / span
			}
			P.CumWater[k] = b.cumW[p]
			P.CumOil[k] = b.cumL[p] - b.cumW[p]
			b.perW[p], b.perL[p] = 0, 0
			if b.avgSw != nil {
				P.AvgSw[k] = b.avgSw(P.Well)
			} else {
				P.AvgSw[k] = partitionSw(b.partition, b.pv, b.sw, P.Well)
			}
		}
		if b.limits {
			fieldWC := 0.0
			if fieldL > 0 {
				fieldWC = fieldW / fieldL
			}
			b.limitShut = b.checkLimits(t, fieldWC, fieldL > 0)
			if b.ended {
				b.syncCells() // endEarly keeps the map of t
			}
		}
	}
	for ; b.nextHist < len(b.histT) && b.histT[b.nextHist] <= t*(1+1e-12); b.nextHist++ {
		for p := range r.Producers {
			b.histW[p][b.nextHist] = b.cumW[p] + b.perW[p]
			b.histL[p][b.nextHist] = b.cumL[p] + b.perL[p]
		}
	}
	if slices.Contains(snaps, t) || slices.Contains(frames, t) {
		b.syncCells()
	}
	if slices.Contains(snaps, t) {
		r.Snapshots = append(r.Snapshots, Snapshot{Time: t, PVI: b.cumInj / r.PoreVolume, Sw: cellMap(b.m.Active, b.sw)})
	}
	if slices.Contains(frames, t) {
		r.Frames = append(r.Frames, Snapshot{Time: t, PVI: b.cumInj / r.PoreVolume, Sw: cellMap(b.m.Active, b.sw)})
	}
}

// syncCells brings the cell saturations up to date (book.cells).
func (b *book) syncCells() {
	if b.cells != nil {
		b.cells()
	}
}

// finish fills the field series and the mass balance.
func (b *book) finish() {
	b.syncCells()
	for _, w := range b.rep {
		if w.n > 1 {
			b.r.Warnings[w.idx] += fmt.Sprintf(" (at %d pressure solves, from day %g to day %g; the first is shown)", w.n, w.first, w.last)
		}
	}
	r := b.r
	fillField(r)
	r.History = b.historyResult()
	produced := b.otherProduced
	for p := range r.Producers {
		produced += b.cumW[p]
	}
	r.MassBalanceError = massBalance(b.m.Active, b.pv, b.sw, b.swi, b.cumInj, produced)
}

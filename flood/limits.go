package flood

import (
	"fmt"
	"slices"

	"floodtrace/reservoir"
)

// The economic limits a producer can reach (Producer.Limit), named by
// their case-file keys.
const (
	LimitWaterCut = "max_water_cut"
	LimitOilRate  = "min_oil_rate"
)

// ShutLimit is the control wells.csv gives a producer shut in at its
// economic limit.
const ShutLimit reservoir.Control = "shut_limit"

// limitCrossed returns which economic limit (LimitWaterCut, LimitOilRate
// or "") a producer flowing at water cut wc and oil rate oil has reached,
// with maxWC and minOil its limits (0 = none). A water cut at the limit
// has reached it; an oil rate at the limit has not fallen below it.
func limitCrossed(wc, oil, maxWC, minOil float64) string {
	switch {
	case maxWC > 0 && wc >= maxWC:
		return LimitWaterCut
	case minOil > 0 && oil < minOil:
		return LimitOilRate
	}
	return ""
}

// limitMessage is the warning of a producer shut in at its economic limit.
func limitMessage(name, limit string, day, value, maxWC, minOil float64) string {
	if limit == LimitWaterCut {
		return fmt.Sprintf("producer %s reaches its water-cut limit on day %g (water cut %.4g >= max_water_cut %g): shut in from that day", name, day, value, maxWC)
	}
	return fmt.Sprintf("producer %s reaches its oil-rate limit on day %g (oil rate %.4g < min_oil_rate %g): shut in from that day", name, day, value, minOil)
}

// checkLimits applies the economic limits at report k, day t, in a
// stepping engine: wc and oil are each producer's water cut and oil rate
// of the report period just ended, fieldWC the field's. A producer flowing
// at the end of the period that has reached a limit is shut in from t (a
// dynamic schedule event; the caller re-solves); it returns whether one
// was. A field water cut at run.field_max_water_cut sets b.ended.
func (b *book) checkLimits(t float64, fieldWC float64, flowingField bool) (shut bool) {
	m, r := b.m, b.r
	k := b.nextReport - 1
	for p := range r.Producers {
		P := &r.Producers[p]
		if P.Limit != "" || b.rate[p] <= 0 {
			continue
		}
		maxWC, minOil := m.ProducerLimits(P.Well)
		lim := limitCrossed(P.WaterCut[k], P.OilRate[k], maxWC, minOil)
		if lim == "" {
			continue
		}
		P.Limit, P.LimitDay = lim, t
		v := P.WaterCut[k]
		if lim == LimitOilRate {
			v = P.OilRate[k]
		}
		b.warn(limitMessage(P.Name, lim, t, v, maxWC, minOil))
		if t < b.m.Run.End {
			b.sched.shutAt(P.Name, t)
			shut = true
		}
	}
	if shut && !b.producing(t) {
		// Nothing would flow out: the run ends (a rate injector with no
		// outlet has no incompressible solution).
		r.FieldLimitDay = t
		b.ended = true
		b.warn(fmt.Sprintf("every producer is shut in at its economic limit by day %g: the run ends on that day", t))
		return false
	}
	if f := m.Run.FieldMaxWaterCut; f > 0 && flowingField && fieldWC >= f {
		r.FieldLimitDay = t
		b.ended = true
		if t < m.Run.End {
			b.warn(fmt.Sprintf("the field reaches its water-cut limit on day %g (water cut %.4g >= field_max_water_cut %g): the run ends on that day", t, fieldWC, f))
		}
	}
	return shut
}

// producing reports whether some producer is open at day t or the
// schedule changes a well after t (a producer may open or reopen).
func (b *book) producing(t float64) bool {
	for _, c := range b.sched.changes {
		if c > t {
			return true
		}
	}
	for _, w := range b.sched.At(t) {
		if w.Type == reservoir.Producer && !w.Shut {
			return true
		}
	}
	return false
}

// endEarly cuts the result of a stepping engine at its last report, day t,
// when the field limit ended the run there: the report series stop at t
// and the saturation map at t is the last snapshot.
func (b *book) endEarly(t float64) {
	r := b.r
	r.truncate(b.nextReport)
	if !slices.ContainsFunc(r.Snapshots, func(s Snapshot) bool { return s.Time == t }) {
		r.Snapshots = append(r.Snapshots, Snapshot{Time: t, PVI: b.cumInj / r.PoreVolume, Sw: cellMap(b.m.Active, b.sw)})
	}
}

// truncate keeps the first n report times of the result's series.
func (r *Result) truncate(n int) {
	r.Times, r.PVI = r.Times[:n], r.PVI[:n]
	for p := range r.Producers {
		P := &r.Producers[p]
		P.WaterCut, P.OilRate, P.WaterRate = P.WaterCut[:n], P.OilRate[:n], P.WaterRate[:n]
		P.CumOil, P.CumWater, P.AvgSw = P.CumOil[:n], P.CumWater[:n], P.AvgSw[:n]
	}
	cut := func(v []float64) []float64 {
		if len(v) > n {
			return v[:n]
		}
		return v
	}
	r.FieldWaterCut, r.FieldOilRate, r.FieldWaterRate = cut(r.FieldWaterCut), cut(r.FieldOilRate), cut(r.FieldWaterRate)
	r.FieldCumOil, r.FieldCumWater, r.RecoveryFactor = cut(r.FieldCumOil), cut(r.FieldCumWater), cut(r.RecoveryFactor)
}

// fixedLimits applies the economic limits to a finished fixed-streamline
// result, whose rates are those at the report times. It returns the first
// report time before the end at which a producer reaches a limit (the run
// must then be made with pressure updates, which re-solve at the shut-in,
// as for a scheduled one) and the producer, or -1. A limit reached at the
// last report is recorded on r.
func (r *Result) fixedLimits() (day float64, well string) {
	m := r.Model
	nt := len(r.Times)
	first, who := -1.0, ""
	for p := range r.Producers {
		P := &r.Producers[p]
		if P.Rate <= 0 {
			continue
		}
		maxWC, minOil := m.ProducerLimits(P.Well)
		for k := range nt {
			lim := limitCrossed(P.WaterCut[k], P.OilRate[k], maxWC, minOil)
			if lim == "" {
				continue
			}
			if k < nt-1 {
				if first < 0 || r.Times[k] < first {
					first, who = r.Times[k], P.Name
				}
			} else {
				v := P.WaterCut[k]
				if lim == LimitOilRate {
					v = P.OilRate[k]
				}
				P.Limit, P.LimitDay = lim, r.Times[k]
				r.Warnings = append(r.Warnings, limitMessage(P.Name, lim, r.Times[k], v, maxWC, minOil))
			}
			break
		}
	}
	if first >= 0 {
		for p := range r.Producers {
			r.Producers[p].Limit, r.Producers[p].LimitDay = "", 0
		}
	}
	return first, who
}

// fieldLimitIndex returns the first report at which the field water cut
// reaches run.field_max_water_cut, or -1.
func fieldLimitIndex(m *reservoir.Model, r *Result) int {
	f := m.Run.FieldMaxWaterCut
	if !(f > 0) {
		return -1
	}
	for k, wc := range r.FieldWaterCut {
		if wc >= f && r.FieldOilRate[k]+r.FieldWaterRate[k] > 0 {
			return k
		}
	}
	return -1
}

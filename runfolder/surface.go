package runfolder

// Surface volumes (docs/OUTPUTS.md): when the case gives a formation
// volume factor (fluids.oil_fvf or fluids.water_fvf), wells.csv,
// producers.csv, field.csv, pairs.csv and injectors.csv gain, after their reservoir columns, the
// surface form of every oil, water and liquid volume and rate, the unit
// in the column name (SurfaceColumn), and summary.json the surface
// cumulative volumes and oil in place. A case without either factor
// writes the files as before.

// The surface units of the column names: stock-tank barrels in field
// units, standard cubic metres in metric units.
const (
	SurfaceFieldUnit  = "stb"
	SurfaceMetricUnit = "sm3"
)

// SurfaceUnit returns the surface-volume unit of the column names for a
// case's units ("field" or "metric").
func SurfaceUnit(units string) string {
	if units == "metric" {
		return SurfaceMetricUnit
	}
	return SurfaceFieldUnit
}

// surfaceVolumeCols are the volume columns with a surface form; the rate
// columns are the others with a surface form.
var surfaceVolumeCols = map[string]bool{ColCumOil: true, ColCumWater: true}

// HasSurface reports whether a column has a surface form (rate is an
// injector's water rate in injectors.csv).
func HasSurface(col string) bool {
	switch col {
	case ColLiquidRate, ColOilRate, ColWaterRate, ColCumOil, ColCumWater, ColRate, ColAttributedOilRate:
		return true
	}
	return false
}

// SurfaceColumn returns the name of the surface form of the reservoir
// column col for a case's units: oil_rate -> oil_rate_stb_day, cum_oil ->
// cum_oil_stb in field units (oil_rate_sm3_day, cum_oil_sm3 in metric).
func SurfaceColumn(col, units string) string {
	u := SurfaceUnit(units)
	if surfaceVolumeCols[col] {
		return col + "_" + u
	}
	return col + "_" + u + "_day"
}

// WithSurface returns cols (a copy) followed by the surface form of each
// of them that has one, in the same order.
func WithSurface(cols []string, units string) []string {
	out := append([]string(nil), cols...)
	for _, c := range cols {
		if HasSurface(c) {
			out = append(out, SurfaceColumn(c, units))
		}
	}
	return out
}

package reservoir

import (
	"math"
	"time"
)

// UnitSystem names the units of a case. Field units are ft, md, cp,
// bbl/day, psi and days; metric units are m, mD, cP, m3/day, bar and days.
type UnitSystem string

// The two supported unit systems.
const (
	Field  UnitSystem = "field"
	Metric UnitSystem = "metric"
)

// Darcy returns the transmissibility conversion factor of the unit system:
// 0.001127 in field units (bbl/day from md*ft*psi/(cp*ft)) and 0.008527 in
// metric units (m3/day from mD*m*bar/(cP*m)). Values from memory, common
// practice.
func (u UnitSystem) Darcy() float64 {
	if u == Metric {
		return 0.008527
	}
	return 0.001127
}

// VolumeFactor converts a pore volume in length^3 to the unit of reservoir
// volume used for rates: 1/5.614583 bbl per ft3 in field units, 1 in metric.
func (u UnitSystem) VolumeFactor() float64 {
	if u == Metric {
		return 1
	}
	return 1 / 5.614583333333333
}

// Labels returns short unit labels: length, permeability, viscosity, rate,
// pressure and volume.
func (u UnitSystem) Labels() (length, perm, visc, rate, pres, vol string) {
	if u == Metric {
		return "m", "mD", "cP", "m3/day", "bar", "m3"
	}
	return "ft", "md", "cp", "bbl/day", "psi", "bbl"
}

// DefaultWellRadius is the wellbore radius used when a well gives none:
// 0.3 ft or 0.1 m.
func (u UnitSystem) DefaultWellRadius() float64 {
	if u == Metric {
		return 0.1
	}
	return 0.3
}

// Atmospheric is atmospheric pressure in the unit system's pressure unit:
// 14.7 psi or 1.01325 bar (common practice). Package pressure uses it as
// the default lower BHP limit of a rate-controlled producer that gives no
// min_bhp.
func (u UnitSystem) Atmospheric() float64 {
	if u == Metric {
		return 1.01325
	}
	return 14.7
}

// Grid is a uniform Cartesian areal grid. Origin is the south-west corner
// in map coordinates.
type Grid struct {
	NX, NY int
	DX, DY float64
	X0, Y0 float64
}

// N returns the number of cells.
func (g Grid) N() int { return g.NX * g.NY }

// Index returns the cell number of column i (east) and row j (north).
func (g Grid) Index(i, j int) int { return j*g.NX + i }

// IJ returns the column and row of cell k.
func (g Grid) IJ(k int) (i, j int) { return k % g.NX, k / g.NX }

// Center returns the map coordinates of the centre of cell k.
func (g Grid) Center(k int) (x, y float64) {
	i, j := g.IJ(k)
	return g.X0 + (float64(i)+0.5)*g.DX, g.Y0 + (float64(j)+0.5)*g.DY
}

// Locate returns the cell holding the map point (x, y):
// i = floor((x-x0)/dx), j = floor((y-y0)/dy), so a point on a face goes to
// the cell east or north of it and a point on the east or north edge of the
// grid to the last cell. ok is false outside the grid.
func (g Grid) Locate(x, y float64) (i, j int, ok bool) {
	fx := (x - g.X0) / g.DX
	fy := (y - g.Y0) / g.DY
	if math.IsNaN(fx) || math.IsNaN(fy) || fx < 0 || fy < 0 || fx > float64(g.NX) || fy > float64(g.NY) {
		return 0, 0, false
	}
	i, j = int(math.Floor(fx)), int(math.Floor(fy))
	if i == g.NX {
		i--
	}
	if j == g.NY {
		j--
	}
	return i, j, true
}

// Width returns the east-west extent of the grid in map units.
func (g Grid) Width() float64 { return float64(g.NX) * g.DX }

// Height returns the north-south extent of the grid in map units.
func (g Grid) Height() float64 { return float64(g.NY) * g.DY }

// XFace returns the index of the x-face west of cell (i, j); x-faces are
// numbered j*(NX+1)+i for i in [0, NX], so the east face of (i, j) is
// XFace(i+1, j).
func (g Grid) XFace(i, j int) int { return j*(g.NX+1) + i }

// YFace returns the index of the y-face south of cell (i, j); y-faces are
// numbered j*NX+i for j in [0, NY], so the north face of (i, j) is
// YFace(i, j+1).
func (g Grid) YFace(i, j int) int { return j*g.NX + i }

// NXFaces returns the number of x-faces, (NX+1)*NY.
func (g Grid) NXFaces() int { return (g.NX + 1) * g.NY }

// NYFaces returns the number of y-faces, NX*(NY+1).
func (g Grid) NYFaces() int { return g.NX * (g.NY + 1) }

// WellType tells injectors from producers.
type WellType string

// Well types.
const (
	Injector WellType = "injector"
	Producer WellType = "producer"
)

// Control is how a well is operated.
type Control string

// Well controls.
const (
	RateControl Control = "rate"
	BHPControl  Control = "bhp"
)

// Well is a vertical well through the full net thickness of its cell.
// Rates are positive reservoir volumes per day for both injectors and
// producers; the type gives the direction.
type Well struct {
	Name    string
	Type    WellType
	X, Y    float64
	I, J    int // cell column and row
	Cell    int // cell number
	Control Control
	Rate    float64 // target rate when Control == RateControl
	BHP     float64 // target bottom-hole pressure when Control == BHPControl
	// MaxBHP is an injector's upper pressure limit (fracture or permit
	// limit) and MinBHP a producer's lower limit; 0 means none given. A
	// rate-controlled well that would cross its limit switches to BHP
	// control at the limit. The model keeps what the case file says: a
	// rate-controlled producer with MinBHP 0 is held at the default floor
	// UnitSystem.Atmospheric by package pressure at solve time, not here.
	MaxBHP float64
	MinBHP float64
	// MinRate and MaxRate bound the rate floodtrace balance may give an
	// injector (0 = no bound given); a run does not use them. A producer
	// on BHP control may give MaxRate, its liquid limit (reservoir volume
	// per day), which every pressure solve honours (pressure.Solve).
	MinRate, MaxRate float64
	Radius           float64
	Skin             float64
	Open             float64 // day the well opens; 0 = from the start
	Shut             bool    // shut in (no flow)
	// MaxWaterCut and MinOilRate are a producer's economic limits (0 =
	// none given; RunSettings gives defaults): the producer is shut in
	// once its water cut reaches MaxWaterCut or its oil rate falls below
	// MinOilRate. Model.ProducerLimits resolves them.
	MaxWaterCut, MinOilRate float64
	Line                    int // line in the case file, for messages
	// Source is the file the well came from when the case's wells key
	// names a well file ("" for the case file); Line is then its line.
	Source string
}

// Fluids holds the fluid properties. The run works in reservoir volumes;
// the formation volume factors (reservoir volume per surface volume,
// fluids.oil_fvf and fluids.water_fvf, 1 when not given) convert the
// surface volumes of a history and report the oil in place at the surface.
type Fluids struct {
	WaterViscosity float64
	OilViscosity   float64
	InitialSw      float64
	OilFVF         float64
	WaterFVF       float64
	// WaterDensity and OilDensity are the densities at reservoir
	// conditions, lb/ft3 in field units and kg/m3 in metric units; 0 when
	// the case gives none. They matter only with Model.Depth.
	WaterDensity, OilDensity float64
	// FVFGiven is true when the case file gives oil_fvf or water_fvf: the
	// outputs then carry surface volumes beside the reservoir ones.
	FVFGiven bool
}

// RelPerm gives water and oil relative permeability against water
// saturation.
type RelPerm interface {
	Krw(sw float64) float64
	Kro(sw float64) float64
	// Endpoints returns the connate water saturation and the residual oil
	// saturation.
	Endpoints() (swc, sor float64)
}

// Fault is a polyline in map coordinates that multiplies the
// transmissibility of every face it crosses.
type Fault struct {
	Name       string
	Trace      [][2]float64
	Multiplier float64
	Line       int
	// Source is the file the fault came from when the case's faults key
	// names a GeoJSON file ("" for the case file).
	Source string
}

// Event is a schedule change to one well at a given time. Unset fields are
// NaN (numbers) or false.
type Event struct {
	Time    float64
	Well    string
	Rate    float64 // NaN if not set
	BHP     float64 // NaN if not set
	Shut    bool
	Reopen  bool
	Convert WellType // "" or the new type of the well
	// SetLimit sets the well's BHP limit to Limit (0: none): MinBHP of a
	// producer, MaxBHP of an injector. Case files do not give it; a run
	// driven by a production history does.
	SetLimit bool
	Limit    float64
	Line     int
}

// RunSettings controls a run.
type RunSettings struct {
	End             float64   // days
	ReportEvery     float64   // days
	Snapshots       []float64 // days
	Streamlines     int
	PressureUpdates int       // number of pressure solves over the run (1 = fixed streamlines)
	UpdateTimes     []float64 // explicit update times, if given
	// MaxWaterCut and MinOilRate are the economic limits of every producer
	// that gives none of its own (0 = none); FieldMaxWaterCut ends the run
	// once the field's water cut reaches it (0 = none).
	MaxWaterCut, MinOilRate, FieldMaxWaterCut float64
}

// ProducerLimits returns the economic limits of well i: its own
// max_water_cut and min_oil_rate, or the run's where it gives none (0 =
// no limit).
func (m *Model) ProducerLimits(i int) (maxWaterCut, minOilRate float64) {
	w := m.Wells[i]
	maxWaterCut, minOilRate = w.MaxWaterCut, w.MinOilRate
	if maxWaterCut == 0 {
		maxWaterCut = m.Run.MaxWaterCut
	}
	if minOilRate == 0 {
		minOilRate = m.Run.MinOilRate
	}
	return maxWaterCut, minOilRate
}

// HasProducerLimits reports whether some well or the run gives an
// economic limit of a producer.
func (m *Model) HasProducerLimits() bool {
	if m.Run.MaxWaterCut > 0 || m.Run.MinOilRate > 0 {
		return true
	}
	for _, w := range m.Wells {
		if w.MaxWaterCut > 0 || w.MinOilRate > 0 {
			return true
		}
	}
	return false
}

// Model is a validated case. Property arrays have one value per cell,
// numbered as described in the package documentation; values of inactive
// cells are zero.
type Model struct {
	Path  string // case file, for messages
	Title string
	Units UnitSystem
	Grid  Grid

	// PermEast and PermNorth are the permeabilities along x (east) and
	// y (north), from rock.perm and rock.perm_y.
	PermEast, PermNorth []float64
	Porosity            []float64
	Thickness           []float64
	Active              []bool
	// Depth is the depth of the layer's mid-surface below the datum,
	// positive down, in length units (rock.depth); nil when the case gives
	// none, and then gravity plays no part (see HasGravity).
	Depth []float64
	// DepthFile is the map file rock.depth names; "" when it gives a
	// number or nothing.
	DepthFile string

	// TransMultX and TransMultY scale the transmissibility of x- and
	// y-faces (faults); see Grid.XFace and Grid.YFace for numbering.
	TransMultX, TransMultY []float64

	Fluids   Fluids
	RelPerm  RelPerm
	Wells    []Well
	Faults   []Fault
	Schedule []Event
	Run      RunSettings
	// CRS is the coordinate system of the map coordinates, when the case
	// gives one (crs key or a .prj beside a raster map).
	CRS CRS

	// StartDate is the calendar date of day 0 (start_date); the zero time
	// when the case gives none.
	StartDate time.Time
	// History is the case's production history (history:), nil when
	// none.
	History *History
	// Calibration holds the settings of floodtrace calibrate
	// (calibration:), nil when the case gives none.
	Calibration *Calibration
	// Value prices the flood for floodtrace balance --objective value
	// (value:), nil when the case gives none.
	Value *Economics

	// Warnings are the problems Load found that do not stop a run (values
	// outside their usual range, cells made inactive by NODATA, ...), each
	// naming the file and the line, or the row and column. check prints
	// them and a run carries them into its own warnings.
	Warnings []string
}

// PoreVolume returns the pore volume of cell k in reservoir volume units
// (bbl in field units, m3 in metric units).
func (m *Model) PoreVolume(k int) float64 {
	if !m.Active[k] {
		return 0
	}
	return m.Grid.DX * m.Grid.DY * m.Thickness[k] * m.Porosity[k] * m.Units.VolumeFactor()
}

// PoreVolumes returns the pore volume of every cell.
func (m *Model) PoreVolumes() []float64 {
	pv := make([]float64, m.Grid.N())
	for k := range pv {
		pv[k] = m.PoreVolume(k)
	}
	return pv
}

// TotalPoreVolume returns the pore volume of the active cells.
func (m *Model) TotalPoreVolume() float64 {
	s := 0.0
	for k := range m.Active {
		s += m.PoreVolume(k)
	}
	return s
}

// OOIP returns the original oil in place in reservoir volumes.
func (m *Model) OOIP() float64 {
	return m.TotalPoreVolume() * (1 - m.Fluids.InitialSw)
}

// WellIndex returns the position of the named well, or -1.
func (m *Model) WellIndex(name string) int {
	for i := range m.Wells {
		if m.Wells[i].Name == name {
			return i
		}
	}
	return -1
}

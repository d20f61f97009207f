package reservoir

import "strconv"

// NewUniform returns a homogeneous, isotropic, fully active model with no
// wells: permeability perm, porosity poro and thickness h everywhere, unit
// transmissibility multipliers, quadratic Corey curves with no residual
// saturations, water and oil viscosity 1 and initial water saturation 0,
// field units, and a run of 1000 days. Tests and examples start from it.
func NewUniform(nx, ny int, dx, dy, perm, poro, h float64) *Model {
	g := Grid{NX: nx, NY: ny, DX: dx, DY: dy}
	n := g.N()
	m := &Model{
		Title:      "uniform",
		Units:      Field,
		Grid:       g,
		PermEast:   fill(n, perm),
		PermNorth:  fill(n, perm),
		Porosity:   fill(n, poro),
		Thickness:  fill(n, h),
		Active:     make([]bool, n),
		TransMultX: fill(g.NXFaces(), 1),
		TransMultY: fill(g.NYFaces(), 1),
		Fluids:     Fluids{WaterViscosity: 1, OilViscosity: 1},
		RelPerm:    Corey{KrwMax: 1, KroMax: 1, Nw: 2, No: 2},
		Run:        RunSettings{End: 1000, ReportEvery: 10, Streamlines: 1000, PressureUpdates: 1},
	}
	for k := range m.Active {
		m.Active[k] = true
	}
	return m
}

// PlaceWell places a well at map point (x, y) with the given control and
// appends it to the model. It returns an error if the point is outside the
// grid. For a rate control, value is the rate; for BHP, the pressure.
func (m *Model) PlaceWell(name string, t WellType, x, y float64, c Control, value float64) error {
	i, j, ok := m.Grid.Locate(x, y)
	if !ok {
		return &WellError{Well: name, Msg: "lies outside the grid"}
	}
	w := Well{Name: name, Type: t, X: x, Y: y, I: i, J: j, Cell: m.Grid.Index(i, j), Control: c,
		Radius: m.Units.DefaultWellRadius()}
	if c == RateControl {
		w.Rate = value
	} else {
		w.BHP = value
	}
	m.Wells = append(m.Wells, w)
	return nil
}

// WellError is a problem with one well.
type WellError struct {
	Path string
	Line int
	Well string
	Msg  string
}

// Error formats the problem as "path:line: well NAME: message".
func (e *WellError) Error() string {
	if e.Path != "" {
		return e.Path + ":" + strconv.Itoa(e.Line) + ": well " + e.Well + ": " + e.Msg
	}
	return "well " + e.Well + ": " + e.Msg
}

func fill(n int, v float64) []float64 {
	s := make([]float64, n)
	for i := range s {
		s[i] = v
	}
	return s
}

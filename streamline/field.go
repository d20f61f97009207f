package streamline

import (
	"fmt"
	"math"

	"floodtrace/reservoir"
)

// Well is a source or sink in one cell of a Field.
type Well struct {
	Name string
	Cell int
	// Q is the rate into the reservoir in reservoir volume per day:
	// positive for injection, negative for production, zero when shut.
	Q float64
}

// Field is the flow field to trace: a grid, the pore volume of every cell
// and the volumetric flux through every face.
type Field struct {
	Grid reservoir.Grid
	// PoreVolume is the pore volume of each cell in reservoir volume units,
	// the same units as flux times days.
	PoreVolume []float64
	// Active marks the cells inside the reservoir; nil means all.
	Active []bool
	// FluxX[Grid.XFace(i,j)] is the flux through the west face of cell
	// (i,j), positive eastward; FluxY[Grid.YFace(i,j)] the flux through the
	// south face, positive northward. Reservoir volume per day.
	FluxX, FluxY []float64
	Wells        []Well
}

// Settings controls Trace. The zero value is a sensible default.
type Settings struct {
	// Count is the number of streamlines launched from the injectors,
	// shared out in proportion to their rates (at least MinPerWell each);
	// 0 means 2000. Cells no launched line crosses get extra lines.
	Count int
	// MaxSteps caps the cells one half of a streamline may cross; 0 means
	// 20*(NX+NY).
	MaxSteps int
	// Workers is the number of goroutines; 0 means GOMAXPROCS. Results do
	// not depend on it.
	Workers int
	// KeepPaths stores the polyline of every streamline in map
	// coordinates, for drawing.
	KeepPaths bool
	// MaxPathPoints thins each kept polyline to at most this many points
	// (evenly chosen, both ends kept); 0 keeps every point. Drawing and
	// GIS export need a few hundred; a million-cell grid would otherwise
	// keep gigabytes of coordinates.
	MaxPathPoints int
	// VolumesOnly leaves out the time-of-flight maps (the Result's TOF,
	// BackTOF and Travel are nil) and the injector partition (nil): the
	// lines, Volume, Stagnant, the producer partition and the pairs are
	// made as always, bit for bit. For an engine that retraces and reads
	// only those (the pressure-update engine after its first trace).
	VolumesOnly bool
}

// MinPerWell is the smallest number of streamlines launched from a well
// that launches any.
const MinPerWell = 8

// EndReason tells why one end of a streamline is where it is.
type EndReason uint8

// The ways a streamline can end.
const (
	// AtWell: the line reached (or started at) a well.
	AtWell EndReason = iota
	// Stagnation: the line approaches a point of zero velocity and would
	// need infinite time to go on.
	Stagnation
	// Boundary: the line would leave through a face of the grid edge or of
	// an inactive cell that carries flux; a sign of an inconsistent field.
	Boundary
	// StepCap: the line crossed Settings.MaxSteps cells without ending.
	StepCap
)

// String names the reason.
func (e EndReason) String() string {
	switch e {
	case AtWell:
		return "well"
	case Stagnation:
		return "stagnation"
	case Boundary:
		return "boundary"
	case StepCap:
		return "step cap"
	}
	return fmt.Sprintf("EndReason(%d)", uint8(e))
}

// FieldError is a defect of the input field.
type FieldError struct {
	What  string // the slice or value at fault
	Index int    // the element at fault, -1 when not an element
	Msg   string
}

// Error describes the defect.
func (e *FieldError) Error() string {
	if e.Index >= 0 {
		return fmt.Sprintf("streamline: %s[%d]: %s", e.What, e.Index, e.Msg)
	}
	return fmt.Sprintf("streamline: %s: %s", e.What, e.Msg)
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// check validates the field.
func (f *Field) check() error {
	g := f.Grid
	if g.NX <= 0 || g.NY <= 0 {
		return &FieldError{"Grid", -1, fmt.Sprintf("size %dx%d is not positive", g.NX, g.NY)}
	}
	if !(g.DX > 0) || !(g.DY > 0) || !finite(g.DX) || !finite(g.DY) {
		return &FieldError{"Grid", -1, fmt.Sprintf("cell size %gx%g is not positive", g.DX, g.DY)}
	}
	n := g.N()
	if len(f.PoreVolume) != n {
		return &FieldError{"PoreVolume", -1, fmt.Sprintf("has %d values for %d cells", len(f.PoreVolume), n)}
	}
	if f.Active != nil && len(f.Active) != n {
		return &FieldError{"Active", -1, fmt.Sprintf("has %d values for %d cells", len(f.Active), n)}
	}
	if len(f.FluxX) != g.NXFaces() {
		return &FieldError{"FluxX", -1, fmt.Sprintf("has %d values for %d x-faces", len(f.FluxX), g.NXFaces())}
	}
	if len(f.FluxY) != g.NYFaces() {
		return &FieldError{"FluxY", -1, fmt.Sprintf("has %d values for %d y-faces", len(f.FluxY), g.NYFaces())}
	}
	for k, v := range f.PoreVolume {
		if f.active(k) && !(v >= 0 && finite(v)) {
			return &FieldError{"PoreVolume", k, fmt.Sprintf("is %g", v)}
		}
	}
	for k, v := range f.FluxX {
		if !finite(v) {
			return &FieldError{"FluxX", k, fmt.Sprintf("is %g", v)}
		}
	}
	for k, v := range f.FluxY {
		if !finite(v) {
			return &FieldError{"FluxY", k, fmt.Sprintf("is %g", v)}
		}
	}
	seen := make(map[int]int, len(f.Wells))
	for w, wl := range f.Wells {
		if wl.Cell < 0 || wl.Cell >= n {
			return &FieldError{"Wells", w, fmt.Sprintf("well %q: cell %d is outside the grid", wl.Name, wl.Cell)}
		}
		if !finite(wl.Q) {
			return &FieldError{"Wells", w, fmt.Sprintf("well %q: rate is %g", wl.Name, wl.Q)}
		}
		if wl.Q != 0 && !f.active(wl.Cell) {
			return &FieldError{"Wells", w, fmt.Sprintf("well %q: cell %d is inactive", wl.Name, wl.Cell)}
		}
		if wl.Q == 0 {
			continue
		}
		if o, ok := seen[wl.Cell]; ok {
			return &FieldError{"Wells", w, fmt.Sprintf("wells %q and %q share cell %d", f.Wells[o].Name, wl.Name, wl.Cell)}
		}
		seen[wl.Cell] = w
	}
	return nil
}

func (f *Field) active(k int) bool { return f.Active == nil || f.Active[k] }

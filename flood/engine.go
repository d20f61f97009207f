package flood

import "fmt"

// Engine selects how a run moves the water.
type Engine int

// The engines. The zero value is EngineStreamline.
const (
	// EngineStreamline runs on streamlines: fixed streamlines (one
	// pressure solve, the exact Buckley-Leverett solution along each) or,
	// when the case asks for pressure updates, has schedule events or
	// opens wells late, streamlines updated in time (RunUpdates).
	EngineStreamline Engine = iota
	// EngineGrid is the cell-based IMPES reference engine (RunGrid).
	EngineGrid
)

// String returns the engine's name as summary.json reports it:
// "streamline" or "grid".
func (e Engine) String() string {
	switch e {
	case EngineStreamline:
		return "streamline"
	case EngineGrid:
		return "grid"
	}
	return fmt.Sprintf("Engine(%d)", int(e))
}

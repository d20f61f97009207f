package synth

import (
	"math"
	"math/rand/v2"
)

// ChannelSettings describes a channelised permeability map: sinuous bands
// of high permeability in a low-permeability background. Zero values of the
// optional fields select the defaults given beside them.
type ChannelSettings struct {
	// NX and NY are the number of cells east and north (both > 0).
	NX, NY int
	// DX and DY are the cell sizes in map units; zero means 1.
	DX, DY float64
	// Count is the number of channels (default 3).
	Count int
	// Width is the channel width measured across the channel, in map units
	// (default 3 cells of the larger size).
	Width float64
	// Amplitude is the sideways swing of the channel axis in map units; zero
	// gives straight channels.
	Amplitude float64
	// Wavelength of the swing along the channel in map units (default half
	// the extent of the map along the channels).
	Wavelength float64
	// Azimuth of the channel direction in degrees clockwise from north:
	// 0 runs the channels north-south, 90 east-west.
	Azimuth float64
	// ChannelPerm and BackgroundPerm are the permeabilities in md
	// (defaults 1000 and 10).
	ChannelPerm, BackgroundPerm float64
	// Seed places the channels: the same seed gives the same map.
	Seed uint64
}

// Channel defaults.
const (
	DefaultChannelCount   = 3
	DefaultChannelPerm    = 1000.0
	DefaultBackgroundPerm = 10.0
)

func (c ChannelSettings) resolved() (ChannelSettings, error) {
	if c.NX <= 0 {
		return c, bad("NX", float64(c.NX), "must be positive")
	}
	if c.NY <= 0 {
		return c, bad("NY", float64(c.NY), "must be positive")
	}
	if c.NX > maxGridCells/c.NY {
		return c, bad("NX*NY", float64(c.NX)*float64(c.NY), "too many cells")
	}
	if err := length("DX", &c.DX, 1, "a cell size (zero means 1)"); err != nil {
		return c, err
	}
	if err := length("DY", &c.DY, 1, "a cell size (zero means 1)"); err != nil {
		return c, err
	}
	switch {
	case c.Count < 0 || c.Count > 1000:
		return c, bad("Count", float64(c.Count), "must lie in [1, 1000] (zero means 3)")
	case c.Count == 0:
		c.Count = DefaultChannelCount
	}
	if err := length("Width", &c.Width, min(3*max(c.DX, c.DY), maxLength), "a channel width (zero means 3 cells)"); err != nil {
		return c, err
	}
	if c.Amplitude != 0 {
		if err := length("Amplitude", &c.Amplitude, 0, "zero or a positive length"); err != nil {
			return c, err
		}
	}
	if !finite(c.Azimuth) {
		return c, bad("Azimuth", c.Azimuth, "must be finite")
	}
	sin, cos := math.Sincos(c.Azimuth * math.Pi / 180)
	ext := math.Abs(float64(c.NX)*c.DX*sin) + math.Abs(float64(c.NY)*c.DY*cos)
	if err := length("Wavelength", &c.Wavelength, ext/2, "a positive length (zero means half the map)"); err != nil {
		return c, err
	}
	for _, f := range []struct {
		name string
		v    *float64
		def  float64
	}{{"ChannelPerm", &c.ChannelPerm, DefaultChannelPerm}, {"BackgroundPerm", &c.BackgroundPerm, DefaultBackgroundPerm}} {
		switch {
		case !finite(*f.v) || *f.v < 0:
			return c, bad(f.name, *f.v, "must be a positive permeability (zero means the default)")
		case *f.v == 0:
			*f.v = f.def
		}
	}
	return c, nil
}

// Channels returns a channelised permeability map in md, cells
// k = j*NX + i with j = 0 the southern row. Channel m runs along the
// azimuth; its axis is t = t_m + A sin(2 pi s/L + phi_m) in coordinates s
// along and t across the channels about the map centre, with t_m drawn in
// the middle half of the m-th of Count equal strips across the map and the
// phase phi_m uniform, both from a PCG generator (math/rand/v2) seeded with
// Seed. A cell centre belongs to the channel when
// |t - axis(s)| <= (W/2) sqrt(1 + axis'(s)^2), a band whose width measured
// across the axis is W to first order and whose area is exactly W times the
// arc length of the axis (common practice for object-style demo maps).
func Channels(s ChannelSettings) ([]float64, error) {
	s, err := s.resolved()
	if err != nil {
		return nil, err
	}
	rng := rand.New(rand.NewPCG(s.Seed, pcgStream+1))
	sin, cos := math.Sincos(s.Azimuth * math.Pi / 180)
	// Along-channel unit vector u = (sin, cos); across v = (cos, -sin).
	lx, ly := float64(s.NX)*s.DX, float64(s.NY)*s.DY
	halfT := 0.5 * (math.Abs(lx*cos) + math.Abs(ly*sin))
	strip := 2 * halfT / float64(s.Count)
	type axis struct{ t, phase float64 }
	axes := make([]axis, s.Count)
	for m := range axes {
		axes[m].t = -halfT + strip*(float64(m)+0.25+0.5*rng.Float64())
		axes[m].phase = 2 * math.Pi * rng.Float64()
	}
	kw := 2 * math.Pi / s.Wavelength
	perm := make([]float64, s.NX*s.NY)
	for j := range s.NY {
		y := (float64(j)+0.5)*s.DY - 0.5*ly
		for i := range s.NX {
			x := (float64(i)+0.5)*s.DX - 0.5*lx
			along := x*sin + y*cos
			across := x*cos - y*sin
			k := j*s.NX + i
			perm[k] = s.BackgroundPerm
			for _, a := range axes {
				ps, pc := math.Sincos(kw*along + a.phase)
				centre := a.t + s.Amplitude*ps
				slope := s.Amplitude * kw * pc
				if math.Abs(across-centre) <= 0.5*s.Width*math.Sqrt(1+slope*slope) {
					perm[k] = s.ChannelPerm
					break
				}
			}
		}
	}
	return perm, nil
}

package synth

import (
	"errors"
	"math"
	"slices"
	"testing"

	"gonum.org/v1/gonum/mathext"
)

// sinusoidArcLength is the length of one wavelength L of the curve
// A sin(2 pi s/L): (2L/pi) sqrt(1+b^2) E(b^2/(1+b^2)) with b = 2 pi A/L and E
// the complete elliptic integral of the second kind (a standard reduction,
// from memory; E from gonum's mathext).
func sinusoidArcLength(a, l float64) float64 {
	b := 2 * math.Pi * a / l
	return 2 * l / math.Pi * math.Sqrt(1+b*b) * mathext.CompleteE(b*b/(1+b*b))
}

// TestChannelArea: a channel of width W is a band whose area is W times
// the arc length of its axis (the area of a tube about a plane curve,
// Steiner's formula, from memory), so the fraction of channel cells
// approaches W * Count * arc length / map area; the cell sampling error is
// at most the perimeter times half a cell over the area.
func TestChannelArea(t *testing.T) {
	cases := []struct {
		name string
		c    ChannelSettings
	}{
		{"straight north-south", ChannelSettings{NX: 400, NY: 300, DX: 2, DY: 2, Count: 2, Width: 30, Wavelength: 200}},
		{"sinuous north-south", ChannelSettings{NX: 400, NY: 400, DX: 2, DY: 2, Count: 2, Width: 30, Amplitude: 40, Wavelength: 200, Seed: 3}},
		{"sinuous east-west", ChannelSettings{NX: 300, NY: 500, DX: 3, DY: 2, Count: 3, Width: 25, Amplitude: 30, Wavelength: 300, Azimuth: 90, Seed: 9}},
		{"strongly sinuous", ChannelSettings{NX: 500, NY: 500, Count: 1, Width: 20, Amplitude: 60, Wavelength: 125, Seed: 5}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			perm, err := Channels(tc.c)
			if err != nil {
				t.Fatal(err)
			}
			c, _ := tc.c.resolved()
			lx, ly := float64(c.NX)*c.DX, float64(c.NY)*c.DY
			along := ly // azimuth 0: channels span the map north-south
			if c.Azimuth == 90 {
				along = lx
			}
			if r := along / c.Wavelength; math.Abs(r-math.Round(r)) > 1e-9 {
				t.Fatalf("test map must hold whole wavelengths, holds %g", r)
			}
			arc := sinusoidArcLength(c.Amplitude, c.Wavelength) * along / c.Wavelength
			want := float64(c.Count) * c.Width * arc / (lx * ly)
			n := 0
			for _, k := range perm {
				switch k {
				case c.ChannelPerm:
					n++
				case c.BackgroundPerm:
				default:
					t.Fatalf("permeability %g is neither channel nor background", k)
				}
			}
			got := float64(n) / float64(len(perm))
			// A fifth of the worst case (every edge cell misjudged by half a cell):
			// edge errors are of both signs and largely cancel.
			tol := 0.2 * float64(c.Count) * 2 * arc * 0.5 * max(c.DX, c.DY) / (lx * ly)
			t.Logf("channel fraction %.4f, W*L/area %.4f (tolerance %.4f)", got, want, tol)
			if math.Abs(got-want) > tol {
				t.Errorf("channel fraction %.4f, want %.4f +- %.4f", got, want, tol)
			}
		})
	}
}

// TestChannelGeometry: straight channels at azimuth 90 run east-west, so
// every row is uniform; at azimuth 0 every column is. Same seed, same map.
func TestChannelGeometry(t *testing.T) {
	for _, az := range []float64{0, 90} {
		c := ChannelSettings{NX: 60, NY: 50, Count: 4, Width: 3, Azimuth: az, Seed: 2}
		perm, err := Channels(c)
		if err != nil {
			t.Fatal(err)
		}
		for j := range c.NY {
			for i := range c.NX {
				ref := perm[i] // row 0
				if az == 90 {
					ref = perm[j*c.NX] // column 0
				}
				if perm[j*c.NX+i] != ref {
					t.Fatalf("azimuth %g: cell (%d,%d) breaks the straight channel pattern", az, i, j)
				}
			}
		}
		again, _ := Channels(c)
		if !slices.Equal(perm, again) {
			t.Error("same seed gave a different map")
		}
		c.Seed++
		other, _ := Channels(c)
		if slices.Equal(perm, other) {
			t.Error("different seeds gave the same map")
		}
	}
}

func TestChannelSettings(t *testing.T) {
	perm, err := Channels(ChannelSettings{NX: 50, NY: 40})
	if err != nil {
		t.Fatal(err)
	}
	var hi int
	for _, k := range perm {
		if k == DefaultChannelPerm {
			hi++
		} else if k != DefaultBackgroundPerm {
			t.Fatalf("default map holds permeability %g", k)
		}
	}
	if hi == 0 || hi == len(perm) {
		t.Errorf("default map has %d channel cells of %d", hi, len(perm))
	}
	cases := []struct {
		name  string
		c     ChannelSettings
		field string
	}{
		{"zero NX", ChannelSettings{NY: 4}, "NX"},
		{"negative NY", ChannelSettings{NX: 4, NY: -1}, "NY"},
		{"negative count", ChannelSettings{NX: 4, NY: 4, Count: -2}, "Count"},
		{"NaN width", ChannelSettings{NX: 4, NY: 4, Width: math.NaN()}, "Width"},
		{"negative amplitude", ChannelSettings{NX: 4, NY: 4, Amplitude: -1}, "Amplitude"},
		{"infinite wavelength", ChannelSettings{NX: 4, NY: 4, Wavelength: math.Inf(1)}, "Wavelength"},
		{"negative perm", ChannelSettings{NX: 4, NY: 4, ChannelPerm: -5}, "ChannelPerm"},
		{"negative DX", ChannelSettings{NX: 4, NY: 4, DX: -1}, "DX"},
	}
	for _, tc := range cases {
		_, err := Channels(tc.c)
		var se *SettingsError
		if !errors.As(err, &se) || se.Field != tc.field {
			t.Errorf("%s: error %v, want a SettingsError on %s", tc.name, err, tc.field)
		}
	}
}

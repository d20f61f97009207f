package reservoir

import (
	"math"
	"path/filepath"
	"strings"
	"testing"
)

// TestTableReproducesCorey samples the Corey (1954) power law and checks
// that the Fritsch-Butland interpolant of the samples stays close to the
// closed form between the nodes and equals it at the nodes.
func TestTableReproducesCorey(t *testing.T) {
	c := Corey{Swc: 0.2, Sor: 0.25, KrwMax: 0.35, KroMax: 0.9, Nw: 2.5, No: 2}
	const n = 41
	var sw, krw, kro []float64
	for i := 0; i < n; i++ {
		s := c.Swc + (1-c.Swc-c.Sor)*float64(i)/(n-1)
		sw, krw, kro = append(sw, s), append(krw, c.Krw(s)), append(kro, c.Kro(s))
	}
	sw, krw, kro = append(sw, 1), append(krw, c.KrwMax), append(kro, 0)
	tab, err := NewTable(sw, krw, kro)
	if err != nil {
		t.Fatal(err)
	}
	if swc, sor := tab.Endpoints(); swc != c.Swc || math.Abs(sor-c.Sor) > 1e-15 {
		t.Errorf("endpoints %g %g, want %g %g", swc, sor, c.Swc, c.Sor)
	}
	maxErr := 0.0
	for i := 0; i <= 2000; i++ {
		s := c.Swc + (1-c.Swc-c.Sor)*float64(i)/2000
		maxErr = math.Max(maxErr, math.Abs(tab.Krw(s)-c.Krw(s)))
		maxErr = math.Max(maxErr, math.Abs(tab.Kro(s)-c.Kro(s)))
	}
	t.Logf("largest difference from the Corey closed form with %d nodes: %.2e", n, maxErr)
	if maxErr > 1e-4 {
		t.Errorf("interpolation differs from the Corey curve by %g", maxErr)
	}
	for i := range sw {
		if tab.Krw(sw[i]) != krw[i] || tab.Kro(sw[i]) != kro[i] {
			t.Errorf("node %d not reproduced: %g %g vs %g %g", i, tab.Krw(sw[i]), tab.Kro(sw[i]), krw[i], kro[i])
		}
	}
	// Below swc krw is zero; outside the table the end values hold.
	if tab.Krw(0.1) != 0 || tab.Kro(0.1) != 0.9 || tab.Kro(0.9) != 0 {
		t.Errorf("outside the mobile range: krw(0.1) %g kro(0.1) %g kro(0.9) %g", tab.Krw(0.1), tab.Kro(0.1), tab.Kro(0.9))
	}
}

// TestTableMonotone: on data with a sharp rise and long flats the
// interpolant keeps the monotonicity of the data and its range
// (Fritsch and Butland 1984), where an ordinary cubic spline would
// overshoot.
func TestTableMonotone(t *testing.T) {
	sw := []float64{0.1, 0.2, 0.25, 0.3, 0.6, 0.62, 0.8, 0.85, 1}
	krw := []float64{0, 0, 0.001, 0.002, 0.003, 0.5, 0.51, 0.7, 0.7}
	kro := []float64{1, 1, 0.99, 0.5, 0.49, 0.1, 0, 0, 0}
	tab, err := NewTable(sw, krw, kro)
	if err != nil {
		t.Fatal(err)
	}
	if swc, sor := tab.Endpoints(); swc != 0.2 || math.Abs(sor-0.2) > 1e-15 {
		t.Errorf("endpoints %g %g, want 0.2 0.2", swc, sor)
	}
	pw, po := tab.Krw(0), tab.Kro(0)
	for i := 1; i <= 10000; i++ {
		s := float64(i) / 10000
		w, o := tab.Krw(s), tab.Kro(s)
		if w < pw || o > po || w < 0 || w > 0.7 || o < 0 || o > 1 {
			t.Fatalf("not monotone or out of range at sw = %g: krw %g (prev %g), kro %g (prev %g)", s, w, pw, o, po)
		}
		pw, po = w, o
	}
	// Flat stretches stay flat: krw is exactly 0 up to swc and kro
	// exactly 0 from 1 - sor on.
	if tab.Krw(0.15) != 0 || tab.Kro(0.9) != 0 {
		t.Errorf("flat stretches: krw(0.15) = %g, kro(0.9) = %g", tab.Krw(0.15), tab.Kro(0.9))
	}
}

// TestTableLinear: a cubic Hermite interpolant whose node derivatives are
// the common slope reproduces linear data exactly (Fritsch and Butland
// 1984 pick the slope on linear data).
func TestTableLinear(t *testing.T) {
	var sw, krw, kro []float64
	for i := 0; i <= 8; i++ {
		s := 0.2 + 0.1*float64(i)
		sw, krw, kro = append(sw, s), append(krw, 0.5*(s-0.2)/0.8), append(kro, 0.9*(1-s)/0.8)
	}
	tab, err := NewTable(sw, krw, kro)
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i <= 100; i++ {
		s := 0.2 + 0.8*float64(i)/100
		if d := math.Abs(tab.Krw(s) - 0.5*(s-0.2)/0.8); d > 1e-14 {
			t.Fatalf("krw(%g) off by %g", s, d)
		}
		if d := math.Abs(tab.Kro(s) - 0.9*(1-s)/0.8); d > 1e-14 {
			t.Fatalf("kro(%g) off by %g", s, d)
		}
	}
}

func TestNewTableErrors(t *testing.T) {
	cases := []struct {
		name         string
		sw, krw, kro []float64
		want         string
	}{
		{"one row", []float64{0.2}, []float64{0}, []float64{1}, "needs at least two rows"},
		{"lengths", []float64{0.2, 0.8}, []float64{0}, []float64{1, 0}, "columns of different lengths"},
		{"sw above one", []float64{0.2, 1.2}, []float64{0, 1}, []float64{1, 0}, "row 2: sw = 1.2 is outside [0, 1]"},
		{"negative krw", []float64{0.2, 0.8}, []float64{-0.1, 1}, []float64{1, 0}, "row 1: krw = -0.1 is outside [0, 1]"},
		{"nan", []float64{0.2, math.NaN()}, []float64{0, 1}, []float64{1, 0}, "row 2: sw = NaN is outside [0, 1]"},
		{"sw repeats", []float64{0.2, 0.2, 0.8}, []float64{0, 0.1, 1}, []float64{1, 0.5, 0}, "row 2: sw = 0.2 does not increase"},
		{"krw falls", []float64{0.2, 0.5, 0.8}, []float64{0, 0.3, 0.2}, []float64{1, 0.5, 0}, "row 3: krw = 0.2 decreases"},
		{"kro rises", []float64{0.2, 0.5, 0.8}, []float64{0, 0.1, 0.2}, []float64{0.5, 0.6, 0}, "row 2: kro = 0.6 increases"},
		{"krw never zero", []float64{0.2, 0.8}, []float64{0.1, 1}, []float64{1, 0}, "row 1: krw = 0.1: the table must start at krw = 0"},
		{"kro never zero", []float64{0.2, 0.8}, []float64{0, 1}, []float64{1, 0.1}, "row 2: kro = 0.1: the table must reach kro = 0"},
		{"no mobile range", []float64{0.2, 0.5, 0.8}, []float64{0, 0, 1}, []float64{1, 0, 0}, "row 2: no mobile range"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := NewTable(c.sw, c.krw, c.kro)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("got %v, want %q", err, c.want)
			}
		})
	}
}

func TestReadTable(t *testing.T) {
	dir := t.TempDir()
	p := write(t, dir, "kr.csv", "# lab curve, invented\r\nKro, Sw, KRW\r\n0.9,0.2,0\r\n\r\n0.3,0.5,0.1\r\n0,0.75,0.4\r\n0,1,0.6\r\n")
	tab, err := ReadTable(p)
	if err != nil {
		t.Fatal(err)
	}
	if len(tab.Sw) != 4 || tab.Sw[1] != 0.5 || tab.KrwNodes[1] != 0.1 || tab.KroNodes[1] != 0.3 || tab.Source != p {
		t.Errorf("table %+v", tab)
	}
	if swc, sor := tab.Endpoints(); swc != 0.2 || sor != 0.25 {
		t.Errorf("endpoints %g %g", swc, sor)
	}
	for name, c := range map[string]struct{ src, want string }{
		"no header":    {"0.2,0,1\n0.8,1,0\n", "t.csv:1: no header"},
		"two columns":  {"sw,krw\n", "t.csv:1: the header must name the three columns"},
		"short row":    {"sw,krw,kro\n0.2,0\n", "t.csv:2: 2 values; expected 3"},
		"word":         {"sw,krw,kro\n0.2,0,1\n0.8,one,0\n", `t.csv:3: krw: "one" is not a finite number`},
		"bad order":    {"sw,krw,kro\n0.2,0,1\n\n0.5,0.5,0.5\n0.4,0.6,0\n", "t.csv:5: sw = 0.4 does not increase"},
		"empty":        {"\n# only a comment\n", "t.csv: empty relative permeability table"},
		"header twice": {"sw,sw,kro\n", "t.csv:1: column sw named twice"},
	} {
		p := write(t, dir, "t.csv", c.src)
		if _, err := ReadTable(p); err == nil || !strings.Contains(err.Error(), filepath.Join(dir, c.want)) {
			t.Errorf("%s: got %v, want %s", name, err, c.want)
		}
	}
}

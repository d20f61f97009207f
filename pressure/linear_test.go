package pressure

import (
	"math"
	"testing"

	"floodtrace/reservoir"
)

// uniformMobility returns a mobility array of 1/mu in every cell.
func uniformMobility(m *reservoir.Model, mu float64) []float64 {
	mob := make([]float64, m.Grid.N())
	for k := range mob {
		mob[k] = 1 / mu
	}
	return mob
}

func mustAddWell(t testing.TB, m *reservoir.Model, name string, typ reservoir.WellType, i, j int, c reservoir.Control, v float64) *reservoir.Well {
	t.Helper()
	g := m.Grid
	x := g.X0 + (float64(i)+0.5)*g.DX
	y := g.Y0 + (float64(j)+0.5)*g.DY
	if err := m.PlaceWell(name, typ, x, y, c, v); err != nil {
		t.Fatal(err)
	}
	return &m.Wells[len(m.Wells)-1]
}

// TestLinearDarcy checks one-dimensional linear flow between a rate
// injector and a BHP producer in the end cells against Darcy's law
// (Darcy 1856; field-unit form q = 0.001127*k*A*dp/(mu*L), constant from
// memory, common practice): the pressure profile between the well cells is
// linear and the drop between their centres is q*mu*L/(0.001127*k*A).
func TestLinearDarcy(t *testing.T) {
	cases := []struct {
		name                string
		units               reservoir.UnitSystem
		nx                  int
		dx, dy, k, h, mu, q float64
		pbh                 float64
	}{
		{"field", reservoir.Field, 50, 20, 30, 150, 25, 0.8, 400, 1000},
		{"metric", reservoir.Metric, 50, 10, 8, 40, 6, 2.5, 60, 150},
		{"field-thin", reservoir.Field, 50, 100, 100, 5, 2, 3, 10, 500},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			m := reservoir.NewUniform(tc.nx, 1, tc.dx, tc.dy, tc.k, 0.2, tc.h)
			m.Units = tc.units
			mustAddWell(t, m, "I", reservoir.Injector, 0, 0, reservoir.RateControl, tc.q)
			mustAddWell(t, m, "P", reservoir.Producer, tc.nx-1, 0, reservoir.BHPControl, tc.pbh)
			sol, err := Solve(Input{Model: m, Mobility: uniformMobility(m, tc.mu)}, Settings{Tol: 1e-13})
			if err != nil {
				t.Fatal(err)
			}
			L := float64(tc.nx-1) * tc.dx
			A := tc.dy * tc.h
			want := tc.q * tc.mu * L / (tc.units.Darcy() * tc.k * A)
			got := sol.P[0] - sol.P[tc.nx-1]
			if rel := math.Abs(got-want) / want; rel > 1e-8 {
				t.Errorf("pressure drop %.12g, Darcy %.12g (rel %.2g)", got, want, rel)
			}
			for i := 0; i < tc.nx; i++ {
				lin := sol.P[0] - want*float64(i)/float64(tc.nx-1)
				if rel := math.Abs(sol.P[i]-lin) / want; rel > 1e-8 {
					t.Errorf("cell %d: p = %.12g, linear profile %.12g", i, sol.P[i], lin)
				}
			}
			for i := 1; i < tc.nx; i++ {
				f := sol.FluxX[m.Grid.XFace(i, 0)]
				if math.Abs(f-tc.q) > 1e-8*tc.q {
					t.Errorf("face %d: flux %.12g, want %g", i, f, tc.q)
				}
			}
			if p := sol.Wells[1].Q; math.Abs(p+tc.q) > 1e-8*tc.q {
				t.Errorf("producer rate %g, want %g", p, -tc.q)
			}
		})
	}
}

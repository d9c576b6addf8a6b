package scenario

import (
	"context"
	"math"
	"testing"

	"ringbox/internal/thermal"
)

// TestSubbandSumsMatchTheCurve checks the per-subband thermal sums
// (bySubband) against the curve integrator on the same exact counts,
// with 20 000 evaluations (its centred estimate good to ~1e-9 on smooth
// curves, thermal.Integrator): wires, films and their modes, parabolic and
// Kane, box and ring, E_F inside the bands and in the Boltzmann tail. The
// integrator is independent of the Fermi–Dirac closed forms and tables
// bySubband uses (common practice: two quadratures of one integral).
func TestSubbandSumsMatchTheCurve(t *testing.T) {
	ctx := context.Background()
	for _, q := range []string{
		"material=gaas&lx=30nm&ly=20nm&lz=1um&bz=open&temp=300&ef=0.08",
		"material=gaas&lx=30nm&ly=20nm&lz=1um&bx=ring&by=box&bz=open&temp=77&ef=0.02",
		"material=gaas&lx=30nm&ly=20nm&lz=1um&bz=open&temp=300&ef=-0.1",
		"material=insb&lx=40nm&ly=40nm&lz=1um&bz=open&temp=300&ef=0.05",
		"material=free&lx=3nm&ly=4nm&lz=1um&bz=open&temp=300&ef=3",
		"material=si&lx=1um&ly=1um&lz=5nm&bx=open&by=open&bz=box&temp=300&ef=0.05",
		"material=gaas&lx=1um&ly=1um&lz=12nm&bx=open&by=open&bz=ring&temp=300&ef=0.1",
		"material=cu&lx=2um&ly=2um&lz=3nm&bx=open&by=open&bz=box&temp=300&ef=7",
	} {
		s := parseQ(t, q)
		c := s.Conductor()
		conds := variants(c)
		sp := newSpan(s, conds, s.EFEV, false)
		// The reference integrates 30 k_BT above E_F, where the tail it
		// leaves out (e^(−30)) is far below the tolerance; the subband sums
		// take every subband's tail in analytically and leave out the
		// subbands above the window, to the requested accuracy relTol.
		sp.curves = math.Max(s.EFEV, conds["box"].Edge()) + 30*s.KTEV()
		srcs, _, err := build(ctx, s, conds, sp)
		if err != nil {
			t.Fatal(err)
		}
		kT := s.KTEV()
		for _, name := range []string{"box", "ring"} {
			v := srcs[name]
			occ, slope, ok, err := bySubband(ctx, v.states, s.EFEV, kT)
			if err != nil || !ok {
				t.Fatalf("%s %s: bySubband ok=%v err=%v", q, name, ok, err)
			}
			in := thermal.Integrator{WindowKT: 30, RelTol: 1e-12, MaxEvals: 80000, Edge: v.edge, HasEdge: true}
			wantN, _ := in.Occupied(ctx, v.stateCurve, s.EFEV, kT)
			wantS, _ := in.Slope(ctx, v.stateCurve, s.EFEV, kT)
			if relErr(occ, wantN.Value) > relTol || relErr(slope, wantS.Value) > relTol {
				t.Errorf("%s %s: electrons %.10g, dN/dE_F %.10g; curve %.10g, %.10g", q, name, occ, slope, wantN.Value, wantS.Value)
			}
			m, _, ok, err := bySubband(ctx, v.modes, s.EFEV, kT)
			if err != nil || !ok {
				t.Fatalf("%s %s modes: ok=%v err=%v", q, name, ok, err)
			}
			in.Edge = v.modeEdge
			wantM, _ := in.Occupied(ctx, v.modeCurve, s.EFEV, kT)
			if relErr(m, wantM.Value) > relTol {
				t.Errorf("%s %s: mean modes %.10g; curve %.10g", q, name, m, wantM.Value)
			}
		}
	}
}

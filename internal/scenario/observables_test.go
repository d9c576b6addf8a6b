package scenario

import (
	"context"
	"fmt"
	"math"
	"net/url"
	"testing"

	"ringbox/internal/phys"
)

// Published checks of the observables at (E_F, T), through the same paths
// the pages and the sweep use: Run and Observe on parsed scenarios.

func parseQ(t *testing.T, query string) Scenario {
	t.Helper()
	q, err := url.ParseQuery(query)
	if err != nil {
		t.Fatal(err)
	}
	s, err := Parse(q)
	if err != nil {
		t.Fatalf("Parse(%s): %v", query, err)
	}
	return s
}

func observeQ(t *testing.T, query string) *Point {
	t.Helper()
	p, err := Observe(context.Background(), parseQ(t, query))
	if err != nil {
		t.Fatalf("Observe(%s): %v", query, err)
	}
	return p
}

func relErr(got, want float64) float64 { return math.Abs(got-want) / math.Abs(want) }

// TestEffectiveDensityOfStates reads N_c off a bulk conductor (every axis
// open) in the non-degenerate limit: with E_F = −0.25 eV, ten k_BT below
// the band edge, n = N_c·exp(E_F/k_BT) to better than 10⁻⁴, so
// n/exp(E_F/k_BT) is N_c.
func TestEffectiveDensityOfStates(t *testing.T) {
	const efEV = -0.25
	tests := []struct {
		name, query string
		lo, hi      float64 // accepted N_c in cm⁻³
	}{
		// GaAs at 300 K: 4.4–4.7×10¹⁷ cm⁻³ (Sze & Ng, Physics of
		// Semiconductor Devices, table of semiconductor properties; the
		// range spans the values printed in different editions). With the catalogue's Kane α ≈ 0.57 /eV the
		// parabolic 4.35×10¹⁷ rises by about 15αk_BT/4 ≈ 5.5 %.
		{"GaAs with Kane alpha (Sze & Ng)", "material=gaas", 4.4e17, 4.7e17},
		// Si at 300 K: 2.8×10¹⁹ cm⁻³ (Sze & Ng, Appendix G), six X valleys
		// with m_l = 0.98, m_t = 0.19; within 3 %.
		{"Si six valleys (Sze & Ng)", "material=si", 2.8e19 * 0.97, 2.8e19 * 1.03},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			q := tt.query + fmt.Sprintf("&dims=3&bx=open&by=open&bz=open&temp=300&ef=%g", efEV)
			p := observeQ(t, q)
			o := p.Observables["scenario"]
			if o.DensityUnit != "cm^-3" {
				t.Fatalf("density unit %q", o.DensityUnit)
			}
			kT := 300 * phys.BoltzmannEV
			nc := o.Density / math.Exp(efEV/kT)
			t.Logf("N_c = %.4g cm^-3", nc)
			if nc < tt.lo || nc > tt.hi {
				t.Errorf("N_c = %.4g cm⁻³, want %.3g to %.3g", nc, tt.lo, tt.hi)
			}
			// Every axis open: the scenario is its own continuum.
			if c := p.Observables["continuum"].Density; relErr(c, o.Density) > 1e-9 {
				t.Errorf("continuum %g differs from the all-open scenario %g", c, o.Density)
			}
		})
	}
}

// subbandEdgeEV is the n-th level of a hard-wall axis of width wM for mass
// m (in m₀) with Kane α: γ_n = ħ²(nπ/W)²/(2m), E = (√(1+4αγ) − 1)/(2α).
// Written out here rather than taken from the spectrum package, so the
// check does not lean on the code it tests.
func subbandEdgeEV(n int, wM, m, alpha float64) float64 {
	k := float64(n) * math.Pi / wM
	g := phys.Hbar * phys.Hbar * k * k / (2 * m * phys.ElectronMass) / phys.ElementaryCharge
	if alpha == 0 {
		return g
	}
	return (math.Sqrt(1+4*alpha*g) - 1) / (2 * alpha)
}

// TestQuantizedConductance: a hard-wall channel at T → 0 conducts an
// integer multiple of 2e²/h, stepping up by one at each subband edge
// (van Wees et al., PRL 60, 848 (1988); Landauer–Büttiker with T = 1).
func TestQuantizedConductance(t *testing.T) {
	s := parseQ(t, "material=gaas&dims=2&lx=50nm&bx=box&ly=1um&by=open&along=y&temp=0")
	const w = 50e-9
	m, alpha := s.Material.Valleys[0].MassM0[0], s.AlphaPerEV
	for n := 0; n <= 6; n++ {
		lo := subbandEdgeEV(n, w, m, alpha)
		hi := subbandEdgeEV(n+1, w, m, alpha)
		probes := []struct {
			name   string
			efEV   float64
			wantG0 float64
		}{
			{"between edges", (lo + hi) / 2, float64(n)},
			{"just below the next edge", hi * (1 - 1e-6), float64(n)},
			{"just above the next edge", hi * (1 + 1e-6), float64(n + 1)},
		}
		for _, pr := range probes {
			t.Run(fmt.Sprintf("n=%d %s", n, pr.name), func(t *testing.T) {
				s := s
				s.EFEV = pr.efEV
				p, err := Observe(context.Background(), s)
				if err != nil {
					t.Fatal(err)
				}
				g := p.Observables["scenario"].ConductanceG0
				if math.Abs(g-pr.wantG0) > 1e-9 {
					t.Errorf("G = %.12g × 2e²/h at E_F = %.6g eV, want %g", g, pr.efEV, pr.wantG0)
				}
				// The conductance quantum itself, CODATA 2018 (h and e exact).
				if gs := p.Observables["scenario"].ConductanceS; math.Abs(gs-pr.wantG0*7.748091729e-5) > 1e-13 {
					t.Errorf("G = %.10g S, want %g × 7.748091729×10⁻⁵ S", gs, pr.wantG0)
				}
			})
		}
	}
}

// TestSharvinConductance: a contact much wider than the Fermi wavelength
// conducts G = (2e²/h)·k_F²A/(4π) (Sharvin, JETP 21, 655 (1965)). The
// continuum variant is that formula exactly; the 30 nm × 30 nm copper
// contact's box and ring counts approach it, the box from below by its
// wall term P/(A·k_F) ≈ 1 % (Weyl; Baltes & Hilf 1976).
func TestSharvinConductance(t *testing.T) {
	const a = 30e-9 * 30e-9
	efEV := 7.00 // Cu free-electron Fermi energy (Ashcroft & Mermin, Table 2.1)
	kF := math.Sqrt(2*phys.ElectronMass*efEV*phys.ElementaryCharge) / phys.Hbar
	want := phys.ConductanceQuantum * kF * kF * a / (4 * math.Pi)
	for _, temp := range []string{"0", "300"} {
		t.Run("T="+temp, func(t *testing.T) {
			p := observeQ(t, "material=cu&dims=3&lx=30nm&ly=30nm&lz=1um&bx=box&by=box&bz=open&along=z&temp="+temp)
			// k_BT ≪ E_F: the thermal average of the smooth mode count
			// differs from M(E_F) by (π²/6)(k_BT)²M''/M ~ 10⁻⁵.
			if g := p.Observables["continuum"].ConductanceS; relErr(g, want) > 1e-4 {
				t.Errorf("continuum G = %.8g S, Sharvin %.8g S", g, want)
			}
			box := p.Observables["box"].ConductanceS
			if box >= want || relErr(box, want) > 0.02 {
				t.Errorf("box G = %.6g S, want within 2 %% below Sharvin's %.6g S", box, want)
			}
			if ring := p.Observables["ring"].ConductanceS; relErr(ring, want) > 0.01 {
				t.Errorf("ring G = %.6g S, want within 1 %% of Sharvin's %.6g S", ring, want)
			}
		})
	}
}

// TestTransmissionFactor: with a mean free path λ over the channel length
// L the Landauer transmission is λ/(λ + L), the incoherent series sum
// (1−T)/T = Σ(1−Tᵢ)/Tᵢ of Büttiker, IBM J. Res. Dev. 32, 63 (1988) (from
// memory), so G falls by that factor.
func TestTransmissionFactor(t *testing.T) {
	const base = "material=gaas&lx=10nm&ly=10nm&lz=100nm&bz=open&temp=300&ef=0.08"
	ballistic := observeQ(t, base)
	for _, tt := range []struct {
		mfp  string
		want float64
	}{{"50nm", 50.0 / 150}, {"100nm", 0.5}, {"1um", 1000.0 / 1100}} {
		t.Run(tt.mfp, func(t *testing.T) {
			p := observeQ(t, base+"&mfp="+tt.mfp)
			for _, name := range Variants {
				o, b := p.Observables[name], ballistic.Observables[name]
				if relErr(o.Transmission, tt.want) > 1e-12 {
					t.Errorf("%s: transmission %g, want %g", name, o.Transmission, tt.want)
				}
				if relErr(o.ConductanceS, tt.want*b.ConductanceS) > 1e-12 {
					t.Errorf("%s: G %g, want %g × ballistic %g", name, o.ConductanceS, tt.want, b.ConductanceS)
				}
				if o.ResistanceOhm == nil || relErr(*o.ResistanceOhm, 1/o.ConductanceS) > 1e-12 {
					t.Errorf("%s: R %v is not 1/G", name, o.ResistanceOhm)
				}
			}
		})
	}
}

// TestFermiLevelRoundTrip: the E_F solved from a density gives that
// density back when it is given as E_F (the solver's inverse; common
// practice), through Run as the pages call it.
func TestFermiLevelRoundTrip(t *testing.T) {
	tests := []struct{ name, query string }{
		{"GaAs wire, cm⁻¹", "material=gaas&lx=10nm&ly=10nm&lz=100nm&bz=open&temp=300&density=4e5&points=40"},
		{"GaAs well, cm⁻²", "material=gaas&dims=3&lx=1um&ly=1um&lz=12nm&bx=open&by=open&bz=box&temp=77&density=3e11&points=40"},
		{"Si bulk, cm⁻³", "material=si&bx=open&by=open&bz=open&temp=300&density=1e18&points=40"},
	}
	ctx := context.Background()
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			s := parseQ(t, tt.query)
			r1, err := Run(ctx, s)
			if err != nil {
				t.Fatal(err)
			}
			if d := r1.Observables["scenario"].Density; relErr(d, s.Density) > 1e-6 {
				t.Errorf("solved E_F = %g eV gives density %g, asked %g", r1.EFEV, d, s.Density)
			}
			q := s.Values()
			q.Del("density")
			q.Set("ef", fmt.Sprint(r1.EFEV))
			s2, err := Parse(q)
			if err != nil {
				t.Fatal(err)
			}
			r2, err := Run(ctx, s2)
			if err != nil {
				t.Fatal(err)
			}
			if d := r2.Observables["scenario"].Density; relErr(d, s.Density) > 1e-6 {
				t.Errorf("E_F = %.10g eV back: density %.8g, first given %.8g", r1.EFEV, d, s.Density)
			}
			// The sweep's lean path solves the same E_F.
			p, err := Observe(ctx, s)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(p.EFEV-r1.EFEV) > 1e-6 {
				t.Errorf("Observe E_F %.10g eV, Run %.10g eV", p.EFEV, r1.EFEV)
			}
		})
	}
}

// TestContinuityAsTGoesToZero: at 4 K the observables of a channel with
// E_F well between two subband edges (≥ 16 k_BT from each) are those at
// 0 K: the steps' tails are e^(−16) small, and the smooth continuum moves
// by its Sommerfeld correction (π²/6)(k_BT)²·(d²M/dE²)/M ≈ 2×10⁻⁴
// for M ∝ √E at E_F = 15 meV (Sommerfeld expansion; Ashcroft & Mermin,
// eq. 2.70, from memory).
func TestContinuityAsTGoesToZero(t *testing.T) {
	const w = 50e-9
	s := parseQ(t, "material=gaas&dims=2&lx=50nm&bx=box&ly=1um&by=open&along=y")
	m, alpha := s.Material.Valleys[0].MassM0[0], s.AlphaPerEV
	ef := (subbandEdgeEV(2, w, m, alpha) + subbandEdgeEV(3, w, m, alpha)) / 2
	q := fmt.Sprintf("material=gaas&dims=2&lx=50nm&bx=box&ly=1um&by=open&along=y&ef=%.10g&temp=", ef)
	cold, warm := observeQ(t, q+"0"), observeQ(t, q+"4")
	for _, name := range Variants {
		c, w := cold.Observables[name], warm.Observables[name]
		if relErr(w.Density, c.Density) > 2e-3 {
			t.Errorf("%s: density %g at 4 K, %g at 0 K", name, w.Density, c.Density)
		}
		tol := 1e-6
		if name == "continuum" {
			tol = 5e-4
		}
		if relErr(w.ConductanceS, c.ConductanceS) > tol {
			t.Errorf("%s: G %g at 4 K, %g at 0 K", name, w.ConductanceS, c.ConductanceS)
		}
	}
	if g := cold.Observables["scenario"].ConductanceG0; g != 2 {
		t.Errorf("G = %g × 2e²/h between the second and third edge, want 2", g)
	}
}

// TestQuantumCapacitance2DEG: a degenerate parabolic 2D electron gas has
// the constant density of states g_s·m*/(2πħ²) per area, so its quantum
// capacitance is q²·m*/(πħ²)·A (common practice; GaAs, m* = 0.067:
// 2.80×10¹⁰ cm⁻² meV⁻¹, DESIGN's check value).
func TestQuantumCapacitance2DEG(t *testing.T) {
	const area = 1e-6 * 1e-6
	m := 0.067 * phys.ElectronMass
	want := phys.ElementaryCharge * phys.ElementaryCharge * m / (math.Pi * phys.Hbar * phys.Hbar) * area
	for _, temp := range []string{"4", "77"} {
		t.Run("T="+temp, func(t *testing.T) {
			// E_F = 0.1 eV is 15 k_BT above the edge at 77 K: the band
			// edge's tail e^(−15) is far below the tolerance.
			p := observeQ(t, "material=gaas&alpha=0&dims=2&lx=1um&ly=1um&bx=open&by=open&ef=0.1&temp="+temp)
			for _, name := range Variants {
				c := p.Observables[name].QuantumCapacitance
				if relErr(c, want) > 1e-5 {
					t.Errorf("%s: C_Q = %.8g F, want q²m*A/(πħ²) = %.8g F", name, c, want)
				}
			}
			// The same as a density of states per area and energy.
			c := p.Observables["scenario"].QuantumCapacitance
			dos := c / (phys.ElementaryCharge * phys.ElementaryCharge * area) * 1e-3 * phys.ElementaryCharge * 1e-4
			if relErr(dos, 2.80e10) > 0.005 {
				t.Errorf("D = %.4g cm⁻² meV⁻¹, want 2.80×10¹⁰", dos)
			}
		})
	}
}

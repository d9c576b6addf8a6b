package scenario

import (
	"context"
	"fmt"
	"math"
	"strings"
	"testing"
)

// Checks that the counting window follows the question: the answers at
// (E_F, T) do not move with emax, densities keep their relative accuracy in
// the Boltzmann tail, and a broadened D(E) is complete at emax.

func runQ(t *testing.T, query string) *Result {
	t.Helper()
	r, err := Run(context.Background(), parseQ(t, query))
	if err != nil {
		t.Fatalf("Run(%s): %v", query, err)
	}
	return r
}

// TestObservablesIgnoreEmax: a copper film (3 µm × 3 µm × 2 nm box, E_F
// 2 eV, 300 K) gives the same electrons and C_Q at emax 4 and 8, and the
// count is exact (identity: emax only sets the curves' range).
func TestObservablesIgnoreEmax(t *testing.T) {
	base := "material=cu&lx=3um&ly=3um&lz=2nm&bx=box&by=box&bz=box&ef=2&temp=300&points=50"
	a, b := runQ(t, base+"&emax=4"), runQ(t, base+"&emax=8")
	if a.Method != "exact" || b.Method != "exact" {
		t.Fatalf("methods %s, %s", a.Method, b.Method)
	}
	for _, v := range Variants {
		oa, ob := a.Observables[v], b.Observables[v]
		if relErr(oa.Electrons, ob.Electrons) > 1e-6 || relErr(oa.QuantumCapacitance, ob.QuantumCapacitance) > 1e-5 {
			t.Errorf("%s: electrons %g vs %g, C_Q %g vs %g", v, oa.Electrons, ob.Electrons, oa.QuantumCapacitance, ob.QuantumCapacitance)
		}
	}
}

// TestBoltzmannTailDensity: bulk GaAs at 300 K with E_F far below the band
// edge holds n = N_c·e^η (Sze & Ng, Physics of Semiconductor Devices, 3rd
// ed., eq. 1.19 and its non-degenerate limit), so the density from E_F
// falls by exactly e^(Δη) between Fermi levels, down to η = −200; and E_F
// from a density round-trips from 1 cm⁻³ to 10²³ cm⁻³.
func TestBoltzmannTailDensity(t *testing.T) {
	bulk := "material=gaas&dims=3&bx=open&by=open&bz=open&lx=100nm&ly=100nm&lz=100nm&temp=300&points=20&emax=0.3"
	kT := parseQ(t, bulk).KTEV()
	ref := runQ(t, bulk+fmt.Sprintf("&ef=%g", -30*kT)).Observables["scenario"].VolumeDensity
	for _, eta := range []float64{-60, -120, -200} {
		got := runQ(t, bulk+fmt.Sprintf("&ef=%.17g", eta*kT)).Observables["scenario"].VolumeDensity
		want := ref * math.Exp(eta+30)
		if relErr(got, want) > 1e-6 {
			t.Errorf("η = %g: n = %.8g cm⁻³, N_c·e^η scaling gives %.8g (rel %.2g)", eta, got, want, relErr(got, want))
		}
	}
	for _, n := range []float64{1, 1e5, 1e12, 1e17, 1e20, 1e23} {
		r := runQ(t, bulk+"&density="+strings.Replace(fmt.Sprintf("%g", n), "+", "", 1))
		// The density is per cm³ of the open axes here.
		if got := r.Observables["scenario"].Density; relErr(got, n) > 1e-6 {
			t.Errorf("density %g cm⁻³: E_F %g eV holds %g", n, r.EFEV, got)
		}
	}
}

// TestBroadenedDensityAtEmax: a broadened D(E) at emax equals the same
// quantity with emax raised by 10η, for a GaAs 10 × 10 × 100 nm box with
// η = 5 meV (identity: the levels above emax that the peaks reach count).
func TestBroadenedDensityAtEmax(t *testing.T) {
	base := "material=gaas&lx=10nm&ly=10nm&lz=100nm&bz=box&eta=5meV&ef=0.3&temp=0&at=0.3"
	a, b := runQ(t, base+"&emax=0.3"), runQ(t, base+"&emax=0.35")
	for _, v := range []string{"scenario", "box", "ring"} {
		da, db := a.At[0].DOS[v], b.At[0].DOS[v]
		if relErr(da, db) > 1e-9 {
			t.Errorf("%s: D(0.3 eV) = %g at emax 0.3, %g at emax 0.35", v, da, db)
		}
		if qa, qb := a.Observables[v].QuantumCapacitance, b.Observables[v].QuantumCapacitance; relErr(qa, qb) > 1e-9 {
			t.Errorf("%s: C_Q at T = 0 %g vs %g", v, qa, qb)
		}
	}
}

// TestZeroTemperatureFermiLevelHoldsElectrons: at T = 0 in a fully confined
// GaAs 10 nm cube, a density of one electron puts E_F on the lowest level,
// which holds its two spin states (common practice: the aufbau rule).
func TestZeroTemperatureFermiLevelHoldsElectrons(t *testing.T) {
	r := runQ(t, "material=gaas&lx=10nm&ly=10nm&lz=10nm&bz=box&density=1&temp=0")
	if got := r.Observables["scenario"].Electrons; got != 2 {
		t.Errorf("electrons %g, want the 2 of the lowest level", got)
	}
	if l := r.Levels[0].EnergyEV; relErr(r.EFEV, l) > 1e-9 {
		t.Errorf("E_F %g eV, lowest level %g eV", r.EFEV, l)
	}
}

// TestLongWireExact: a 20 nm × 20 nm × 1 mm InAs box wire at E_F 0.15 eV
// is exact (its cheapest plan is cheap), and the box count at E_F lies
// within the smooth count's own error estimate (identity check of the two
// paths).
func TestLongWireExact(t *testing.T) {
	r := runQ(t, "material=inas&lx=20nm&ly=20nm&lz=1mm&bz=box&ef=0.15&points=40")
	if r.Method != "exact" {
		t.Fatalf("method %s: %v", r.Method, r.Notes)
	}
	if len(r.Levels) < 2 || r.Levels[1].N[2] != 2 {
		t.Errorf("second level %v, want (1,1,2)", r.Levels[1])
	}
}

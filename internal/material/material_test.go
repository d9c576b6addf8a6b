package material

import (
	"math"
	"testing"
)

func TestCatalogueIDs(t *testing.T) {
	for _, id := range []string{"gaas", "inas", "insb", "inp", "si", "cu", "ag", "au", "al", "na", "free"} {
		m, ok := Lookup(id)
		if !ok {
			t.Fatalf("%s missing", id)
		}
		if m.Source == "" || len(m.Valleys) == 0 {
			t.Errorf("%s: no source or valleys", id)
		}
	}
	if _, ok := Lookup("custom"); ok {
		t.Error("custom is built, not looked up")
	}
}

// Kane α of GaAs from α = (1 − m*)²/E_g with m* = 0.067, E_g = 1.519 eV
// (Vurgaftman et al. 2001) is 0.573 1/eV; the commonly quoted value is about
// 0.6 1/eV (common practice).
func TestKaneAlpha(t *testing.T) {
	m, _ := Lookup("gaas")
	if math.Abs(m.AlphaPerEV-0.573) > 0.001 {
		t.Errorf("GaAs α = %g", m.AlphaPerEV)
	}
}

// Silicon's six valleys: the density-of-states mass 6^(2/3)(m_l m_t²)^(1/3) =
// 1.08 m₀ (Sze & Ng, App. G) follows from the catalogue's valleys.
func TestSiliconValleys(t *testing.T) {
	m, _ := Lookup("si")
	g, prod := 0, 1.0
	for _, v := range m.Valleys {
		g += v.Degeneracy
		prod *= v.MassM0[0]
	}
	if g != 6 {
		t.Fatalf("si valleys sum to %d", g)
	}
	// Each axis sees m_l once across the three pairs.
	mdos := math.Pow(6, 2.0/3) * math.Cbrt(prod)
	if math.Abs(mdos-1.08) > 0.01 {
		t.Errorf("Si DOS mass %g", mdos)
	}
}

// Package material is ringbox's catalogue of conductors: effective masses,
// valleys, Kane nonparabolicity and default Fermi levels, each value with its
// published source.
package material

import (
	"fmt"
	"sort"
)

// Kind says which default the conductor page uses for the Fermi level.
type Kind int

const (
	// Semiconductor: E_F defaults to a value near the band edge.
	Semiconductor Kind = iota
	// Metal: E_F defaults to the free-electron Fermi energy.
	Metal
	// Model: a free or custom band with no physical default.
	Model
)

// Valley is one conduction-band valley. MassM0 holds the effective mass along
// the conductor's x, y and z axes in units of the free-electron mass m₀, and
// Degeneracy how many equivalent valleys share those masses (silicon's ±x pair
// counts 2).
type Valley struct {
	Label      string
	MassM0     [3]float64
	Degeneracy int
}

// Material is one catalogue entry.
type Material struct {
	ID   string
	Name string
	Kind Kind
	// Valleys are summed valley by valley.
	Valleys []Valley
	// AlphaPerEV is the Kane nonparabolicity α in 1/eV: E(1 + αE) = ħ²k²/2m*.
	AlphaPerEV float64
	// GapEV is the band gap at 0 K (0 for metals and models).
	GapEV float64
	// FermiEV is the default Fermi level above the band edge, in eV.
	FermiEV float64
	// Source names where the values come from.
	Source string
}

// kaneAlpha is the two-band Kane estimate of the nonparabolicity,
// α = (1 − m*/m₀)²/E_g (Kane, J. Phys. Chem. Solids 1, 249 (1957); the form
// used by Vurgaftman, Meyer & Ram-Mohan, J. Appl. Phys. 89, 5815 (2001)).
func kaneAlpha(massM0, gapEV float64) float64 {
	d := 1 - massM0
	return d * d / gapEV
}

func isotropic(label string, m float64, g int) []Valley {
	return []Valley{{Label: label, MassM0: [3]float64{m, m, m}, Degeneracy: g}}
}

// Silicon's conduction band: six equivalent X valleys, longitudinal mass
// m_l = 0.98 m₀ and transverse m_t = 0.19 m₀ (Sze & Ng, Physics of
// Semiconductor Devices, 3rd ed. (2007), Appendix G). Each ± pair has its
// longitudinal mass along one axis of the conductor ([100] axes assumed).
const (
	siMl = 0.98
	siMt = 0.19
)

// III–V Γ-valley masses and 0 K gaps: Vurgaftman, Meyer & Ram-Mohan,
// J. Appl. Phys. 89, 5815 (2001), Tables III (GaAs), IV (InAs), VII (InP)
// and VIII (InSb).
const (
	gaasMass, gaasGap = 0.067, 1.519
	inasMass, inasGap = 0.026, 0.417
	insbMass, insbGap = 0.0135, 0.235
	inpMass, inpGap   = 0.0795, 1.4236
)

// Free-electron Fermi energies of metals: Ashcroft & Mermin, Solid State
// Physics (1976), Table 2.1 (Cu 7.00 eV, Ag 5.49 eV, Au 5.53 eV, Al 11.7 eV,
// Na 3.24 eV). The same table lists the conduction-electron densities
// (Cu 8.47, Ag 5.86, Au 5.90, Al 18.1, Na 2.65 ×10²² cm⁻³).
var catalogue = []Material{
	{ID: "gaas", Name: "GaAs (Γ valley)", Kind: Semiconductor, Valleys: isotropic("Γ", gaasMass, 1),
		AlphaPerEV: kaneAlpha(gaasMass, gaasGap), GapEV: gaasGap, FermiEV: 0.05,
		Source: "Vurgaftman, Meyer & Ram-Mohan, J. Appl. Phys. 89, 5815 (2001)"},
	{ID: "inas", Name: "InAs (Γ valley)", Kind: Semiconductor, Valleys: isotropic("Γ", inasMass, 1),
		AlphaPerEV: kaneAlpha(inasMass, inasGap), GapEV: inasGap, FermiEV: 0.05,
		Source: "Vurgaftman, Meyer & Ram-Mohan, J. Appl. Phys. 89, 5815 (2001)"},
	{ID: "insb", Name: "InSb (Γ valley)", Kind: Semiconductor, Valleys: isotropic("Γ", insbMass, 1),
		AlphaPerEV: kaneAlpha(insbMass, insbGap), GapEV: insbGap, FermiEV: 0.05,
		Source: "Vurgaftman, Meyer & Ram-Mohan, J. Appl. Phys. 89, 5815 (2001)"},
	{ID: "inp", Name: "InP (Γ valley)", Kind: Semiconductor, Valleys: isotropic("Γ", inpMass, 1),
		AlphaPerEV: kaneAlpha(inpMass, inpGap), GapEV: inpGap, FermiEV: 0.05,
		Source: "Vurgaftman, Meyer & Ram-Mohan, J. Appl. Phys. 89, 5815 (2001)"},
	{ID: "si", Name: "Si (six X valleys)", Kind: Semiconductor, Valleys: []Valley{
		{Label: "X±x", MassM0: [3]float64{siMl, siMt, siMt}, Degeneracy: 2},
		{Label: "X±y", MassM0: [3]float64{siMt, siMl, siMt}, Degeneracy: 2},
		{Label: "X±z", MassM0: [3]float64{siMt, siMt, siMl}, Degeneracy: 2},
	}, GapEV: 1.12, FermiEV: 0.05,
		Source: "Sze & Ng, Physics of Semiconductor Devices, 3rd ed. (2007), App. G"},
	{ID: "cu", Name: "Cu (free electrons)", Kind: Metal, Valleys: isotropic("s", 1, 1), FermiEV: 7.00,
		Source: "Ashcroft & Mermin, Solid State Physics (1976), Table 2.1"},
	{ID: "ag", Name: "Ag (free electrons)", Kind: Metal, Valleys: isotropic("s", 1, 1), FermiEV: 5.49,
		Source: "Ashcroft & Mermin, Solid State Physics (1976), Table 2.1"},
	{ID: "au", Name: "Au (free electrons)", Kind: Metal, Valleys: isotropic("s", 1, 1), FermiEV: 5.53,
		Source: "Ashcroft & Mermin, Solid State Physics (1976), Table 2.1"},
	{ID: "al", Name: "Al (free electrons)", Kind: Metal, Valleys: isotropic("s", 1, 1), FermiEV: 11.7,
		Source: "Ashcroft & Mermin, Solid State Physics (1976), Table 2.1"},
	{ID: "na", Name: "Na (free electrons)", Kind: Metal, Valleys: isotropic("s", 1, 1), FermiEV: 3.24,
		Source: "Ashcroft & Mermin, Solid State Physics (1976), Table 2.1"},
	{ID: "free", Name: "free electron (m = m₀)", Kind: Model, Valleys: isotropic("", 1, 1), FermiEV: 1,
		Source: "m = m₀ by definition"},
}

// CustomID names the user-defined material, built by Custom.
const CustomID = "custom"

// Lookup returns the catalogue entry with the given id (not "custom").
func Lookup(id string) (Material, bool) {
	for _, m := range catalogue {
		if m.ID == id {
			return clone(m), true
		}
	}
	return Material{}, false
}

// All returns the catalogue sorted by id, without "custom".
func All() []Material {
	out := make([]Material, len(catalogue))
	for i, m := range catalogue {
		out[i] = clone(m)
	}
	sort.Slice(out, func(i, j int) bool { return out[i].ID < out[j].ID })
	return out
}

// IDs returns every id a user may give, "custom" included.
func IDs() []string {
	ids := []string{}
	for _, m := range All() {
		ids = append(ids, m.ID)
	}
	return append(ids, CustomID)
}

// Custom builds a single-valley material with per-axis masses (m₀), valley
// degeneracy gv and nonparabolicity alpha (1/eV). Validation of the ranges
// belongs to the caller.
func Custom(mass [3]float64, gv int, alphaPerEV float64) Material {
	return Material{ID: CustomID, Name: "custom", Kind: Model,
		Valleys: []Valley{{Label: "", MassM0: mass, Degeneracy: gv}}, AlphaPerEV: alphaPerEV,
		FermiEV: 0.05, Source: "user-defined"}
}

func clone(m Material) Material {
	m.Valleys = append([]Valley(nil), m.Valleys...)
	return m
}

// String is a one-line summary for listings.
func (m Material) String() string {
	return fmt.Sprintf("%s: %s", m.ID, m.Name)
}

// Package phys holds the physical constants ringbox uses and the parsing and
// formatting of the quantities users type: lengths and energies.
//
// Constants are the CODATA 2018 recommended values (Tiesinga et al.,
// Rev. Mod. Phys. 93, 025010 (2021)); since the 2019 SI redefinition h, e
// and k_B are exact.
package phys

import "math"

const (
	// PlanckH is the Planck constant h in J·s (exact).
	PlanckH = 6.62607015e-34
	// Hbar is the reduced Planck constant ħ = h/2π in J·s.
	Hbar = PlanckH / (2 * math.Pi)
	// ElementaryCharge is e in C (exact).
	ElementaryCharge = 1.602176634e-19
	// ElectronMass is m₀ in kg (CODATA 2018, 9.1093837015(28)×10⁻³¹).
	ElectronMass = 9.1093837015e-31
	// Boltzmann is k_B in J/K (exact).
	Boltzmann = 1.380649e-23
	// BoltzmannEV is k_B in eV/K.
	BoltzmannEV = Boltzmann / ElementaryCharge
	// ConductanceQuantum is G₀ = 2e²/h in S (7.748091729…×10⁻⁵ S).
	ConductanceQuantum = 2 * ElementaryCharge * ElementaryCharge / PlanckH
	// ConductanceQuantumPerSpin is e²/h in S, one spin channel.
	ConductanceQuantumPerSpin = ElementaryCharge * ElementaryCharge / PlanckH
)

// HbarSqOver2M0EVm2 is ħ²/(2m₀) in eV·m²: the kinetic energy of a free
// electron is E = HbarSqOver2M0EVm2·k²/m with k in 1/m and m in units of m₀
// (about 3.81 eV·Å²).
const HbarSqOver2M0EVm2 = Hbar * Hbar / (2 * ElectronMass) / ElementaryCharge

// KOf returns the wave number k in 1/m of a parabolic band of mass m (in m₀)
// at kinetic energy gammaEV (≥ 0) above its edge: ħ²k²/(2m) = γ.
func KOf(gammaEV, massM0 float64) float64 {
	if gammaEV <= 0 {
		return 0
	}
	return math.Sqrt(gammaEV * massM0 / HbarSqOver2M0EVm2)
}

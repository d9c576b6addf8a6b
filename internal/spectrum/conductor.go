// Package spectrum counts the electronic states and conduction modes of a
// conductor exactly: hard-wall (box), periodic (ring) or open axes, parabolic
// or Kane-nonparabolic valleys, and their degeneracies.
//
// The boundary condition only quantises the wave vector, so every count is
// done in γ-space, γ(E) = E(1 + αE) = Σᵢ ħ²kᵢ²/(2mᵢ) (Kane, J. Phys. Chem.
// Solids 1, 249 (1957)), which makes the parabolic and the Kane band exact
// alike. The level lattice is never enumerated state by state: counts walk
// its columns (see Counter).
package spectrum

import (
	"fmt"
	"math"
	"strings"

	"ringbox/internal/phys"
)

// BC is an axis's boundary condition.
type BC int

const (
	// Box is a pair of hard walls: standing waves, k = nπ/L, n = 1, 2, …
	Box BC = iota
	// Ring is periodic (Born–von Kármán): running waves, k = 2πn/L, n ∈ ℤ.
	Ring
	// Open is an axis long enough for k to be continuous; it keeps its
	// length so that counts stay extensive.
	Open
)

var bcNames = [...]string{Box: "box", Ring: "ring", Open: "open"}

func (b BC) String() string {
	if b < 0 || int(b) >= len(bcNames) {
		return fmt.Sprintf("BC(%d)", int(b))
	}
	return bcNames[b]
}

// ParseBC reads "box", "ring" or "open".
func ParseBC(s string) (BC, error) {
	for i, n := range bcNames {
		if strings.EqualFold(strings.TrimSpace(s), n) {
			return BC(i), nil
		}
	}
	return 0, fmt.Errorf("unknown boundary condition %q (use box, ring or open)", s)
}

// Axis is one direction of the conductor.
type Axis struct {
	LengthM float64
	BC      BC
}

// Valley is one conduction-band valley: masses along the conductor's x, y, z
// axes in m₀ and the number of equivalent valleys.
type Valley struct {
	Label      string
	MassM0     [3]float64
	Degeneracy int
}

// Conductor is everything the counts depend on.
type Conductor struct {
	Axes           []Axis // 1 to 3: x; x, y; x, y, z
	Valleys        []Valley
	SpinDegeneracy int     // g_s, 1 or 2
	AlphaPerEV     float64 // Kane nonparabolicity α ≥ 0
}

// Check reports a malformed conductor. Front ends validate user input with
// named keys first; this is the engine's own guard.
func (c Conductor) Check() error {
	if len(c.Axes) > 3 {
		return fmt.Errorf("spectrum: %d axes (at most 3)", len(c.Axes))
	}
	for i, a := range c.Axes {
		if !(a.LengthM > 0) || math.IsInf(a.LengthM, 0) {
			return fmt.Errorf("spectrum: axis %d length %g", i, a.LengthM)
		}
		if a.BC < Box || a.BC > Open {
			return fmt.Errorf("spectrum: axis %d boundary condition %d", i, a.BC)
		}
	}
	if len(c.Valleys) == 0 {
		return fmt.Errorf("spectrum: no valleys")
	}
	for _, v := range c.Valleys {
		for i := range c.Axes {
			if !(v.MassM0[i] > 0) || math.IsInf(v.MassM0[i], 0) {
				return fmt.Errorf("spectrum: valley %q mass %g", v.Label, v.MassM0[i])
			}
		}
		if v.Degeneracy < 1 {
			return fmt.Errorf("spectrum: valley %q degeneracy %d", v.Label, v.Degeneracy)
		}
	}
	if c.SpinDegeneracy < 1 {
		return fmt.Errorf("spectrum: spin degeneracy %d", c.SpinDegeneracy)
	}
	if !(c.AlphaPerEV >= 0) || math.IsInf(c.AlphaPerEV, 0) {
		return fmt.Errorf("spectrum: alpha %g", c.AlphaPerEV)
	}
	return nil
}

// WithBC returns the conductor with every axis that is not open set to bc:
// the "box" and "ring" variants every result is compared with.
func (c Conductor) WithBC(bc BC) Conductor {
	out := c.clone()
	for i := range out.Axes {
		if out.Axes[i].BC != Open {
			out.Axes[i].BC = bc
		}
	}
	return out
}

// Continuum returns the conductor with every axis open: the bulk reference.
func (c Conductor) Continuum() Conductor {
	out := c.clone()
	for i := range out.Axes {
		out.Axes[i].BC = Open
	}
	return out
}

// Transverse returns the conductor without axis along, whose states are the
// transverse modes of transport along that axis. Masses keep their axes.
func (c Conductor) Transverse(along int) Conductor {
	if along < 0 || along >= len(c.Axes) {
		panic("spectrum: transport axis out of range")
	}
	out := c.clone()
	out.Axes = append(out.Axes[:along:along], c.Axes[along+1:]...)
	for vi, v := range c.Valleys {
		var m [3]float64
		j := 0
		for i := range c.Axes {
			if i != along {
				m[j] = v.MassM0[i]
				j++
			}
		}
		out.Valleys[vi].MassM0 = m
	}
	return out
}

// Confined reports whether every axis is box or ring.
func (c Conductor) Confined() bool {
	for _, a := range c.Axes {
		if a.BC == Open {
			return false
		}
	}
	return true
}

// Edge returns the lowest energy that holds a state, in eV: the lowest level
// of every confined axis added up, lowest over the valleys (0 when no axis
// is confined). N(E) is zero below it.
func (c Conductor) Edge() float64 {
	edge := math.Inf(1)
	for _, v := range c.Valleys {
		g := 0.0
		for i, a := range c.Axes {
			switch a.BC {
			case Box:
				g += quantumEV(a, v.MassM0[i])
			}
		}
		edge = math.Min(edge, g)
	}
	if math.IsInf(edge, 1) {
		return 0
	}
	return Energy(edge, c.AlphaPerEV)
}

// Volume returns the product of the axis lengths in m^dims.
func (c Conductor) Volume() float64 {
	v := 1.0
	for _, a := range c.Axes {
		v *= a.LengthM
	}
	return v
}

// Degeneracy returns g_s·Σ g_v, the states per k point.
func (c Conductor) Degeneracy() int {
	g := 0
	for _, v := range c.Valleys {
		g += v.Degeneracy
	}
	return g * c.SpinDegeneracy
}

func (c Conductor) clone() Conductor {
	c.Axes = append([]Axis(nil), c.Axes...)
	c.Valleys = append([]Valley(nil), c.Valleys...)
	return c
}

// Gamma returns γ(E) = E(1 + αE) in eV, the energy the band would have if it
// were parabolic. Below the band edge (E < 0) it returns a negative number so
// that nothing is counted.
func Gamma(eEV, alphaPerEV float64) float64 {
	if eEV <= 0 {
		return eEV
	}
	return eEV * (1 + alphaPerEV*eEV)
}

// Energy inverts Gamma: E = (√(1 + 4αγ) − 1)/(2α), or γ when α = 0.
func Energy(gammaEV, alphaPerEV float64) float64 {
	if gammaEV <= 0 || alphaPerEV == 0 {
		return gammaEV
	}
	x := 4 * alphaPerEV * gammaEV
	// 2γ/(1 + √(1+x)) avoids cancellation for small αγ.
	return 2 * gammaEV / (1 + math.Sqrt(1+x))
}

// dGammadE returns dγ/dE = 1 + 2αE.
func dGammadE(eEV, alphaPerEV float64) float64 {
	if eEV <= 0 {
		return 1
	}
	return 1 + 2*alphaPerEV*eEV
}

// quantumEV returns ħ²(π/L)²/(2m) in eV for a box axis, the level scale
// ε_n = n²·quantumEV; a ring axis has four times it (k = 2πn/L).
func quantumEV(a Axis, massM0 float64) float64 {
	k := math.Pi / a.LengthM
	if a.BC == Ring {
		k *= 2
	}
	return phys.HbarSqOver2M0EVm2 * k * k / massM0
}

// Package smooth holds the reference counts that the exact staircase is
// compared with: the bulk continuum count and the smooth (Weyl) count with the
// boundary terms of hard walls.
package smooth

import (
	"math"
	"slices"

	"ringbox/internal/phys"
	"ringbox/internal/spectrum"
)

// Weyl returns the smooth count N̄(E) of c for its own boundary conditions
// and its derivative dN̄/dE (per eV), spin and valleys included.
//
// In lattice units each axis is a semi-axis of the constant-energy ellipsoid:
// kL/π for a box axis (n ≥ 1 only: half of the axis counts) and kL/(2π) for a
// ring or open axis. With B the box axes,
//
//	N̄ = Σ_{S⊆B} (−½)^|S| · (½)^|B∖S| · Vol_{d−|S|}(ellipsoid without the axes in S),
//
// which is Weyl's law with its boundary corrections (Weyl, Math. Ann. 71, 441
// (1912); Balian & Bloch, Ann. Phys. 60, 401 (1970); Baltes & Hilf, Spectra
// of Finite Systems (1976)): kL/π − ½ for a 1D box; A k²/4π − P k/4π + ¼ for
// a rectangle; V k³/6π² − S k²/16π + L_edges k/16π − ⅛ for a 3D box; the bulk
// term alone for rings. Anisotropic masses and the Kane band enter through
// kᵢ = √(2mᵢγ(E))/ħ. Below the band edge both are 0.
func Weyl(c spectrum.Conductor, eEV float64) (n, dndE float64) {
	g := spectrum.Gamma(eEV, c.AlphaPerEV)
	if g <= 0 {
		return 0, 0
	}
	for _, v := range c.Valleys {
		semi := make([]float64, len(c.Axes))
		var box []int
		for i, a := range c.Axes {
			k := phys.KOf(g, v.MassM0[i])
			if a.BC == spectrum.Box {
				semi[i] = k * a.LengthM / math.Pi
				box = append(box, i)
			} else {
				semi[i] = k * a.LengthM / (2 * math.Pi)
			}
		}
		d := len(c.Axes)
		var nv, dv float64
		// Each subset S of the box axes removes those axes from the volume.
		for mask := 0; mask < 1<<len(box); mask++ {
			removed := make(map[int]bool)
			for j, i := range box {
				if mask&(1<<j) != 0 {
					removed[i] = true
				}
			}
			s := len(removed)
			term := math.Pow(-0.5, float64(s)) * math.Pow(0.5, float64(len(box)-s)) * unitBall(d-s)
			for i := range c.Axes {
				if !removed[i] {
					term *= semi[i]
				}
			}
			nv += term
			// term ∝ γ^((d−s)/2)
			dv += term * float64(d-s) / (2 * g)
		}
		w := float64(c.SpinDegeneracy * v.Degeneracy)
		n += w * nv
		dndE += w * dv
	}
	return n, dndE * (1 + 2*c.AlphaPerEV*eEV)
}

// Continuum returns the bulk count N(E) and dN/dE with every axis open: per
// spin and valley (L/π)k, (A/4π)k² or (V/6π²)k³ with k of the geometric-mean
// mass (equivalently 2L·p/h, πA(p/h)², (4π/3)V(p/h)³).
func Continuum(c spectrum.Conductor, eEV float64) (n, dndE float64) {
	return Weyl(c.Continuum(), eEV)
}

// ContinuumModes returns the continuum number of modes for transport along
// axis along: the transverse axes counted as open, W·k/π or A·k²/4π per spin
// and valley, and g_s·g_v for a 1D conductor (Sharvin, JETP 21, 655 (1965)).
func ContinuumModes(c spectrum.Conductor, along int, eEV float64) float64 {
	t := c.Transverse(along)
	if len(t.Axes) == 0 {
		if eEV < 0 {
			return 0
		}
		return float64(c.Degeneracy())
	}
	n, _ := Continuum(t, eEV)
	return n
}

// WeylModes returns the smooth count of the transverse states along axis
// along, with the scenario's own boundary conditions.
func WeylModes(c spectrum.Conductor, along int, eEV float64) float64 {
	t := c.Transverse(along)
	if len(t.Axes) == 0 {
		if eEV < 0 {
			return 0
		}
		return float64(c.Degeneracy())
	}
	n, _ := Weyl(t, eEV)
	return n
}

// ErrorEstimate returns a bound on |N(E) − N̄(E)|, the lattice-point
// remainder left after Weyl's terms, for reporting with an asymptotic count.
// With the confined axes' lattice radii R₁ ≤ R₂ ≤ … (R = kL/π box, kL/2π
// ring) the remainder is the Euler–Maclaurin sawtooth of the sum over the
// thinnest axis of the count of the others, of size Π_{i≥2} Rᵢ / R₁^((d−1)/2):
// for an isotropic ellipsoid that is R^((d−1)/2) (Landau's bound for
// generic ellipsoids; Hardy's circle problem in 2D), and for a film or a
// wire it is the cross-section the thin axis cuts in steps, which no
// isotropic bound covers. A logarithmic allowance, 4(1 + ln R_max), covers
// the rational (degenerate) shapes such as cubes and cubic rings; the open
// axes multiply by their own volume factor; in 1D the remainder is below 1
// per spin and valley. The tests check the estimate against exact counts
// of films, lines, wires and cubes.
func ErrorEstimate(c spectrum.Conductor, eEV float64) float64 {
	g := spectrum.Gamma(eEV, c.AlphaPerEV)
	if g <= 0 {
		return 0
	}
	var est float64
	for _, v := range c.Valleys {
		var radii []float64
		open := 1.0
		do := 0
		for i, a := range c.Axes {
			k := phys.KOf(g, v.MassM0[i])
			switch a.BC {
			case spectrum.Box:
				radii = append(radii, math.Max(k*a.LengthM/math.Pi, 1))
			case spectrum.Ring:
				radii = append(radii, math.Max(k*a.LengthM/(2*math.Pi), 1))
			default:
				open *= k * a.LengthM / (2 * math.Pi)
				do++
			}
		}
		if len(radii) == 0 {
			continue
		}
		open *= unitBall(do)
		slices.Sort(radii)
		f := 1.0
		if dc := len(radii); dc > 1 {
			f = 4 * (1 + math.Log(radii[dc-1])) * math.Pow(radii[0], -float64(dc-1)/2)
			for _, r := range radii[1:] {
				f *= r
			}
		}
		est += float64(c.SpinDegeneracy*v.Degeneracy) * math.Max(open, 1) * f
	}
	return est
}

func unitBall(d int) float64 {
	return math.Pow(math.Pi, float64(d)/2) / math.Gamma(float64(d)/2+1)
}

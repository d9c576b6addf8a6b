// Package lattice computes the π bands of graphene ribbons and carbon
// nanotubes in the nearest-neighbour tight-binding model (one p_z orbital per
// carbon atom, hopping γ0 between neighbours a_cc apart, no overlap, on-site
// energy 0 so that E = 0 is the charge-neutrality point), and from them the
// density of states per unit length D(E), the number of conduction modes
// M(E), the gap, and the ballistic conductance at a Fermi level and
// temperature.
//
// Structures:
//   - armchair ribbons of N dimer lines, with analytic bands (Nakada et al.,
//     PRB 54, 17954 (1996); Brey & Fertig, PRB 73, 235411 (2006));
//   - zigzag ribbons of N zigzag chains, solved numerically as a symmetric
//     tridiagonal eigenproblem at each k (Fujita et al., J. Phys. Soc. Jpn.
//     65, 1920 (1996));
//   - (n, m) nanotubes by zone folding of the graphene π bands (Saito,
//     Dresselhaus & Dresselhaus, Physical Properties of Carbon Nanotubes
//     (Imperial College Press, 1998), ch. 3–4).
//
// Energies are in eV, lengths in nm, wave numbers along the axis in 1/nm.
package lattice

import (
	"fmt"
	"math"
)

// Structure names the kind of graphene conductor.
type Structure string

const (
	// Armchair is a ribbon with armchair edges, N dimer lines wide.
	Armchair Structure = "armchair"
	// Zigzag is a ribbon with zigzag edges, N zigzag chains wide.
	Zigzag Structure = "zigzag"
	// Tube is an (n, m) single-wall carbon nanotube.
	Tube Structure = "tube"
)

// Defaults of the model: the hopping and bond length most often quoted for
// graphene's π bands (Saito, Dresselhaus & Dresselhaus 1998, ch. 2; common
// practice).
const (
	DefaultGamma0EV = 2.7
	DefaultAccNM    = 0.142
)

// Bounds on the work one request may ask for. They keep the costliest
// request to about two seconds on one core (the (200, 199) tube, 238 802
// hexagons per cell, at the 15 k points the sample budget allows).
const (
	MaxLines    = 2000 // armchair dimer lines or zigzag chains
	MaxTubeN    = 200  // chiral index n of a tube ((200, 0): 15.7 nm, (200, 200): 27.1 nm)
	MinKPoints  = 3
	MaxKPoints  = 4001
	MaxPoints   = 20001 // energy-grid bins
	MaxAt       = 64    // point energies
	MaxEnergyEV = 40.0  // |emin|, |emax|, |ef|, |at| bound
	MaxTempK    = 5000.0

	// maxSamples bounds (bands with E ≥ 0) × (k points): memory of the sampled bands.
	maxSamples = 4_000_000
	// maxZigzagWork bounds N²·K for zigzag ribbons, the cost of the
	// tridiagonal solves (N = 200 chains over 1000 k points is 4·10⁷).
	maxZigzagWork = 2e8
)

// Params describes one lattice calculation. Use DefaultParams and change
// what differs; Validate reports the first bad field.
type Params struct {
	Structure Structure
	Lines     int // dimer lines (armchair) or zigzag chains (zigzag), 1…MaxLines
	N, M      int // tube chiral indices, 1 ≤ n ≤ MaxTubeN, 0 ≤ m ≤ n

	Gamma0EV float64 // nearest-neighbour hopping |γ0| in eV, (0, 20]
	AccNM    float64 // carbon–carbon distance in nm, [0.05, 1]
	Gs       int     // spin degeneracy, 1 or 2

	EFEV  float64   // Fermi level in eV, measured from charge neutrality
	TempK float64   // temperature in K, [0, MaxTempK]
	AtEV  []float64 // energies for point values (modes, DOS)

	EMinEV, EMaxEV float64 // energy grid of the DOS and modes curves
	Points         int     // number of energy bins, 2…MaxPoints
	KPoints        int     // k points across the Brillouin zone, odd, MinKPoints…MaxKPoints
}

// DefaultParams returns the N = 7 armchair ribbon with the default model
// and grids: γ0 = 2.7 eV, a_cc = 0.142 nm, g_s = 2, E_F = 0, T = 300 K,
// energies −3…3 eV in 600 bins, 401 k points.
func DefaultParams() Params {
	return Params{
		Structure: Armchair,
		Lines:     7,
		N:         10,
		M:         0,
		Gamma0EV:  DefaultGamma0EV,
		AccNM:     DefaultAccNM,
		Gs:        2,
		EFEV:      0,
		TempK:     300,
		EMinEV:    -3,
		EMaxEV:    3,
		Points:    600,
		KPoints:   401,
	}
}

// ParamError is a bad or too costly parameter. Field is the Params field's
// request key ("lines", "n", "m", "gamma0", "acc", "gs", "ef", "temp", "at",
// "emin", "emax", "points", "kpoints", "structure").
type ParamError struct {
	Field    string
	Msg      string
	TooLarge bool // the value is valid but the work it asks for is over budget
}

func (e *ParamError) Error() string { return "lattice: " + e.Field + ": " + e.Msg }

func bad(field, format string, args ...any) error {
	return &ParamError{Field: field, Msg: fmt.Sprintf(format, args...)}
}

func tooLarge(field, format string, args ...any) error {
	return &ParamError{Field: field, Msg: fmt.Sprintf(format, args...), TooLarge: true}
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// Validate checks every field and the work budget. K points must be odd so
// that the grid holds k = 0 and the zone edge, where ribbon bands have
// their extrema.
func (p Params) Validate() error {
	switch p.Structure {
	case Armchair, Zigzag:
		if p.Lines < 1 || p.Lines > MaxLines {
			return bad("lines", "must be an integer from 1 to %d, got %d", MaxLines, p.Lines)
		}
	case Tube:
		if p.N < 1 || p.N > MaxTubeN {
			return bad("n", "must be an integer from 1 to %d, got %d", MaxTubeN, p.N)
		}
		if p.M < 0 || p.M > p.N {
			return bad("m", "must be from 0 to n = %d (the (m, n) tube is the mirror image of (n, m)), got %d", p.N, p.M)
		}
	default:
		return bad("structure", "must be armchair, zigzag or tube, got %q", string(p.Structure))
	}
	if !finite(p.Gamma0EV) || p.Gamma0EV <= 0 || p.Gamma0EV > 20 {
		return bad("gamma0", "must be in (0, 20] eV, got %g", p.Gamma0EV)
	}
	if !finite(p.AccNM) || p.AccNM < 0.05 || p.AccNM > 1 {
		return bad("acc", "must be from 0.05 to 1 nm, got %g nm", p.AccNM)
	}
	if p.Gs != 1 && p.Gs != 2 {
		return bad("gs", "must be 1 or 2, got %d", p.Gs)
	}
	if !finite(p.EFEV) || math.Abs(p.EFEV) > MaxEnergyEV {
		return bad("ef", "must be within ±%g eV, got %g", MaxEnergyEV, p.EFEV)
	}
	if !finite(p.TempK) || p.TempK < 0 || p.TempK > MaxTempK {
		return bad("temp", "must be from 0 to %g K, got %g", MaxTempK, p.TempK)
	}
	if len(p.AtEV) > MaxAt {
		return bad("at", "at most %d energies, got %d", MaxAt, len(p.AtEV))
	}
	for _, e := range p.AtEV {
		if !finite(e) || math.Abs(e) > MaxEnergyEV {
			return bad("at", "energies must be within ±%g eV, got %g", MaxEnergyEV, e)
		}
	}
	if !finite(p.EMinEV) || math.Abs(p.EMinEV) > MaxEnergyEV {
		return bad("emin", "must be within ±%g eV, got %g", MaxEnergyEV, p.EMinEV)
	}
	if !finite(p.EMaxEV) || math.Abs(p.EMaxEV) > MaxEnergyEV {
		return bad("emax", "must be within ±%g eV, got %g", MaxEnergyEV, p.EMaxEV)
	}
	if p.EMaxEV <= p.EMinEV {
		return bad("emax", "must be above emin = %g eV, got %g", p.EMinEV, p.EMaxEV)
	}
	if p.Points < 2 || p.Points > MaxPoints {
		return bad("points", "must be from 2 to %d, got %d", MaxPoints, p.Points)
	}
	if p.KPoints < MinKPoints || p.KPoints > MaxKPoints || p.KPoints%2 == 0 {
		return bad("kpoints", "must be an odd integer from %d to %d, got %d", MinKPoints, MaxKPoints, p.KPoints)
	}
	nb := p.upperBands()
	if float64(nb)*float64(p.KPoints) > maxSamples {
		return tooLarge("kpoints", "%d bands × %d k points is over the budget of %d samples; use fewer k points or a smaller structure", 2*nb, p.KPoints, maxSamples)
	}
	if p.Structure == Zigzag && float64(p.Lines)*float64(p.Lines)*float64(p.KPoints) > maxZigzagWork {
		return tooLarge("kpoints", "a zigzag ribbon of %d chains over %d k points is over the budget (chains² × k points ≤ %g)", p.Lines, p.KPoints, maxZigzagWork)
	}
	return nil
}

// upperBands is the number of bands with E ≥ 0: half the atoms per unit
// cell (the π spectrum of a bipartite lattice is symmetric about E = 0).
func (p Params) upperBands() int {
	switch p.Structure {
	case Armchair, Zigzag:
		return p.Lines
	case Tube:
		_, _, nhex := tubeCell(p.N, p.M)
		return nhex
	}
	return 0
}

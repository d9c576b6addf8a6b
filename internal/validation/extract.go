package validation

import (
	"errors"
	"fmt"
	"math"

	"ringbox/internal/phys"
	"ringbox/internal/scenario"
	"ringbox/internal/spectrum"
)

// An extractor turns a count result into the number a check compares. arg
// is the text after "name:" in the table's read column (a variant name for
// some extractors, empty for others).
type extractor func(res *scenario.Result, arg string) (float64, error)

// extractors are the named reads of the table. Each one is a published
// relation applied to the engine's answer, so the check compares the
// engine with a printed value rather than the engine with itself.
var extractors = map[string]extractor{
	"nc":                 effectiveDensityOfStates,
	"fd_ratio":           fermiDiracRatio,
	"dos2d_per_cm2_meV":  dos2DPerCm2MeV,
	"sharvin_ratio":      sharvinRatio,
	"weyl_residual_mean": weylResidualMean,
}

// Extractors lists the extractor names, for documentation.
func Extractors() []string {
	return []string{"nc", "fd_ratio", "dos2d_per_cm2_meV", "sharvin_ratio", "weyl_residual_mean"}
}

// variant picks the variant named by arg (default "scenario").
func variant(res *scenario.Result, arg string) (scenario.Observables, error) {
	if arg == "" {
		arg = "scenario"
	}
	o, ok := res.Observables[arg]
	if !ok {
		return o, fmt.Errorf("read: no variant %q", arg)
	}
	return o, nil
}

// allOpen fails unless every axis of the scenario is open (a bulk check).
func allOpen(s scenario.Scenario, what string) error {
	if s.OpenAxes() != s.Dims {
		return fmt.Errorf("read: %s needs every axis open", what)
	}
	return nil
}

// effectiveDensityOfStates is the effective density of states N_c, in
// cm⁻³ (cm⁻² or cm⁻¹ in lower dimensions), from a bulk count at a
// non-degenerate Fermi level: in the Boltzmann limit n = N_c·e^(E_F/kT),
// so N_c = n·e^(−E_F/kT) (Sze & Ng, Physics of Semiconductor Devices,
// ch. 1). The error of the Boltzmann limit is about e^η/2^(3/2) relative
// (η = E_F/kT), 2×10⁻⁵ at η = −9.7; the check's E_F must be well below
// the band edge and T > 0.
func effectiveDensityOfStates(res *scenario.Result, arg string) (float64, error) {
	s := res.Input()
	if err := allOpen(s, "nc"); err != nil {
		return 0, err
	}
	kT := s.KTEV()
	if kT <= 0 || res.EFEV > -5*kT {
		return 0, errors.New("read: nc needs T > 0 and E_F at least 5 kT below the band edge")
	}
	o, err := variant(res, arg)
	if err != nil {
		return 0, err
	}
	return o.Density * math.Exp(-res.EFEV/kT), nil
}

// fermiDiracRatio is n/N_d, the carrier density of a bulk count divided by
// the effective density of states of d open dimensions,
//
//	N_d = g_s·Σ_valleys g_v·Π_i (m_i·kT/(2πħ²))^½,
//
// which is the Fermi–Dirac integral ℱ_(d/2−1)(E_F/kT): ℱ_½ in 3D, ℱ_0 in
// 2D, ℱ_−½ in 1D (DLMF §25.12(iii); Sze & Ng ch. 1). It needs a parabolic
// band (alpha = 0) and T > 0.
func fermiDiracRatio(res *scenario.Result, arg string) (float64, error) {
	s := res.Input()
	if err := allOpen(s, "fd_ratio"); err != nil {
		return 0, err
	}
	if s.AlphaPerEV != 0 || s.TempK <= 0 {
		return 0, errors.New("read: fd_ratio needs alpha = 0 and T > 0")
	}
	kTJ := s.KTEV() * phys.ElementaryCharge
	var nd float64
	for _, v := range s.Material.Valleys {
		f := float64(v.Degeneracy)
		for i := 0; i < s.Dims; i++ {
			m := v.MassM0[i] * phys.ElectronMass
			f *= math.Sqrt(m*kTJ/(2*math.Pi*phys.Hbar*phys.Hbar)) / 100 // 1/cm
		}
		nd += f
	}
	nd *= float64(s.GS)
	o, err := variant(res, arg)
	if err != nil {
		return 0, err
	}
	return o.Density / nd, nil
}

// dos2DPerCm2MeV is the scenario's density of states at the first `at`
// energy per unit area, in cm⁻²·meV⁻¹, for a conductor whose two axes are
// open (a quantum well's lowest subband: m*/(πħ²) with g_s = 2; common
// practice).
func dos2DPerCm2MeV(res *scenario.Result, _ string) (float64, error) {
	s := res.Input()
	if s.Dims != 2 {
		return 0, errors.New("read: dos2d_per_cm2_meV needs dims = 2")
	}
	if err := allOpen(s, "dos2d_per_cm2_meV"); err != nil {
		return 0, err
	}
	if len(res.At) == 0 {
		return 0, errors.New("read: dos2d_per_cm2_meV needs an `at` energy")
	}
	areaCm2 := s.LengthM[0] * s.LengthM[1] * 1e4
	return res.At[0].DOS["scenario"] / areaCm2 / 1000, nil
}

// sharvinRatio is the conductance of the named variant divided by
// Sharvin's contact conductance (Sharvin, Sov. Phys. JETP 21, 655 (1965)),
//
//	G_S = (g_s·e²/h)·Σ_valleys g_v·A·k_1·k_2/(4π),
//
// the number of transverse states of a cross-section A below k_F (for one
// isotropic valley and g_s = 2: (2e²/h)·k_F²A/(4π)), with k_i the Fermi
// wave numbers of the two transverse masses at γ(E_F). It needs dims = 3.
// The ratio is 1 for open transverse axes; for box axes it is below 1 by
// the Weyl perimeter term, P/(2k_F·A)·… (Balian & Bloch 1970), which
// vanishes as the contact widens.
func sharvinRatio(res *scenario.Result, arg string) (float64, error) {
	s := res.Input()
	if s.Dims != 3 {
		return 0, errors.New("read: sharvin_ratio needs dims = 3")
	}
	g := spectrum.Gamma(res.EFEV, s.AlphaPerEV)
	var modes float64
	area := 1.0
	for i := 0; i < 3; i++ {
		if i != s.Along {
			area *= s.LengthM[i]
		}
	}
	for _, v := range s.Material.Valleys {
		kk := float64(v.Degeneracy)
		for i := 0; i < 3; i++ {
			if i != s.Along {
				kk *= phys.KOf(g, v.MassM0[i])
			}
		}
		modes += kk * area / (4 * math.Pi)
	}
	gs := float64(s.GS) * phys.ConductanceQuantumPerSpin * modes
	if gs <= 0 {
		return 0, errors.New("read: sharvin_ratio needs E_F above the band edge")
	}
	o, err := variant(res, arg)
	if err != nil {
		return 0, err
	}
	return o.ConductanceS / gs, nil
}

// weylResidualMean is the mean over the energy grid of N(E) − N̄(E), the
// exact staircase of the scenario minus its smooth Weyl count with the
// boundary terms (Weyl, Math. Ann. 71, 441 (1912); Balian & Bloch, Ann.
// Phys. 60, 401 (1970)). The residual fluctuates about zero; without the
// boundary terms its mean would be the perimeter term, −P·k/(4π) per spin.
func weylResidualMean(res *scenario.Result, _ string) (float64, error) {
	if res.Method != "exact" {
		return 0, errors.New("read: weyl_residual_mean needs an exact count")
	}
	ex, sm := res.Curves.States["scenario"], res.Curves.States["smooth"]
	if len(ex) == 0 || len(ex) != len(sm) {
		return 0, errors.New("read: no state curves")
	}
	var sum float64
	for i := range ex {
		sum += ex[i] - sm[i]
	}
	return sum / float64(len(ex)), nil
}

// Package thermal provides Fermi–Dirac statistics and thermal averages of the
// curves the counting engines compute: the state count N(E) and the mode count
// M(E) of a conductor, which are non-decreasing staircases (or continuous when
// an axis is open).
//
// Energies are in eV and temperatures in K throughout. The thermal averages
// are Stieltjes integrals ∫ f dc and ∫ (−∂f/∂E) dc, evaluated by an adaptive
// cell scheme that brackets each cell's contribution rigorously, so isolated
// levels far apart compared with k_BT are as exact as dense ones (see
// Integrator).
package thermal

import (
	"errors"
	"fmt"
	"math"

	"ringbox/internal/phys"
)

// Errors returned by this package; test for them with errors.Is.
var (
	// ErrZeroTemperature: the quantity needs k_BT > 0 (Slope), or k_BT is
	// below the floating-point resolution of energies near E_F.
	ErrZeroTemperature = errors.New("thermal: temperature must be above zero")
	// ErrNegativeTemperature: k_BT < 0.
	ErrNegativeTemperature = errors.New("thermal: temperature must not be negative")
	// ErrNotFinite: an argument or a curve value is NaN or infinite.
	ErrNotFinite = errors.New("thermal: value is not finite")
	// ErrCurveDecreasing: a Curve returned a value below an earlier one at a
	// lower energy, beyond rounding.
	ErrCurveDecreasing = errors.New("thermal: curve decreases with energy")
	// ErrOutsideBracket: SolveFermiLevel's target is not reached between
	// the ends of the bracket.
	ErrOutsideBracket = errors.New("thermal: target density outside the bracket")
	// ErrBadBracket: SolveFermiLevel's bracket is empty or not finite.
	ErrBadBracket = errors.New("thermal: bad bracket")
)

// KT returns the thermal energy k_B·T in eV for a temperature tempK in K
// (k_B exact since the 2019 SI; CODATA 2018). tempK must be ≥ 0 and finite:
// KT panics otherwise, since a negative or NaN temperature reaching here is a
// programming error (user input is validated by the scenario package).
func KT(tempK float64) float64 {
	if !(tempK >= 0) || math.IsInf(tempK, 0) {
		panic(fmt.Sprintf("thermal: KT of temperature %g K", tempK))
	}
	return phys.BoltzmannEV * tempK
}

// FermiDirac returns the occupation f(E) = 1/(1 + exp((E − E_F)/k_BT)) of a
// level at eEV for Fermi level efEV and thermal energy kTEV (all eV).
//
// At kTEV = 0 it is the step f = 1 for E ≤ E_F and 0 above: a level exactly
// at E_F counts as occupied, matching the "≤" tie rule of the exact counts.
// The exponential is evaluated on the side where it cannot overflow, so the
// result lies in [0, 1] for every finite input. kTEV < 0 or NaN panics.
func FermiDirac(eEV, efEV, kTEV float64) float64 {
	if !(kTEV >= 0) {
		panic(fmt.Sprintf("thermal: FermiDirac with kT = %g", kTEV))
	}
	if kTEV == 0 {
		if eEV <= efEV {
			return 1
		}
		return 0
	}
	return logistic((eEV - efEV) / kTEV)
}

// logistic returns 1/(1 + e^x) without overflow.
func logistic(x float64) float64 {
	if x > 0 {
		e := math.Exp(-x)
		return e / (1 + e)
	}
	return 1 / (1 + math.Exp(x))
}

// Kernel returns the thermal broadening function −∂f/∂E =
// 1/(4k_BT·cosh²((E − E_F)/2k_BT)) in 1/eV, which integrates to 1 over E.
// It is written with e^(−|x|) so it neither overflows nor loses precision
// for |E − E_F| ≫ k_BT (it underflows smoothly to 0). kTEV must be > 0; it
// panics otherwise (the k_BT → 0 limit is a delta function, which callers
// handle as a point evaluation).
func Kernel(eEV, efEV, kTEV float64) float64 {
	if !(kTEV > 0) {
		panic(fmt.Sprintf("thermal: Kernel with kT = %g", kTEV))
	}
	e := math.Exp(-math.Abs((eEV - efEV) / kTEV))
	return e / ((1 + e) * (1 + e)) / kTEV
}

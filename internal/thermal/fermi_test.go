package thermal

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

func TestKT(t *testing.T) {
	// k_B = 8.617333262…×10⁻⁵ eV/K (CODATA 2018, exact in the SI).
	tests := []struct {
		name  string
		tempK float64
		want  float64
	}{
		{"zero", 0, 0},
		{"liquid helium", 4.2, 4.2 * 8.617333262e-5},
		{"room", 300, 0.02585199979},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := KT(tt.tempK); relErr(got, tt.want) > 1e-9 {
				t.Errorf("KT(%g) = %.12g, want %.12g", tt.tempK, got, tt.want)
			}
		})
	}
}

func TestKTPanicsOnNegative(t *testing.T) {
	defer func() {
		if recover() == nil {
			t.Error("KT(-1) did not panic")
		}
	}()
	KT(-1)
}

func TestFermiDirac(t *testing.T) {
	const ef, kT = 0.3, 0.025
	tests := []struct {
		name   string
		e, kT  float64
		want   float64
		relTol float64
	}{
		// T = 0 step with the "≤" tie rule (our convention, documented).
		{"T=0 below", 0.2, 0, 1, 0},
		{"T=0 at E_F", ef, 0, 1, 0},
		{"T=0 above", 0.3000001, 0, 0, 0},
		// f(E_F) = 1/2 (common practice).
		{"at E_F", ef, kT, 0.5, 0},
		// f = 1/(1+e) one kT above (definition).
		{"one kT above", ef + kT, kT, 1 / (1 + math.E), 1e-15},
		// Far tail: f ≈ e^(−x), no overflow (definition).
		{"1000 kT above", ef + 1000*kT, kT, 0, 0},
		{"30 kT above", ef + 30*kT, kT, math.Exp(-30) / (1 + math.Exp(-30)), 1e-14},
		{"1000 kT below", ef - 1000*kT, kT, 1, 0},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got := FermiDirac(tt.e, ef, tt.kT)
			if tt.relTol == 0 && got != tt.want || tt.relTol > 0 && relErr(got, tt.want) > tt.relTol {
				t.Errorf("f(%g) = %.17g, want %.17g", tt.e, got, tt.want)
			}
		})
	}
}

// The particle–hole symmetry f(E_F + x) + f(E_F − x) = 1 (common practice).
func TestFermiDiracSymmetry(t *testing.T) {
	for _, x := range []float64{0, 1e-9, 0.1, 1, 5, 36, 700, 1e6} {
		// E_F = 0 so that ±x are exact opposites in floating point.
		s := FermiDirac(x*0.01, 0, 0.01) + FermiDirac(-x*0.01, 0, 0.01)
		if math.Abs(s-1) > 1e-15 {
			t.Errorf("x=%g: f(+)+f(−) = %.17g", x, s)
		}
	}
}

func TestKernel(t *testing.T) {
	const ef, kT = -0.1, 0.0003
	// ∫(−∂f/∂E)dE = 1 (definition: f goes from 1 to 0), by gonum's
	// Gauss–Legendre rule over ±60 kT on 24 panels.
	sum := 0.0
	for p := -12; p < 12; p++ {
		a, b := ef+float64(p)*5*kT, ef+float64(p+1)*5*kT
		sum += quad.Fixed(func(e float64) float64 { return Kernel(e, ef, kT) }, a, b, 20, quad.Legendre{}, 0)
	}
	if math.Abs(sum-1) > 1e-13 {
		t.Errorf("∫ kernel dE = %.15g, want 1", sum)
	}
	// Kernel = −∂f/∂E by central differences (definition); peak 1/(4kT).
	// Far below E_F, f ≈ 1 and differences of f lose digits, so the rows
	// stay at x ≥ −2 there.
	for _, x := range []float64{0, 0.5, -2, 7, 20} {
		e, h := ef+x*kT, 1e-4*kT
		num := -(FermiDirac(e+h, ef, kT) - FermiDirac(e-h, ef, kT)) / (2 * h)
		if got := Kernel(e, ef, kT); relErr(got, num) > 1e-7 {
			t.Errorf("x=%g: Kernel = %g, −df/dE = %g", x, got, num)
		}
	}
	if got := Kernel(ef, ef, kT); got != 1/(4*kT) {
		t.Errorf("peak = %g, want %g", got, 1/(4*kT))
	}
	// Stability far out: finite, non-negative, symmetric.
	for _, x := range []float64{40, 700, 1e5, 1e300} {
		up, down := Kernel(ef+x*kT, ef, kT), Kernel(ef-x*kT, ef, kT)
		if math.IsNaN(up) || math.IsInf(up, 0) || up < 0 || up != down {
			t.Errorf("x=%g: kernel %g / %g", x, up, down)
		}
	}
	if got := Kernel(1e300, -1e300, 1e-300); got != 0 {
		t.Errorf("extreme kernel = %g, want 0", got)
	}
}

package thermal

import (
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/mathext"
)

// dirichletEta returns η(s) = Σ_{k≥0} (−1)^k/(k+1)^s by the alternating-series
// acceleration of Cohen, Rodriguez Villegas & Zagier (Exp. Math. 9, 3 (2000),
// Algorithm 1); 40 terms give ~1e-30. It is a reference independent of both
// gonum and the code under test, valid also for s < 1 where mathext.Zeta
// panics.
func dirichletEta(s float64) float64 {
	const n = 40
	d := math.Pow(3+math.Sqrt(8), n)
	d = (d + 1/d) / 2
	b, c, sum := -1.0, -d, 0.0
	for k := 0; k < n; k++ {
		c = b - c
		sum += c / math.Pow(float64(k+1), s)
		b = float64(k+n) * float64(k-n) * b / ((float64(k) + 0.5) * float64(k+1))
	}
	return sum / d
}

// polylogSeries returns ℱ_j(η) = Σ_{k≥1} (−1)^(k+1) e^(kη)/k^(j+1), the
// series of −Li_(j+1)(−e^η) (DLMF 25.12.10 with 25.12.16), for η < 0.
func polylogSeries(j, eta float64) float64 {
	sum := 0.0
	for k := 1; k < 2000; k++ {
		term := math.Exp(float64(k)*eta) / math.Pow(float64(k), j+1)
		if k%2 == 0 {
			term = -term
		}
		sum += term
		if math.Abs(term) < 1e-18*math.Abs(sum) {
			break
		}
	}
	return sum
}

func TestFermiDiracIntegralAtZero(t *testing.T) {
	tests := []struct {
		name    string
		j       float64
		printed float64 // DLMF §25.12(iii) / DESIGN check values, 6 decimals
		zeta    bool    // (1 − 2^(−j))ζ(j+1) by mathext.Zeta needs j+1 > 1
	}{
		{"j=-1/2", -0.5, 0.604899, false},
		{"j=1/2", 0.5, 0.765147, true},
		{"j=1", 1, math.Pi * math.Pi / 12, true}, // η(2) = π²/12, DLMF 25.2.? (from memory)
		{"j=3/2", 1.5, 0.867200, true},           // from memory
		{"j=-0.9", -0.9, math.NaN(), false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got := FermiDiracIntegral(tt.j, 0)
			if !math.IsNaN(tt.printed) && math.Abs(got-tt.printed) > 5e-7 {
				t.Errorf("ℱ(0) = %.9f, printed %.6f", got, tt.printed)
			}
			// ℱ_j(0) = η(j+1), the Dirichlet eta function (DLMF 25.12.16 at
			// z = −1 with 25.2.3); tolerance: quadrature ~1e-14.
			if want := dirichletEta(tt.j + 1); relErr(got, want) > 1e-13 {
				t.Errorf("ℱ(0) = %.16g, η(j+1) = %.16g", got, want)
			}
			// ℱ_j(0) = (1 − 2^(−j))ζ(j+1) with gonum's zeta.
			if tt.zeta {
				want := (1 - math.Pow(2, -tt.j)) * mathext.Zeta(tt.j+1, 1)
				if relErr(got, want) > 1e-13 {
					t.Errorf("ℱ(0) = %.16g, (1−2^−j)ζ(j+1) = %.16g", got, want)
				}
			}
		})
	}
}

// ℱ₀(η) = ln(1 + e^η) exactly (DLMF 25.12.14 integrated in closed form).
func TestFermiDiracIntegralOrderZero(t *testing.T) {
	for eta := -50.0; eta <= 50; eta += 0.7 {
		want := math.Max(eta, 0) + math.Log1p(math.Exp(-math.Abs(eta)))
		if got := FermiDiracIntegral(0, eta); relErr(got, want) > 1e-13 {
			t.Errorf("ℱ₀(%g) = %.16g, ln(1+e^η) = %.16g", eta, got, want)
		}
	}
}

// ℱ_1(η) = η²/2 + π²/6 − ℱ_1(−η), the inversion formula of the dilogarithm
// (DLMF 25.12.4), with ℱ_1(−η) from its series: an exact reference for η > 0.
func TestFermiDiracIntegralOrderOneInversion(t *testing.T) {
	for _, eta := range []float64{0.5, 2, 10, 33, 50} {
		want := eta*eta/2 + math.Pi*math.Pi/6 - polylogSeries(1, -eta)
		if got := FermiDiracIntegral(1, eta); relErr(got, want) > 1e-13 {
			t.Errorf("ℱ₁(%g) = %.16g, want %.16g", eta, got, want)
		}
	}
}

// The polylogarithm series for η < 0 (DLMF 25.12.10, 25.12.16) and the
// non-degenerate limit ℱ_j(η) → e^η (DLMF 25.12(iii)).
func TestFermiDiracIntegralNonDegenerate(t *testing.T) {
	for _, j := range []float64{-0.5, 0, 0.5, 1, 1.5} {
		for _, eta := range []float64{-0.5, -1, -3, -10, -25, -50} {
			t.Run(fmt.Sprintf("j=%g/eta=%g", j, eta), func(t *testing.T) {
				got := FermiDiracIntegral(j, eta)
				if want := polylogSeries(j, eta); relErr(got, want) > 1e-13 {
					t.Errorf("ℱ = %.16g, series %.16g", got, want)
				}
				// Limit: the first correction is −e^η/2^(j+1), so the ratio to
				// e^η is within e^η of 1.
				if eta <= -10 {
					if r := got / math.Exp(eta); math.Abs(r-1) > 2*math.Exp(eta)+1e-14 {
						t.Errorf("ℱ/e^η = %.16g", r)
					}
				}
			})
		}
	}
}

// The degenerate (Sommerfeld) limit ℱ_j(η) → η^(j+1)/Γ(j+2), and with its
// first correction (1 + (π²/6)·j(j+1)/η²) (DLMF 25.12(iii); Sommerfeld
// expansion, e.g. Ashcroft & Mermin eq. 2.70, from memory). Tolerance: the
// next term, (7π⁴/360)·(j+1)j(j−1)(j−2)/η⁴, is below 1e-6 at η = 50.
func TestFermiDiracIntegralDegenerate(t *testing.T) {
	for _, j := range []float64{-0.5, 0.5, 1.5} {
		for _, eta := range []float64{50, 200, 1e4} {
			t.Run(fmt.Sprintf("j=%g/eta=%g", j, eta), func(t *testing.T) {
				got := FermiDiracIntegral(j, eta)
				lead := math.Pow(eta, j+1) / math.Gamma(j+2)
				// The leading term alone is off by about the first correction.
				if relErr(got, lead) > 2*math.Pi*math.Pi/6*math.Abs(j*(j+1))/(eta*eta) {
					t.Errorf("ℱ = %.12g, leading term %.12g", got, lead)
				}
				two := lead * (1 + math.Pi*math.Pi/6*j*(j+1)/(eta*eta))
				if relErr(got, two) > 1e-6 {
					t.Errorf("ℱ = %.12g, two-term Sommerfeld %.12g", got, two)
				}
			})
		}
	}
}

// dℱ_j/dη = ℱ_(j−1) (DLMF 25.12(iii)), by central differences (h = 1e-4:
// truncation ~1e-9, rounding ~1e-12).
func TestFermiDiracIntegralDerivative(t *testing.T) {
	for _, j := range []float64{0.5, 1.5} {
		for _, eta := range []float64{-20, -2, 0, 1, 4, 30} {
			const h = 1e-4
			num := (FermiDiracIntegral(j, eta+h) - FermiDiracIntegral(j, eta-h)) / (2 * h)
			if got := FermiDiracIntegral(j-1, eta); relErr(got, num) > 1e-8 {
				t.Errorf("j=%g η=%g: ℱ_(j−1) = %.12g, dℱ_j/dη = %.12g", j, eta, got, num)
			}
		}
	}
}

func TestFermiDiracIntegralEdges(t *testing.T) {
	if got := FermiDiracIntegral(0.5, math.Inf(-1)); got != 0 {
		t.Errorf("ℱ(−∞) = %g", got)
	}
	if got := FermiDiracIntegral(0.5, math.Inf(1)); !math.IsInf(got, 1) {
		t.Errorf("ℱ(+∞) = %g", got)
	}
	if got := FermiDiracIntegral(0.5, math.NaN()); !math.IsNaN(got) {
		t.Errorf("ℱ(NaN) = %g", got)
	}
	for _, j := range []float64{-1, -2, math.NaN()} {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("j=%g did not panic", j)
				}
			}()
			FermiDiracIntegral(j, 0)
		}()
	}
}

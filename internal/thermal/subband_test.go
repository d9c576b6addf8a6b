package thermal

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// minusThreeHalves is an independent ℱ_{−3/2}(η) = dℱ_{−1/2}/dη =
// (2/√π)∫₀^∞ f(1 − f) du with f = 1/(1 + e^(u² − η)) (DLMF 25.12.15
// differentiated under the integral, t = u²), by gonum's Gauss–Legendre
// rule on panels of width 0.05 up to u² = η + 60.
func minusThreeHalves(eta float64) float64 {
	top := math.Sqrt(math.Max(eta, 0) + 60)
	s := 0.0
	for a := 0.0; a < top; a += 0.05 {
		s += quad.Fixed(func(u float64) float64 {
			f := logistic(u*u - eta)
			return f * (1 - f)
		}, a, a+0.05, 20, quad.Legendre{}, 0)
	}
	return 2 / math.Sqrt(math.Pi) * s
}

// The half-order integrals of a wire's subbands against the defining
// integral (FermiDiracIntegral, itself checked against DLMF), the series
// Σ(−1)^(k+1)e^(kη)/k^(j+1) (DLMF 25.12.10 with 25.12.16), the values at
// η = 0, ℱ_j(0) = −Li_(j+1)(−1) = η_D(j+1), the Dirichlet eta function
// (DLMF §25.12(ii), from memory), and
// an independent quadrature of ℱ_{−3/2}.
func TestFermiDiracMinusHalf(t *testing.T) {
	worst12, worst32 := 0.0, 0.0
	for eta := -45.0; eta < 3000; eta += 0.173 + math.Abs(eta)/50 {
		m12, m32 := FermiDiracMinusHalf(eta)
		worst12 = math.Max(worst12, relErr(m12, FermiDiracIntegral(-0.5, eta)))
		if eta < 200 {
			worst32 = math.Max(worst32, relErr(m32, minusThreeHalves(eta)))
		}
	}
	if worst12 > 1e-8 || worst32 > 1e-8 {
		t.Errorf("ℱ_{−1/2} worst relative error %.2g, ℱ_{−3/2} %.2g; want ≤ 1e-8", worst12, worst32)
	}
	m12, m32 := FermiDiracMinusHalf(0)
	if relErr(m12, dirichletEta(0.5)) > 1e-8 || relErr(m32, dirichletEta(-0.5)) > 1e-8 {
		t.Errorf("ℱ_{−1/2}(0) = %.12g, ℱ_{−3/2}(0) = %.12g; want η_D(1/2) = %.12g, η_D(−1/2) = %.12g",
			m12, m32, dirichletEta(0.5), dirichletEta(-0.5))
	}
	for _, eta := range []float64{-60, -41, -39, -10, -2} {
		m12, m32 := FermiDiracMinusHalf(eta)
		if relErr(m12, polylogSeries(-0.5, eta)) > 1e-8 || relErr(m32, polylogSeries(-1.5, eta)) > 1e-8 {
			t.Errorf("η = %g: got %.12g, %.12g; series %.12g, %.12g", eta, m12, m32, polylogSeries(-0.5, eta), polylogSeries(-1.5, eta))
		}
	}
	// Degenerate limits (the Sommerfeld expansion, common practice):
	// ℱ_{−1/2} → 2√η/√π, ℱ_{−3/2} → 1/√(πη), to (π²/24)/η² relative.
	for _, eta := range []float64{1e5, 1e8, 1e9} {
		m12, m32 := FermiDiracMinusHalf(eta)
		if relErr(m12, 2*math.Sqrt(eta/math.Pi)) > 1e-8 || relErr(m32, 1/math.Sqrt(math.Pi*eta)) > 1e-8 {
			t.Errorf("η = %g: got %.12g, %.12g (relative %.2g, %.2g)", eta, m12, m32,
				relErr(m12, 2*math.Sqrt(eta/math.Pi)), relErr(m32, 1/math.Sqrt(math.Pi*eta)))
		}
	}
}

// ℱ₁ against the defining integral and its value η_D(2) = π²/12 at 0
// (DLMF 25.2.3 with ζ(2) = π²/6).
func TestFermiDiracOne(t *testing.T) {
	for eta := -60.0; eta < 80; eta += 0.37 {
		if e := relErr(FermiDiracOne(eta), FermiDiracIntegral(1, eta)); e > 1e-13 {
			t.Errorf("ℱ₁(%g) = %.15g, integral %.15g", eta, FermiDiracOne(eta), FermiDiracIntegral(1, eta))
		}
	}
	if e := relErr(FermiDiracOne(0), math.Pi*math.Pi/12); e > 1e-15 {
		t.Errorf("ℱ₁(0) = %.17g, want π²/12", FermiDiracOne(0))
	}
}

// wireByParts is an independent G and S of a Kane wire subband: G =
// ∫ N(E)(−∂f/∂E) dE by parts, N = √(γ(E) − γₙ), with E = Eₙ + v², by
// gonum's Gauss–Legendre rule on narrow panels; S by central differences
// of G in E_F.
func wireByParts(alpha, ef, kT, en float64) (g, s float64) {
	gam := func(e float64) float64 { return e * (1 + alpha*e) }
	at := func(ef float64) float64 {
		top := math.Sqrt(math.Max(ef-en, 0) + 60*kT)
		step := 0.02 * math.Sqrt(kT)
		sum := 0.0
		for a := 0.0; a < top; a += step {
			sum += quad.Fixed(func(v float64) float64 {
				e := en + v*v
				x := (e - ef) / kT
				k := logistic(x) * logistic(-x) / kT
				return math.Sqrt(gam(e)-gam(en)) * k * 2 * v
			}, a, a+step, 16, quad.Legendre{}, 0)
		}
		return sum
	}
	h := 1e-3 * kT
	return at(ef), (at(ef+h) - at(ef-h)) / (2 * h)
}

// The Kane wire's tabulated edge function against the independent
// integration by parts, at random edges from far below E_F (the deep
// region) to the top of the window, for GaAs- and InSb-like α at 4 K,
// 77 K and 300 K. The stated accuracy: 1e-8 relative (S: 1e-6, the
// central difference's own error).
func TestKaneWireTable(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	ctx := context.Background()
	for _, alpha := range []float64{0.64, 4.1} {
		for _, kT := range []float64{KT(4), KT(77), KT(300)} {
			ef := 0.08
			top := ef + 17*kT
			sum, err := NewSubbandSum(ctx, 1, alpha, ef, kT, 0, top, 1<<30)
			if err != nil {
				t.Fatal(err)
			}
			if sum.tab == nil {
				t.Fatal("no table built")
			}
			for range 12 {
				en := rng.Float64() * top
				g, s := sum.At(en)
				wg, ws := wireByParts(alpha, ef, kT, en)
				if relErr(g, wg) > 1e-8 || relErr(s, ws) > 1e-6 {
					t.Errorf("α %g, kT %.3g, Eₙ %.6g: G %.12g S %.12g; by parts %.12g %.12g", alpha, kT, en, g, s, wg, ws)
				}
				// Integrated on its own, without the table.
				d, _ := NewSubbandSum(ctx, 1, alpha, ef, kT, 0, top, 0)
				dg, ds := d.At(en)
				if relErr(dg, wg) > 1e-9 || relErr(ds, ws) > 1e-6 {
					t.Errorf("α %g, kT %.3g, Eₙ %.6g: direct G %.12g S %.12g; by parts %.12g %.12g", alpha, kT, en, dg, ds, wg, ws)
				}
			}
		}
	}
}

// A film's subband (two open axes) against the same integration by parts
// with N = γ(E) − γₙ: G = c·k_BT·ℱ₀ + 2α(k_BT)²·ℱ₁ (DLMF 25.12.14 with the
// Kane dispersion, common practice).
func TestKaneFilmSubband(t *testing.T) {
	ctx := context.Background()
	for _, alpha := range []float64{0, 0.64} {
		kT := KT(300)
		ef := 0.1
		sum, _ := NewSubbandSum(ctx, 2, alpha, ef, kT, 0, 1, 1)
		for _, en := range []float64{0, 0.02, 0.1, 0.3} {
			gam := func(e float64) float64 { return e * (1 + alpha*e) }
			want := quad.Fixed(func(e float64) float64 {
				x := (e - ef) / kT
				return (gam(e) - gam(en)) * logistic(x) * logistic(-x) / kT
			}, en, en+ef+80*kT, 4000, quad.Legendre{}, 0)
			g, _ := sum.At(en)
			if relErr(g, want) > 1e-9 {
				t.Errorf("α %g, Eₙ %g: G %.12g, integral %.12g", alpha, en, g, want)
			}
		}
	}
}

func BenchmarkKaneWireTable(b *testing.B) {
	kT := KT(300)
	for b.Loop() {
		if _, err := NewSubbandSum(context.Background(), 1, 0.64, 0.05, kT, 0, 0.05+17*kT, 1<<30); err != nil {
			b.Fatal(err)
		}
	}
}

// OccupiedAndSlope's slope, summed on the cells the occupation refined,
// against the 3D band's closed forms: for c(E) = E^(3/2),
// ∫ f dc = (3/2)Γ(3/2)(k_BT)^(3/2)ℱ_{1/2}(η) and the slope
// (3/2)Γ(3/2)(k_BT)^(1/2)ℱ_{−1/2}(η) (DLMF 25.12.14), at the integrator
// caps the counts use, where it must be as good as a Slope refined on its
// own; and against a separate Slope on a dense staircase of random
// levels, within the two bounds. The occupation is Occupied's exactly.
func TestOccupiedAndSlope(t *testing.T) {
	ctx := context.Background()
	band := smooth(func(e float64) float64 {
		if e <= 0 {
			return 0
		}
		return e * math.Sqrt(e)
	})
	kT := KT(300)
	for _, ef := range []float64{-0.1, 0, 0.05, 0.5} {
		for _, evals := range []int{300, 2000} {
			in := Integrator{RelTol: 1e-6, MaxEvals: evals, HasEdge: true}
			occ, sl, err := in.OccupiedAndSlope(ctx, band, ef, kT)
			if err != nil {
				t.Fatal(err)
			}
			eta := ef / kT
			wantN := 1.5 * halfSqrtPi * math.Pow(kT, 1.5) * FermiDiracIntegral(0.5, eta)
			wantS := 1.5 * halfSqrtPi * math.Sqrt(kT) * FermiDiracIntegral(-0.5, eta)
			sep, err := in.Slope(ctx, band, ef, kT)
			if err != nil {
				t.Fatal(err)
			}
			// As accurate as a Slope refined on its own (or 1e-6).
			tol := math.Max(2*relErr(sep.Value, wantS), 1e-6)
			if o, _ := in.Occupied(ctx, band, ef, kT); occ.Value != o.Value || relErr(sl.Value, wantS) > tol {
				t.Errorf("E_F %g, %d evaluations: %.10g, %.10g; closed forms %.10g, %.10g; separate slope %.10g",
					ef, evals, occ.Value, sl.Value, wantN, wantS, sep.Value)
			}
		}
	}
	rng := rand.New(rand.NewPCG(3, 5))
	levels := make([]float64, 20000)
	jumps := make([]float64, len(levels))
	for i := range levels {
		levels[i] = 0.2 * rng.Float64()
		jumps[i] = float64(1 + rng.IntN(4))
	}
	st := newStaircase(levels, jumps)
	in := Integrator{RelTol: 1e-6, MaxEvals: 2000, HasEdge: true}
	_, sl, err := in.OccupiedAndSlope(ctx, st.curve, 0.1, kT)
	if err != nil {
		t.Fatal(err)
	}
	ref, err := Integrator{RelTol: 1e-9, MaxEvals: 200000, HasEdge: true}.Slope(ctx, st.curve, 0.1, kT)
	if err != nil {
		t.Fatal(err)
	}
	if d := math.Abs(sl.Value - ref.Value); d > sl.ErrBound+ref.ErrBound || d > 1e-4*ref.Value {
		t.Errorf("staircase slope %.10g ± %.2g, separate %.10g ± %.2g", sl.Value, sl.ErrBound, ref.Value, ref.ErrBound)
	}
}

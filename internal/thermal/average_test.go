package thermal

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"

	"ringbox/internal/phys"
)

// unitStep is c(E) = 1 for E ≥ at, else 0.
func unitStep(at float64) Curve {
	return newStaircase([]float64{at}, []float64{1}).curve
}

// ∫(−∂f/∂E)dE = 1 (definition): a unit step far below the window is fully
// occupied, and ∫ E (−∂f/∂E) dE = E_F by the symmetry of −∂f/∂E.
func TestOccupiedSumRules(t *testing.T) {
	ctx := context.Background()
	const ef, kT = 0.12, 0.0259
	v, bound, err := Occupied(ctx, unitStep(ef-50*kT), ef, kT)
	if err != nil || math.Abs(v-1) > 1e-15 || bound > 1e-15 {
		t.Errorf("step at E_F − 50kT: %.17g ± %g, %v; want 1", v, bound, err)
	}
	for _, efLin := range []float64{-0.3, 0, 0.12, 5} {
		e, err := Integrator{}.Occupied(ctx, smooth(func(e float64) float64 { return e }), efLin, kT)
		// The bound is rigorous for the window; the estimate itself is
		// exact here up to rounding because the weights are symmetric.
		if err != nil || math.Abs(e.Value-efLin) > e.ErrBound+1e-14 || math.Abs(e.Value-efLin) > 1e-12 {
			t.Errorf("c = E, E_F = %g: %.15g ± %g, %v", efLin, e.Value, e.ErrBound, err)
		}
	}
}

// A single level at E_l contributes f(E_l)·jump (definition of the
// Stieltjes integral ∫ f dc), to 1e-9 relative as the brief requires.
func TestOccupiedSingleStep(t *testing.T) {
	ctx := context.Background()
	const ef, kT, jump = 0.05, KTAt300K, 2.0 // e.g. a spin-degenerate level
	for _, x := range []float64{-35, -5, -1, -0.01, 0, 0.3, 2, 10, 25} {
		t.Run(fmt.Sprintf("x=%g", x), func(t *testing.T) {
			el := ef + x*kT
			c := newStaircase([]float64{el}, []float64{jump}).curve
			e, err := Integrator{}.Occupied(ctx, c, ef, kT)
			if err != nil {
				t.Fatal(err)
			}
			want := jump * FermiDirac(el, ef, kT)
			if relErr(e.Value, want) > 1e-9 || math.Abs(e.Value-want) > e.ErrBound {
				t.Errorf("Occupied = %.15g ± %g, f(E_l)·jump = %.15g", e.Value, e.ErrBound, want)
			}
			if !e.Converged || e.Evals > 200 {
				t.Errorf("converged %v after %d evaluations", e.Converged, e.Evals)
			}
			s, err := Integrator{}.Slope(ctx, c, ef, kT)
			if err != nil {
				t.Fatal(err)
			}
			// 2e-9: at x = −35 the absolute floor (1e-24·c/kT) takes over.
			if want := jump * Kernel(el, ef, kT); relErr(s.Value, want) > 2e-9 || math.Abs(s.Value-want) > s.ErrBound {
				t.Errorf("Slope = %.15g ± %g, kernel·jump = %.15g", s.Value, s.ErrBound, want)
			}
		})
	}
}

// KTAt300K is k_B·300 K in eV (CODATA 2018).
const KTAt300K = phys.BoltzmannEV * 300

// A few levels with random energies and degeneracies (seeded): Occupied is
// Σ g_l f(E_l) and Slope Σ g_l (−∂f/∂E)(E_l) (definition).
func TestOccupiedFewSteps(t *testing.T) {
	ctx := context.Background()
	rng := rand.New(rand.NewPCG(1, 2))
	for trial := range 20 {
		kT := KT(1 + 300*rng.Float64())
		ef := rng.Float64()
		n := 1 + rng.IntN(6)
		levels, jumps := make([]float64, n), make([]float64, n)
		var wantN, wantS float64
		for i := range n {
			levels[i] = ef + (rng.Float64()*30-15)*kT
			jumps[i] = float64(1 + rng.IntN(4))
			wantN += jumps[i] * FermiDirac(levels[i], ef, kT)
			wantS += jumps[i] * Kernel(levels[i], ef, kT)
		}
		c := newStaircase(levels, jumps).curve
		o, err := Integrator{}.Occupied(ctx, c, ef, kT)
		if err != nil || relErr(o.Value, wantN) > 1e-9 || !o.Converged {
			t.Errorf("trial %d: Occupied = %.15g ± %g (%d evals), want %.15g, %v", trial, o.Value, o.ErrBound, o.Evals, wantN, err)
		}
		s, err := Integrator{}.Slope(ctx, c, ef, kT)
		if err != nil || relErr(s.Value, wantS) > 1e-9 || !s.Converged {
			t.Errorf("trial %d: Slope = %.15g ± %g (%d evals), want %.15g, %v", trial, s.Value, s.ErrBound, s.Evals, wantS, err)
		}
	}
}

// 3D parabolic band: c(E) = C·E^(3/2) (E > 0) gives Occupied =
// C·(kT)^(3/2)·Γ(5/2)·ℱ_½(η), η = E_F/kT (e.g. Sze & Ng ch. 1; definition
// of ℱ_j in DLMF 25.12.14), checked also against gonum's Gauss–Legendre
// quadrature of ∫ c (−∂f/∂E) dE.
func TestOccupiedParabolicBand(t *testing.T) {
	ctx := context.Background()
	const C, kT = 3.7, 0.01
	band := func(e float64) float64 {
		if e <= 0 {
			return 0
		}
		return C * e * math.Sqrt(e)
	}
	for _, eta := range []float64{-10, -2, 0, 3, 15, 60} {
		t.Run(fmt.Sprintf("eta=%g", eta), func(t *testing.T) {
			ef := eta * kT
			e, err := Integrator{}.Occupied(ctx, smooth(band), ef, kT)
			if err != nil {
				t.Fatal(err)
			}
			want := C * math.Pow(kT, 1.5) * math.Gamma(2.5) * FermiDiracIntegral(0.5, eta)
			// The bound is rigorous (it dominates the true error) but loose
			// for a continuum, which refines to second order; the 1e-7
			// accuracy claim is checked separately.
			if d := math.Abs(e.Value - want); d > e.ErrBound || relErr(e.Value, want) > 1e-7 {
				t.Errorf("Occupied = %.15g ± %g, C(kT)^1.5Γ(5/2)ℱ_½ = %.15g (rel %g)", e.Value, e.ErrBound, want, relErr(e.Value, want))
			}
			// Independent quadrature with gonum's Gauss–Legendre rule on 64
			// panels in u = √E (smooth at the band edge, where E^(3/2) is
			// not): ∫ c(E)(−f′)dE over [max(0, E_F−60kT), E_F+60kT], and
			// c(lo)·(1 − f(lo)) for the fully occupied part below.
			lo, hi := math.Max(0, ef-60*kT), ef+60*kT
			ulo, uhi := math.Sqrt(lo), math.Sqrt(hi)
			sum := band(lo) * (1 - FermiDirac(lo, ef, kT))
			for p := range 64 {
				a, b := ulo+(uhi-ulo)*float64(p)/64, ulo+(uhi-ulo)*float64(p+1)/64
				sum += quad.Fixed(func(u float64) float64 { return band(u*u) * Kernel(u*u, ef, kT) * 2 * u }, a, b, 24, quad.Legendre{}, 0)
			}
			if relErr(e.Value, sum) > 1e-7 || relErr(want, sum) > 1e-11 {
				t.Errorf("Occupied = %.15g, ℱ-form %.15g, gonum quad %.15g", e.Value, want, sum)
			}
		})
	}
}

// Effective density of states of the silicon conduction band at 300 K,
// N_c ≈ 2.8×10¹⁹ cm⁻³ (Sze & Ng, Physics of Semiconductor Devices, 3rd ed.,
// Appendix G), from the 3D continuum count per volume with six valleys,
// m_d = (m_l m_t²)^(1/3), m_l = 0.98, m_t = 0.19 (Sze & Ng), g_s = 2: in the
// non-degenerate regime n = N_c·e^η.
func TestSiliconEffectiveDensityOfStates(t *testing.T) {
	const ml, mt, gv, gs = 0.98, 0.19, 6, 2
	md := math.Cbrt(ml*mt*mt) * phys.ElectronMass
	perM3 := func(eEV float64) float64 {
		if eEV <= 0 {
			return 0
		}
		p := math.Sqrt(2 * md * eEV * phys.ElementaryCharge) // ħk in kg·m/s
		return gs * gv / (6 * math.Pi * math.Pi) * math.Pow(p/phys.Hbar, 3)
	}
	kT := KT(300)
	const eta = -10.0
	n, bound, err := Occupied(context.Background(), smooth(perM3), eta*kT, kT)
	if err != nil {
		t.Fatal(err)
	}
	nc := n * 1e-6 / math.Exp(eta) // cm⁻³
	t.Logf("N_c = %.4g cm⁻³", nc)
	if relErr(nc, 2.8e19) > 0.03 {
		t.Errorf("N_c = %.4g cm⁻³ (± %.2g), want 2.8e19 within 3%%", nc, bound*1e-6/math.Exp(eta))
	}
	// Cross-check with the closed form N_c = 2 g_v (2π m_d kT/h²)^(3/2)
	// (Sze & Ng eq. 1.19) times ℱ_½(η)/e^η.
	closed := 2 * gv * math.Pow(2*math.Pi*md*kT*phys.ElementaryCharge/(phys.PlanckH*phys.PlanckH), 1.5) * 1e-6
	if want := closed * FermiDiracIntegral(0.5, eta) / math.Exp(eta); relErr(nc, want) > 1e-7 {
		t.Errorf("N_c = %.8g, closed form %.8g", nc, want)
	}
}

// Zero temperature: exactly c(E_F) from one evaluation, a level at E_F
// counted (the "≤" rule); and continuity as kT → 0.
func TestOccupiedZeroTemperature(t *testing.T) {
	ctx := context.Background()
	st := newStaircase([]float64{0.1, 0.2, 0.2, 0.35}, []float64{2, 1, 1, 4})
	var evals, calls int
	c := counted(st.curve, &evals, &calls)
	for _, tt := range []struct {
		ef, want float64
	}{{0.05, 0}, {0.1, 2}, {0.19999, 2}, {0.2, 4}, {0.5, 8}} {
		evals = 0
		v, bound, err := Occupied(ctx, c, tt.ef, 0)
		if err != nil || v != tt.want || bound != 0 || evals != 1 {
			t.Errorf("T=0, E_F=%g: %g ± %g (%d evals), %v; want %g", tt.ef, v, bound, evals, err, tt.want)
		}
	}
	// kT → 0 with levels away from E_F: tends to c(E_F).
	for _, kT := range []float64{1e-3, 1e-6, 1e-12, 1e-30} {
		v, _, err := Occupied(ctx, st.curve, 0.3, kT)
		if err != nil || math.Abs(v-4) > 1e-9 {
			t.Errorf("kT=%g: %g, %v; want 4", kT, v, err)
		}
	}
	band := smooth(func(e float64) float64 { return math.Max(e, 0) * math.Sqrt(math.Max(e, 0)) })
	for _, kT := range []float64{1e-4, 1e-8, 1e-14} {
		v, _, err := Occupied(ctx, band, 1, kT)
		if err != nil || math.Abs(v-1) > 1e-7 {
			t.Errorf("E^1.5 at kT=%g: %.15g, %v; want 1", kT, v, err)
		}
	}
}

// Slope of c = E^(3/2) at small kT tends to dc/dE = 1.5·E_F^(1/2), with the
// Sommerfeld correction (π²/6)(kT)²·c”'(E_F) (e.g. Ashcroft & Mermin eq.
// 2.70, from memory); the next term, (7π⁴/360)(kT)⁴c⁽⁵⁾, is below 1e-12
// relative here.
func TestSlopeSmallTemperature(t *testing.T) {
	ctx := context.Background()
	band := smooth(func(e float64) float64 { return math.Max(e, 0) * math.Sqrt(math.Max(e, 0)) })
	const kT = 1e-4
	for _, ef := range []float64{0.04, 0.5, 2} {
		v, bound, err := Slope(ctx, band, ef, kT)
		limit := 1.5 * math.Sqrt(ef)
		want := limit - math.Pi*math.Pi/6*kT*kT*0.375/(ef*math.Sqrt(ef))
		if err != nil || relErr(v, want) > 1e-9 || relErr(v, limit) > 3e-6 {
			t.Errorf("E_F=%g: Slope %.12g ± %g, want %.12g (limit %.12g), %v", ef, v, bound, want, limit, err)
		}
	}
	if _, _, err := Slope(ctx, band, 0.5, 0); !errors.Is(err, ErrZeroTemperature) {
		t.Errorf("Slope at T=0: %v, want ErrZeroTemperature", err)
	}
	if _, _, err := Slope(ctx, band, 0.5, 1e-30); !errors.Is(err, ErrZeroTemperature) {
		t.Errorf("Slope at kT below resolution: %v, want ErrZeroTemperature", err)
	}
}

// Slope = d Occupied/dE_F (definition), by central differences on seeded
// random curves: a staircase plus a continuum.
func TestSlopeIsDerivativeOfOccupied(t *testing.T) {
	ctx := context.Background()
	rng := rand.New(rand.NewPCG(7, 11))
	for trial := range 6 {
		kT := KT(20 + 300*rng.Float64())
		n := 3 + rng.IntN(20)
		levels, jumps := make([]float64, n), make([]float64, n)
		for i := range n {
			levels[i], jumps[i] = rng.Float64()*0.4, float64(1+rng.IntN(3))
		}
		st := newStaircase(levels, jumps)
		a := 5 + 20*rng.Float64()
		curve := func(ctx context.Context, es, out []float64) error {
			if err := st.curve(ctx, es, out); err != nil {
				return err
			}
			for i, e := range es {
				out[i] += a * math.Max(e, 0)
			}
			return nil
		}
		ef := 0.05 + 0.3*rng.Float64()
		h := 1e-2 * kT
		up, _, err1 := Occupied(ctx, curve, ef+h, kT)
		down, _, err2 := Occupied(ctx, curve, ef-h, kT)
		s, bound, err3 := Slope(ctx, curve, ef, kT)
		if err := errors.Join(err1, err2, err3); err != nil {
			t.Fatal(err)
		}
		// Tolerance: truncation (h/kT)²/6·|c'''| ~ 2e-5 relative, plus
		// Occupied's 1e-9 relative divided by 2h.
		num := (up - down) / (2 * h)
		if relErr(s, num) > 1e-4 {
			t.Errorf("trial %d: Slope %.10g ± %g, numerical dOccupied/dE_F %.10g", trial, s, bound, num)
		}
	}
}

func TestOccupiedErrors(t *testing.T) {
	ctx := context.Background()
	decreasing := smooth(func(e float64) float64 { return -e })
	nan := smooth(func(e float64) float64 {
		if e > 0.1 {
			return math.NaN()
		}
		return 0
	})
	failing := func(context.Context, []float64, []float64) error { return errors.New("table missing") }
	cancelled, cancel := context.WithCancel(ctx)
	cancel()
	tests := []struct {
		name    string
		ctx     context.Context
		c       Curve
		ef, kT  float64
		wantErr error
	}{
		{"decreasing", ctx, decreasing, 0, 0.01, ErrCurveDecreasing},
		{"NaN value", ctx, nan, 0.1, 0.01, ErrNotFinite},
		{"NaN E_F", ctx, unitStep(0), math.NaN(), 0.01, ErrNotFinite},
		{"infinite kT", ctx, unitStep(0), 0, math.Inf(1), ErrNotFinite},
		{"negative kT", ctx, unitStep(0), 0, -0.01, ErrNegativeTemperature},
		{"cancelled", cancelled, unitStep(0), 0, 0.01, context.Canceled},
		{"cancelled at T=0", cancelled, unitStep(0), 0, 0, context.Canceled},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if _, _, err := Occupied(tt.ctx, tt.c, tt.ef, tt.kT); !errors.Is(err, tt.wantErr) {
				t.Errorf("Occupied: %v, want %v", err, tt.wantErr)
			}
			if tt.kT != 0 {
				if _, _, err := Slope(tt.ctx, tt.c, tt.ef, tt.kT); !errors.Is(err, tt.wantErr) {
					t.Errorf("Slope: %v, want %v", err, tt.wantErr)
				}
			}
		})
	}
	if _, _, err := Occupied(ctx, failing, 0, 0.01); err == nil || err.Error() != "thermal: curve: table missing" {
		t.Errorf("curve error: %v", err)
	}
}

// Cancellation mid-refinement: the curve cancels the context on its third
// batch; the integral must stop with ctx.Err().
func TestOccupiedCancelledMidway(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	calls := 0
	st := newStaircase([]float64{0.01, 0.02}, []float64{1, 1})
	c := func(ctx context.Context, es, out []float64) error {
		calls++
		if calls == 3 {
			cancel()
		}
		return st.curve(ctx, es, out)
	}
	if _, _, err := Occupied(ctx, c, 0.015, 0.001); !errors.Is(err, context.Canceled) {
		t.Errorf("got %v, want context.Canceled", err)
	}
	if calls > 3 {
		t.Errorf("curve called %d times after cancellation", calls)
	}
}

// The evaluation cap holds, and on a dense staircase the reported bound
// still dominates the true error.
func TestOccupiedEvaluationCap(t *testing.T) {
	levels, jumps := make([]float64, 3000), make([]float64, 3000)
	var want float64
	const ef, kT = 0.5, 0.02
	for i := range levels {
		levels[i], jumps[i] = float64(i)/3000, 1
		want += FermiDirac(levels[i], ef, kT)
	}
	var evals, calls int
	c := counted(newStaircase(levels, jumps).curve, &evals, &calls)
	in := Integrator{MaxEvals: 5000}
	e, err := in.Occupied(context.Background(), c, ef, kT)
	if err != nil {
		t.Fatal(err)
	}
	if evals != e.Evals || evals > in.MaxEvals {
		t.Errorf("%d evaluations (reported %d), cap %d", evals, e.Evals, in.MaxEvals)
	}
	if math.Abs(e.Value-want) > e.ErrBound {
		t.Errorf("Occupied %.12g ± %g, exact %.12g", e.Value, e.ErrBound, want)
	}
	t.Logf("dense: %d evaluations in %d batches, error %.3g, bound %.3g, converged %v",
		evals, calls, e.Value-want, e.ErrBound, e.Converged)
}

// FuzzOccupiedStaircase: for any few levels (energies within ±60 kT of E_F,
// degeneracies 0–3) the results match Σ g f(E_l) and Σ g (−∂f/∂E)(E_l)
// within the reported bounds (definition of the Stieltjes sums).
func FuzzOccupiedStaircase(f *testing.F) {
	f.Add([]byte{128, 1, 10, 2, 250, 3}, uint16(300))
	f.Add([]byte{0, 3, 255, 3, 128, 0}, uint16(4))
	f.Fuzz(func(t *testing.T, data []byte, tempK uint16) {
		if tempK == 0 || len(data) > 16 {
			return
		}
		const ef = 0.2
		kT := KT(float64(tempK))
		var levels, jumps []float64
		// Levels beyond the ±40 kT window are dropped by design; each
		// carries a weight below e^(−40) (Occupied) or e^(−40)/kT (Slope).
		var wantN, wantS, outside float64
		for i := 0; i+1 < len(data); i += 2 {
			e := ef + (float64(data[i])-127.5)/127.5*60*kT
			g := float64(data[i+1] % 4)
			levels, jumps = append(levels, e), append(jumps, g)
			wantN += g * FermiDirac(e, ef, kT)
			wantS += g * Kernel(e, ef, kT)
			outside += g * math.Exp(-DefaultWindowKT)
		}
		c := newStaircase(levels, jumps).curve
		o, err := Integrator{}.Occupied(context.Background(), c, ef, kT)
		if err != nil {
			t.Fatal(err)
		}
		if d := math.Abs(o.Value - wantN); d > o.ErrBound+outside+1e-14*(1+wantN) {
			t.Errorf("Occupied %.17g ± %g, exact %.17g", o.Value, o.ErrBound, wantN)
		}
		s, err := Integrator{}.Slope(context.Background(), c, ef, kT)
		if err != nil {
			t.Fatal(err)
		}
		if d := math.Abs(s.Value - wantS); d > s.ErrBound+outside/kT+1e-14*(1+wantS) {
			t.Errorf("Slope %.17g ± %g, exact %.17g", s.Value, s.ErrBound, wantS)
		}
	})
}

// Boltzmann tail: from the band edge the density keeps its relative accuracy
// however far E_F lies below it, n = N_c·ℱ_½(η) → N_c·e^η (Sze & Ng,
// Physics of Semiconductor Devices, 3rd ed., eq. 1.19 and the
// non-degenerate limit), for η down to −200 at the relative tolerance 1e-6
// a scenario asks for.
func TestOccupiedBoltzmannTail(t *testing.T) {
	ctx := context.Background()
	const C, kT = 3.7, 0.0259
	band := func(e float64) float64 {
		if e <= 0 {
			return 0
		}
		return C * e * math.Sqrt(e)
	}
	in := Integrator{RelTol: 1e-6, MaxEvals: 2000, Edge: 0, HasEdge: true}
	for _, eta := range []float64{-200, -60, -41, -10, -1, 0, 5, 30} {
		e, err := in.Occupied(ctx, smooth(band), eta*kT, kT)
		if err != nil {
			t.Fatal(err)
		}
		want := C * math.Pow(kT, 1.5) * math.Gamma(2.5) * FermiDiracIntegral(0.5, eta)
		if eta < -30 {
			// ℱ_½(η) = e^η to 1e-13 there (DLMF 25.12.14 series).
			want = C * math.Pow(kT, 1.5) * math.Gamma(2.5) * math.Exp(eta)
		}
		if relErr(e.Value, want) > 1e-6 {
			t.Errorf("η = %g: Occupied = %.10g, N_c·ℱ_½(η) = %.10g (rel %.2g)", eta, e.Value, want, relErr(e.Value, want))
		}
		s, err := in.Slope(ctx, smooth(band), eta*kT, kT)
		if err != nil {
			t.Fatal(err)
		}
		// d/dE_F of the same: C(kT)^½Γ(5/2)ℱ_{−½}(η) (DLMF 25.12.15).
		wantS := C * math.Sqrt(kT) * math.Gamma(2.5) * FermiDiracIntegral(-0.5, eta)
		if eta < -30 {
			wantS = C * math.Sqrt(kT) * math.Gamma(2.5) * math.Exp(eta)
		}
		if relErr(s.Value, wantS) > 1e-6 {
			t.Errorf("η = %g: Slope = %.10g, want %.10g (rel %.2g)", eta, s.Value, wantS, relErr(s.Value, wantS))
		}
	}
}

// TestWindow: the range an average reads (identity with the Integrator's
// documentation): E_F ± W·k_BT, from the edge when it is inside, and
// nothing once the occupation at the edge underflows (708 k_BT).
func TestWindow(t *testing.T) {
	const kT = 0.025
	w := WindowFor(1e-6) * kT
	for _, tt := range []struct {
		edge, lo, hi  float64
		atEdge, empty bool
	}{
		{-1, -w, w, false, false},
		{0.1, 0.1, 0.1 + w, true, false},
		{-w / 2, -w / 2, w, true, false},
		{709 * kT, 0, 0, true, true},
	} {
		in := Integrator{RelTol: 1e-6, Edge: tt.edge, HasEdge: true}
		lo, hi, atEdge, empty := in.Window(0, kT)
		if math.Abs(lo-tt.lo) > 1e-15 || math.Abs(hi-tt.hi) > 1e-15 || atEdge != tt.atEdge || empty != tt.empty {
			t.Errorf("edge %g: window (%g, %g) atEdge %v empty %v, want %+v", tt.edge, lo, hi, atEdge, empty, tt)
		}
	}
	if _, _, _, empty := (Integrator{Edge: 0.1, HasEdge: true}).Window(0, 0); !empty {
		t.Error("T = 0 below the edge reads something")
	}
}

package thermal

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"testing"
)

// Round trip E_F → density → E_F on seeded random curves: a random
// staircase of levels plus a parabolic continuum (so the density is
// strictly increasing), at random temperatures (identity; common practice).
func TestSolveFermiLevelRoundTrip(t *testing.T) {
	ctx := context.Background()
	rng := rand.New(rand.NewPCG(3, 5))
	for trial := range 12 {
		n := 1 + rng.IntN(30)
		levels, jumps := make([]float64, n), make([]float64, n)
		for i := range n {
			levels[i], jumps[i] = rng.Float64()*0.5, float64(1+rng.IntN(4))
		}
		st := newStaircase(levels, jumps)
		a := 1 + 100*rng.Float64()
		curve := func(ctx context.Context, es, out []float64) error {
			if err := st.curve(ctx, es, out); err != nil {
				return err
			}
			for i, e := range es {
				if e > 0 {
					out[i] += a * e * math.Sqrt(e)
				}
			}
			return nil
		}
		kT := KT([]float64{4, 77, 300}[trial%3])
		// A lower evaluation cap keeps the test fast: the continuum part
		// never meets the rigorous 1e-9 bound, but its estimate is good to
		// ~1e-8 relative at 3000 evaluations.
		in := Integrator{MaxEvals: 3000}
		calls := 0
		density := func(ctx context.Context, ef float64) (float64, error) {
			calls++
			e, err := in.Occupied(ctx, curve, ef, kT)
			return e.Value, err
		}
		ef := 0.02 + 0.45*rng.Float64()
		target, err := density(ctx, ef)
		if err != nil {
			t.Fatal(err)
		}
		got, err := SolveFermiLevel(ctx, density, target, -0.5, 1.5)
		// Tolerance: the density is known to ~1e-9 relative and
		// d ln n/dE_F ≥ ~1/E_F, so E_F is recovered to ≲1e-9 eV; 1e-8 allows
		// for flat stretches of the staircase.
		if err != nil || math.Abs(got-ef) > 1e-8 {
			t.Errorf("trial %d (kT=%.3g): E_F = %.12g, want %.12g, %v", trial, kT, got, ef, err)
		}
		t.Logf("trial %d: %d density evaluations, |ΔE_F| = %.2g eV", trial, calls-1, math.Abs(got-ef))
	}
}

// At T = 0 the density is a staircase; a target inside a jump returns the
// energy of that level (the bracket closes on the discontinuity), and the
// number of evaluations stays within bisection's.
func TestSolveFermiLevelStaircase(t *testing.T) {
	ctx := context.Background()
	st := newStaircase([]float64{0.1, 0.25, 0.4}, []float64{2, 2, 4})
	calls := 0
	density := func(ctx context.Context, ef float64) (float64, error) {
		calls++
		v, _, err := Occupied(ctx, st.curve, ef, 0)
		return v, err
	}
	for _, tt := range []struct{ target, want float64 }{{1, 0.1}, {3, 0.25}, {5, 0.4}, {7.5, 0.4}} {
		calls = 0
		got, err := SolveFermiLevel(ctx, density, tt.target, 0, 1)
		if err != nil || math.Abs(got-tt.want) > 2e-12 {
			t.Errorf("target %g: E_F = %.15g, want %g, %v", tt.target, got, tt.want, err)
		}
		// ⌈log₂(1/2e-12)⌉ + 1 ITP steps, plus the two ends.
		if calls > 41+1+2 {
			t.Errorf("target %g: %d density evaluations", tt.target, calls)
		}
	}
}

// A smooth density converges superlinearly: n = E^(3/2) (ITP paper's claim;
// Oliveira & Takahashi 2020).
func TestSolveFermiLevelSmooth(t *testing.T) {
	calls := 0
	density := func(_ context.Context, ef float64) (float64, error) {
		calls++
		return ef * math.Sqrt(math.Abs(ef)), nil
	}
	got, err := SolveFermiLevel(context.Background(), density, 0.125, 0, 3)
	if err != nil || math.Abs(got-0.25) > 1e-12 {
		t.Errorf("E_F = %.15g, want 0.25, %v", got, err)
	}
	if calls > 15 {
		t.Errorf("%d evaluations for a smooth density", calls)
	}
}

var errNoLevels = errors.New("no levels")

func TestSolveFermiLevelErrors(t *testing.T) {
	linear := func(_ context.Context, ef float64) (float64, error) { return ef, nil }
	failing := func(context.Context, float64) (float64, error) { return 0, errNoLevels }
	nan := func(context.Context, float64) (float64, error) { return math.NaN(), nil }
	cancelled, cancel := context.WithCancel(context.Background())
	cancel()
	bg := context.Background()
	tests := []struct {
		name           string
		ctx            context.Context
		density        func(context.Context, float64) (float64, error)
		target, lo, hi float64
		wantErr        error
	}{
		{"below bracket", bg, linear, -2, -1, 1, ErrOutsideBracket},
		{"above bracket", bg, linear, 2, -1, 1, ErrOutsideBracket},
		{"reversed bracket", bg, linear, 0, 1, -1, ErrBadBracket},
		{"NaN bracket", bg, linear, 0, math.NaN(), 1, ErrBadBracket},
		{"infinite bracket", bg, linear, 0, -1, math.Inf(1), ErrBadBracket},
		{"NaN target", bg, linear, math.NaN(), -1, 1, ErrNotFinite},
		{"NaN density", bg, nan, 0, -1, 1, ErrNotFinite},
		{"cancelled", cancelled, linear, 0, -1, 1, context.Canceled},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if _, err := SolveFermiLevel(tt.ctx, tt.density, tt.target, tt.lo, tt.hi); !errors.Is(err, tt.wantErr) {
				t.Errorf("got %v, want %v", err, tt.wantErr)
			}
		})
	}
	if _, err := SolveFermiLevel(bg, failing, 0, -1, 1); !errors.Is(err, errNoLevels) {
		t.Errorf("density error not wrapped: %v", err)
	}
	// Exact hits at the ends return the end.
	if got, err := SolveFermiLevel(bg, linear, 1, -1, 1); got != 1 || err != nil {
		t.Errorf("target at hi: %g, %v", got, err)
	}
}

// Cancellation during the search: the density cancels on its fifth call and
// the solver returns ctx.Err() at once.
func TestSolveFermiLevelCancelledMidway(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	calls := 0
	density := func(ctx context.Context, ef float64) (float64, error) {
		calls++
		if calls == 5 {
			cancel()
		}
		return ef, nil
	}
	_, err := SolveFermiLevel(ctx, density, 0.3, 0, 1)
	if err != context.Canceled {
		t.Errorf("got %v, want context.Canceled itself", err)
	}
	if calls != 5 {
		t.Errorf("%d calls, want 5", calls)
	}
}

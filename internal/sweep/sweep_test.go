package sweep

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"sync/atomic"
	"testing"
	"time"
)

func TestLogGrid(t *testing.T) {
	tests := []struct {
		name      string
		from, to  float64
		steps     int
		wantErr   error
		wantRatio float64 // constant ratio of neighbours
	}{
		{"decade in 11", 1, 10, 11, nil, math.Pow(10, 0.1)},
		{"two ends", 5e-9, 80e-9, 2, nil, 16},
		{"max steps", 1, 2, MaxSteps, nil, math.Pow(2, 1.0/(MaxSteps-1))},
		{"one step", 1, 2, 1, ErrSteps, 0},
		{"too many", 1, 2, MaxSteps + 1, ErrSteps, 0},
		{"reversed", 2, 1, 5, ErrRange, 0},
		{"equal", 2, 2, 5, ErrRange, 0},
		{"zero", 0, 1, 5, ErrRange, 0},
		{"NaN", math.NaN(), 1, 5, ErrRange, 0},
		{"Inf", 1, math.Inf(1), 5, ErrRange, 0},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			g, err := LogGrid(tt.from, tt.to, tt.steps)
			if tt.wantErr != nil {
				if !errors.Is(err, tt.wantErr) {
					t.Fatalf("err = %v, want %v", err, tt.wantErr)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if len(g) != tt.steps || g[0] != tt.from || g[len(g)-1] != tt.to {
				t.Fatalf("grid %v: want %d steps from %g to %g exactly", g, tt.steps, tt.from, tt.to)
			}
			// Log spacing: every neighbour ratio equals (to/from)^(1/(steps−1)).
			for i := 1; i < len(g); i++ {
				if r := g[i] / g[i-1]; math.Abs(r-tt.wantRatio) > 1e-12*tt.wantRatio {
					t.Errorf("ratio %d = %.15g, want %.15g", i, r, tt.wantRatio)
				}
			}
		})
	}
}

func TestDeviation(t *testing.T) {
	tests := []struct {
		name    string
		v, ref  float64
		want    float64
		wantNaN bool
	}{
		{"above", 1.1, 1, 0.1, false},
		{"below", 0.5, 2, -0.75, false},
		{"negative reference", -1.5, -1, -0.5, false},
		{"both zero", 0, 0, 0, false},
		{"zero reference", 1, 0, 0, true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got := Deviation(tt.v, tt.ref)
			if tt.wantNaN {
				if !math.IsNaN(got) {
					t.Errorf("Deviation(%g, %g) = %g, want NaN", tt.v, tt.ref, got)
				}
				return
			}
			if math.Abs(got-tt.want) > 1e-15 {
				t.Errorf("Deviation(%g, %g) = %g, want %g", tt.v, tt.ref, got, tt.want)
			}
		})
	}
}

func TestCrossover(t *testing.T) {
	nan := math.NaN()
	sizes := []float64{1, 2, 4, 8, 16}
	tests := []struct {
		name   string
		sizes  []float64
		dev    []float64
		tol    float64
		want   float64
		wantOK bool
	}{
		{"decaying", sizes, []float64{0.5, 0.2, 0.08, 0.03, 0.01}, 0.05, 8, true},
		{"tol is inclusive", sizes, []float64{0.5, 0.2, 0.05, 0.03, 0.01}, 0.05, 4, true},
		{"re-entry beyond tol", sizes, []float64{0.01, 0.2, 0.01, 0.06, 0.01}, 0.05, 16, true},
		{"all within", sizes, []float64{0.01, -0.02, 0.01, 0, 0}, 0.05, 1, true},
		{"never", sizes, []float64{0.5, 0.4, 0.3, 0.2, 0.1}, 0.05, 0, false},
		{"largest NaN", sizes, []float64{0, 0, 0, 0, nan}, 0.05, 0, false},
		{"NaN breaks the run", sizes, []float64{0, nan, 0, 0, 0}, 0.05, 4, true},
		{"sign ignored", sizes, []float64{-0.5, -0.2, -0.04, 0.03, -0.01}, 0.05, 4, true},
		{"unsorted sizes", []float64{16, 1, 8, 2, 4}, []float64{0.01, 0.5, 0.03, 0.2, 0.08}, 0.05, 8, true},
		{"negative tol", sizes, []float64{0, 0, 0, 0, 0}, -1, 0, false},
		{"empty", nil, nil, 0.05, 0, false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got, ok := Crossover(tt.sizes, tt.dev, tt.tol)
			if ok != tt.wantOK || got != tt.want {
				t.Errorf("Crossover = %g, %v; want %g, %v", got, ok, tt.want, tt.wantOK)
			}
		})
	}
}

// TestCrossoverMonotoneInTol checks, on seeded random deviations, that a
// smaller tolerance never gives a smaller crossover (an identity of the
// definition), and that every size at or above the crossover is within tol.
func TestCrossoverMonotoneInTol(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	sizes, _ := LogGrid(1, 100, 30)
	for trial := range 200 {
		dev := make([]float64, len(sizes))
		for i, l := range sizes {
			dev[i] = (rng.Float64()*2 - 1) / l * 3 // decays like 1/L with noise
		}
		prev, prevOK := 0.0, true
		for _, tol := range []float64{1, 0.3, 0.1, 0.03, 0.01, 0.003} {
			c, ok := Crossover(sizes, dev, tol)
			if ok {
				for i, l := range sizes {
					if l >= c && math.Abs(dev[i]) > tol {
						t.Fatalf("trial %d tol %g: size %g ≥ crossover %g has |dev| %g", trial, tol, l, c, dev[i])
					}
				}
			}
			if ok && (!prevOK || c < prev) {
				t.Fatalf("trial %d: crossover %g at tol %g is below %g (ok %v) at a larger tol", trial, c, tol, prev, prevOK)
			}
			prev, prevOK = c, ok
		}
	}
}

func TestMap(t *testing.T) {
	t.Run("all steps once, progress in order", func(t *testing.T) {
		const n = 50
		var hits [n]atomic.Int32
		var seen []int
		err := Map(context.Background(), n, 2, func(ctx context.Context, i int) error {
			hits[i].Add(1)
			return nil
		}, func(done, total int) {
			if total != n {
				t.Errorf("total = %d", total)
			}
			seen = append(seen, done)
		})
		if err != nil {
			t.Fatal(err)
		}
		for i := range hits {
			if hits[i].Load() != 1 {
				t.Errorf("step %d ran %d times", i, hits[i].Load())
			}
		}
		for i, d := range seen {
			if d != i+1 {
				t.Fatalf("progress %v is not 1…%d", seen, n)
			}
		}
	})
	t.Run("bounded workers", func(t *testing.T) {
		var running, peak atomic.Int32
		err := Map(context.Background(), 20, 2, func(ctx context.Context, i int) error {
			r := running.Add(1)
			for {
				p := peak.Load()
				if r <= p || peak.CompareAndSwap(p, r) {
					break
				}
			}
			time.Sleep(time.Millisecond)
			running.Add(-1)
			return nil
		}, nil)
		if err != nil {
			t.Fatal(err)
		}
		if p := peak.Load(); p > 2 {
			t.Errorf("%d steps ran at once, want ≤ 2", p)
		}
	})
	t.Run("first error stops the rest", func(t *testing.T) {
		boom := errors.New("boom")
		var ran atomic.Int32
		err := Map(context.Background(), 1000, 2, func(ctx context.Context, i int) error {
			ran.Add(1)
			if i == 3 {
				return boom
			}
			return nil
		}, nil)
		if !errors.Is(err, boom) {
			t.Fatalf("err = %v", err)
		}
		if r := ran.Load(); r > 20 {
			t.Errorf("%d steps ran after the failure at step 3", r)
		}
	})
	t.Run("cancellation stops the workers", func(t *testing.T) {
		ctx, cancel := context.WithCancel(context.Background())
		var ran atomic.Int32
		err := Map(ctx, 1000, 2, func(ctx context.Context, i int) error {
			if ran.Add(1) == 5 {
				cancel()
			}
			select { // a step that honours its context inside
			case <-ctx.Done():
				return ctx.Err()
			case <-time.After(time.Millisecond):
				return nil
			}
		}, nil)
		if !errors.Is(err, context.Canceled) {
			t.Fatalf("err = %v, want context.Canceled", err)
		}
		if r := ran.Load(); r > 10 {
			t.Errorf("%d steps started; cancellation after 5 should stop them", r)
		}
	})
	t.Run("canceled before start", func(t *testing.T) {
		ctx, cancel := context.WithCancel(context.Background())
		cancel()
		var ran atomic.Int32
		err := Map(ctx, 10, 2, func(ctx context.Context, i int) error { ran.Add(1); return nil }, nil)
		if !errors.Is(err, context.Canceled) || ran.Load() != 0 {
			t.Errorf("err = %v, ran = %d", err, ran.Load())
		}
	})
	t.Run("zero steps", func(t *testing.T) {
		if err := Map(context.Background(), 0, 0, func(context.Context, int) error { return nil }, nil); err != nil {
			t.Error(err)
		}
	})
}

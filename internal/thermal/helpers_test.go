package thermal

import (
	"context"
	"fmt"
	"slices"
)

// staircase is a test Curve: c(E) = Σ jumps of the levels at or below E
// (right-continuous, the "≤" tie rule).
type staircase struct {
	levels, jumps []float64 // levels ascending
}

func newStaircase(levels, jumps []float64) staircase {
	idx := make([]int, len(levels))
	for i := range idx {
		idx[i] = i
	}
	slices.SortFunc(idx, func(a, b int) int {
		switch {
		case levels[a] < levels[b]:
			return -1
		case levels[a] > levels[b]:
			return 1
		}
		return 0
	})
	s := staircase{}
	for _, i := range idx {
		s.levels = append(s.levels, levels[i])
		s.jumps = append(s.jumps, jumps[i])
	}
	return s
}

func (s staircase) curve(ctx context.Context, energies, out []float64) error {
	if err := ctx.Err(); err != nil {
		return err
	}
	k, acc := 0, 0.0
	for i, e := range energies {
		if i > 0 && e < energies[i-1] {
			return fmt.Errorf("energies not ascending: %g after %g", e, energies[i-1])
		}
		for k < len(s.levels) && s.levels[k] <= e {
			acc += s.jumps[k]
			k++
		}
		out[i] = acc
	}
	return nil
}

// smooth wraps a function of energy as a Curve, checking the batch order.
func smooth(f func(float64) float64) Curve {
	return func(ctx context.Context, energies, out []float64) error {
		if err := ctx.Err(); err != nil {
			return err
		}
		for i, e := range energies {
			if i > 0 && e < energies[i-1] {
				return fmt.Errorf("energies not ascending: %g after %g", e, energies[i-1])
			}
			out[i] = f(e)
		}
		return nil
	}
}

// counted wraps a Curve and counts its evaluations and calls.
func counted(c Curve, evals, calls *int) Curve {
	return func(ctx context.Context, energies, out []float64) error {
		*evals += len(energies)
		*calls++
		return c(ctx, energies, out)
	}
}

func relErr(got, want float64) float64 {
	if want == 0 {
		return abs(got)
	}
	return abs(got/want - 1)
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

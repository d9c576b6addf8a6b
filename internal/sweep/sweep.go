// Package sweep holds the size-sweep algorithms that do not depend on what
// is swept: the logarithmic grid of sizes, relative deviations from a
// reference, crossover detection, and a bounded worker pool that runs the
// steps with cancellation and progress.
//
// The request side (which lengths of a scenario change and which observable
// is read) lives in internal/scenario (sweep.go there); this package knows
// only numbers, so the engines' packages never import the request model.
package sweep

import (
	"errors"
	"fmt"
	"math"
	"slices"
)

// Limits of a grid.
const (
	MinSteps = 2
	MaxSteps = 200
)

// Errors of LogGrid, wrapped with the offending values.
var (
	ErrSteps = errors.New("sweep: steps out of range")
	ErrRange = errors.New("sweep: sizes must be positive, finite and increasing")
)

// LogGrid returns steps sizes from from to to (both included), evenly spaced
// in log(size): size_i = from·(to/from)^(i/(steps−1)). The ends are exactly
// from and to. It needs 0 < from < to, both finite, and MinSteps ≤ steps ≤
// MaxSteps; otherwise it returns ErrRange or ErrSteps.
func LogGrid(from, to float64, steps int) ([]float64, error) {
	if steps < MinSteps || steps > MaxSteps {
		return nil, fmt.Errorf("%w: %d (%d to %d)", ErrSteps, steps, MinSteps, MaxSteps)
	}
	if !(from > 0 && to > from) || math.IsInf(to, 0) {
		return nil, fmt.Errorf("%w: from %g to %g", ErrRange, from, to)
	}
	out := make([]float64, steps)
	r := math.Log(to / from)
	for i := range out {
		out[i] = from * math.Exp(r*float64(i)/float64(steps-1))
	}
	out[0], out[steps-1] = from, to
	return out, nil
}

// Deviation is the relative deviation (value − reference)/|reference|.
// When the reference is zero it is 0 if value is zero too (both counts
// empty agree) and NaN otherwise (no relative scale exists); NaN never
// counts as within a tolerance.
func Deviation(value, reference float64) float64 {
	if reference == 0 {
		if value == 0 {
			return 0
		}
		return math.NaN()
	}
	return (value - reference) / math.Abs(reference)
}

// Deviations applies Deviation element by element; values and reference
// must have equal length (programmer misuse panics).
func Deviations(values, reference []float64) []float64 {
	if len(values) != len(reference) {
		panic("sweep: values and reference differ in length")
	}
	out := make([]float64, len(values))
	for i := range values {
		out[i] = Deviation(values[i], reference[i])
	}
	return out
}

// Crossover returns the crossover size: the smallest swept size L* such
// that |deviation| ≤ tol at L* and at every larger swept size. ok is false
// when there is none, that is when the deviation at the largest size is
// beyond tol (or NaN). sizes need not be sorted; sizes and deviations must
// have equal length (programmer misuse panics). A negative or NaN tol
// admits nothing.
//
// As tol shrinks the set of sizes that qualify can only lose its smallest
// members, so the crossover moves to larger sizes or stays (or vanishes).
func Crossover(sizes, deviations []float64, tol float64) (size float64, ok bool) {
	if len(sizes) != len(deviations) {
		panic("sweep: sizes and deviations differ in length")
	}
	idx := make([]int, len(sizes))
	for i := range idx {
		idx[i] = i
	}
	slices.SortStableFunc(idx, func(a, b int) int {
		switch {
		case sizes[a] < sizes[b]:
			return -1
		case sizes[a] > sizes[b]:
			return 1
		}
		return 0
	})
	for k := len(idx) - 1; k >= 0; k-- {
		d := deviations[idx[k]]
		if !(math.Abs(d) <= tol) {
			break
		}
		size, ok = sizes[idx[k]], true
	}
	return size, ok
}

package smooth

import "math"

// envelopePoints is the grid of Monotone, uniform in √E.
const envelopePoints = 4096

// Monotone returns the smallest non-decreasing, non-negative function that
// is at least f on [0, topEV], where f is smooth: the Weyl counts of hard
// walls dip below zero and fall just above the band edge (the constant and
// perimeter terms win there), which no count can do, and thermal averages
// need a non-decreasing curve.
//
// The running maximum of f is tabulated on a grid uniform in √E and
// interpolated linearly, which keeps it non-decreasing; above the last grid
// point where f still falls, f itself is returned. The interpolation error
// there is below f″·h²/8, about 1e-7 of the count at the top.
func Monotone(f func(eEV float64) float64, topEV float64) func(eEV float64) float64 {
	if !(topEV > 0) {
		return func(e float64) float64 { return math.Max(f(e), 0) }
	}
	h := math.Sqrt(topEV) / envelopePoints
	run := make([]float64, envelopePoints+1)
	last := 0 // last grid index where f fell
	prev := math.Inf(-1)
	best := 0.0
	for i := range run {
		u := h * float64(i)
		v := f(u * u)
		if v < prev {
			last = i
		}
		prev = v
		best = math.Max(best, v)
		run[i] = best
	}
	uStar := h * float64(last)
	floor := run[last]
	return func(e float64) float64 {
		if e < 0 {
			return 0
		}
		u := math.Sqrt(e)
		if u >= uStar {
			return math.Max(f(e), floor)
		}
		x := u / h
		i := int(x)
		t := x - float64(i)
		return run[i]*(1-t) + run[i+1]*t
	}
}

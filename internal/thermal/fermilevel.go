package thermal

import (
	"context"
	"fmt"
	"math"
)

// fermiLevelTolEV is the half-width, in eV (relative above 1 eV), at which
// SolveFermiLevel stops: far below any thermal or level spacing of interest.
const fermiLevelTolEV = 1e-12

// SolveFermiLevel finds E_F in [loEV, hiEV] (eV) with density(E_F) = target,
// for a density non-decreasing in E_F (for example Occupied of N(E) over a
// volume). It uses the ITP method (Oliveira & Takahashi, ACM Trans. Math.
// Softw. 47(1), 5 (2020)): regula falsi steps, truncated and projected so
// the bracket never shrinks slower than bisection. It converges
// superlinearly on smooth densities and still needs at most
// ⌈log₂((hi−lo)/2ε)⌉ + 1 evaluations on staircases (T = 0), where a target
// inside a jump returns the energy of the jump. It stops when the bracket is
// within ε = 1e-12·max(1, |E|) eV.
//
// Errors: ErrBadBracket (lo > hi or not finite), ErrNotFinite (target or a
// density value), ErrOutsideBracket (target < density(lo) or >
// density(hi)), the density's own error, and ctx.Err() on cancellation.
func SolveFermiLevel(ctx context.Context, density func(ctx context.Context, efEV float64) (float64, error), target, loEV, hiEV float64) (float64, error) {
	if math.IsNaN(loEV) || math.IsNaN(hiEV) || math.IsInf(loEV, 0) || math.IsInf(hiEV, 0) || loEV > hiEV {
		return 0, fmt.Errorf("thermal: bracket [%g, %g] eV: %w", loEV, hiEV, ErrBadBracket)
	}
	if math.IsNaN(target) || math.IsInf(target, 0) {
		return 0, fmt.Errorf("thermal: target density %g: %w", target, ErrNotFinite)
	}
	g := func(e float64) (float64, error) {
		if err := ctx.Err(); err != nil {
			return 0, err
		}
		d, err := density(ctx, e)
		if err != nil {
			if ctxErr := ctx.Err(); ctxErr != nil {
				return 0, ctxErr
			}
			return 0, fmt.Errorf("thermal: density at E_F = %g eV: %w", e, err)
		}
		if math.IsNaN(d) || math.IsInf(d, 0) {
			return 0, fmt.Errorf("thermal: density at E_F = %g eV is %g: %w", e, d, ErrNotFinite)
		}
		return d - target, nil
	}
	a, b := loEV, hiEV
	ya, err := g(a)
	if err != nil {
		return 0, err
	}
	if ya >= 0 {
		if ya == 0 {
			return a, nil
		}
		return 0, fmt.Errorf("thermal: target %g is below the density %g at %g eV: %w", target, ya+target, a, ErrOutsideBracket)
	}
	yb, err := g(b)
	if err != nil {
		return 0, err
	}
	if yb <= 0 {
		if yb == 0 {
			return b, nil
		}
		return 0, fmt.Errorf("thermal: target %g is above the density %g at %g eV: %w", target, yb+target, b, ErrOutsideBracket)
	}

	eps := fermiLevelTolEV * math.Max(1, math.Max(math.Abs(a), math.Abs(b)))
	// ITP parameters: κ₁ = 0.2/(b−a), κ₂ = 2, n₀ = 1 (the authors' defaults).
	kappa1 := 0.2 / (b - a)
	nMax := int(math.Ceil(math.Log2((b-a)/(2*eps)))) + 1
	for j := 0; b-a > 2*eps; j++ {
		mid := 0.5 * (a + b)
		r := math.Ldexp(eps, nMax-j) - 0.5*(b-a)
		delta := kappa1 * (b - a) * (b - a)
		xf := (yb*a - ya*b) / (yb - ya) // regula falsi
		sigma := math.Copysign(1, mid-xf)
		xt := mid
		if delta <= math.Abs(mid-xf) {
			xt = xf + sigma*delta
		}
		x := xt
		if math.Abs(xt-mid) > r {
			x = mid - sigma*math.Max(r, 0)
		}
		if !(x > a && x < b) { // rounding at the last bits: bisect
			x = mid
			if !(x > a && x < b) {
				break
			}
		}
		y, err := g(x)
		if err != nil {
			return 0, err
		}
		switch {
		case y > 0:
			b, yb = x, y
		case y < 0:
			a, ya = x, y
		default:
			return x, nil
		}
	}
	return 0.5 * (a + b), nil
}

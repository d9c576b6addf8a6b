package thermal

import (
	"context"
	"fmt"
	"math"
	"slices"
	"sort"
	"sync"
)

// A subband of a conductor with d open axes holds N(γ) = (γ − γₙ)^(d/2)
// states per unit weight above its edge γₙ, where γ(E) = E(1 + αE) is the
// Kane dispersion (α = 0: parabolic). At (E_F, T) its electrons are
// G = ∫ f dN and its share of the quantum capacitance S = ∂G/∂E_F =
// ∫ (−∂f/∂E) dN. Both depend on the subband only through its edge energy
// Eₙ, which is what makes a conductor with open axes cost one evaluation
// per subband instead of one curve evaluation per quadrature node.
//
// Closed forms (DLMF §25.12; Blakemore, Solid-State Electron. 25, 1067
// (1982) for the normalisation), with δ = (E_F − Eₙ)/k_BT, c = 1 + 2αEₙ:
//
//	d = 0:  G = f(Eₙ),                                      S = f(1 − f)/k_BT
//	d = 1:  G = (√π/2)·√k_BT·ℱ_{−1/2}(δ)  (α = 0),          S = (√π/2)·ℱ_{−3/2}(δ)/√k_BT
//	d = 2:  G = c·k_BT·ℱ₀(δ) + 2α(k_BT)²·ℱ₁(δ),             S = c·ℱ_{−1}(δ) + 2α·k_BT·ℱ₀(δ)
//
// with ℱ₀ = ln(1 + e^δ), ℱ_{−1} the logistic function and ℱ₁ = −Li₂(−e^δ).
// A Kane wire (d = 1, α > 0) has no closed form: its G and S are tabulated
// once per (E_F, T) over the edges asked for and interpolated (see
// edgeTable).

// SubbandSum evaluates G and S for subbands of one open dimension at one
// (E_F, T). Build it with NewSubbandSum; it is safe for concurrent use.
type SubbandSum struct {
	dim           int
	alpha, ef, kT float64
	tab           *edgeTable // d = 1, α > 0
}

// NewSubbandSum prepares the sums for n subbands with dim (0, 1 or 2) open
// axes, Kane α, Fermi level efEV and k_BT > 0, with edges in [loEV, hiEV].
// A Kane wire with more subbands than its table would have nodes tabulates
// its edge function there (about 150 integrand evaluations a node); with
// fewer, each subband is integrated on its own.
func NewSubbandSum(ctx context.Context, dim int, alphaPerEV, efEV, kTEV, loEV, hiEV float64, n int) (*SubbandSum, error) {
	if dim < 0 || dim > 2 {
		return nil, fmt.Errorf("thermal: subbands with %d open axes", dim)
	}
	if !(kTEV > 0) || math.IsInf(efEV, 0) || math.IsNaN(efEV) {
		return nil, fmt.Errorf("thermal: subband sum at kT = %g, E_F = %g", kTEV, efEV)
	}
	s := &SubbandSum{dim: dim, alpha: alphaPerEV, ef: efEV, kT: kTEV}
	if dim == 1 && alphaPerEV > 0 && n > tableNodes(efEV, kTEV, loEV, hiEV) {
		t, err := newEdgeTable(ctx, alphaPerEV, efEV, kTEV, loEV, hiEV)
		if err != nil {
			return nil, err
		}
		s.tab = t
	}
	return s, nil
}

// At returns G and S of a subband of unit weight with edge enEV.
func (s *SubbandSum) At(enEV float64) (g, slope float64) {
	d := (s.ef - enEV) / s.kT
	switch s.dim {
	case 0:
		f := logistic(-d)
		return f, f * logistic(d) / s.kT
	case 1:
		if s.tab != nil {
			return s.tab.at(enEV)
		}
		if s.alpha > 0 {
			if d > deepKT {
				g, _, slope, _ = wireDeep(s.alpha, s.ef, s.kT, enEV)
			} else {
				g, _, slope, _ = wireTrapezoid(s.alpha, s.ef, s.kT, enEV)
			}
			return g, slope
		}
		m12, m32 := FermiDiracMinusHalf(d)
		r := math.Sqrt(s.kT)
		return halfSqrtPi * r * m12, halfSqrtPi * m32 / r
	}
	c := 1 + 2*s.alpha*enEV
	f0 := logOnePlusExp(d)
	g = c*s.kT*f0 + 2*s.alpha*s.kT*s.kT*FermiDiracOne(d)
	return g, c*logistic(-d) + 2*s.alpha*s.kT*f0
}

const halfSqrtPi = 0.88622692545275801365 // √π/2 = Γ(3/2)

// logOnePlusExp returns ℱ₀(x) = ln(1 + eˣ) without overflow.
func logOnePlusExp(x float64) float64 {
	if x > 0 {
		return x + math.Log1p(math.Exp(-x))
	}
	return math.Log1p(math.Exp(x))
}

// FermiDiracOne returns ℱ₁(η) = −Li₂(−e^η) (DLMF 25.12.16). For η ≤ 0 it
// sums the dilogarithm by the Bernoulli series in u = −ln(1 + e^η),
// Li₂(x) = Σ Bₖ u^(k+1)/(k+1)!, which converges for |u| < 2π ('t Hooft
// and Veltman, Nucl. Phys. B 153, 365 (1979)); for η > 0 it uses the
// reflection ℱ₁(η) = η²/2 + π²/6 − ℱ₁(−η) (DLMF 25.12.4 with z = −e^η).
func FermiDiracOne(eta float64) float64 {
	if eta > 0 {
		return eta*eta/2 + math.Pi*math.Pi/6 - FermiDiracOne(-eta)
	}
	z := math.Exp(eta)
	if z < 0.25 {
		// Σ (−1)^(k+1) z^k/k²: 30 terms reach 1e-18 of the first.
		s, p := 0.0, 1.0
		for k := 1; k <= 30; k++ {
			p *= -z
			s -= p / float64(k*k)
		}
		return s
	}
	u := -math.Log1p(z)
	// Bₖ/(k+1)! for k = 0, 1, 2, 4, …, 18 (Bernoulli numbers, DLMF 24.2).
	coef := [...]float64{
		1, -1.0 / 4, 1.0 / 36, -1.0 / 3600, 1.0 / 211680, -1.0 / 10886400,
		1.0 / 526901760, -4.064761645144226e-11, 8.921691020456453e-13,
		-1.9939295860721074e-14, 4.5189800296199184e-16,
	}
	u2 := u * u
	s := coef[0]*u + coef[1]*u2
	p := u
	for _, c := range coef[2:] {
		p *= u2
		s += c * p
	}
	return -s
}

// FermiDiracMinusHalf returns ℱ_{−1/2}(η) and ℱ_{−3/2}(η) = dℱ_{−1/2}/dη
// (DLMF 25.12.15 and §25.12(iii)) to about 1e-9 relative: the series
// Σ (−1)^(k+1) e^(kη)/k^(j+1) below η = −40, the degenerate limits
// 2√η/√π and 1/√(πη) above η = 10⁸, and in between cubic Hermite
// interpolation of a table built once by the trapezoid rule (see
// edgeTable at α = 0).
func FermiDiracMinusHalf(eta float64) (m12, m32 float64) {
	switch {
	case eta < -40:
		e := math.Exp(eta)
		return e * (1 - e/math.Sqrt2), e * (1 - math.Sqrt2*e)
	case eta > 1e8:
		return 2 * math.Sqrt(eta/math.Pi), 1 / math.Sqrt(math.Pi*eta)
	}
	g, s := universal().at(-eta)
	return g / halfSqrtPi, s / halfSqrtPi
}

// universal is the parabolic wire's edge table at E_F = 0, k_BT = 1: its
// G and S are (√π/2)·ℱ_{−1/2}(−Eₙ) and (√π/2)·ℱ_{−3/2}(−Eₙ).
var universal = sync.OnceValue(func() *edgeTable {
	t, err := newEdgeTable(context.Background(), 0, 0, 1, -1e8, 40)
	if err != nil {
		panic(err)
	}
	return t
})

// edgeTable holds ln G, ln S and their derivatives in Eₙ for a wire (d = 1) at
// one (E_F, k_BT, α) on nodes spanning the edges asked for: spaced k_BT/16
// from 80 k_BT below E_F up (where G changes on the scale of k_BT), and
// geometrically, 3 % of the distance E_F − Eₙ apart, below (where it
// changes on the scale of that distance). Cubic Hermite interpolation of
// ln G and ln S with their exact derivatives is then good to about 1e-8
// relative (tested against
// an independent quadrature); the nodes cost about 150 integrand
// evaluations each.
type edgeTable struct {
	x, g, dg, s, ds []float64
}

const (
	tableStep  = 1.0 / 16 // node spacing near E_F, in k_BT
	deepKT     = 80       // below E_F − deepKT·k_BT the nodes are geometric
	deepRatio  = 1.03
	tailKT     = 40 // f and 1 − f are below e^(−40) beyond ±tailKT·k_BT
	trapMargin = 40 // trapezoid error e^(−2π·d/h) with h = 2π·d/trapMargin
)

// tableNodes estimates the nodes of an edge table over [lo, hi].
func tableNodes(ef, kT, lo, hi float64) int {
	n := 0.0
	deep := ef - deepKT*kT
	if hi > deep {
		n += (hi - math.Max(lo, deep)) / (tableStep * kT)
	}
	if lo < deep {
		n += math.Log(math.Max(ef-lo, 0)/(deepKT*kT)) / math.Log(deepRatio)
	}
	return int(math.Min(n, 1<<30)) + 4
}

func newEdgeTable(ctx context.Context, alpha, ef, kT, lo, hi float64) (*edgeTable, error) {
	if !(lo <= hi) {
		lo, hi = hi, lo
	}
	// Keep a node on each side of every edge asked for.
	lo -= 2 * tableStep * kT
	hi += 2 * tableStep * kT
	deep := ef - deepKT*kT
	var xs []float64
	if lo < deep {
		for d := deepKT * kT; ef-d > lo-(deepRatio-1)*d; d *= deepRatio {
			if ef-d <= hi {
				xs = append(xs, ef-d)
			}
		}
		slices.Reverse(xs)
	}
	start := math.Max(lo, deep)
	n := int(math.Ceil((hi - start) / (tableStep * kT)))
	if n > 1<<22 {
		return nil, fmt.Errorf("thermal: edge table of %d nodes", n)
	}
	for i := 0; i <= n; i++ {
		x := start + float64(i)*tableStep*kT
		if len(xs) == 0 || x > xs[len(xs)-1] {
			xs = append(xs, x)
		}
	}
	t := &edgeTable{x: xs, g: make([]float64, len(xs)), dg: make([]float64, len(xs)), s: make([]float64, len(xs)), ds: make([]float64, len(xs))}
	for i, x := range xs {
		if i%64 == 0 && ctx.Err() != nil {
			return nil, ctx.Err()
		}
		if ef-x > deepKT*kT {
			t.g[i], t.dg[i], t.s[i], t.ds[i] = wireDeep(alpha, ef, kT, x)
		} else {
			t.g[i], t.dg[i], t.s[i], t.ds[i] = wireTrapezoid(alpha, ef, kT, x)
		}
		// Interpolate the logarithms: exponential tails become straight.
		t.dg[i] /= t.g[i]
		t.ds[i] /= t.s[i]
		t.g[i], t.s[i] = math.Log(t.g[i]), math.Log(t.s[i])
	}
	return t, nil
}

// at interpolates G and S at edge x (cubic Hermite).
func (t *edgeTable) at(x float64) (g, s float64) {
	i := sort.SearchFloat64s(t.x, x) - 1
	i = min(max(i, 0), len(t.x)-2)
	x0, x1 := t.x[i], t.x[i+1]
	h := x1 - x0
	u := (x - x0) / h
	u2, u3 := u*u, u*u*u
	h00 := 2*u3 - 3*u2 + 1
	h10 := u3 - 2*u2 + u
	h01 := -2*u3 + 3*u2
	h11 := u3 - u2
	g = h00*t.g[i] + h10*h*t.dg[i] + h01*t.g[i+1] + h11*h*t.dg[i+1]
	s = h00*t.s[i] + h10*h*t.ds[i] + h01*t.s[i+1] + h11*h*t.ds[i+1]
	return math.Exp(g), math.Exp(s)
}

// wireTrapezoid integrates G = ∫₀^∞ f(Eₙ + v²)·φ(v) dv, with the state
// count N = (γ(Eₙ + v²) − γₙ)^(1/2) = v·√(c + αv²) and φ = dN/dv =
// (c + 2αv²)/√(c + αv²), c = 1 + 2αEₙ, and S and the Eₙ-derivatives of
// both, by the trapezoid rule. The integrand is even and analytic in v, so
// the rule converges geometrically, with an error about e^(−2πd/h) for a
// strip of half-width d free of singularities (Trefethen and Weideman,
// SIAM Rev. 56, 385 (2014)); d is set by the nearest pole of f,
// v² = E_F − Eₙ + iπk_BT, and the branch point of φ at v² = −c/α.
func wireTrapezoid(alpha, ef, kT, en float64) (g, dg, s, ds float64) {
	dist := ef - en
	r := math.Hypot(dist, math.Pi*kT)
	d := math.Sqrt((r - dist) / 2) // Im √(dist + iπk_BT)
	c := 1 + 2*alpha*en
	if alpha > 0 {
		d = math.Min(d, math.Sqrt(c/alpha))
	}
	// The cap keeps the Gaussian tail of a non-degenerate edge resolved
	// (error about e^(−π²k_BT/h²)).
	h := math.Min(2*math.Pi*d/trapMargin, 0.25*math.Sqrt(kT))
	vmax := math.Sqrt(math.Max(dist, 0) + tailKT*kT)
	n := int(math.Ceil(vmax / h))
	for k := 0; k <= n; k++ {
		v := float64(k) * h
		v2 := v * v
		y := (en + v2 - ef) / kT
		f := logistic(y)
		ff := f * logistic(-y) // f(1 − f)
		q := c + alpha*v2
		sq := math.Sqrt(q)
		phi := (c + 2*alpha*v2) / sq
		phiN := 2 * alpha * c / (2 * q * sq) // ∂φ/∂Eₙ through c
		w := h
		if k == 0 {
			w = h / 2
		}
		g += w * f * phi
		dg += w * (-ff/kT*phi + f*phiN)
		s += w * ff / kT * phi
		ds += w * (-ff*(1-2*f)/(kT*kT)*phi + ff/kT*phiN)
	}
	return g, dg, s, ds
}

// wireDeep handles an edge far below E_F (E_F − Eₙ > 80 k_BT): G = N(E_F) +
// ∫ (f − Θ(E_F − E)) dN, whose integrand lives within ±40 k_BT of E_F,
// where N is smooth, so Gauss–Legendre panels of width 2 k_BT (16 nodes;
// the poles of f lie π k_BT off the axis) converge to double precision.
// With t = |E − E_F|/k_BT and ψ = dN/dE = γ'(E)/(2√(γ(E) − γₙ)):
// G = N(E_F) + k_BT ∫₀^40 ℓ(t)[ψ(E_F + tk_BT) − ψ(E_F − tk_BT)] dt and
// S = ∫₀^40 ℓ(1 − ℓ)[ψ(E_F + tk_BT) + ψ(E_F − tk_BT)] dt, ℓ(t) = 1/(1 + eᵗ).
func wireDeep(alpha, ef, kT, en float64) (g, dg, s, ds float64) {
	gam := func(e float64) float64 { return e * (1 + alpha*e) }
	gn := gam(en)
	cn := 1 + 2*alpha*en
	// ψ and ∂ψ/∂Eₙ at energy e.
	psi := func(e float64) (p, pn float64) {
		x := gam(e) - gn
		rx := math.Sqrt(x)
		c := 1 + 2*alpha*e
		return c / (2 * rx), c * cn / (4 * x * rx)
	}
	xf := gam(ef) - gn
	g = math.Sqrt(xf)
	dg = -cn / (2 * g)
	x, w := legendreRule()
	for a := 0.0; a < tailKT; a += 2 {
		for i := range x {
			t := a + 1 + x[i]
			l := logistic(t)
			ll := l * logistic(-t)
			pu, pnu := psi(ef + t*kT)
			pd, pnd := psi(ef - t*kT)
			g += w[i] * kT * l * (pu - pd)
			dg += w[i] * kT * l * (pnu - pnd)
			s += w[i] * ll * (pu + pd)
			ds += w[i] * ll * (pnu + pnd)
		}
	}
	return g, dg, s, ds
}

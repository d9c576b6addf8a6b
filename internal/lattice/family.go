package lattice

import (
	"context"
	"math"

	lapack "gonum.org/v1/gonum/lapack/gonum"
)

// FamilyView is the gap against size for structures of the same kind around
// the requested one: ribbons against width (N over a range), tubes against
// diameter (every (n, m), 0 ≤ m ≤ n, in a diameter range). Family is N mod 3
// or (n − m) mod 3, the three families of the gap (Nakada et al. 1996 for
// armchair ribbons; Hamada, Sawada & Oshiyama, PRL 68, 1579 (1992) and
// Saito et al. 1998 for tubes).
type FamilyView struct {
	Axis   string        `json:"axis"` // "width_nm" or "diameter_nm"
	Points []FamilyPoint `json:"points"`
}

// FamilyPoint is one structure of a FamilyView.
type FamilyPoint struct {
	Lines  int     `json:"lines,omitempty"` // ribbons
	N      *int    `json:"n,omitempty"`     // tubes
	M      *int    `json:"m,omitempty"`     // tubes
	SizeNM float64 `json:"size_nm"`
	GapEV  float64 `json:"gap_eV"`
	Family int     `json:"family"`
}

// Ranges of familyAround.
const (
	familyLinesHalf   = 100 // N within ±100 of the request
	familyZigzagStep  = 5   // zigzag ribbons: every 5th N (each costs one solve)
	familyDiamHalfNM  = 1.0 // tubes within ±1 nm of the requested diameter
	familyMinDiamNM   = 0.3 // and not thinner than the thinnest tubes made
	familyDiamAreaNM2 = 5.0 // but within ±5 nm²/d for thick tubes
)

// Family returns the gap of every ribbon of p's kind with lines in
// [fromLines, toLines] (stepping by step), or of every tube with diameter in
// [fromNM, toNM], using p's γ0 and a_cc. Ribbons use fromLines/toLines/step;
// tubes use fromNM/toNM. At most 2001 structures are allowed.
func Family(ctx context.Context, p Params, fromLines, toLines, step int, fromNM, toNM float64) (FamilyView, error) {
	switch p.Structure {
	case Armchair, Zigzag:
		if fromLines < 1 || toLines > MaxLines || toLines < fromLines || step < 1 {
			return FamilyView{}, bad("lines", "family range %d…%d step %d is outside 1…%d", fromLines, toLines, step, MaxLines)
		}
		if (toLines-fromLines)/step > 2000 {
			return FamilyView{}, tooLarge("lines", "family range has more than 2001 ribbons")
		}
		v := FamilyView{Axis: "width_nm"}
		for n := fromLines; n <= toLines; n += step {
			if err := ctx.Err(); err != nil {
				return FamilyView{}, err
			}
			q := p
			q.Lines = n
			var gap, width float64
			if p.Structure == Armchair {
				gap, width = ArmchairGapEV(p.Gamma0EV, n), armchairGeometry(q).widthNM
			} else {
				var err error
				if gap, err = zigzagGapEV(p.Gamma0EV, n); err != nil {
					return FamilyView{}, err
				}
				width = zigzagGeometry(q).widthNM
			}
			v.Points = append(v.Points, FamilyPoint{Lines: n, SizeNM: width, GapEV: gap, Family: n % 3})
		}
		return v, nil
	case Tube:
		if !finite(fromNM) || !finite(toNM) || fromNM < 0 || toNM < fromNM {
			return FamilyView{}, bad("n", "family diameter range %g…%g nm is not valid", fromNM, toNM)
		}
		v := FamilyView{Axis: "diameter_nm"}
		for n := 1; n <= MaxTubeN; n++ {
			if TubeDiameterNM(n, 0, p.AccNM) > toNM {
				break
			}
			if err := ctx.Err(); err != nil {
				return FamilyView{}, err
			}
			for m := 0; m <= n; m++ {
				d := TubeDiameterNM(n, m, p.AccNM)
				if d < fromNM || d > toNM {
					continue
				}
				if len(v.Points) > 2000 {
					return FamilyView{}, tooLarge("n", "family range has more than 2001 tubes")
				}
				v.Points = append(v.Points, FamilyPoint{N: ptr(n), M: ptr(m), SizeNM: d, GapEV: TubeGapEV(p.Gamma0EV, n, m), Family: (n - m) % 3})
			}
		}
		return v, nil
	}
	panic("lattice: unknown structure " + string(p.Structure))
}

func familyAround(ctx context.Context, p Params) (FamilyView, error) {
	switch p.Structure {
	case Armchair:
		return Family(ctx, p, max(1, p.Lines-familyLinesHalf), min(MaxLines, p.Lines+familyLinesHalf), 1, 0, 0)
	case Zigzag:
		return Family(ctx, p, max(1, p.Lines-familyLinesHalf), min(MaxLines, p.Lines+familyLinesHalf), familyZigzagStep, 0, 0)
	}
	// The number of tubes in a diameter range grows as d·Δd; narrowing the
	// range for thick tubes keeps it near a thousand.
	d := TubeDiameterNM(p.N, p.M, p.AccNM)
	half := math.Min(familyDiamHalfNM, familyDiamAreaNM2/d)
	return Family(ctx, p, 0, 0, 0, math.Max(familyMinDiamNM, d-half), d+half)
}

// ArmchairGapEV is the gap of the armchair ribbon of nLines dimer lines:
// E² = γ0²(1 + 4c² + 4c·x) with x = cos(3ka_cc/2) ∈ [0, 1] over the zone is
// linear in x, so each channel's lowest |E| is at k = 0 or the zone edge, and
// the gap is 2·min over channels of those (Nakada et al. 1996). It is zero
// exactly (to rounding) iff N = 3j + 2.
func ArmchairGapEV(gamma0EV float64, nLines int) float64 {
	lo := math.Inf(1)
	for p := 1; p <= nLines; p++ {
		lo = math.Min(lo, math.Min(ArmchairBand(gamma0EV, nLines, p, 0), ArmchairBand(gamma0EV, nLines, p, math.Pi)))
	}
	return 2 * snap(lo, snapFraction*gamma0EV)
}

// zigzagGapEV is twice the smallest |E| of the zigzag ribbon at the zone
// edge ka = π, where the edge-state bands meet at E = 0 (Fujita et al.
// 1996); it is zero to rounding for every N.
func zigzagGapEV(gamma0EV float64, n int) (float64, error) {
	var impl lapack.Implementation
	d := make([]float64, 2*n)
	e := make([]float64, 2*n-1)
	fillZigzag(e, gamma0EV, math.Pi)
	if !impl.Dsterf(2*n, d, e) {
		return 0, errNoConvergence
	}
	return 2 * snap((d[n]-d[n-1])/2, snapFraction*gamma0EV), nil
}

// TubeGapEV is the zone-folding gap of the (n, m) tube from the cutting
// lines nearest the graphene K point, where |f| vanishes. With
// φ1 = k·a1, φ2 = k·a2 the line index is μ = (nφ1 + mφ2)/2π = C_h·k/2π and
// the axial phase s = t1φ1 + t2φ2 = T·k (Saito et al. 1998, eqs. 3.13–3.15).
// K = (φ1, φ2) = (2π/3, −2π/3) gives μ_K = (n − m)/3 (+ a lattice shift)
// and s_K = 2π(t1 − t2)/3; the shift by an integer c·(a, b) with
// t1·a + t2·b = c brings s_K into [−π, π] and moves μ_K by c·(na + mb). The
// lines ⌊μ_K⌋−1 … ⌈μ_K⌉+1 are searched along s ∈ s_K ± π/4 (the mirror K'
// = −K gives the same gap); tubes of at most smallTubeHexagons hexagons per
// cell, whose gap can come from a line farther from K, search every line. It is zero iff (n − m) ≡ 0 (mod 3) (Hamada et al.
// 1992).
func TubeGapEV(gamma0EV float64, n, m int) float64 {
	t1, t2, nhex := tubeCell(n, m)
	lo := math.Inf(1)
	search := func(mu int, from, to float64) {
		f := func(s float64) float64 { return tubeBand(gamma0EV, n, m, t1, t2, nhex, mod(mu, nhex), s) }
		const samples = 32
		best, bestS := math.Inf(1), from
		for i := 0; i <= samples; i++ {
			s := from + (to-from)*float64(i)/samples
			if v := f(s); v < best {
				best, bestS = v, s
			}
		}
		step := (to - from) / samples
		_, v := goldenMin(f, bestS-step, bestS+step)
		lo = math.Min(lo, math.Min(v, best))
	}
	if nhex <= smallTubeHexagons {
		// Thin tubes: the lowest band need not be the one nearest K.
		for mu := 0; mu < nhex; mu++ {
			search(mu, -math.Pi, math.Pi)
		}
		return 2 * snap(lo, snapFraction*gamma0EV)
	}
	a0, b0 := extendedGCD(t1, t2) // t1·a0 + t2·b0 = 1
	x := float64(t1-t2) / 3
	c := -math.Round(x)
	sK := 2 * math.Pi * (x + c)
	muK := float64(n-m)/3 + c*float64(n*a0+m*b0)
	for mu := int(math.Floor(muK)) - 1; mu <= int(math.Ceil(muK))+1; mu++ {
		search(mu, sK-math.Pi/4, sK+math.Pi/4)
	}
	return 2 * snap(lo, snapFraction*gamma0EV)
}

// smallTubeHexagons is the cell size up to which TubeGapEV searches every
// cutting line instead of those next to K.
const smallTubeHexagons = 400

// extendedGCD returns (x, y) with a·x + b·y = gcd(a, b).
func extendedGCD(a, b int) (int, int) {
	x0, y0, x1, y1 := 1, 0, 0, 1
	for b != 0 {
		q := a / b
		a, b = b, a-q*b
		x0, x1 = x1, x0-q*x1
		y0, y1 = y1, y0-q*y1
	}
	if a < 0 {
		return -x0, -y0
	}
	return x0, y0
}

package lattice

import (
	"context"
	"math"
	"runtime"
	"slices"

	"golang.org/x/sync/errgroup"

	lapack "gonum.org/v1/gonum/lapack/gonum"
)

// geometry is what one structure contributes before its bands are sampled.
type geometry struct {
	periodNM   float64 // length of the 1D unit cell along the axis
	widthNM    float64 // ribbons: edge-to-edge width of the atoms
	diameterNM float64 // tubes
	atoms      int     // atoms per unit cell = number of bands
	hexagons   int     // tubes: hexagons per unit cell
	// band returns the b-th band with E ≥ 0 at s = k·period ∈ [−π, π];
	// nil when the bands come only from a numerical solve (zigzag ribbons).
	band func(b int, s float64) float64
	// sample fills upper[b][i] for every band b at the k grid s[i].
	sample func(ctx context.Context, s []float64, upper [][]float64) error
}

// ArmchairBand returns the π band of an armchair ribbon of nLines dimer
// lines, channel p (1…nLines), with E ≥ 0, at s = k·3a_cc (k along the
// ribbon, the unit cell is 3a_cc long):
//
//	E = γ0·√(1 + 4cos²θ_p + 4cosθ_p·cos(s/2)),  θ_p = pπ/(N+1)
//
// (Nakada et al., PRB 54, 17954 (1996); Brey & Fertig, PRB 73, 235411
// (2006)). It is evaluated as γ0·|1 + 2cosθ_p·e^{is/2}|, the same number,
// so that a band touching zero is zero to rounding instead of to √ε. The
// other band of the channel is −E.
func ArmchairBand(gamma0EV float64, nLines, p int, s float64) float64 {
	c := math.Cos(float64(p) * math.Pi / float64(nLines+1))
	sn, cs := math.Sincos(s / 2)
	return gamma0EV * math.Hypot(1+2*c*cs, 2*c*sn)
}

func armchairGeometry(p Params) geometry {
	n := p.Lines
	return geometry{
		periodNM: 3 * p.AccNM,
		widthNM:  float64(n-1) * math.Sqrt(3) / 2 * p.AccNM,
		atoms:    2 * n,
		band: func(b int, s float64) float64 {
			return ArmchairBand(p.Gamma0EV, n, b+1, s)
		},
	}
}

// zigzagGeometry: a zigzag ribbon of N chains has 2N atoms per cell of
// length a = √3·a_cc. Ordering the atoms A1 B1 A2 B2 … across the width, the
// Bloch Hamiltonian at s = k·a is tridiagonal with zero diagonal and
// off-diagonal hoppings alternating 2γ0·cos(s/2) (A_j–B_j, the two bonds
// along chain j) and γ0 (B_j–A_{j+1}, the rung to the next chain)
// (Fujita et al., J. Phys. Soc. Jpn. 65, 1920 (1996); Wakabayashi et al.,
// PRB 59, 8271 (1999)). The width between the outermost atoms is
// (3N/2 − 1)·a_cc.
func zigzagGeometry(p Params) geometry {
	n := p.Lines
	return geometry{
		periodNM: math.Sqrt(3) * p.AccNM,
		widthNM:  (1.5*float64(n) - 1) * p.AccNM,
		atoms:    2 * n,
		sample: func(ctx context.Context, s []float64, upper [][]float64) error {
			return zigzagSample(ctx, p.Gamma0EV, n, s, upper)
		},
	}
}

// ZigzagHamiltonian returns the diagonal d (all zero) and off-diagonal e
// (length 2N−1) of the zigzag-ribbon Bloch Hamiltonian described at
// zigzagGeometry, at s = k·√3a_cc.
func ZigzagHamiltonian(gamma0EV float64, nChains int, s float64) (d, e []float64) {
	d = make([]float64, 2*nChains)
	e = make([]float64, 2*nChains-1)
	fillZigzag(e, gamma0EV, s)
	return d, e
}

func fillZigzag(e []float64, gamma0EV, s float64) {
	t := 2 * gamma0EV * math.Cos(s/2)
	for i := range e {
		if i%2 == 0 {
			e[i] = t
		} else {
			e[i] = gamma0EV
		}
	}
}

// zigzagSample finds the spectrum at the k ≥ 0 half of the grid and mirrors
// it, since E(−k) = E(k) (time reversal), splitting the k points among the
// cores.
//
// The 2N×2N tridiagonal H has zero diagonal and off-diagonal
// (d1, e1, d2, …, dN), so its eigenvalues are ±σ_i, σ_i the singular values
// of the N×N bidiagonal B with diagonal d = t = 2γ0cos(ka/2) and
// off-diagonal e = γ0 (Golub & Kahan, SIAM J. Numer. Anal. 2, 205 (1965)).
// The ribbon's mirror symmetry makes B persymmetric, J·B·J = Bᵀ with J the
// exchange matrix, so JB is symmetric and BᵀB = (JB)²: σ_i = |λ_i(JB)|. JB
// joins row i to columns N−1−i (t) and N−2−i (γ0); visiting the rows in the
// order N−1, 0, N−2, 1, … makes it an N×N symmetric tridiagonal with zero
// diagonal except its last entry (t for odd N, γ0 for even N) and
// off-diagonal t, γ0, t, γ0, …. That is a quarter of the size² of H, solved
// with LAPACK's Pal–Walker–Kahan QL/QR (Dsterf); the test checks it against
// Dsterf on H itself.
func zigzagSample(ctx context.Context, gamma0EV float64, n int, s []float64, upper [][]float64) error {
	k := len(s)
	workers := max(1, min(runtime.GOMAXPROCS(0), 4, k/2))
	g, ctx := errgroup.WithContext(ctx)
	for w := 0; w < workers; w++ {
		g.Go(func() error {
			var impl lapack.Implementation
			d := make([]float64, n)
			e := make([]float64, max(n-1, 1))
			// Each worker writes its own columns i and k−1−i of upper.
			for i := k/2 + w; i < k; i += workers {
				if err := ctx.Err(); err != nil {
					return err
				}
				fillFolded(d, e[:n-1], gamma0EV, s[i])
				if !impl.Dsterf(n, d, e[:n-1]) {
					return errNoConvergence
				}
				for j := range d {
					d[j] = math.Abs(d[j])
				}
				slices.Sort(d)
				for b, v := range d {
					upper[b][i] = v
					upper[b][k-1-i] = v
				}
			}
			return nil
		})
	}
	return g.Wait()
}

// fillFolded writes the N×N tridiagonal JB of zigzagSample at s = k·a.
func fillFolded(d, e []float64, gamma0EV, s float64) {
	n := len(d)
	t := 2 * gamma0EV * math.Cos(s/2)
	clear(d)
	if n%2 == 1 {
		d[n-1] = t
	} else {
		d[n-1] = gamma0EV
	}
	for j := range e {
		if j%2 == 0 {
			e[j] = t
		} else {
			e[j] = gamma0EV
		}
	}
}

// tubeCell returns the translation vector T = t1·a1 + t2·a2 of the (n, m)
// tube and the number of hexagons in its unit cell:
// t1 = (2m+n)/d_R, t2 = −(2n+m)/d_R, N = 2(n²+nm+m²)/d_R, d_R = gcd(2n+m, 2m+n)
// (Saito, Dresselhaus & Dresselhaus 1998, eqs. 3.9–3.11).
func tubeCell(n, m int) (t1, t2, nhex int) {
	dR := gcd(2*n+m, 2*m+n)
	return (2*m + n) / dR, -(2*n + m) / dR, 2 * (n*n + n*m + m*m) / dR
}

func gcd(a, b int) int {
	for b != 0 {
		a, b = b, a%b
	}
	if a < 0 {
		return -a
	}
	return a
}

// TubeDiameterNM is d = a·√(n²+nm+m²)/π with a = √3·a_cc (Saito et al. 1998, eq. 3.2).
func TubeDiameterNM(n, m int, accNM float64) float64 {
	return math.Sqrt(3) * accNM * math.Sqrt(float64(n*n+n*m+m*m)) / math.Pi
}

// TubePeriodNM is |T| = √3·|C_h|/d_R (Saito et al. 1998, eq. 3.10).
func TubePeriodNM(n, m int, accNM float64) float64 {
	dR := gcd(2*n+m, 2*m+n)
	ch := math.Sqrt(3) * accNM * math.Sqrt(float64(n*n+n*m+m*m))
	return math.Sqrt(3) * ch / float64(dR)
}

// TubeBand returns the zone-folded π band μ (0…N−1, N hexagons per cell) of
// the (n, m) tube with E ≥ 0 at s = k·|T| ∈ [−π, π]:
// E_μ(k) = γ0·|f(μK1 + kK2/|K2|)|, f(k) = 1 + e^{ik·a1} + e^{ik·a2} the
// graphene structure factor, K1 = (−t2·b1 + t1·b2)/N around the
// circumference and K2 = (m·b1 − n·b2)/N along the axis (Saito et al. 1998,
// eqs. 3.13–3.15 and 4.3). With b_i·a_j = 2πδ_ij the phases are
// k·a1 = (−2πt2μ + m·s)/N and k·a2 = (2πt1μ − n·s)/N. The other band is −E.
func TubeBand(gamma0EV float64, n, m, mu int, s float64) float64 {
	t1, t2, nhex := tubeCell(n, m)
	return tubeBand(gamma0EV, n, m, t1, t2, nhex, mu, s)
}

func tubeBand(gamma0EV float64, n, m, t1, t2, nhex, mu int, s float64) float64 {
	// Reduce the integer parts first so the angles stay small and exact.
	r1 := mod(-t2*mu, nhex)
	r2 := mod(t1*mu, nhex)
	fn := float64(nhex)
	p1 := (2*math.Pi*float64(r1) + float64(m)*s) / fn
	p2 := (2*math.Pi*float64(r2) - float64(n)*s) / fn
	s1, c1 := math.Sincos(p1)
	s2, c2 := math.Sincos(p2)
	return gamma0EV * math.Hypot(1+c1+c2, s1+s2)
}

func mod(a, n int) int {
	r := a % n
	if r < 0 {
		r += n
	}
	return r
}

func tubeGeometry(p Params) geometry {
	t1, t2, nhex := tubeCell(p.N, p.M)
	n, m, g := p.N, p.M, p.Gamma0EV
	return geometry{
		periodNM:   TubePeriodNM(n, m, p.AccNM),
		diameterNM: TubeDiameterNM(n, m, p.AccNM),
		atoms:      2 * nhex,
		hexagons:   nhex,
		band: func(b int, s float64) float64 {
			return tubeBand(g, n, m, t1, t2, nhex, b, s)
		},
	}
}

func geometryOf(p Params) geometry {
	var g geometry
	switch p.Structure {
	case Armchair:
		g = armchairGeometry(p)
	case Zigzag:
		g = zigzagGeometry(p)
	case Tube:
		g = tubeGeometry(p)
	default:
		panic("lattice: unknown structure " + string(p.Structure))
	}
	if g.sample == nil {
		band := g.band
		g.sample = func(ctx context.Context, s []float64, upper [][]float64) error {
			for b := range upper {
				if err := ctx.Err(); err != nil {
					return err
				}
				row := upper[b]
				for i, si := range s {
					row[i] = band(b, si)
				}
			}
			return nil
		}
	}
	return g
}

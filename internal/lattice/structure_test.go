package lattice

import (
	"context"
	"math"
	"math/cmplx"
	"slices"
	"testing"

	lapack "gonum.org/v1/gonum/lapack"
	lapackgonum "gonum.org/v1/gonum/lapack/gonum"
	"gonum.org/v1/gonum/mat"
)

// armchairBlochEigenvalues builds the armchair ribbon of n dimer lines atom by
// atom (bonds along x, a1 = (3/2, √3/2)a_cc, a2 = (3/2, −√3/2)a_cc, the
// ribbon axis a1 + a2 = (3a_cc, 0)), joins every pair of atoms a_cc apart
// (including images one period along the axis), forms the Bloch Hamiltonian
// H_ij(k) = −γ0·Σ e^{ik(x_j − x_i + ℓ·3a_cc)} and diagonalises it with
// gonum's dense symmetric solver (mat.EigenSym) through the real embedding
// [[Re H, −Im H], [Im H, Re H]], whose spectrum is that of H twice over.
func armchairBlochEigenvalues(t *testing.T, gamma0, acc float64, n int, s float64) []float64 {
	t.Helper()
	type atom struct{ x, y float64 }
	var atoms []atom
	for j := 0; j < n; j++ {
		x0 := float64(j%2) * 1.5 * acc
		y := float64(j) * math.Sqrt(3) / 2 * acc
		atoms = append(atoms, atom{x0, y}, atom{x0 + acc, y})
	}
	period := 3 * acc
	k := s / period
	dim := len(atoms)
	h := make([]complex128, dim*dim)
	for i, a := range atoms {
		for j, b := range atoms {
			for l := -1; l <= 1; l++ {
				dx := b.x + float64(l)*period - a.x
				dy := b.y - a.y
				if math.Abs(math.Hypot(dx, dy)-acc) < 1e-9*acc {
					h[i*dim+j] += complex(-gamma0, 0) * cmplx.Exp(complex(0, k*dx))
				}
			}
		}
	}
	big := mat.NewSymDense(2*dim, nil)
	for i := 0; i < dim; i++ {
		for j := i; j < dim; j++ {
			v := h[i*dim+j]
			big.SetSym(i, j, real(v))
			big.SetSym(dim+i, dim+j, real(v))
			big.SetSym(i, dim+j, -imag(v))
			big.SetSym(j, dim+i, imag(v))
		}
	}
	var es mat.EigenSym
	if !es.Factorize(big, false) {
		t.Fatal("EigenSym did not converge")
	}
	all := es.Values(nil)
	slices.Sort(all)
	out := make([]float64, dim)
	for i := range out {
		out[i] = all[2*i]
	}
	return out
}

// The analytic armchair bands (Nakada et al. 1996; Brey & Fertig 2006) agree
// with the real-space Bloch Hamiltonian diagonalised by gonum (a general
// reference library) to 1e-10 eV, at seeded k points across the zone.
func TestArmchairBandsAgainstEigenSym(t *testing.T) {
	const gamma0, acc = 2.7, 0.142
	for _, n := range []int{1, 2, 3, 4, 5, 7, 8, 12} {
		for _, s := range []float64{-math.Pi, -2.1, -0.37, 0, 0.5, 1.9, 3.0, math.Pi} {
			got := armchairBlochEigenvalues(t, gamma0, acc, n, s)
			var want []float64
			for p := 1; p <= n; p++ {
				e := ArmchairBand(gamma0, n, p, s)
				want = append(want, e, -e)
			}
			slices.Sort(want)
			for i := range want {
				if math.Abs(got[i]-want[i]) > 1e-10 {
					t.Errorf("N=%d s=%g: eigenvalue %d = %.14f, analytic %.14f", n, s, i, got[i], want[i])
				}
			}
		}
	}
}

// The general (n, m) folding at m = 0 equals the closed form of the zigzag
// tube, E = ±γ0·√(1 + 4cos²θ_q + 4cosθ_q·cos(s/2)), θ_q = qπ/n, q = 1…2n
// (Saito, Dresselhaus & Dresselhaus 1998, eq. 4.8), band by band as a set.
func TestZigzagTubeFoldingMatchesClosedForm(t *testing.T) {
	for _, n := range []int{1, 3, 7, 10, 17} {
		_, _, nhex := tubeCell(n, 0)
		if nhex != 2*n {
			t.Fatalf("(%d,0): %d hexagons per cell, want 2n = %d", n, nhex, 2*n)
		}
		for _, s := range []float64{-math.Pi, -1.3, 0, 0.7, 2.9} {
			var got, want []float64
			for mu := 0; mu < nhex; mu++ {
				got = append(got, TubeBand(2.7, n, 0, mu, s))
			}
			for q := 1; q <= 2*n; q++ {
				c := math.Cos(float64(q) * math.Pi / float64(n))
				want = append(want, 2.7*math.Sqrt(math.Max(0, 1+4*c*c+4*c*math.Cos(s/2))))
			}
			slices.Sort(got)
			slices.Sort(want)
			for i := range got {
				if math.Abs(got[i]-want[i]) > 1e-7 { // √ of a rounded 0 is ~1e-8 in the closed form
					t.Errorf("(%d,0) s=%g band %d: folding %.12f, closed form %.12f", n, s, i, got[i], want[i])
				}
			}
		}
	}
}

// Tube unit cells against the worked examples of Saito, Dresselhaus &
// Dresselhaus (1998), Table 3.2 (from memory): (n, n): d_R = 3n, N = 2n;
// (n, 0): N = 2n; (4, 2): d_R = 2, N = 28, T = (4, −5). Diameter of (10, 10)
// = 1.356 nm with a_cc = 0.142 nm (common practice).
func TestTubeCell(t *testing.T) {
	tests := []struct {
		n, m, t1, t2, nhex int
	}{
		{5, 5, 1, -1, 10},
		{10, 10, 1, -1, 20},
		{10, 0, 1, -2, 20},
		{4, 2, 4, -5, 28},
		{6, 5, 16, -17, 182},
	}
	for _, tc := range tests {
		t1, t2, nhex := tubeCell(tc.n, tc.m)
		if t1 != tc.t1 || t2 != tc.t2 || nhex != tc.nhex {
			t.Errorf("(%d,%d): T = (%d,%d), N = %d; want (%d,%d), %d", tc.n, tc.m, t1, t2, nhex, tc.t1, tc.t2, tc.nhex)
		}
	}
	if d := TubeDiameterNM(10, 10, 0.142); math.Abs(d-1.356) > 0.001 {
		t.Errorf("(10,10) diameter %.4f nm, want 1.356", d)
	}
}

// Zigzag ribbons: the two bands nearest zero are flat edge states for
// 2π/3 ≤ |k|a ≤ π (Fujita et al., J. Phys. Soc. Jpn. 65, 1920 (1996)).
// At |k|a = 2π/3 both hoppings equal γ0, the ribbon is a uniform chain of 2N
// sites and the level nearest zero is exactly 2γ0·sin(π/(2(2N+1))) (common
// practice), which vanishes as N grows; a little inside the interval the
// edge state decays as |2cos(ka/2)|^j from the edge and its energy is below
// 1e-3·γ0 for N = 400. At ka = π it is zero.
func TestZigzagFlatEdgeBand(t *testing.T) {
	const gamma0, n = 2.7, 400
	var s []float64
	for i := 0; i <= 40; i++ {
		s = append(s, 2*math.Pi/3+0.03+(math.Pi/3-0.03)*float64(i)/40)
	}
	s = append(s, 2*math.Pi/3)
	upper := make([][]float64, n)
	for b := range upper {
		upper[b] = make([]float64, len(s))
	}
	// zigzagSample mirrors the second half onto the first: pass ±s pairs.
	full := append(slices.Clone(s), s...)
	for i := range s {
		full[i] = -s[len(s)-1-i]
	}
	up2 := make([][]float64, n)
	for b := range up2 {
		up2[b] = make([]float64, len(full))
	}
	if err := zigzagSample(context.Background(), gamma0, n, full, up2); err != nil {
		t.Fatal(err)
	}
	for i, si := range s {
		e0 := up2[0][len(s)+i]
		if si == 2*math.Pi/3 {
			want := 2 * gamma0 * math.Sin(math.Pi/(2*(2*n+1)))
			if math.Abs(e0-want) > 1e-12 {
				t.Errorf("ka = 2π/3: lowest level %.15g, uniform chain %.15g", e0, want)
			}
			continue
		}
		if e0 > 1e-3*gamma0 {
			t.Errorf("ka = %.4f: edge band at %.3g eV, want < 1e-3·γ0", si, e0)
		}
		// Only the edge pair is flat: the next band is a bulk state,
		// about ħv·π/W ≈ 0.02 eV or more away at this width.
		if e1 := up2[1][len(s)+i]; e1 < 1e-3*gamma0 {
			t.Errorf("ka = %.4f: second band %.3g eV is also near zero", si, e1)
		}
	}
}

// The edge states are localised at the edges: at ka = 0.9π the eigenvectors
// of the two levels nearest zero (from LAPACK's Dsteqr) carry more than 99 %
// of their weight on the outer 10 % of the chains on each side (Fujita et al.
// 1996: amplitude ∝ (−2cos(ka/2))^j).
func TestZigzagEdgeStatesLocalised(t *testing.T) {
	const n = 100
	d, e := ZigzagHamiltonian(2.7, n, 0.9*math.Pi)
	dim := 2 * n
	z := make([]float64, dim*dim)
	work := make([]float64, 2*dim)
	var impl lapackgonum.Implementation
	if !impl.Dsteqr(lapack.EVTridiag, dim, d, e, z, dim, work) {
		t.Fatal("Dsteqr did not converge")
	}
	for _, col := range []int{n - 1, n} {
		edge := 0.0
		for row := 0; row < dim; row++ {
			if row < dim/10 || row >= dim-dim/10 {
				edge += z[row*dim+col] * z[row*dim+col]
			}
		}
		if edge < 0.99 {
			t.Errorf("level %d (E = %.3g): %.4f of the weight at the edges, want > 0.99", col, d[col], edge)
		}
	}
}

// The folded N×N problem of zigzagSample gives the spectrum of the full
// 2N×2N zigzag Bloch Hamiltonian (Fujita et al. 1996) as solved directly by
// LAPACK's Dsterf, to 1e-12 eV.
func TestZigzagFoldedMatchesFullTridiagonal(t *testing.T) {
	var impl lapackgonum.Implementation
	s := kGrid(41)
	for _, n := range []int{1, 2, 3, 4, 7, 20, 51} {
		upper := make([][]float64, n)
		for b := range upper {
			upper[b] = make([]float64, len(s))
		}
		if err := zigzagSample(context.Background(), 2.7, n, s, upper); err != nil {
			t.Fatal(err)
		}
		for i, si := range s {
			d, e := ZigzagHamiltonian(2.7, n, si)
			if !impl.Dsterf(2*n, d, e) {
				t.Fatal("Dsterf did not converge")
			}
			for b := 0; b < n; b++ {
				if got, want := upper[b][i], d[n+b]; math.Abs(got-want) > 1e-12 {
					t.Errorf("N=%d s=%.3f band %d: folded %.15f, full %.15f", n, si, b, got, want)
				}
			}
		}
	}
}

package lattice

import (
	"context"
	"encoding/json"
	"errors"
	"math"
	"testing"

	"ringbox/internal/phys"
)

func params(s Structure, lines, n, m int) Params {
	p := DefaultParams()
	p.Structure, p.Lines, p.N, p.M = s, lines, n, m
	p.KPoints = 201
	return p
}

func run(t *testing.T, p Params) Result {
	t.Helper()
	r, err := compute(context.Background(), p)
	if err != nil {
		t.Fatalf("%+v: %v", p, err)
	}
	return r
}

// Check values of DESIGN.md at γ0 = 2.7 eV, to 1 meV: the (10, 0) tube gap
// 0.948 eV (Saito, Dresselhaus & Dresselhaus 1998, zone-folding formula) and
// the N = 7 armchair ribbon gap 1.267 eV (Nakada et al., PRB 54, 17954 (1996)
// formula).
func TestCheckValueGaps(t *testing.T) {
	tests := []struct {
		name string
		p    Params
		want float64
	}{
		{"tube (10,0)", params(Tube, 0, 10, 0), 0.948},
		{"armchair N=7", params(Armchair, 7, 0, 0), 1.267},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			r := run(t, tc.p)
			if math.Abs(r.GapEV-tc.want) > 1e-3 {
				t.Errorf("gap %.5f eV, want %.3f ± 0.001", r.GapEV, tc.want)
			}
			if r.Metallic {
				t.Error("reported metallic")
			}
		})
	}
}

// Armchair ribbons are metallic iff N = 3j + 2 (Nakada et al. 1996; Brey &
// Fertig 2006), from the sampled bands for N ≤ 40 and the closed gap for
// N ≤ 600.
func TestArmchairMetallicFamily(t *testing.T) {
	for n := 1; n <= 40; n++ {
		r := run(t, params(Armchair, n, 0, 0))
		if want := n%3 == 2; r.Metallic != want {
			t.Errorf("N=%d: metallic %v (gap %.3g eV), want %v", n, r.Metallic, r.GapEV, want)
		}
		if g := ArmchairGapEV(2.7, n); math.Abs(g-r.GapEV) > 1e-12 {
			t.Errorf("N=%d: closed gap %.15g, sampled %.15g", n, g, r.GapEV)
		}
	}
	for n := 41; n <= 600; n++ {
		if g := ArmchairGapEV(2.7, n); (g == 0) != (n%3 == 2) {
			t.Errorf("N=%d: gap %.3g eV", n, g)
		}
	}
}

// Tubes are metallic iff (n − m) ≡ 0 (mod 3) (Hamada, Sawada & Oshiyama,
// PRL 68, 1579 (1992); Saito et al. 1998), from the full sampled bands for
// every tube with n ≤ 12, and from the near-K search for n ≤ 60, which must
// agree with the full bands wherever both are computed.
func TestTubeMetallicFamily(t *testing.T) {
	for n := 1; n <= 12; n++ {
		for m := 0; m <= n; m++ {
			r := run(t, params(Tube, 0, n, m))
			if want := (n-m)%3 == 0; r.Metallic != want {
				t.Errorf("(%d,%d): metallic %v (gap %.3g eV), want %v", n, m, r.Metallic, r.GapEV, want)
			}
			if g := TubeGapEV(2.7, n, m); math.Abs(g-r.GapEV) > 1e-9 {
				t.Errorf("(%d,%d): near-K gap %.12f, full bands %.12f", n, m, g, r.GapEV)
			}
		}
	}
	for n := 13; n <= 60; n++ {
		for m := 0; m <= n; m++ {
			if g := TubeGapEV(2.7, n, m); (g == 0) != ((n-m)%3 == 0) {
				t.Errorf("(%d,%d): gap %.3g eV", n, m, g)
			}
		}
	}
}

// Large semiconducting tubes: E_g ≈ 2a_cc·γ0/d (Saito et al. 1998, §4.3;
// White & Mintmire, Nature 394, 29 (1998)), within 5 % for d ≥ 1.5 nm
// (trigonal warping makes the two semiconducting families deviate by a few
// per cent in opposite directions).
func TestTubeGapInverseDiameter(t *testing.T) {
	tests := [][2]int{{19, 0}, {20, 0}, {22, 0}, {25, 0}, {16, 8}, {17, 10}, {15, 13}, {20, 15}, {30, 2}}
	for _, nm := range tests {
		n, m := nm[0], nm[1]
		d := TubeDiameterNM(n, m, 0.142)
		want := 2 * 0.142 * 2.7 / d
		got := TubeGapEV(2.7, n, m)
		if math.Abs(got-want) > 0.05*want {
			t.Errorf("(%d,%d) d=%.3f nm: gap %.4f eV, 2a_cc·γ0/d = %.4f", n, m, d, got, want)
		}
	}
	r := run(t, params(Tube, 0, 16, 8))
	if g := TubeGapEV(2.7, 16, 8); math.Abs(r.GapEV-g) > 1e-9 {
		t.Errorf("(16,8): full bands %.12f, near-K %.12f", r.GapEV, g)
	}
}

// A metallic tube near E = 0 carries M = 2 channels per spin and
// G = 4e²/h ≈ 154.9 µS as T → 0 (common practice; DESIGN check value).
func TestMetallicTubeConductance(t *testing.T) {
	for _, nm := range [][2]int{{5, 5}, {10, 10}, {9, 0}, {12, 0}, {7, 4}, {8, 5}} {
		for _, temp := range []float64{0, 1, 4.2} {
			p := params(Tube, 0, nm[0], nm[1])
			p.TempK = temp
			p.AtEV = []float64{0, 0.05, -0.05}
			r := run(t, p)
			for _, pt := range r.At {
				if pt.Modes != 4 {
					t.Errorf("(%d,%d) E=%g: M = %d, want 2 per spin × g_s = 2", nm[0], nm[1], pt.EnergyEV, pt.Modes)
				}
			}
			want := 4 * phys.ConductanceQuantumPerSpin
			if g := r.Observables.ConductanceS; math.Abs(g-want) > 1e-6*want {
				t.Errorf("(%d,%d) T=%g K: G = %.6g S, want 4e²/h = %.6g S", nm[0], nm[1], temp, g, want)
			}
		}
	}
}

// M(E) of the armchair ribbon counted directly: every channel p has E_p(k)
// monotone on 0 ≤ k ≤ π/(3a_cc) (E² is linear in cos(3ka_cc/2)), so for
// E > 0 it contributes one right-mover iff min_p < E ≤ max_p (Landauer
// counting; common practice).
func TestArmchairModesDirectCount(t *testing.T) {
	const n = 11
	p := params(Armchair, n, 0, 0)
	p.Gs = 1
	for e := 0.05; e < 8.0; e += 0.173 {
		p.AtEV = append(p.AtEV, e, -e)
	}
	r := run(t, p)
	for _, pt := range r.At {
		e := math.Abs(pt.EnergyEV)
		want := 0
		for q := 1; q <= n; q++ {
			a, b := ArmchairBand(2.7, n, q, 0), ArmchairBand(2.7, n, q, math.Pi)
			if math.Min(a, b) < e && e <= math.Max(a, b) {
				want++
			}
		}
		if pt.Modes != want {
			t.Errorf("E=%g: M = %d, want %d", pt.EnergyEV, pt.Modes, want)
		}
	}
}

// Sum rule: D(E) integrated over the whole band is the number of states per
// length, g_s·(atoms per cell)/period (each of the 2N bands holds one state
// per spin per cell). The bins hold the piecewise-linear bands exactly, so
// the sum is exact to rounding.
func TestDOSSumRule(t *testing.T) {
	for _, p := range []Params{
		params(Armchair, 9, 0, 0),
		params(Zigzag, 12, 0, 0),
		params(Tube, 0, 7, 4),
		params(Tube, 0, 6, 6),
	} {
		p.EMinEV, p.EMaxEV, p.Points = -8.5, 8.5, 1700
		r := run(t, p)
		sum := 0.0
		for _, d := range r.Curves.DOS {
			sum += d * r.Curves.BinEV
		}
		want := float64(p.Gs*r.AtomsPerCell) / r.PeriodNM
		if math.Abs(sum-want) > 1e-9*want {
			t.Errorf("%s: ∫D dE = %.12g /nm, want %.12g", p.Structure, sum, want)
		}
	}
}

// Far from band edges, the DOS of a single channel is g_s/(π·ħv) with
// ħv = dE/dk: for an armchair tube near E = 0, two channels with
// ħv = 3a_cc·γ0/2 give D = 8/(3π·a_cc·γ0) states/(eV·nm) with g_s = 2
// (Mintmire & White, PRL 81, 2506 (1998)).
func TestMetallicTubeDOS(t *testing.T) {
	p := params(Tube, 0, 10, 10)
	p.KPoints = 2001
	p.AtEV = []float64{0.1}
	r := run(t, p)
	want := 8 / (3 * math.Pi * 0.142 * 2.7)
	if got := r.At[0].DOS; math.Abs(got-want) > 0.01*want {
		t.Errorf("D(0.1 eV) = %.5g /(eV·nm), want %.5g", got, want)
	}
}

// Every number of the result is finite: encoding/json refuses NaN and ±Inf.
func TestResultJSONFinite(t *testing.T) {
	for _, p := range []Params{
		params(Armchair, 1, 0, 0),
		params(Armchair, 2, 0, 0),
		params(Zigzag, 1, 0, 0),
		params(Zigzag, 3, 0, 0),
		params(Tube, 0, 1, 0),
		params(Tube, 0, 1, 1),
		params(Tube, 0, 13, 7),
	} {
		p.AtEV = []float64{0, 2.7, -5.4, 9}
		r, err := Compute(context.Background(), p)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := json.Marshal(r); err != nil {
			t.Errorf("%s: %v", p.Structure, err)
		}
	}
}

func TestValidate(t *testing.T) {
	mod := func(f func(*Params)) Params { p := DefaultParams(); f(&p); return p }
	tests := []struct {
		name  string
		p     Params
		field string
		large bool
	}{
		{"structure", mod(func(p *Params) { p.Structure = "chiral" }), "structure", false},
		{"lines 0", mod(func(p *Params) { p.Lines = 0 }), "lines", false},
		{"m > n", mod(func(p *Params) { p.Structure, p.N, p.M = Tube, 4, 5 }), "m", false},
		{"n big", mod(func(p *Params) { p.Structure, p.N = Tube, 201 }), "n", false},
		{"gamma0 NaN", mod(func(p *Params) { p.Gamma0EV = math.NaN() }), "gamma0", false},
		{"acc", mod(func(p *Params) { p.AccNM = 2 }), "acc", false},
		{"gs", mod(func(p *Params) { p.Gs = 3 }), "gs", false},
		{"temp", mod(func(p *Params) { p.TempK = -1 }), "temp", false},
		{"at", mod(func(p *Params) { p.AtEV = []float64{math.Inf(1)} }), "at", false},
		{"emax", mod(func(p *Params) { p.EMaxEV = p.EMinEV }), "emax", false},
		{"kpoints even", mod(func(p *Params) { p.KPoints = 100 }), "kpoints", false},
		{"budget", mod(func(p *Params) { p.Structure, p.N, p.M, p.KPoints = Tube, 200, 199, 4001 }), "kpoints", true},
		{"zigzag budget", mod(func(p *Params) { p.Structure, p.Lines, p.KPoints = Zigzag, 2000, 401 }), "kpoints", true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			err := tc.p.Validate()
			var pe *ParamError
			if !errors.As(err, &pe) {
				t.Fatalf("got %v, want a ParamError", err)
			}
			if pe.Field != tc.field || pe.TooLarge != tc.large {
				t.Errorf("field %q too large %v, want %q %v (%v)", pe.Field, pe.TooLarge, tc.field, tc.large, err)
			}
		})
	}
	if err := DefaultParams().Validate(); err != nil {
		t.Errorf("defaults: %v", err)
	}
}

func TestCanceled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	for _, p := range []Params{params(Zigzag, 50, 0, 0), params(Tube, 0, 20, 3), params(Armchair, 30, 0, 0)} {
		if _, err := Compute(ctx, p); !errors.Is(err, context.Canceled) {
			t.Errorf("%s: err = %v, want context.Canceled", p.Structure, err)
		}
	}
}

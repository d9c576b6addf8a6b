package lattice

import (
	"context"
	"math"
	"testing"
)

func TestPartnerParams(t *testing.T) {
	tests := []struct {
		name        string
		p           Params
		want        Structure
		lines, n, m int
		exact, ok   bool
	}{
		{"armchair even", params(Armchair, 20, 0, 0), Tube, 0, 10, 0, true, true},
		{"armchair odd", params(Armchair, 7, 0, 0), Tube, 0, 4, 0, false, true},
		{"zigzag even", params(Zigzag, 10, 0, 0), Tube, 0, 5, 5, true, true},
		{"zigzag odd", params(Zigzag, 9, 0, 0), Tube, 0, 5, 5, false, true},
		{"zigzag tube", params(Tube, 0, 10, 0), Armchair, 20, 0, 0, true, true},
		{"armchair tube", params(Tube, 0, 6, 6), Zigzag, 12, 0, 0, true, true},
		{"chiral tube", params(Tube, 0, 6, 5), "", 0, 0, 0, false, false},
		{"beyond tube bound", params(Armchair, 1000, 0, 0), "", 0, 0, 0, false, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			q, exact, note, ok := PartnerParams(tc.p)
			if ok != tc.ok || exact != tc.exact || note == "" {
				t.Fatalf("ok %v exact %v note %q; want %v %v", ok, exact, note, tc.ok, tc.exact)
			}
			if !ok {
				return
			}
			if q.Structure != tc.want {
				t.Errorf("structure %s, want %s", q.Structure, tc.want)
			}
			if q.Structure == Tube && (q.N != tc.n || q.M != tc.m) || q.Structure != Tube && q.Lines != tc.lines {
				t.Errorf("partner %+v", q)
			}
		})
	}
}

// Rolling up conserves the unit cell: an exact partner has the same atoms
// per cell and the same period along the axis (Saito, Dresselhaus &
// Dresselhaus 1998, ch. 3: (n, 0) has T = 3a_cc and 4n atoms; (n, n) has
// T = √3·a_cc and 4n atoms).
func TestExactPartnerSameCell(t *testing.T) {
	for _, p := range []Params{params(Armchair, 14, 0, 0), params(Zigzag, 8, 0, 0), params(Tube, 0, 9, 0), params(Tube, 0, 4, 4)} {
		q, exact, _, ok := PartnerParams(p)
		if !ok || !exact {
			t.Fatalf("%+v: no exact partner", p)
		}
		a, b := run(t, p), run(t, q)
		if a.AtomsPerCell != b.AtomsPerCell || math.Abs(a.PeriodNM-b.PeriodNM) > 1e-12 {
			t.Errorf("%s ↔ %s: atoms %d/%d, period %g/%g nm", p.Structure, q.Structure, a.AtomsPerCell, b.AtomsPerCell, a.PeriodNM, b.PeriodNM)
		}
	}
}

// The rationale for odd N: the armchair ribbon's box is N+1 lines long
// (θ_p = pπ/(N+1), Nakada et al. 1996) and the ((N+1)/2, 0) tube is the ring
// of that length (θ_q = 2πq/(N+1), Saito et al. 1998), so every even-p
// ribbon channel is a band of the partner tube, at every k.
func TestOddArmchairPartnerShareEvenChannels(t *testing.T) {
	for _, n := range []int{5, 7, 11, 21} {
		tube := (n + 1) / 2
		for _, s := range []float64{-2.5, 0, 0.4, math.Pi} {
			for p := 2; p <= n; p += 2 {
				e := ArmchairBand(2.7, n, p, s)
				best := math.Inf(1)
				for mu := 0; mu < 2*tube; mu++ {
					best = math.Min(best, math.Abs(TubeBand(2.7, tube, 0, mu, s)-e))
				}
				if best > 1e-12 {
					t.Errorf("N=%d p=%d s=%g: E=%.12f not among the (%d,0) bands (off by %.3g)", n, p, s, e, tube, best)
				}
			}
		}
	}
}

func TestComputePartner(t *testing.T) {
	r, err := Compute(context.Background(), params(Armchair, 20, 0, 0))
	if err != nil {
		t.Fatal(err)
	}
	if r.Partner.Structure != Tube || *r.Partner.N != 10 || !r.Partner.Exact || r.Partner.DiameterNM == nil {
		t.Errorf("partner %+v", r.Partner)
	}
	// (10, 0) is the DESIGN check tube: 0.948 eV (Saito et al. 1998).
	if math.Abs(r.Partner.GapEV-0.948) > 1e-3 {
		t.Errorf("partner gap %.4f eV, want 0.948", r.Partner.GapEV)
	}
	// N = 20 = 3·6 + 2 is metallic (Nakada et al. 1996) while its tube is not:
	// box and ring quantise the same width differently.
	if !r.Metallic || r.Partner.Metallic {
		t.Errorf("metallic %v, partner metallic %v", r.Metallic, r.Partner.Metallic)
	}
}

// The family view shows the three families: armchair ribbons with N mod 3 = 2
// and tubes with (n − m) mod 3 = 0 are gapless, the others are not (Nakada
// et al. 1996; Hamada et al. 1992).
func TestFamilyView(t *testing.T) {
	v, err := Family(context.Background(), params(Armchair, 0, 0, 0), 2, 60, 1, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	if v.Axis != "width_nm" || len(v.Points) != 59 {
		t.Fatalf("axis %q, %d points", v.Axis, len(v.Points))
	}
	for _, pt := range v.Points {
		if (pt.GapEV == 0) != (pt.Family == 2) || pt.SizeNM <= 0 {
			t.Errorf("N=%d family %d gap %.3g width %.3g", pt.Lines, pt.Family, pt.GapEV, pt.SizeNM)
		}
	}
	v, err = Family(context.Background(), params(Tube, 0, 10, 0), 0, 0, 0, 0.6, 1.2)
	if err != nil {
		t.Fatal(err)
	}
	if v.Axis != "diameter_nm" || len(v.Points) < 20 {
		t.Fatalf("axis %q, %d points", v.Axis, len(v.Points))
	}
	for _, pt := range v.Points {
		if (pt.GapEV == 0) != (pt.Family == 0) || pt.SizeNM < 0.6 || pt.SizeNM > 1.2 {
			t.Errorf("(%d,%d) family %d gap %.3g d %.3g", *pt.N, *pt.M, pt.Family, pt.GapEV, pt.SizeNM)
		}
	}
	v, err = Family(context.Background(), params(Zigzag, 0, 0, 0), 1, 41, 5, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	for _, pt := range v.Points {
		if pt.GapEV != 0 {
			t.Errorf("zigzag N=%d: gap %.3g, want 0 (edge states, Fujita et al. 1996)", pt.Lines, pt.GapEV)
		}
	}
	if _, err := Family(context.Background(), params(Armchair, 0, 0, 0), 0, 10, 1, 0, 0); err == nil {
		t.Error("lines from 0 accepted")
	}
}

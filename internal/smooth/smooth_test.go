package smooth

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"ringbox/internal/phys"
	"ringbox/internal/spectrum"
)

var iso = []spectrum.Valley{{MassM0: [3]float64{1, 1, 1}, Degeneracy: 1}}

func conductor(bc []spectrum.BC, lengthsM ...float64) spectrum.Conductor {
	c := spectrum.Conductor{SpinDegeneracy: 1, Valleys: iso}
	for i, l := range lengthsM {
		c.Axes = append(c.Axes, spectrum.Axis{LengthM: l, BC: bc[i]})
	}
	return c
}

// TestWeylClosedForms checks the general subset sum against the printed
// closed forms (Balian & Bloch 1970; Baltes & Hilf 1976): kL/π − ½,
// A k²/4π − P k/4π + ¼, V k³/6π² − S k²/16π + L k/16π − ⅛, where L is the
// total edge length 4(a+b+c).
func TestWeylClosedForms(t *testing.T) {
	e := 0.8
	k := phys.KOf(e, 1)
	a, b, c := 7e-9, 11e-9, 13e-9
	B := spectrum.Box
	tests := []struct {
		name string
		c    spectrum.Conductor
		want float64
	}{
		{"1D box", conductor([]spectrum.BC{B}, a), k*a/math.Pi - 0.5},
		{"1D ring", conductor([]spectrum.BC{spectrum.Ring}, a), k * a / math.Pi},
		{"rectangle", conductor([]spectrum.BC{B, B}, a, b), a*b*k*k/(4*math.Pi) - 2*(a+b)*k/(4*math.Pi) + 0.25},
		{"3D box", conductor([]spectrum.BC{B, B, B}, a, b, c),
			a*b*c*k*k*k/(6*math.Pi*math.Pi) - 2*(a*b+b*c+c*a)*k*k/(16*math.Pi) + 4*(a+b+c)*k/(16*math.Pi) - 0.125},
		{"3D ring", conductor([]spectrum.BC{spectrum.Ring, spectrum.Ring, spectrum.Ring}, a, b, c), a * b * c * k * k * k / (6 * math.Pi * math.Pi)},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got, _ := Weyl(tt.c, e)
			if math.Abs(got-tt.want) > 1e-10*math.Max(1, math.Abs(tt.want)) {
				t.Errorf("got %.12g, want %.12g", got, tt.want)
			}
		})
	}
}

// TestWeylAveragesStaircase: the exact staircase minus the smooth count
// averages to about zero over many energies (Weyl 1912; Balian & Bloch
// 1970), for boxes, rings and mixes in 1D, 2D and 3D, while the bulk term
// alone leaves the box's surface deficit.
func TestWeylAveragesStaircase(t *testing.T) {
	ctx := context.Background()
	r := rand.New(rand.NewPCG(7, 8))
	B, R, O := spectrum.Box, spectrum.Ring, spectrum.Open
	cases := [][]spectrum.BC{{B}, {R}, {B, B}, {R, R}, {B, R}, {B, O}, {B, B, B}, {R, R, R}, {B, R, B}, {B, B, O}, {B, O, O}, {R, B, O}}
	for _, bcs := range cases {
		c := spectrum.Conductor{SpinDegeneracy: 2, AlphaPerEV: 0.7,
			Valleys: []spectrum.Valley{{MassM0: [3]float64{0.3, 0.45, 0.6}, Degeneracy: 1}}}
		for _, bc := range bcs {
			c.Axes = append(c.Axes, spectrum.Axis{LengthM: (20 + 30*r.Float64()) * 1e-9, BC: bc})
		}
		emax := 1.5
		k, err := spectrum.NewCounter(ctx, c, emax)
		if err != nil {
			t.Fatal(err)
		}
		const samples = 4000
		es := make([]float64, samples)
		for i := range es {
			es[i] = emax * (0.2 + 0.8*float64(i)/samples)
		}
		exact := make([]float64, samples)
		if err := k.States(ctx, es, exact); err != nil {
			t.Fatal(err)
		}
		var mean, meanBulk, scale float64
		for i, e := range es {
			w, _ := Weyl(c, e)
			b, _ := Continuum(c, e)
			mean += (exact[i] - w) / samples
			meanBulk += (exact[i] - b) / samples
			scale += ErrorEstimate(c, e) / samples
		}
		// The residual mean is small against the typical fluctuation: a fifth
		// of it here (the fluctuation estimate is itself generous).
		if math.Abs(mean) > 0.2*scale {
			t.Errorf("%v: mean(N − N̄) = %g, typical fluctuation %g", bcs, mean, scale)
		}
		hasBox := false
		for _, bc := range bcs {
			hasBox = hasBox || bc == B
		}
		if hasBox && !(meanBulk < 0 && math.Abs(mean) < 0.2*math.Abs(meanBulk)) {
			t.Errorf("%v: the box should fall short of the bulk count: mean %g", bcs, meanBulk)
		}
	}
}

// TestErrorEstimateBoundsExact: near the asymptotic switch-over sizes the
// estimate covers the exact remainder at every sampled energy.
func TestErrorEstimateBoundsExact(t *testing.T) {
	ctx := context.Background()
	B, R, O := spectrum.Box, spectrum.Ring, spectrum.Open
	for _, tc := range []struct {
		bcs []spectrum.BC
		l   []float64
	}{
		{[]spectrum.BC{B, B, B}, []float64{60e-9, 60e-9, 60e-9}}, // a cube: the degenerate worst case
		{[]spectrum.BC{R, R, R}, []float64{60e-9, 60e-9, 60e-9}},
		{[]spectrum.BC{B, B, B}, []float64{40e-9, 55e-9, 71e-9}},
		{[]spectrum.BC{B, B}, []float64{300e-9, 410e-9}},
		{[]spectrum.BC{B, B, O}, []float64{20e-9, 30e-9, 100e-9}},
		{[]spectrum.BC{B}, []float64{1e-6}},
	} {
		c := spectrum.Conductor{SpinDegeneracy: 2, Valleys: iso}
		for i, bc := range tc.bcs {
			c.Axes = append(c.Axes, spectrum.Axis{LengthM: tc.l[i], BC: bc})
		}
		emax := 7.0
		k, _ := spectrum.NewCounter(ctx, c, emax)
		es := make([]float64, 500)
		for i := range es {
			es[i] = emax * (0.5 + 0.5*float64(i+1)/float64(len(es)))
		}
		exact := make([]float64, len(es))
		_ = k.States(ctx, es, exact)
		for i, e := range es {
			w, _ := Weyl(c, e)
			if d := math.Abs(exact[i] - w); d > ErrorEstimate(c, e) {
				t.Errorf("%v at %g eV: |N − N̄| = %g > estimate %g (N = %g)", tc.bcs, e, d, ErrorEstimate(c, e), exact[i])
				break
			}
		}
	}
}

// TestContinuumModes: a wide 3D contact has M = k_F²A/4π per spin (Sharvin,
// JETP 21, 655 (1965)); a 2D one W·k/π.
func TestContinuumModes(t *testing.T) {
	e := 5.0
	k := phys.KOf(e, 1)
	c := spectrum.Conductor{SpinDegeneracy: 2, Valleys: iso, Axes: []spectrum.Axis{
		{LengthM: 30e-9, BC: spectrum.Box}, {LengthM: 40e-9, BC: spectrum.Box}, {LengthM: 1e-6, BC: spectrum.Open}}}
	if got, want := ContinuumModes(c, 2, e), 2*k*k*30e-9*40e-9/(4*math.Pi); math.Abs(got/want-1) > 1e-12 {
		t.Errorf("3D: %g want %g", got, want)
	}
	c.Axes = c.Axes[1:]
	if got, want := ContinuumModes(c, 1, e), 2*k*40e-9/math.Pi; math.Abs(got/want-1) > 1e-12 {
		t.Errorf("2D: %g want %g", got, want)
	}
}

func TestWeylDerivative(t *testing.T) {
	c := conductor([]spectrum.BC{spectrum.Box, spectrum.Ring, spectrum.Open}, 9e-9, 12e-9, 40e-9)
	c.AlphaPerEV = 1.3
	e, h := 0.4, 1e-6
	n1, _ := Weyl(c, e-h)
	n2, _ := Weyl(c, e+h)
	_, d := Weyl(c, e)
	if math.Abs((n2-n1)/(2*h)/d-1) > 1e-6 {
		t.Errorf("dN̄/dE %g vs numerical %g", d, (n2-n1)/(2*h))
	}
}

// TestMonotoneEnvelope: the Weyl count of a thin box falls below zero near
// the band edge; its envelope never decreases, never goes negative, and is
// the Weyl count itself higher up.
func TestMonotoneEnvelope(t *testing.T) {
	c := conductor([]spectrum.BC{spectrum.Box, spectrum.Box, spectrum.Open}, 1, 10e-9, 100e-9)
	c.SpinDegeneracy = 2
	f := func(e float64) float64 { n, _ := Weyl(c, e); return n }
	if f(1e-6) >= 0 {
		t.Fatalf("expected the Weyl count to dip below zero, got %g", f(1e-6))
	}
	m := Monotone(f, 0.5)
	prev := 0.0
	for i := 0; i <= 20000; i++ {
		e := 0.5 * float64(i) / 20000
		v := m(e)
		if v < prev || v < 0 {
			t.Fatalf("envelope at %g: %g after %g", e, v, prev)
		}
		prev = v
	}
	if got, want := m(0.4), f(0.4); got != want {
		t.Errorf("envelope %g, Weyl %g at 0.4 eV", got, want)
	}
}

// TestErrorEstimateBoundsAnisotropic: on seeded random films (µm × µm × nm),
// lines (nm × nm × µm), long wires and cubes near the sizes where a count
// turns asymptotic, with box and ring mixes and anisotropic masses, the
// estimate covers the exact remainder at every sampled energy (the exact
// counts are the engine's, themselves checked against independent column
// counts in package spectrum).
func TestErrorEstimateBoundsAnisotropic(t *testing.T) {
	ctx := context.Background()
	r := rand.New(rand.NewPCG(41, 42))
	nm := 1e-9
	shapes := map[string]func() [3]float64{
		"film": func() [3]float64 {
			return [3]float64{(300 + 2700*r.Float64()) * nm, (300 + 2700*r.Float64()) * nm, (1 + 4*r.Float64()) * nm}
		},
		"line": func() [3]float64 {
			return [3]float64{(1 + 10*r.Float64()) * nm, (1 + 12*r.Float64()) * nm, (1e3 + 2e4*r.Float64()) * nm}
		},
		"wire": func() [3]float64 {
			return [3]float64{(10 + 30*r.Float64()) * nm, (10 + 30*r.Float64()) * nm, (1e4 + 1e5*r.Float64()) * nm}
		},
		"cube": func() [3]float64 {
			l := (20 + 60*r.Float64()) * nm
			return [3]float64{l, l, l * (1 + r.Float64()*r.Float64())}
		},
	}
	for _, name := range []string{"film", "line", "wire", "cube"} {
		for trial := 0; trial < 6; trial++ {
			l := shapes[name]()
			c := spectrum.Conductor{SpinDegeneracy: 2}
			for i := range l {
				c.Axes = append(c.Axes, spectrum.Axis{LengthM: l[i], BC: spectrum.BC(r.IntN(2))})
			}
			m := [3]float64{1, 1, 1}
			m[r.IntN(3)] = 0.3 + r.Float64()
			c.Valleys = []spectrum.Valley{{MassM0: m, Degeneracy: 1}}
			emax := 7.0
			if name == "wire" {
				emax = 0.5
			}
			k, err := spectrum.NewPlan(c, emax, 200).Counter(ctx)
			if err != nil {
				t.Fatal(err)
			}
			es := make([]float64, 200)
			for i := range es {
				es[i] = emax * (0.3 + 0.7*float64(i+1)/float64(len(es)))
			}
			exact := make([]float64, len(es))
			if err := k.States(ctx, es, exact); err != nil {
				t.Fatal(err)
			}
			worst := 0.0
			for i, e := range es {
				w, _ := Weyl(c, e)
				worst = math.Max(worst, math.Abs(exact[i]-w)/ErrorEstimate(c, e))
			}
			t.Logf("%s: worst remainder/estimate %.3g", name, worst)
			if worst > 1 {
				t.Errorf("%s %v %v: |N − N̄| reaches %.3g × the estimate", name, l, c.Axes, worst)
			}
		}
	}
}

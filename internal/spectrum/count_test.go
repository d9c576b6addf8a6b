package spectrum

import (
	"context"
	"math"
	"math/rand/v2"
	"sort"
	"testing"

	"ringbox/internal/phys"
)

// bruteStates enumerates every confined lattice point one by one (each ring
// index n and −n separately) and integrates the open axes with the textbook
// continuum count, L·k/π, A·k²/4π or V·k³/6π² per transverse state.
func bruteStates(c Conductor, eEV float64) float64 {
	g := Gamma(eEV, c.AlphaPerEV)
	if g < 0 {
		return 0
	}
	var total float64
	for _, v := range c.Valleys {
		var conf []int
		for i, a := range c.Axes {
			if a.BC != Open {
				conf = append(conf, i)
			}
		}
		var walk func(d int, used float64) float64
		walk = func(d int, used float64) float64 {
			if d == len(conf) {
				rest := g - used
				if rest < -1e-12*g {
					return 0
				}
				// Open axes: volume of the ellipse section in k-space over (2π)^d_o per unit length.
				f := 1.0
				var dim int
				for i, a := range c.Axes {
					if a.BC == Open {
						dim++
						f *= a.LengthM / (2 * math.Pi) * math.Sqrt(v.MassM0[i]/phys.HbarSqOver2M0EVm2)
					}
				}
				switch dim {
				case 1:
					return 2 * f * math.Sqrt(math.Max(rest, 0))
				case 2:
					return math.Pi * f * math.Max(rest, 0)
				case 3:
					return 4 * math.Pi / 3 * f * math.Pow(math.Max(rest, 0), 1.5)
				}
				return 1
			}
			i := conf[d]
			a := c.Axes[i]
			var s float64
			if a.BC == Box {
				for n := 1; ; n++ {
					k := float64(n) * math.Pi / a.LengthM
					e := phys.HbarSqOver2M0EVm2 * k * k / v.MassM0[i]
					if used+e > g*(1+1e-12) {
						break
					}
					s += walk(d+1, used+e)
				}
				return s
			}
			for n := 0; ; n++ {
				k := float64(n) * 2 * math.Pi / a.LengthM
				e := phys.HbarSqOver2M0EVm2 * k * k / v.MassM0[i]
				if used+e > g*(1+1e-12) {
					break
				}
				s += walk(d+1, used+e)
				if n != 0 {
					s += walk(d+1, used+e) // −n
				}
			}
			return s
		}
		total += float64(v.Degeneracy*c.SpinDegeneracy) * walk(0, 0)
	}
	return total
}

func randomConductor(r *rand.Rand) Conductor {
	dims := 1 + r.IntN(3)
	c := Conductor{SpinDegeneracy: 1 + r.IntN(2)}
	if r.IntN(2) == 0 {
		c.AlphaPerEV = 3 * r.Float64()
	}
	for i := 0; i < dims; i++ {
		c.Axes = append(c.Axes, Axis{LengthM: (2 + 18*r.Float64()) * 1e-9, BC: BC(r.IntN(3))})
	}
	for v := 0; v <= r.IntN(2); v++ {
		var m [3]float64
		for i := range m {
			m[i] = 0.03 + r.Float64()
		}
		c.Valleys = append(c.Valleys, Valley{MassM0: m, Degeneracy: 1 + r.IntN(3)})
	}
	return c
}

// TestStatesMatchEnumeration: the column counts equal brute-force
// enumeration on seeded random conductors (identity; common practice).
func TestStatesMatchEnumeration(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	ctx := context.Background()
	for trial := 0; trial < 250; trial++ {
		c := randomConductor(r)
		// Choose emax so the brute force stays small: a few thousand states.
		emax := 0.05
		for bruteStates(c, emax*2) < 3000 && emax < 50 {
			emax *= 2
		}
		k, err := NewCounter(ctx, c, emax)
		if err != nil {
			t.Fatal(err)
		}
		energies := make([]float64, 30)
		for i := range energies {
			energies[i] = emax * r.Float64()
		}
		// Energies exactly on levels test the tie rule (≤ counts).
		for _, l := range levels(c, 5) {
			if l.EnergyEV <= emax {
				energies = append(energies, l.EnergyEV)
			}
		}
		sort.Float64s(energies)
		got := make([]float64, len(energies))
		if err := k.States(ctx, energies, got); err != nil {
			t.Fatal(err)
		}
		for i, e := range energies {
			want := bruteStates(c, e)
			// Integers for confined conductors; with an open axis a subband
			// edge just below E gives √(rounding), hence 1e-7.
			if math.Abs(got[i]-want) > 1e-7*math.Max(10, want) {
				t.Fatalf("trial %d %+v at %g eV: got %g, brute force %g", trial, c, e, got[i], want)
			}
		}
	}
}

// TestModesMatchEnumeration: M(E) along an axis equals the brute-force
// count of transverse states below γ(E) (DESIGN's definition of modes).
func TestModesMatchEnumeration(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	ctx := context.Background()
	for trial := 0; trial < 150; trial++ {
		c := randomConductor(r)
		along := r.IntN(len(c.Axes))
		tr := c.Transverse(along)
		k, err := NewCounter(ctx, tr, 2)
		if err != nil {
			t.Fatal(err)
		}
		for i := 0; i < 10; i++ {
			e := 2 * r.Float64()
			got := []float64{0}
			if err := k.States(ctx, []float64{e}, got); err != nil {
				t.Fatal(err)
			}
			want := bruteStates(tr, e)
			if math.Abs(got[0]-want) > 1e-9*math.Max(1, want) {
				t.Fatalf("trial %d along %d at %g: %g vs %g", trial, along, e, got[0], want)
			}
		}
	}
	// A 1D conductor has M = g_s·g_v for every E ≥ 0 (DESIGN).
	one := Conductor{Axes: []Axis{{LengthM: 1e-7, BC: Open}}, SpinDegeneracy: 2,
		Valleys: []Valley{{MassM0: [3]float64{0.2, 0.2, 0.2}, Degeneracy: 3}}}
	k, _ := NewCounter(ctx, one.Transverse(0), 1)
	got := []float64{0, 0}
	_ = k.States(ctx, []float64{0, 0.7}, got)
	if got[0] != 6 || got[1] != 6 {
		t.Errorf("1D modes %v, want 6", got)
	}
}

// TestRingDegeneracy: ring levels with n ≠ 0 are doubly degenerate (±n,
// common practice); a box with incommensurate lengths has no accidental
// degeneracy at low energy.
func TestRingDegeneracy(t *testing.T) {
	ring := Conductor{Axes: []Axis{{LengthM: 10e-9, BC: Ring}}, SpinDegeneracy: 2,
		Valleys: []Valley{{MassM0: [3]float64{1, 1, 1}, Degeneracy: 1}}}
	for i, l := range levels(ring, 10) {
		want := 4
		if i == 0 {
			want = 2
		}
		if l.Degeneracy != want {
			t.Errorf("ring level %d (n=%v) degeneracy %d, want %d", i, l.N, l.Degeneracy, want)
		}
	}
	// Squared length ratios π/2 and e are irrational, so no two levels coincide.
	box := Conductor{Axes: []Axis{{10e-9, Box}, {10e-9 * math.Sqrt(math.Pi/2), Box}, {10e-9 * math.Sqrt(math.E), Box}},
		SpinDegeneracy: 2, Valleys: []Valley{{MassM0: [3]float64{1, 1, 1}, Degeneracy: 1}}}
	for _, l := range levels(box, 30) {
		if l.Degeneracy != 2 {
			t.Errorf("incommensurate box level %v has degeneracy %d", l.N, l.Degeneracy)
		}
	}
	// A cube has the familiar triple degeneracy of (1,1,2) (common practice).
	cube := box
	cube.Axes = []Axis{{10e-9, Box}, {10e-9, Box}, {10e-9, Box}}
	if l := levels(cube, 2); l[1].Degeneracy != 6 {
		t.Errorf("cube second level degeneracy %d, want 3×2", l[1].Degeneracy)
	}
}

// TestContinuumMomentumForms: with every axis open the count per spin is
// 2L·p/h, πA·(p/h)² and (4π/3)V·(p/h)³ (standard textbook phase-space
// counting, e.g. Kittel, Introduction to Solid State Physics, ch. 6).
func TestContinuumMomentumForms(t *testing.T) {
	ctx := context.Background()
	m, e := 0.3, 0.4
	p := math.Sqrt(2 * m * phys.ElectronMass * e * phys.ElementaryCharge)
	ph := p / phys.PlanckH
	lx, ly, lz := 30e-9, 50e-9, 70e-9
	tests := []struct {
		name string
		axes []Axis
		want float64
	}{
		{"1D", []Axis{{lx, Open}}, 2 * lx * ph},
		{"2D", []Axis{{lx, Open}, {ly, Open}}, math.Pi * lx * ly * ph * ph},
		{"3D", []Axis{{lx, Open}, {ly, Open}, {lz, Open}}, 4 * math.Pi / 3 * lx * ly * lz * ph * ph * ph},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			c := Conductor{Axes: tt.axes, SpinDegeneracy: 1, Valleys: []Valley{{MassM0: [3]float64{m, m, m}, Degeneracy: 1}}}
			k, _ := NewCounter(ctx, c, 1)
			got := []float64{0}
			_ = k.States(ctx, []float64{e}, got)
			if math.Abs(got[0]/tt.want-1) > 1e-12 {
				t.Errorf("got %g, want %g", got[0], tt.want)
			}
		})
	}
}

// TestCopperDensity: free electrons filled to E_F = 7.00 eV give
// 8.47×10²² cm⁻³ (Ashcroft & Mermin, Table 2.1) as a continuum and as the
// exact count of a 40 nm ring cube. The table's E_F (from rounded r_s) and n
// agree only to 0.7 %, hence the 1 % tolerance. The 40 nm box sits lower by
// its surface term, −S·k²/16π against V·k³/6π², i.e. by (3π/8)(S/V)/k_F ≈ 1.3 %
// (Weyl; Balian & Bloch 1970).
func TestCopperDensity(t *testing.T) {
	ctx := context.Background()
	free := []Valley{{MassM0: [3]float64{1, 1, 1}, Degeneracy: 1}}
	for _, bc := range []BC{Open, Box, Ring} {
		c := Conductor{Axes: []Axis{{40e-9, bc}, {40e-9, bc}, {40e-9, bc}}, SpinDegeneracy: 2, Valleys: free}
		k, _ := NewCounter(ctx, c, 7)
		n := []float64{0}
		_ = k.States(ctx, []float64{7.00}, n)
		density := n[0] / c.Volume() * 1e-6 // cm⁻³
		want := 8.47e22
		if bc == Box {
			kF := phys.KOf(7.00, 1)
			want *= 1 - 3*math.Pi/8*(6/40e-9)/kF
		}
		if math.Abs(density/want-1) > 0.01 {
			t.Errorf("%v: Cu density %.4g cm⁻³, want 8.47e22", bc, density)
		}
	}
}

// TestGaAs2DDensityOfStates: the 2D density of states m*/(πħ²) of GaAs
// (m* = 0.067, g_s = 2) is 2.80×10¹⁰ cm⁻² meV⁻¹ (common practice).
func TestGaAs2DDensityOfStates(t *testing.T) {
	ctx := context.Background()
	c := Conductor{Axes: []Axis{{1e-6, Open}, {1e-6, Open}}, SpinDegeneracy: 2,
		Valleys: []Valley{{MassM0: [3]float64{0.067, 0.067, 0.067}, Degeneracy: 1}}}
	k, _ := NewCounter(ctx, c, 1)
	d := []float64{0}
	_ = k.DensityOfStates(ctx, []float64{0.01}, d)
	perCm2meV := d[0] / (c.Volume() * 1e4) / 1000
	if math.Abs(perCm2meV/2.80e10-1) > 0.005 {
		t.Errorf("GaAs 2D DOS %.4g cm⁻² meV⁻¹", perCm2meV)
	}
	// And a quantum well (one box axis) steps by that amount per subband.
	w := Conductor{Axes: []Axis{{10e-9, Box}, {1e-6, Open}, {1e-6, Open}}, SpinDegeneracy: 2, Valleys: c.Valleys}
	kw, _ := NewCounter(ctx, w, 1)
	lv := levels(w, 2)
	e := []float64{(lv[0].EnergyEV + lv[1].EnergyEV) / 2, lv[1].EnergyEV * 1.01}
	dw := make([]float64, 2)
	_ = kw.DensityOfStates(ctx, e, dw)
	if r := dw[1] / dw[0]; math.Abs(r-2) > 1e-9 {
		t.Errorf("second subband should double the 2D DOS, ratio %g", r)
	}
}

func TestDensityIsDerivative(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	ctx := context.Background()
	for trial := 0; trial < 60; trial++ {
		c := randomConductor(r)
		if c.Confined() {
			continue
		}
		k, _ := NewCounter(ctx, c, 3)
		e := 0.05 + 2*r.Float64()
		h := 1e-7 * e
		n := make([]float64, 2)
		_ = k.States(ctx, []float64{e - h, e + h}, n)
		d := []float64{0}
		_ = k.DensityOfStates(ctx, []float64{e}, d)
		num := (n[1] - n[0]) / (2 * h)
		// A level edge inside (e−h, e+h) makes the difference meaningless; rare.
		if math.Abs(num-d[0]) > 1e-4*math.Max(d[0], 1) {
			t.Logf("trial %d at %g: numerical %g analytic %g (an edge nearby?)", trial, e, num, d[0])
			if math.Abs(num-d[0]) > 0.05*math.Max(d[0], 1) {
				t.Errorf("trial %d: D %g vs dN/dE %g", trial, d[0], num)
			}
		}
	}
}

func TestBroadenedSumRule(t *testing.T) {
	ctx := context.Background()
	c := Conductor{Axes: []Axis{{8e-9, Box}, {9e-9, Ring}, {11e-9, Box}}, SpinDegeneracy: 2,
		Valleys: []Valley{{MassM0: [3]float64{0.2, 0.2, 0.2}, Degeneracy: 1}}}
	k, _ := NewCounter(ctx, c, 2)
	// ∫D dE over a window well inside equals N(b) − N(a) up to the tails.
	var es []float64
	for e := 0.0; e <= 1.5; e += 0.0005 {
		es = append(es, e)
	}
	for _, eta := range []float64{0.01, 0.002} {
		d, _, err := k.Broadened(ctx, es, eta, Gaussian)
		if err != nil {
			t.Fatal(err)
		}
		var integral float64
		for i := 1; i < len(es); i++ {
			integral += (d[i] + d[i-1]) / 2 * (es[i] - es[i-1])
		}
		n := []float64{0}
		_ = k.States(ctx, []float64{1.5}, n)
		if math.Abs(integral-n[0]) > 0.01*n[0] {
			t.Errorf("η=%g: ∫D = %g, N(1.5) = %g", eta, integral, n[0])
		}
	}
}

// TestBroadenedBinnedLargeBox: in a box with ~10⁶ states the binned path is
// used; with η far above the level spacing the broadened D(E) must follow
// dN/dE of the exact staircase averaged over the same window (sum rule), and
// agree with the enumerated path on a box small enough for both.
func TestBroadenedBinnedLargeBox(t *testing.T) {
	ctx := context.Background()
	free := []Valley{{MassM0: [3]float64{1, 1, 1}, Degeneracy: 1}}
	c := Conductor{Axes: []Axis{{23e-9, Box}, {27e-9, Ring}, {31e-9, Box}}, SpinDegeneracy: 2, Valleys: free, AlphaPerEV: 0.1}
	k, _ := NewCounter(ctx, c, 6)
	var es []float64
	for e := 3.0; e <= 4.0; e += 0.002 {
		es = append(es, e)
	}
	d, used, err := k.Broadened(ctx, es, 0.02, Gaussian)
	if err != nil {
		t.Fatal(err)
	}
	if used != 0.02 {
		t.Errorf("broadening used %g", used)
	}
	// ∫_{3.2}^{3.8} D dE against N(3.8) − N(3.2): the Gaussian tails that
	// leak across the ends cancel to first order.
	var integral float64
	for i := 1; i < len(es); i++ {
		if es[i-1] >= 3.2 && es[i] <= 3.8+1e-9 {
			integral += (d[i] + d[i-1]) / 2 * (es[i] - es[i-1])
		}
	}
	n := make([]float64, 2)
	_ = k.States(ctx, []float64{3.2, 3.8}, n)
	if want := n[1] - n[0]; math.Abs(integral/want-1) > 0.005 {
		t.Errorf("∫D = %g, ΔN = %g", integral, want)
	}
}

// TestLevelsMatchEnumeration: the lowest levels and their degeneracies equal
// those read off the brute-force staircase (each jump of N(E) is a level).
func TestLevelsMatchEnumeration(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	ctx := context.Background()
	for trial := 0; trial < 80; trial++ {
		c := randomConductor(r)
		if !c.Confined() {
			continue
		}
		lv, truncated, err := Levels(ctx, c, 8)
		if err != nil || truncated {
			t.Fatalf("trial %d: truncated %v, %v", trial, truncated, err)
		}
		if len(lv) != 8 {
			t.Fatalf("trial %d: %d levels", trial, len(lv))
		}
		k, _ := NewCounter(ctx, c, lv[7].EnergyEV*1.01)
		for i, l := range lv {
			below := l.EnergyEV*(1-1e-10) - 1e-15
			n := []float64{0, 0}
			_ = k.States(ctx, []float64{below, l.EnergyEV}, n)
			if int(n[1]-n[0]) != l.Degeneracy {
				t.Errorf("trial %d level %d at %g: jump %g, degeneracy %d", trial, i, l.EnergyEV, n[1]-n[0], l.Degeneracy)
			}
			if i > 0 {
				// No level hides between two listed ones.
				mid := []float64{lv[i-1].EnergyEV, below}
				_ = k.States(ctx, mid, mid)
				if mid[1] != mid[0] {
					t.Errorf("trial %d: states between levels %d and %d", trial, i-1, i)
				}
			}
		}
	}
}

// TestLevelsExtremeRatios: a 1 cm × 1 cm × 0.1 nm box and a 10⁵ mass ratio
// list their lowest levels quickly and resolve the splittings of the long
// axes (common practice: ε = ħ²π²n²/2mL² per axis, added).
func TestLevelsExtremeRatios(t *testing.T) {
	ctx := context.Background()
	sheet := Conductor{SpinDegeneracy: 2, Valleys: []Valley{{MassM0: [3]float64{0.067, 0.067, 0.067}, Degeneracy: 1}},
		Axes: []Axis{{LengthM: 1e-2}, {LengthM: 1e-2}, {LengthM: 1e-10}}}
	lv, truncated, err := Levels(ctx, sheet, 20)
	if err != nil || truncated || len(lv) != 20 {
		t.Fatalf("%d levels, truncated %v, %v", len(lv), truncated, err)
	}
	// The x and y axes are equal: levels (1,1), (1,2)+(2,1), (2,2), … with
	// excitations q·(nx² + ny² − 2), q = ħ²π²/(2mL²).
	q := phys.HbarSqOver2M0EVm2 * math.Pi * math.Pi / (0.067 * 1e-4)
	want := []struct {
		x float64
		g int
	}{{0, 2}, {3, 4}, {6, 2}, {8, 4}, {11, 4}}
	for i, w := range want {
		if math.Abs(lv[i].AboveLowestEV-w.x*q) > 1e-9*q || lv[i].Degeneracy != w.g {
			t.Errorf("level %d: %g eV above lowest (want %g), degeneracy %d (want %d)", i, lv[i].AboveLowestEV, w.x*q, lv[i].Degeneracy, w.g)
		}
	}
	ratio := Conductor{SpinDegeneracy: 2, Valleys: []Valley{{MassM0: [3]float64{0.1, 1e-3, 1}, Degeneracy: 1}},
		Axes: []Axis{{LengthM: 1}, {LengthM: 1e-9}}}
	if lv, truncated, err = Levels(ctx, ratio, 20); err != nil || truncated || len(lv) != 20 {
		t.Fatalf("mass ratio: %d levels, truncated %v, %v", len(lv), truncated, err)
	}
}

// levels is Levels without a deadline, for tests that want the list.
func levels(c Conductor, max int) []Level {
	l, _, err := Levels(context.Background(), c, max)
	if err != nil {
		panic(err)
	}
	return l
}

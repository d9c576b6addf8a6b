package spectrum

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"ringbox/internal/phys"
)

// columnCount is an independent exact count of a fully confined conductor
// (three axes): for every pair of levels on the two axes with fewer levels
// it counts the third axis's levels below the rest of γ in closed form,
// k ≤ √(2mγ)/ħ with k = nπ/L (box: ⌊kL/π⌋) or 2πn/L (ring: 2⌊kL/2π⌋ + 1).
// It shares nothing with the Counter but the constant ħ²/2m₀.
func columnCount(c Conductor, eEV float64) float64 {
	g := eEV * (1 + c.AlphaPerEV*eEV) * (1 + 1e-12)
	var total float64
	for _, v := range c.Valleys {
		// k per unit of n on each axis and the level energy q = C k₁²/m.
		type axis struct {
			q    float64
			ring bool
		}
		ax := make([]axis, 3)
		for i, a := range c.Axes {
			k1 := math.Pi / a.LengthM
			if a.BC == Ring {
				k1 = 2 * math.Pi / a.LengthM
			}
			ax[i] = axis{q: phys.HbarSqOver2M0EVm2 * k1 * k1 / v.MassM0[i], ring: a.BC == Ring}
		}
		// The closed-form axis: the smallest q (the most levels).
		big := 0
		for i := range ax {
			if ax[i].q < ax[big].q {
				big = i
			}
		}
		o := []axis{ax[(big+1)%3], ax[(big+2)%3]}
		// closed counts the levels of the big axis at or below x.
		closed := func(x float64) float64 {
			if x < 0 {
				return 0
			}
			n := math.Floor(math.Sqrt(x / ax[big].q))
			for n > 0 && ax[big].q*n*n > x {
				n--
			}
			for ax[big].q*(n+1)*(n+1) <= x {
				n++
			}
			if ax[big].ring {
				return 2*n + 1
			}
			return n
		}
		start := func(a axis) int {
			if a.ring {
				return 0
			}
			return 1
		}
		w := func(a axis, n int) float64 {
			if a.ring && n != 0 {
				return 2
			}
			return 1
		}
		var s float64
		for i := start(o[0]); o[0].q*float64(i*i) <= g; i++ {
			for j := start(o[1]); o[0].q*float64(i*i)+o[1].q*float64(j*j) <= g; j++ {
				s += w(o[0], i) * w(o[1], j) * closed(g-o[0].q*float64(i*i)-o[1].q*float64(j*j))
			}
		}
		total += float64(v.Degeneracy*c.SpinDegeneracy) * s
	}
	return total
}

// TestBothPlansMatchEnumeration: the closed-column and the sorted-list plan
// each equal brute-force enumeration (identity; common practice).
func TestBothPlansMatchEnumeration(t *testing.T) {
	r := rand.New(rand.NewPCG(21, 22))
	ctx := context.Background()
	for trial := 0; trial < 120; trial++ {
		c := randomConductor(r)
		for len(c.Axes) < 3 {
			c.Axes = append(c.Axes, Axis{LengthM: (2 + 18*r.Float64()) * 1e-9, BC: BC(r.IntN(2))})
		}
		for i := range c.Axes {
			c.Axes[i].BC = BC(r.IntN(2))
		}
		emax := 0.05
		for bruteStates(c, emax*2) < 2000 && emax < 50 {
			emax *= 2
		}
		for _, list := range []bool{false, true} {
			p := NewPlan(c, emax, 1000)
			for i := range p.v {
				force(&p.v[i], p.gmax, list)
			}
			k, err := p.Counter(ctx)
			if err != nil {
				t.Fatal(err)
			}
			es := []float64{emax / 3, emax / 2, emax}
			out := make([]float64, len(es))
			if err := k.States(ctx, es, out); err != nil {
				t.Fatal(err)
			}
			for i, e := range es {
				if want := bruteStates(c, e); out[i] != want {
					t.Errorf("trial %d list %v: N(%g) = %g, enumeration %g", trial, list, e, out[i], want)
				}
			}
		}
	}
}

// force sets a three-axis valley's plan: the axis with the most levels
// outer (list) or in closed form (columns).
func force(vp *valleyPlan, gmax float64, list bool) {
	c := vp.conf
	big := 0
	for i := range c {
		if c[i].levels(gmax) > c[big].levels(gmax) {
			big = i
		}
	}
	rest := []ladder{c[(big+1)%3], c[(big+2)%3]}
	if list {
		vp.conf = []ladder{c[big], rest[0], rest[1]}
	} else {
		vp.conf = []ladder{rest[0], rest[1], c[big]}
	}
	vp.list = list
}

// TestLargeConductorsExact: films, lines, long wires and cubes far beyond
// enumeration count exactly (against columnCount) at the plan NewPlan picks
// for a page's worth of evaluations, and that plan stays cheap (seeded;
// common practice).
func TestLargeConductorsExact(t *testing.T) {
	r := rand.New(rand.NewPCG(31, 32))
	ctx := context.Background()
	nm := 1e-9
	shapes := []struct {
		name string
		l    func() [3]float64
		emax float64
	}{
		{"film", func() [3]float64 {
			return [3]float64{(500 + 2500*r.Float64()) * nm, (500 + 2500*r.Float64()) * nm, (1 + 4*r.Float64()) * nm}
		}, 7},
		{"line", func() [3]float64 {
			return [3]float64{(1 + 10*r.Float64()) * nm, (1 + 10*r.Float64()) * nm, (1e3 + 2e4*r.Float64()) * nm}
		}, 7},
		{"wire", func() [3]float64 { return [3]float64{(10 + 20*r.Float64()) * nm, (10 + 20*r.Float64()) * nm, 1e6 * nm} }, 0.3},
		{"cube", func() [3]float64 {
			l := (30 + 20*r.Float64()) * nm
			return [3]float64{l, l * (1 + r.Float64()/10), l * (1 + r.Float64()/10)}
		}, 7},
	}
	for _, sh := range shapes {
		for trial := 0; trial < 4; trial++ {
			l := sh.l()
			c := Conductor{SpinDegeneracy: 2}
			for i := range l {
				c.Axes = append(c.Axes, Axis{LengthM: l[i], BC: BC(r.IntN(2))})
			}
			// Metals for films and lines, a light Kane band for wires.
			m := [3]float64{1, 1, 1}
			if sh.name == "wire" {
				m = [3]float64{0.023, 0.023, 0.023}
				c.AlphaPerEV = 2.7
			} else {
				m[r.IntN(3)] = 0.5 + r.Float64()
			}
			c.Valleys = []Valley{{MassM0: m, Degeneracy: 1 + r.IntN(2)}}
			p := NewPlan(c, sh.emax, 2000)
			if p.Ops > 2e9 {
				t.Errorf("%s %d: plan costs %.3g operations", sh.name, trial, p.Ops)
			}
			k, err := p.Counter(ctx)
			if err != nil {
				t.Fatal(err)
			}
			es := []float64{sh.emax / 4, sh.emax * 0.77, sh.emax}
			out := make([]float64, len(es))
			if err := k.States(ctx, es, out); err != nil {
				t.Fatal(err)
			}
			for i, e := range es {
				if want := columnCount(c, e); out[i] != want {
					t.Errorf("%s %d (%v): N(%g) = %.17g, column count %.17g", sh.name, trial, l, e, out[i], want)
				}
			}
		}
	}
}

// TestPlanSubbands: the plan's subband count, which prices the per-subband
// thermal sums before any counter exists, is at least the number the
// counter lists (identity with Counter.Subbands; seeded random conductors
// with one or two confined axes, or two confined and none open).
func TestPlanSubbands(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 8))
	for trial := 0; trial < 200; trial++ {
		c := randomConductor(r)
		conf := 0
		for _, a := range c.Axes {
			if a.BC != Open {
				conf++
			}
		}
		if conf == 3 || conf == 0 {
			continue
		}
		top := 0.05 + r.Float64()
		p := NewPlan(c, top, DefaultEvals)
		k, err := p.Counter(context.Background())
		if err != nil {
			t.Fatal(err)
		}
		listed := 0.0
		if err := k.Subbands(context.Background(), top, func(_, _ float64) { listed++ }); err != nil {
			t.Fatal(err)
		}
		if p.Subbands < listed || p.Subbands > 2*listed+float64(2*len(c.Valleys)) {
			t.Errorf("%+v to %g eV: plan says %g subbands, the counter lists %g", c, top, p.Subbands, listed)
		}
	}
}

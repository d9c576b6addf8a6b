package spectrum

import (
	"context"
	"math"
)

// Costs of the plan's unit steps, in operations (an operation is a few
// nanoseconds: one closed-form column is a square root and a compare).
const (
	opColumn      = 1  // one column counted in closed form along its third axis
	opLookup      = 2  // one bucket lookup in a sorted column list
	opListEntry   = 12 // building one list entry: generate, bucket-sort, merge, index
	bytesPerEntry = 8  // packed pair (4) and its bucket (4)
)

// DefaultEvals is the number of N(E) evaluations NewCounter plans for.
const DefaultEvals = 1000

// MaxListBytes caps the sorted column list of one valley; a plan that
// would need more counts its columns in closed form instead.
const MaxListBytes = 256 << 20

// Plan is the cheapest exact way found to count a conductor up to an energy
// for a given number of N(E) evaluations, with its cost.
//
// With three confined axes there are two ways to count. Closed columns:
// loop over the level pairs of two axes (the columns) and count the third,
// the one with the most levels, in closed form (box ⌊√(γ/q)⌋, ring
// 2⌊√(γ/q)⌋ + 1); nothing is built and each N(E) costs one step per
// column, which is cheap for wires and lines (few columns, one long axis).
// Sorted list: sort the column energies of two axes once and loop over
// the third, one bucket lookup per level; the build costs about the list
// and each N(E) about the third axis's levels, which is cheap for cubes
// and films evaluated many times. Plan prices both (every choice of axes)
// and keeps the cheaper within MaxListBytes.
type Plan struct {
	Ops     float64 // building the counter plus the evaluations
	PerEval float64 // one evaluation of N(E)
	Bytes   float64 // what the counter holds
	// Subbands is the number of subbands below the top (over the
	// valleys; see Counter.Subbands), or an upper bound where counting
	// them would cost more than the plan; +Inf with three confined axes.
	Subbands float64
	c        Conductor
	gmax     float64
	v        []valleyPlan
}

type valleyPlan struct {
	conf []ladder // ordered for the count; see valleyCounter
	list bool     // three confined axes with a sorted list of conf[1], conf[2]
}

// NewPlan prices counting c up to emaxEV with evals evaluations of N(E).
func NewPlan(c Conductor, emaxEV float64, evals int) Plan {
	if err := c.Check(); err != nil {
		panic(err.Error())
	}
	gmax := Gamma(math.Max(emaxEV, 0), c.AlphaPerEV) * (1 + 4*tieRel)
	p := Plan{c: c, gmax: gmax}
	e := float64(max(evals, 0))
	for _, v := range c.Valleys {
		var conf []ladder
		open := 0
		for i, a := range c.Axes {
			if a.BC == Open {
				open++
				continue
			}
			conf = append(conf, ladder{q: quantumEV(a, v.MassM0[i]), ring: a.BC == Ring})
		}
		vp := valleyPlan{conf: conf}
		// levels+1: an axis with no level below gmax still costs a step.
		n := func(l ladder) float64 { return float64(l.levels(gmax)) + 1 }
		per := 1.0
		switch len(conf) {
		case 0:
			p.Subbands++
		case 1:
			if open == 1 {
				per = n(conf[0])
			}
			p.Subbands += n(conf[0]) - 1
		case 2:
			// The outer loop runs over the axis with fewer levels.
			if n(conf[0]) > n(conf[1]) {
				vp.conf[0], vp.conf[1] = conf[1], conf[0]
			}
			per = n(vp.conf[0])
			sub := pairs(vp.conf[0], vp.conf[1], gmax)
			if open > 0 {
				per = sub + 1
			}
			p.Subbands += sub
		case 3:
			p.Subbands = math.Inf(1)
			build, bytes, pe := vp.choose(gmax, e)
			p.Ops += build
			p.Bytes += bytes
			per = pe
		}
		p.Ops += e * per
		p.PerEval += per
		p.v = append(p.v, vp)
	}
	return p
}

// choose orders three confined ladders for the cheaper of the two plans
// and returns its build cost, bytes and cost per evaluation.
func (vp *valleyPlan) choose(gmax, evals float64) (build, bytes, perEval float64) {
	orig := [3]ladder(vp.conf)
	best := math.Inf(1)
	var bestConf [3]ladder
	// k is the axis left out of the pair: the closed-form axis of the
	// column plan or the outer axis of the list plan.
	for k := 0; k < 3; k++ {
		a, b := orig[(k+1)%3], orig[(k+2)%3]
		if a.levels(gmax) > b.levels(gmax) {
			a, b = b, a
		}
		cols := pairs(a, b, gmax) + 1
		if c := evals * cols * opColumn; c < best {
			best, bestConf, vp.list = c, [3]ladder{a, b, orig[k]}, false
			build, bytes, perEval = 0, 0, cols*opColumn
		}
		lb := cols * bytesPerEntry
		// Entries pack their level indices in 16 bits each.
		if lb > MaxListBytes || a.top(gmax) > 0xffff || b.top(gmax) > 0xffff {
			continue
		}
		outer := float64(orig[k].levels(gmax)) + 1
		if c := cols*opListEntry + evals*outer*opLookup; c < best {
			best, bestConf, vp.list = c, [3]ladder{orig[k], a, b}, true
			build, bytes, perEval = cols*opListEntry, lb, outer*opLookup
		}
	}
	vp.conf = bestConf[:]
	return build, bytes, perEval
}

// pairs returns the number of level pairs (n_a, n_b ≥ first) with
// ε_a + ε_b ≤ g (not weighted): counted when a, the ladder with fewer
// levels, has at most exactPairs, else the quarter-ellipse area π/4·R_a·R_b
// (R = √(g/q)) plus both axes, which bounds it from above (Gauss's circle
// problem; common practice).
func pairs(a, b ladder, g float64) float64 {
	if a.levels(g) > exactPairs {
		ra, rb := math.Sqrt(g/a.q), math.Sqrt(g/b.q)
		return math.Pi/4*ra*rb + ra + rb + 1
	}
	s := 0
	for i, top := a.first(), a.top(g); i <= top; i++ {
		s += b.levels(g - a.q*float64(i)*float64(i))
	}
	return float64(s)
}

// exactPairs is the level count up to which pairs counts exactly.
const exactPairs = 1 << 14

// NewCounter prepares the counts of c for energies up to emaxEV with the
// plan for DefaultEvals evaluations; see NewPlan and Plan.Counter.
func NewCounter(ctx context.Context, c Conductor, emaxEV float64) (*Counter, error) {
	return NewPlan(c, emaxEV, DefaultEvals).Counter(ctx)
}

package spectrum

import (
	"cmp"
	"context"
	"math"
	"slices"
	"sort"
)

// Level is one distinct energy of the confined axes (a subband edge where an
// axis is open) with the number of states there.
type Level struct {
	EnergyEV   float64  `json:"energy_eV"`
	Degeneracy int      `json:"degeneracy"` // spin, valleys and ±n included
	Valleys    []string `json:"valleys,omitempty"`
	// AboveLowestEV is the energy above the lowest level, resolved where
	// EnergyEV rounds (a 1 cm axis beside a 0.1 nm one).
	AboveLowestEV float64 `json:"above_lowest_eV"`
	// N holds the quantum numbers of one state at this energy, one per
	// confined axis (ring axes give n ≥ 0; −n has the same energy).
	N []int `json:"n"`
}

// MaxListedStates caps the states Levels enumerates to find the lowest
// levels; beyond it the listing is cut short and says so.
const MaxListedStates = 1 << 20

// Levels returns the lowest max distinct levels of the confined axes, with
// their degeneracies, and whether the listing was cut short (fewer than max
// levels because a level, or the states below it, would take more than
// MaxListedStates to enumerate). A conductor with no confined axis has none.
//
// States are compared by their energy above their valley's ground level,
// summed from the axes' excitations q(n² − n₀²), so that levels a 1 cm axis
// splits by 10⁻¹⁵ eV on top of a 30 eV ground level of a 0.1 nm axis stay
// apart. Two energies are one level when they differ by less than 10⁻¹⁰ of
// the smallest level quantum q of any axis (every level spacing on one axis
// is at least q) or by 10⁻¹² relative (float rounding of the sums).
func Levels(ctx context.Context, c Conductor, max int) ([]Level, bool, error) {
	if err := c.Check(); err != nil {
		panic(err.Error())
	}
	lv, ok := newLevelWalk(c, max)
	if !ok || max <= 0 {
		return nil, false, nil
	}
	// Enumerate below a growing fraction of a safe bound: the states
	// inside grow like the fraction^(d/2), so the first tries are cheap, and
	// a try that finds more than max distinct levels has all states of the
	// lowest max levels. A try over the cap falls back to the last that fit.
	var all, fit []state
	truncated := false
	for _, frac := range []float64{1.0 / 256, 1.0 / 64, 1.0 / 16, 1.0 / 4, 1} {
		all = all[:0]
		done, err := lv.walk(ctx, frac, func(st state) { all = append(all, st) })
		if err != nil {
			return nil, false, err
		}
		if !done {
			truncated = true
			break
		}
		fit = append(fit[:0], all...)
		if frac == 1 || lv.distinct(fit) > max {
			break
		}
	}
	if len(fit) == 0 {
		return nil, truncated, nil
	}
	slices.SortStableFunc(fit, func(a, b state) int { return cmp.Compare(a.key, b.key) })
	var out []Level
	last := 0.0
	for _, st := range fit {
		if n := len(out); n > 0 && lv.tied(last, st.key) {
			out[n-1].Degeneracy += st.w
			if !contains(out[n-1].Valleys, st.valley) && st.valley != "" {
				out[n-1].Valleys = append(out[n-1].Valleys, st.valley)
			}
			continue
		}
		if len(out) == max {
			break
		}
		last = st.key
		e := Energy(lv.base+st.key, c.AlphaPerEV)
		l := Level{EnergyEV: e, AboveLowestEV: st.key, Degeneracy: st.w, N: st.n}
		if a := c.AlphaPerEV; a != 0 {
			// E(γ₀+k) − E(γ₀) without cancellation: 2k/(√(1+4α(γ₀+k)) + √(1+4αγ₀)).
			l.AboveLowestEV = 2 * st.key / (math.Sqrt(1+4*a*(lv.base+st.key)) + math.Sqrt(1+4*a*lv.base))
		}
		if st.valley != "" {
			l.Valleys = []string{st.valley}
		}
		out = append(out, l)
	}
	// fit is a complete walk below its cut: every level listed has all its
	// states. Fewer than max levels after a cut-short walk is a truncation.
	return out, truncated && len(out) < max, nil
}

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

// Shape is the line shape that broadens each level of a fully confined
// conductor into a peak of D(E).
type Shape int

const (
	Gaussian Shape = iota
	Lorentzian
)

// Reach returns how far from a level its broadened peak is summed: 6η for
// a Gaussian (below 1.6e-8 of its peak there), 64η for a Lorentzian. A
// broadened D(E) up to E reads the levels up to E + Reach: the counter must
// cover them.
func Reach(etaEV float64, shape Shape) float64 {
	if shape == Lorentzian {
		return 64 * etaEV
	}
	return 6 * etaEV
}

// maxEnumerated is the number of states below which Broadened sums one
// exact peak per level; above it the levels are binned first.
const maxEnumerated = 100_000

// MaxBroadeningBins caps the bins of the binned broadening: Broadened
// evaluates N(E) at most this many times (plus one).
const MaxBroadeningBins = 16_384

// Broadened returns D(E) at ascending energies for a fully confined conductor: every level a
// normalised Gaussian (standard deviation etaEV) or Lorentzian (half width
// etaEV), in states per eV, and the broadening actually used (wider than
// etaEV only when more than MaxBroadeningBins bins would be needed).
//
// Small conductors sum one peak per level exactly. Large ones bin the level
// count N(E) at a width of at most η/8 (cloud-in-cell would add nothing: the
// bin counts come from the exact staircase) and sum a peak per bin; the
// peak positions are then off by at most half a bin. Three confined axes bin
// faster: the sorted column list is binned once and shifted by each outer
// level (cloud-in-cell, which keeps each level's mean position), so the work
// is the list plus levels × bins. Lorentzian tails are cut
// at 64η, Gaussian ones at 6η.
func (k *Counter) Broadened(ctx context.Context, energiesEV []float64, etaEV float64, shape Shape) ([]float64, float64, error) {
	if !(etaEV > 0) {
		panic("spectrum: broadening must be positive")
	}
	reach := Reach(etaEV, shape)
	lo, hi := energiesEV[0], energiesEV[0]
	for _, e := range energiesEV {
		lo, hi = math.Min(lo, e), math.Max(hi, e)
	}
	lo = math.Max(lo-reach, 0)
	hi = math.Min(hi+reach, Energy(k.gammaMax/(1+4*tieRel), k.c.AlphaPerEV))
	out := make([]float64, len(energiesEV))
	if hi <= lo {
		return out, etaEV, nil
	}
	peak := func(x float64) float64 {
		if shape == Lorentzian {
			return etaEV / math.Pi / (x*x + etaEV*etaEV)
		}
		return math.Exp(-x*x/(2*etaEV*etaEV)) / (etaEV * math.Sqrt(2*math.Pi))
	}
	// Energies are ascending: each peak touches only those within reach.
	add := func(e, w float64) {
		i := sort.SearchFloat64s(energiesEV, e-reach)
		for ; i < len(energiesEV) && energiesEV[i] <= e+reach; i++ {
			out[i] += w * peak(energiesEV[i]-e)
		}
	}
	top := []float64{hi}
	if err := k.States(ctx, top, top); err != nil {
		return nil, 0, err
	}
	if top[0] <= maxEnumerated {
		for _, l := range k.levelsBelow(hi) {
			if l.e >= lo {
				add(l.e, l.w)
			}
		}
		return out, etaEV, nil
	}
	if k.hasColumns() {
		used, err := k.binnedColumns(ctx, lo, hi, etaEV, add)
		return out, used, err
	}
	bins := int(math.Ceil((hi - lo) / (etaEV / 8)))
	used := etaEV
	if bins > MaxBroadeningBins {
		bins = MaxBroadeningBins
		used = math.Max(etaEV, (hi-lo)/float64(bins)*8)
	}
	edges := make([]float64, bins+1)
	for i := range edges {
		edges[i] = lo + (hi-lo)*float64(i)/float64(bins)
	}
	counts := make([]float64, len(edges))
	if err := k.States(ctx, edges, counts); err != nil {
		return nil, 0, err
	}
	for i := 0; i < bins; i++ {
		if w := counts[i+1] - counts[i]; w > 0 {
			add((edges[i]+edges[i+1])/2, w)
		}
	}
	// The states in (lo−, edges[0]] are the level sitting on the lower edge.
	if counts[0] > 0 && lo > 0 {
		prev := []float64{math.Max(lo-(hi-lo)/float64(bins), 0)}
		if err := k.States(ctx, prev, prev); err != nil {
			return nil, 0, err
		}
		if w := counts[0] - prev[0]; w > 0 {
			add(lo, w)
		}
	} else if counts[0] > 0 {
		add(0, counts[0])
	}
	return out, used, nil
}

type weighted struct{ e, w float64 }

// levelsBelow enumerates every confined level up to emaxEV (a few ×10⁵ at
// most: Broadened only calls it for small conductors).
func (k *Counter) levelsBelow(emaxEV float64) []weighted {
	gmax := Gamma(emaxEV, k.c.AlphaPerEV) * (1 + tieRel)
	var out []weighted
	for vi := range k.valleys {
		v := &k.valleys[vi]
		var walk func(d int, g, w float64)
		walk = func(d int, g, w float64) {
			if d == len(v.conf) {
				out = append(out, weighted{Energy(g, k.c.AlphaPerEV), w * v.weight})
				return
			}
			l := v.conf[d]
			for n := l.first(); n <= l.top(gmax-g); n++ {
				walk(d+1, g+l.q*float64(n)*float64(n), w*l.weight(n))
			}
		}
		walk(0, 0, 1)
	}
	return out
}

func (k *Counter) hasColumns() bool {
	for _, v := range k.valleys {
		if v.list != nil {
			return true
		}
	}
	return false
}

// binnedColumns bins the levels of a three-confined-axis conductor in γ on
// [γ(lo), γ(hi)] and hands each bin to add at its energy.
func (k *Counter) binnedColumns(ctx context.Context, lo, hi, etaEV float64, add func(e, w float64)) (float64, error) {
	alpha := k.c.AlphaPerEV
	glo, ghi := Gamma(lo, alpha), Gamma(hi, alpha)
	// dγ/dE ≥ 1, so a γ-bin of η/4 is at most η/4 wide in E; cloud-in-cell
	// keeps each level's weight centred where it belongs.
	h := etaEV / 4
	used := etaEV
	if (ghi-glo)/h > MaxBroadeningBins {
		h = (ghi - glo) / MaxBroadeningBins
		used = 4 * h
	}
	nb := int(math.Ceil((ghi-glo)/h)) + 2
	hist := make([]float64, nb)
	// cic adds weight w at γ = g, split between the two nearest bin centres.
	cic := func(dst []float64, origin, g, w float64) {
		p := (g-origin)/h - 0.5
		i := int(math.Floor(p))
		f := p - float64(i)
		if i >= 0 && i < len(dst) {
			dst[i] += w * (1 - f)
		}
		if i+1 >= 0 && i+1 < len(dst) {
			dst[i+1] += w * f
		}
	}
	for vi := range k.valleys {
		v := &k.valleys[vi]
		if v.list == nil {
			// Not every valley need have three confined axes; none here can
			// differ, since all valleys share the axes.
			continue
		}
		// The inner list binned from γ = 0 at width h.
		inner := make([]float64, int(ghi/h)+2)
		for ci := range v.list {
			c := &v.list[ci]
			for k := range c.p {
				e := c.energy(k)
				if e > ghi {
					break
				}
				cic(inner, 0, e, c.w)
			}
		}
		a := v.conf[0]
		for n := a.first(); n <= a.top(ghi); n++ {
			if ctx.Err() != nil {
				return 0, ctx.Err()
			}
			shift := a.q * float64(n) * float64(n)
			w := a.weight(n) * v.weight
			for b, x := range inner {
				if x == 0 {
					continue
				}
				g := (float64(b)+0.5)*h + shift
				if g > ghi+h {
					break
				}
				if g >= glo-h {
					cic(hist, glo, g, w*x)
				}
			}
		}
	}
	for b, x := range hist {
		if x > 0 {
			add(Energy(glo+(float64(b)+0.5)*h, alpha), x)
		}
	}
	return used, nil
}

// state is one lattice point of the confined axes with its weight; key is
// its γ above the lowest valley's ground level.
type state struct {
	key    float64
	w      int
	valley string
	n      []int
}

// levelWalk enumerates the states of the confined axes by their excitation.
type levelWalk struct {
	c     Conductor
	lad   [][]ladder // per valley
	shift []float64  // per valley: its ground level above base
	base  float64    // the lowest ground level (γ)
	bound float64    // key at or above the max-th lowest level
	tol   float64    // keys closer than this are one level
}

func newLevelWalk(c Conductor, max int) (*levelWalk, bool) {
	lv := &levelWalk{c: c, base: math.Inf(1), bound: math.Inf(1)}
	qmin := math.Inf(1)
	var ground []float64
	for _, v := range c.Valleys {
		var lad []ladder
		for i, a := range c.Axes {
			if a.BC != Open {
				lad = append(lad, ladder{q: quantumEV(a, v.MassM0[i]), ring: a.BC == Ring})
			}
		}
		if len(lad) == 0 {
			return nil, false
		}
		g := 0.0
		for _, l := range lad {
			g += l.q * float64(l.first()*l.first())
			qmin = math.Min(qmin, l.q)
		}
		lv.lad = append(lv.lad, lad)
		ground = append(ground, g)
		lv.base = math.Min(lv.base, g)
	}
	for vi, g := range ground {
		lv.shift = append(lv.shift, g-lv.base)
		// The max-th lowest level lies at or below each valley's own
		// ε_i(first+max) with the other axes at their lowest.
		for _, l := range lv.lad[vi] {
			n := float64(l.first() + max)
			f := float64(l.first())
			lv.bound = math.Min(lv.bound, lv.shift[vi]+l.q*(n*n-f*f))
		}
	}
	lv.tol = 1e-10 * qmin
	return lv, true
}

// tied reports whether two keys (a ≤ b) are one level.
func (lv *levelWalk) tied(a, b float64) bool {
	return b-a <= math.Max(lv.tol, 1e-12*b)
}

// distinct counts the levels among the states.
func (lv *levelWalk) distinct(all []state) int {
	k := make([]float64, len(all))
	for i, s := range all {
		k[i] = s.key
	}
	slices.Sort(k)
	n := 0
	for i := range k {
		if i == 0 || !lv.tied(k[i-1], k[i]) {
			n++
		}
	}
	return n
}

// walk calls emit for every state with key ≤ frac·bound. It reports false
// (and stops) when that is more than MaxListedStates states.
func (lv *levelWalk) walk(ctx context.Context, frac float64, emit func(state)) (bool, error) {
	cut := frac * lv.bound * (1 + 1e-9)
	seen := 0
	for vi, v := range lv.c.Valleys {
		lad := lv.lad[vi]
		idx := make([]int, len(lad))
		stop := false
		var walk func(d int, x float64)
		walk = func(d int, x float64) {
			if stop {
				return
			}
			if d == len(lad) {
				if seen++; seen > MaxListedStates || (seen%4096 == 0 && ctx.Err() != nil) {
					stop = true
					return
				}
				w := v.Degeneracy * lv.c.SpinDegeneracy
				for i, l := range lad {
					w *= int(l.weight(idx[i]))
				}
				emit(state{key: x, w: w, valley: v.Label, n: append([]int(nil), idx...)})
				return
			}
			l := lad[d]
			f := float64(l.first())
			for n := l.first(); ; n++ {
				e := x + l.q*(float64(n)*float64(n)-f*f)
				if e > cut || stop {
					break
				}
				idx[d] = n
				walk(d+1, e)
			}
		}
		walk(0, lv.shift[vi])
		if err := ctx.Err(); err != nil {
			return false, err
		}
		if stop {
			return false, nil
		}
	}
	return true, nil
}

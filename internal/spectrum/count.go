package spectrum

import (
	"context"
	"math"
	"runtime"
	"slices"
	"sort"

	"golang.org/x/sync/errgroup"

	"ringbox/internal/phys"
)

// openPart is the continuum count of the open axes: the number of states (per
// spin and valley) with open-axis energy ≤ x is pref·x^(dim/2), the volume of
// the ellipsoid in lattice units, V_d·Π(kᵢLᵢ/2π): L·k/π, A·k²/4π, V·k³/6π².
type openPart struct {
	dim  int
	pref float64
}

func newOpenPart(axes []Axis, mass []float64) openPart {
	p := openPart{pref: 1}
	for i, a := range axes {
		if a.BC != Open {
			continue
		}
		p.dim++
		// k(x) = √(x·m/C): the factor per axis is L/(2π)·√(m/C).
		p.pref *= a.LengthM / (2 * math.Pi) * math.Sqrt(mass[i]/phys.HbarSqOver2M0EVm2)
	}
	p.pref *= unitBall(p.dim)
	return p
}

// unitBall returns the volume of the unit ball in d dimensions: 1, 2, π, 4π/3.
func unitBall(d int) float64 {
	return math.Pow(math.Pi, float64(d)/2) / math.Gamma(float64(d)/2+1)
}

// at returns the count for open-axis energy x.
func (p openPart) at(x float64) float64 {
	switch {
	case p.dim == 0:
		if x >= 0 {
			return 1
		}
		return 0
	case x <= 0:
		return 0
	case p.dim == 1:
		return p.pref * math.Sqrt(x)
	case p.dim == 2:
		return p.pref * x
	}
	return p.pref * x * math.Sqrt(x)
}

// slope returns d/dx of at (per eV of γ). The 1D van Hove singularity at
// x = 0 is left out (its right limit is infinite).
func (p openPart) slope(x float64) float64 {
	switch {
	case p.dim == 0 || x < 0:
		return 0
	case p.dim == 2:
		return p.pref
	case x == 0:
		return 0
	case p.dim == 1:
		return p.pref / (2 * math.Sqrt(x))
	}
	return 1.5 * p.pref * math.Sqrt(x)
}

// columnList is the sorted list of the column energies ε_a(i) + ε_b(j) of
// the inner two axes that share one weight, with a bucket index over
// [0, gmax] (about one entry per bucket, since the energies are spread
// nearly evenly) that finds upper(x) in O(1): the bucket's first entry,
// then a step or two. An entry is its pair (i, j) packed in 32 bits (a
// list allowed by MaxListBytes has far fewer than 2¹⁶ levels per axis);
// its energy is recomputed by the expression that sorted it, so it
// compares the same. An entry costs 8 bytes with its bucket.
type columnList struct {
	sa, sb []float64 // ε_a(i) and ε_b(j) by index: energy is one add
	w      float64   // the weight each entry stands for
	p      []uint32
	bucket []int32 // bucket[k] = number of entries below k/scale
	scale  float64
}

// energy returns the column energy of entry k.
func (c *columnList) energy(k int) float64 {
	return c.sa[c.p[k]>>16] + c.sb[c.p[k]&0xffff]
}

// upper returns the number of entries ≤ x.
func (c *columnList) upper(x float64) int {
	if x < 0 || len(c.p) == 0 {
		return 0
	}
	b := int(x * c.scale)
	if b >= len(c.bucket)-1 {
		return len(c.p)
	}
	i := int(c.bucket[b])
	for i < len(c.p) && c.energy(i) <= x {
		i++
	}
	return i
}

// lists are the weight classes of one valley's column list.
type lists []columnList

// count returns N₂(x), the weighted number of column energies ≤ x.
func (ls lists) count(x float64) float64 {
	var s float64
	for i := range ls {
		s += ls[i].w * float64(ls[i].upper(x))
	}
	return s
}

// valleyCounter counts one valley's states.
type valleyCounter struct {
	weight float64  // g_s·g_v
	conf   []ladder // confined axes; conf[0] is the outer loop
	open   openPart
	// For three confined axes: the energies ε_a + ε_b of the inner two axes,
	// sorted once by weight class, so that N₃(γ) = Σₙ w_n N₂(γ − εₙ) costs
	// one bucket lookup per outer level and class.
	list lists
}

// Counter counts the states of one conductor at energies up to the cap it
// was built for. It is safe for concurrent use.
//
// No state is enumerated. One confined axis is a closed form; two are a sum
// over the levels of one axis; three are a sum over the outer axis of
// N₂(γ − εₙ), read from the sorted list of the inner two axes' column
// energies. Building costs about the number of columns (≈ N^(2/3) for N
// states in a cube), each N(E) about N^(1/3). Open axes add their continuum
// count per confined level analytically.
type Counter struct {
	c        Conductor
	gammaMax float64
	valleys  []valleyCounter
}

// Counter builds the counter the plan describes. Column builds and sorts
// check ctx.
func (p Plan) Counter(ctx context.Context) (*Counter, error) {
	k := &Counter{c: p.c, gammaMax: p.gmax}
	for i, v := range p.c.Valleys {
		vp := p.v[i]
		vc := valleyCounter{weight: float64(p.c.SpinDegeneracy * v.Degeneracy), conf: vp.conf}
		vc.open = newOpenPart(p.c.Axes, v.MassM0[:len(p.c.Axes)])
		if vp.list {
			ls, err := columns(ctx, vc.conf[1], vc.conf[2], p.gmax-vc.conf[0].q*float64(vc.conf[0].first()))
			if err != nil {
				return nil, err
			}
			vc.list = ls
		}
		k.valleys = append(k.valleys, vc)
	}
	return k, nil
}

// columns lists ε_a(n_a) + ε_b(n_b) ≤ gmax, grouped by weight, each group
// sorted with its bucket index (sortedClass).
func columns(ctx context.Context, a, b ladder, gmax float64) (lists, error) {
	// Weights are a.weight(i)·b.weight(j) ∈ {1, 2, 4}: class index by log₂.
	// Count first, so each class is allocated once at its final size; the
	// weights are constant for j ≥ first+1 on either ladder.
	na := a.top(gmax)
	var sizes [3]int
	for i := a.first(); i <= na; i++ {
		nb := b.top(gmax - a.q*float64(i)*float64(i))
		if nb < b.first() {
			continue
		}
		sizes[weightClass(a.weight(i)*b.weight(b.first()))]++
		if rest := nb - b.first(); rest > 0 {
			sizes[weightClass(a.weight(i)*b.weight(b.first()+1))] += rest
		}
	}
	var out lists
	for c, n := range sizes {
		if n == 0 {
			continue
		}
		l, err := sortedClass(ctx, a, b, gmax, c, n)
		if err != nil {
			return nil, err
		}
		out = append(out, l)
	}
	return out, nil
}

func weightClass(w float64) int { return int(w) / 2 }

// sortedClass returns the n column entries of weight class c, sorted by
// energy, with their bucket index over n buckets of [0, gmax]. It generates
// them twice instead of storing and sorting them: a first pass counts the
// entries of each of (at most) 1024 coarse bins, a second drops each entry
// into its coarse bin (1024 write streams, which the caches hold, where n
// buckets would miss on every write), and each coarse bin is then
// bucket-sorted in a small buffer, which fills its stretch of the fine
// index as it goes (about one entry a bucket, since the 2D density of
// states is flat). Both passes split the rows, and the sort the coarse
// bins, between the cores. The list costs 8 bytes an entry and little
// more at any time.
func sortedClass(ctx context.Context, a, b ladder, gmax float64, c, n int) (columnList, error) {
	l := columnList{sa: squares(a, gmax), sb: squares(b, gmax), w: [3]float64{1, 2, 4}[c], p: make([]uint32, n), bucket: make([]int32, n+1), scale: float64(n) / gmax}
	idx := func(x float64) int { return min(max0(int(x*l.scale)), n-1) }
	nc := min(1024, n)
	bin := func(k int) int { return int(int64(k) * int64(nc) / int64(n)) }
	// The rows of the outer ladder are split between the workers, each
	// counting (then placing) its own entries.
	workers := runtime.GOMAXPROCS(0)
	first, na := a.first(), a.top(gmax)
	rows := func(w int, emit func(x float64, i, j int)) error {
		span := (na - first + workers) / workers
		for i, end := first+w*span, min(first+(w+1)*span-1, na); i <= end; i++ {
			if i%256 == 0 && ctx.Err() != nil {
				return ctx.Err()
			}
			ea := a.q * float64(i) * float64(i)
			nb := b.top(gmax - ea)
			for j := b.first(); j <= nb; j++ {
				if weightClass(a.weight(i)*b.weight(j)) == c {
					emit(ea+b.q*float64(j)*float64(j), i, j)
				}
			}
		}
		return nil
	}
	counts := make([][]int, workers)
	if err := parallel(workers, func(w int) error {
		counts[w] = make([]int, nc)
		cw := counts[w]
		return rows(w, func(x float64, _, _ int) { cw[bin(idx(x))]++ })
	}); err != nil {
		return l, err
	}
	// start[k] is where coarse bin k begins; each worker's entries of bin k
	// follow those of the workers before it.
	start := make([]int, nc+1)
	for k := range nc {
		start[k+1] = start[k]
		for w := range workers {
			start[k+1] += counts[w][k]
		}
	}
	for k := range nc {
		off := start[k]
		for w := range workers {
			n := counts[w][k]
			counts[w][k] = off
			off += n
		}
	}
	if err := parallel(workers, func(w int) error {
		cur := counts[w]
		return rows(w, func(x float64, i, j int) {
			k := bin(idx(x))
			l.p[cur[k]] = uint32(i)<<16 | uint32(j)
			cur[k]++
		})
	}); err != nil {
		return l, err
	}
	// The coarse bins are sorted independently, the workers taking every
	// workers-th bin; each writes only its own stretch of l.p and of the
	// fine index.
	err := parallel(workers, func(w int) error {
		var es, tmpE []float64
		var tmpP []uint32
		var fill []int32
		for cb := w; cb < nc; cb += workers {
			if ctx.Err() != nil {
				return ctx.Err()
			}
			lo, hi := start[cb], start[cb+1]
			seg := l.p[lo:hi]
			es = slices.Grow(es[:0], len(seg))[:len(seg)]
			for k := range seg {
				es[k] = l.energy(lo + k)
			}
			// The fine buckets of this bin: kLo ≤ k < kHi.
			kLo := int((int64(cb)*int64(n) + int64(nc) - 1) / int64(nc))
			kHi := int((int64(cb+1)*int64(n) + int64(nc) - 1) / int64(nc))
			fill = append(fill[:0], make([]int32, kHi-kLo+1)...)
			for _, x := range es {
				fill[idx(x)-kLo+1]++
			}
			fill[0] = int32(lo)
			for k := 1; k < len(fill); k++ {
				fill[k] += fill[k-1]
			}
			copy(l.bucket[kLo:kHi], fill)
			tmpE = slices.Grow(tmpE[:0], len(seg))[:len(seg)]
			tmpP = slices.Grow(tmpP[:0], len(seg))[:len(seg)]
			for k, x := range es {
				f := &fill[idx(x)-kLo]
				tmpE[int(*f)-lo] = x
				tmpP[int(*f)-lo] = seg[k]
				*f++
			}
			// Each fine bucket holds about one entry: insertion sort, or a
			// full sort for a crowded one. l.bucket keeps the starts.
			for k := kLo; k < kHi; k++ {
				p, q := int(l.bucket[k])-lo, hi-lo
				if k+1 < kHi {
					q = int(l.bucket[k+1]) - lo
				}
				if q-p > 16 {
					sort.Sort(byEnergy{tmpE[p:q], tmpP[p:q]})
					continue
				}
				for u := p + 1; u < q; u++ {
					for v := u; v > p && tmpE[v] < tmpE[v-1]; v-- {
						tmpE[v], tmpE[v-1] = tmpE[v-1], tmpE[v]
						tmpP[v], tmpP[v-1] = tmpP[v-1], tmpP[v]
					}
				}
			}
			copy(seg, tmpP)
		}
		return nil
	})
	l.bucket[n] = int32(n)
	return l, err
}

// parallel runs f(0), …, f(workers−1) at once and returns the first error.
func parallel(workers int, f func(w int) error) error {
	var g errgroup.Group
	for w := range workers {
		g.Go(func() error { return f(w) })
	}
	return g.Wait()
}

// squares returns l.q·n² for n = 0 … top(gmax), by the expression the
// column energies are generated with.
func squares(l ladder, gmax float64) []float64 {
	out := make([]float64, max(l.top(gmax), 0)+1)
	for n := range out {
		out[n] = l.q * float64(n) * float64(n)
	}
	return out
}

// byEnergy sorts packed entries by their energies.
type byEnergy struct {
	e []float64
	p []uint32
}

func (b byEnergy) Len() int           { return len(b.e) }
func (b byEnergy) Less(i, j int) bool { return b.e[i] < b.e[j] }
func (b byEnergy) Swap(i, j int) {
	b.e[i], b.e[j] = b.e[j], b.e[i]
	b.p[i], b.p[j] = b.p[j], b.p[i]
}

func max0(i int) int {
	if i < 0 {
		return 0
	}
	return i
}

// count returns this valley's states with γ_state ≤ g.
func (v *valleyCounter) count(g0 float64) float64 {
	if g0 < 0 {
		return 0
	}
	// g decides which levels are in (ties count); the open axes integrate
	// up to the exact g0.
	g := g0 * (1 + tieRel)
	var s float64
	switch len(v.conf) {
	case 0:
		s = v.open.at(g0)
	case 1:
		l := v.conf[0]
		switch v.open.dim {
		case 0:
			s = l.count(g)
		case 2:
			s = math.Max(v.open.pref*(l.count(g)*g0-l.q*l.sumSq(g)), 0)
		default:
			for n, top := l.first(), l.top(g); n <= top; n++ {
				s += l.weight(n) * v.open.at(g0-l.q*float64(n)*float64(n))
			}
		}
	case 2:
		if v.open.dim == 1 {
			s, _ = v.wire(g0, false)
			break
		}
		a, b := v.conf[0], v.conf[1]
		for n, top := a.first(), a.top(g); n <= top; n++ {
			r := g - a.q*float64(n)*float64(n)
			if v.open.dim == 0 {
				s += a.weight(n) * b.count(r)
				continue
			}
			r0 := g0 - a.q*float64(n)*float64(n)
			for m, topm := b.first(), b.top(r); m <= topm; m++ {
				s += a.weight(n) * b.weight(m) * v.open.at(r0-b.q*float64(m)*float64(m))
			}
		}
	case 3:
		if v.list == nil {
			s = closedColumns(v.conf[0], v.conf[1], v.conf[2], g)
			break
		}
		a := v.conf[0]
		for n, top := a.first(), a.top(g); n <= top; n++ {
			s += a.weight(n) * v.list.count(g-a.q*float64(n)*float64(n))
		}
	}
	return v.weight * s
}

// closedColumns counts the levels of three confined axes with γ ≤ g: a
// loop over the columns (n_a, n_b) and the closed form along c.
func closedColumns(a, b, c ladder, g float64) float64 {
	var s float64
	for n, top := a.first(), a.top(g); n <= top; n++ {
		ra := g - a.q*float64(n)*float64(n)
		var col float64
		for m, topm := b.first(), b.top(ra); m <= topm; m++ {
			col += b.weight(m) * c.count(ra-b.q*float64(m)*float64(m))
		}
		s += a.weight(n) * col
	}
	return s
}

// slope returns this valley's dN/dγ where an axis is open (0 otherwise).
func (v *valleyCounter) slope(g float64) float64 {
	if v.open.dim == 0 || g < 0 {
		return 0
	}
	var s float64
	switch len(v.conf) {
	case 0:
		s = v.open.slope(g)
	case 1:
		l := v.conf[0]
		if v.open.dim == 2 {
			s = v.open.pref * l.count(g)
			break
		}
		for n, top := l.first(), l.top(g); n <= top; n++ {
			s += l.weight(n) * v.open.slope(g-l.q*float64(n)*float64(n))
		}
	case 2:
		if v.open.dim == 1 {
			_, s = v.wire(g, true)
			break
		}
		a, b := v.conf[0], v.conf[1]
		for n, top := a.first(), a.top(g); n <= top; n++ {
			r := g - a.q*float64(n)*float64(n)
			for m, topm := b.first(), b.top(r); m <= topm; m++ {
				s += a.weight(n) * b.weight(m) * v.open.slope(r-b.q*float64(m)*float64(m))
			}
		}
	}
	return v.weight * s
}

// wire returns N and dN/dγ, per unit valley weight, of a valley with two
// confined axes and one open one in one pass over its subbands:
// pref·Σ w√(γ − γₙ) and pref·Σ w/(2√(γ − γₙ)). The van Hove peak of a
// subband with its edge exactly at γ is left out of the slope, as in
// openPart.slope.
func (v *valleyCounter) wire(g0 float64, slope bool) (n, d float64) {
	a, b := v.conf[0], v.conf[1]
	g := g0 * (1 + tieRel)
	for i, top := a.first(), a.top(g); i <= top; i++ {
		ea := a.q * float64(i) * float64(i)
		r0 := g0 - ea
		var sn, sd float64
		m, topm := b.first(), b.top(g-ea)
		if b.ring && m == 0 && topm >= 0 {
			// m = 0 has weight 1, every m ≥ 1 weight 2: all of them are
			// doubled below, so half of m = 0 comes off first.
			if r0 > 0 {
				rt := math.Sqrt(r0)
				sn -= rt / 2
				if slope {
					sd -= 1 / (2 * rt)
				}
			}
		}
		for ; m <= topm; m++ {
			if x := r0 - b.q*float64(m)*float64(m); x > 0 {
				rt := math.Sqrt(x)
				sn += rt
				if slope {
					sd += 1 / rt
				}
			}
		}
		bw := 1.0
		if b.ring {
			bw = 2
		}
		n += a.weight(i) * bw * sn
		d += a.weight(i) * bw * sd
	}
	return v.open.pref * n, v.open.pref * d / 2
}

// States writes N(E), the number of states with energy ≤ E (spin and valleys
// included), for each energy (eV) into out. Energies above the cap the
// Counter was built for panic.
func (k *Counter) States(ctx context.Context, energiesEV, out []float64) error {
	return k.each(ctx, energiesEV, out, nil, func(v *valleyCounter, g float64) (float64, float64) { return v.count(g), 0 })
}

// DensityOfStates writes the analytic D(E) = dN/dE in states per eV where at
// least one axis is open (2D steps, 1D inverse-square-root peaks). For a
// fully confined conductor D is a sum of delta functions: use Broadened.
func (k *Counter) DensityOfStates(ctx context.Context, energiesEV, out []float64) error {
	err := k.each(ctx, energiesEV, out, nil, func(v *valleyCounter, g float64) (float64, float64) { return v.slope(g), 0 })
	if err != nil {
		return err
	}
	for i, e := range energiesEV {
		out[i] *= dGammadE(e, k.c.AlphaPerEV)
	}
	return nil
}

// StatesAndDensity writes States into n and DensityOfStates into d in one
// pass, which for a wire shares each subband's square root.
func (k *Counter) StatesAndDensity(ctx context.Context, energiesEV, n, d []float64) error {
	err := k.each(ctx, energiesEV, n, d, func(v *valleyCounter, g float64) (float64, float64) {
		if len(v.conf) == 2 && v.open.dim == 1 && g >= 0 {
			a, b := v.wire(g, true)
			return v.weight * a, v.weight * b
		}
		return v.count(g), v.slope(g)
	})
	if err != nil {
		return err
	}
	for i, e := range energiesEV {
		d[i] *= dGammadE(e, k.c.AlphaPerEV)
	}
	return nil
}

// Conductor returns the conductor being counted.
func (k *Counter) Conductor() Conductor { return k.c }

// each writes Σ over valleys of f's first value into out and, when out2 is
// not nil, of its second into out2, for every energy, on all cores.
func (k *Counter) each(ctx context.Context, energiesEV, out, out2 []float64, f func(*valleyCounter, float64) (float64, float64)) error {
	if len(out) != len(energiesEV) || (out2 != nil && len(out2) != len(out)) {
		panic("spectrum: output length differs from input")
	}
	gam := make([]float64, len(energiesEV))
	for i, e := range energiesEV {
		gam[i] = Gamma(e, k.c.AlphaPerEV)
		if gam[i] > k.gammaMax {
			panic("spectrum: energy above the counter's cap")
		}
	}
	work := func(lo, hi int) error {
		for i := lo; i < hi; i++ {
			if ctx.Err() != nil {
				return ctx.Err()
			}
			var s, s2 float64
			for vi := range k.valleys {
				a, b := f(&k.valleys[vi], gam[i])
				s += a
				s2 += b
			}
			out[i] = s
			if out2 != nil {
				out2[i] = s2
			}
		}
		return nil
	}
	workers := runtime.GOMAXPROCS(0)
	if workers < 2 || len(gam) < 16 {
		return work(0, len(gam))
	}
	var g errgroup.Group
	// Interleaved chunks balance the cost, which grows with energy.
	chunk := (len(gam) + 4*workers - 1) / (4 * workers)
	for lo := 0; lo < len(gam); lo += chunk {
		lo, hi := lo, min(lo+chunk, len(gam))
		g.Go(func() error { return work(lo, hi) })
	}
	return g.Wait()
}

// OpenDims returns the number of open axes.
func (k *Counter) OpenDims() int {
	if len(k.valleys) == 0 {
		return 0
	}
	return k.valleys[0].open.dim
}

// Subbands calls fn for every subband with its edge at or below topEV: its
// edge energy and its weight, so that the subband holds weight·(γ − γₙ)^(d/2)
// states (d = OpenDims, spin and valleys included). Subbands are the levels
// of the confined axes; with no confined axis there is one, at 0. A fully
// confined conductor has no subbands to list: Subbands panics.
func (k *Counter) Subbands(ctx context.Context, topEV float64, fn func(edgeEV, weight float64)) error {
	g := Gamma(topEV, k.c.AlphaPerEV) * (1 + tieRel)
	if g > k.gammaMax*(1+2*tieRel) {
		panic("spectrum: subbands above the counter's cap")
	}
	alpha := k.c.AlphaPerEV
	for vi := range k.valleys {
		v := &k.valleys[vi]
		w := v.weight
		if v.open.dim > 0 {
			w *= v.open.pref
		}
		switch len(v.conf) {
		case 0:
			if g >= 0 {
				fn(0, w)
			}
		case 1:
			l := v.conf[0]
			for n, top := l.first(), l.top(g); n <= top; n++ {
				fn(Energy(l.q*float64(n)*float64(n), alpha), w*l.weight(n))
			}
		case 2:
			a, b := v.conf[0], v.conf[1]
			for n, top := a.first(), a.top(g); n <= top; n++ {
				if n%256 == 0 && ctx.Err() != nil {
					return ctx.Err()
				}
				ea := a.q * float64(n) * float64(n)
				wa := w * a.weight(n)
				for m, topm := b.first(), b.top(g-ea); m <= topm; m++ {
					fn(Energy(ea+b.q*float64(m)*float64(m), alpha), wa*b.weight(m))
				}
			}
		default:
			panic("spectrum: subbands of a fully confined conductor")
		}
	}
	return nil
}

// TopEV returns the highest energy the counter answers for.
func (k *Counter) TopEV() float64 { return Energy(k.gammaMax, k.c.AlphaPerEV) }

// SubbandCount returns how many subbands Subbands(topEV) would list (their
// distinct index tuples, over the valleys), at the cost of one pass over
// the outer axis.
func (k *Counter) SubbandCount(topEV float64) float64 {
	g := Gamma(topEV, k.c.AlphaPerEV) * (1 + tieRel)
	var n float64
	for vi := range k.valleys {
		v := &k.valleys[vi]
		switch len(v.conf) {
		case 0:
			if g >= 0 {
				n++
			}
		case 1:
			n += float64(v.conf[0].levels(g))
		case 2:
			a, b := v.conf[0], v.conf[1]
			for i, top := a.first(), a.top(g); i <= top; i++ {
				n += float64(b.levels(g - a.q*float64(i)*float64(i)))
			}
		default:
			return math.Inf(1)
		}
	}
	return n
}

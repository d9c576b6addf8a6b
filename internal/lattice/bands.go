package lattice

import (
	"context"
	"errors"
	"math"
	"sort"
)

var errNoConvergence = errors.New("lattice: tridiagonal eigensolver did not converge")

// kGrid returns K values of s = k·period evenly spaced over [−π, π]; K is
// odd so that s = 0 and s = ±π are on it.
func kGrid(kpoints int) []float64 {
	s := make([]float64, kpoints)
	for i := range s {
		s[i] = -math.Pi + 2*math.Pi*float64(i)/float64(kpoints-1)
	}
	s[kpoints/2] = 0
	s[kpoints-1] = math.Pi
	return s
}

// spectrum is the analysis of sampled bands: everything D(E), M(E) and the
// gap need. The bands with E < 0 are the mirror images −E of the stored
// ones and are folded in as they are read.
type spectrum struct {
	minUpperEV float64 // lowest energy of any band with E ≥ 0 (refined)

	// Rising runs (lo, hi] of every band, over the periodic zone: M(E) per
	// spin is #{lo < E} − #{hi < E}, the number of right-moving crossings.
	los, his []float64

	// DOS bins: states per nm (spin included) whose energy lies in bin j of
	// the grid emin + j·h.
	eminEV, binEV float64
	bins          []float64

	// windows for point DOS: states per nm in [lo, hi].
	winLo, winHi, winStates []float64
}

// point is one sample of a band in the periodic zone: s = k·period.
type point struct{ s, e float64 }

// analyse refines the extrema of each band, accumulates the DOS of the
// piecewise-linear interpolation between (refined) samples into bins, and
// collects the rising runs. perLength is g_s/(2π·period): the number of
// states per nm in a band per unit of s. Extrema within snapEV of zero are
// set to zero: a zone-folded band that touches E = 0 off the k grid is
// found by the refinement to within rounding, and particle–hole symmetry
// says it then touches its mirror band, so the touching is made exact.
func analyse(ctx context.Context, g geometry, s []float64, upper [][]float64, perLength, snapEV float64,
	eminEV, emaxEV float64, points int, windows [][2]float64) (*spectrum, error) {
	sp := &spectrum{
		minUpperEV: math.Inf(1),
		eminEV:     eminEV,
		binEV:      (emaxEV - eminEV) / float64(points),
		bins:       make([]float64, points),
		winLo:      make([]float64, len(windows)),
		winHi:      make([]float64, len(windows)),
		winStates:  make([]float64, len(windows)),
	}
	for i, w := range windows {
		sp.winLo[i], sp.winHi[i] = w[0], w[1]
	}
	inner := make([]float64, points+1) // difference array of fully covered bins
	K := len(s)
	ds := 2 * math.Pi / float64(K-1)
	pts := make([]point, 0, 2*K)
	for b := range upper {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		e := upper[b]
		pts = pts[:0]
		for i := 0; i < K; i++ {
			cur := e[i]
			// The zone ends are one-sided: a chiral tube's band μ continues
			// past s = π as another band, so brackets stay inside [−π, π].
			lo, hi := s[i]-ds, s[i]+ds
			prev, next := cur, cur
			if i > 0 {
				prev = e[i-1]
			} else {
				lo = s[0]
			}
			if i < K-1 {
				next = e[i+1]
			} else {
				hi = s[K-1]
			}
			isMin := cur <= prev && cur <= next && (cur < prev || cur < next)
			isMax := cur >= prev && cur >= next && (cur > prev || cur > next)
			if !isMin && !isMax || (g.band == nil && (i == 0 || i == K-1)) {
				pts = append(pts, point{s[i], snap(cur, snapEV)})
				continue
			}
			sx, ex := refine(g.band, b, s[i], lo, hi, ds, prev, cur, next, isMin)
			switch {
			case sx < s[i]:
				pts = append(pts, point{sx, snap(ex, snapEV)}, point{s[i], snap(cur, snapEV)})
			case sx > s[i]:
				pts = append(pts, point{s[i], snap(cur, snapEV)}, point{sx, snap(ex, snapEV)})
			default:
				pts = append(pts, point{s[i], snap(ex, snapEV)})
			}
		}
		sp.addBand(pts, perLength, inner)
	}
	acc := 0.0
	for j := range sp.bins {
		acc += inner[j]
		sp.bins[j] += acc
	}
	sort.Float64s(sp.los)
	sort.Float64s(sp.his)
	return sp, nil
}

func snap(e, tol float64) float64 {
	if e < tol {
		return 0
	}
	return e
}

// refine locates the extremum near sample s0 (value cur, neighbours prev and
// next one step ds away). With an analytic band it is a golden-section search
// on [lo, hi]; otherwise the vertex of the parabola through the
// three samples, kept only if it stays inside the bracket and moves the value
// by no more than the neighbouring steps (a kink where sorted bands cross is
// not a smooth extremum).
func refine(band func(int, float64) float64, b int, s0, lo, hi, ds, prev, cur, next float64, isMin bool) (float64, float64) {
	sign := 1.0
	if !isMin {
		sign = -1
	}
	if band != nil {
		f := func(x float64) float64 { return sign * band(b, x) }
		x, fx := goldenMin(f, lo, hi)
		if fx < sign*cur {
			return x, sign * fx
		}
		return s0, cur
	}
	den := prev - 2*cur + next
	if den == 0 {
		return s0, cur
	}
	dx := 0.5 * (prev - next) / den // in units of ds
	if math.Abs(dx) >= 1 {
		return s0, cur
	}
	ex := cur - 0.25*(prev-next)*dx
	limit := math.Max(math.Abs(prev-cur), math.Abs(next-cur))
	if sign*(cur-ex) < 0 || math.Abs(cur-ex) > limit {
		return s0, cur
	}
	return s0 + dx*ds, ex
}

// goldenMin minimises f on [a, b] by golden-section search (Kiefer 1953;
// Press et al., Numerical Recipes, 3rd ed., §10.2) to a bracket of about
// 1e-13 of its start, enough to put a Dirac point on zero to rounding.
func goldenMin(f func(float64) float64, a, b float64) (float64, float64) {
	const r = 0.6180339887498949 // (√5 − 1)/2
	x1, x2 := b-r*(b-a), a+r*(b-a)
	f1, f2 := f(x1), f(x2)
	for i := 0; i < 64 && b-a > 1e-14; i++ {
		if f1 < f2 {
			b, x2, f2 = x2, x1, f1
			x1 = b - r*(b-a)
			f1 = f(x1)
		} else {
			a, x1, f1 = x1, x2, f2
			x2 = a + r*(b-a)
			f2 = f(x2)
		}
	}
	if f1 < f2 {
		return x1, f1
	}
	return x2, f2
}

// addBand folds one band (and its mirror −E) into the DOS bins, the point
// windows and the rising runs. pts is the band over [−π, π] in increasing s.
// Bands are open paths: at the zone edge a band joins another (or itself) at
// the same energy, so half-open runs split there still count each crossing
// once.
func (sp *spectrum) addBand(pts []point, perLength float64, inner []float64) {
	n := len(pts)
	for _, p := range pts {
		sp.minUpperEV = math.Min(sp.minUpperEV, p.e)
	}
	for j := 0; j+1 < n; j++ {
		p, q := pts[j], pts[j+1]
		w := perLength * (q.s - p.s)
		lo, hi := math.Min(p.e, q.e), math.Max(p.e, q.e)
		sp.addSegment(lo, hi, w, inner)
		sp.addSegment(-hi, -lo, w, inner)
	}
	dir := 0
	start := pts[0].e
	prev := start
	for j := 1; j < n; j++ {
		v := pts[j].e
		switch {
		case v > prev:
			if dir < 0 {
				sp.addRun(start, prev, true)
				start = prev
			}
			dir = 1
		case v < prev:
			if dir > 0 {
				sp.addRun(start, prev, false)
				start = prev
			}
			dir = -1
		}
		prev = v
	}
	if dir != 0 {
		sp.addRun(start, prev, dir < 0)
	}
}

// addRun records a rising run of the band from lo to hi, or, for a falling
// run from hi down to lo (falling = true), the rising run (−hi, −lo] of the
// mirror band.
func (sp *spectrum) addRun(from, to float64, falling bool) {
	if falling {
		from, to = -from, -to
	}
	if to <= from {
		return
	}
	sp.los = append(sp.los, from)
	sp.his = append(sp.his, to)
}

// addSegment spreads w states per nm uniformly over [lo, hi] (a linear
// piece of a band has constant dk/dE), or puts them at lo if the piece is
// flat, into the bins and the point windows.
func (sp *spectrum) addSegment(lo, hi, w float64, inner []float64) {
	for i := range sp.winLo {
		sp.winStates[i] += w * overlapFraction(lo, hi, sp.winLo[i], sp.winHi[i])
	}
	nb := len(sp.bins)
	emax := sp.eminEV + float64(nb)*sp.binEV
	if hi < sp.eminEV || lo > emax {
		return
	}
	if hi-lo <= 1e-12*sp.binEV {
		sp.bins[sp.bin(lo)] += w
		return
	}
	rho := w / (hi - lo)
	a, b := math.Max(lo, sp.eminEV), math.Min(hi, emax)
	ja, jb := sp.bin(a), sp.bin(b)
	if ja == jb {
		sp.bins[ja] += rho * (b - a)
		return
	}
	sp.bins[ja] += rho * (sp.edge(ja+1) - a)
	sp.bins[jb] += rho * (b - sp.edge(jb))
	if jb > ja+1 {
		c := rho * sp.binEV
		inner[ja+1] += c
		inner[jb] -= c
	}
}

func (sp *spectrum) edge(j int) float64 { return sp.eminEV + float64(j)*sp.binEV }

func (sp *spectrum) bin(e float64) int {
	j := int(math.Floor((e - sp.eminEV) / sp.binEV))
	return max(0, min(len(sp.bins)-1, j))
}

// overlapFraction is the fraction of [lo, hi] inside [a, b]; a flat piece
// (lo = hi) counts if it lies in [a, b).
func overlapFraction(lo, hi, a, b float64) float64 {
	if hi <= lo {
		if lo >= a && lo < b {
			return 1
		}
		return 0
	}
	o := math.Min(hi, b) - math.Max(lo, a)
	if o <= 0 {
		return 0
	}
	return o / (hi - lo)
}

// modesPerSpin is the number of right-moving band crossings at energy e.
func (sp *spectrum) modesPerSpin(e float64) int {
	return sort.SearchFloat64s(sp.los, e) - sort.SearchFloat64s(sp.his, e)
}

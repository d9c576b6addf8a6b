package thermal

import (
	"context"
	"fmt"
	"math"
	"slices"
	"sync"
)

// Curve evaluates a non-decreasing, right-continuous function of energy
// (for example N(E) or M(E)) at the given energies, ascending, writing into
// out (len(out) == len(energiesEV)). Batches let the caller amortise work;
// it must honour ctx cancellation.
type Curve func(ctx context.Context, energiesEV, out []float64) error

// Defaults of Integrator; the zero Integrator uses them.
const (
	DefaultWindowKT = 40    // widest half-width of the thermal window, in k_BT
	DefaultRelTol   = 1e-9  // target relative error bound
	DefaultMaxEvals = 20000 // cap on curve evaluations per integral
	initialCells    = 32    // uniform cells on each side of E_F to start
	batchFraction   = 0.5   // refine every cell within this factor of the worst
	absFloorScale   = 1e-24 // absolute floor on the bound, relative to |c|
	monotoneSlack   = 1e-12 // relative decrease of c tolerated as rounding
)

// Integrator evaluates thermal averages of a Curve. Its zero value uses the
// defaults above; a field ≤ 0 also takes its default.
//
// The method: inside the window [E_F − W·k_BT, E_F + W·k_BT] the energy axis
// is cut into cells (a, b] with E_F a node. Because c is non-decreasing and
// the weight w (f, or −∂f/∂E) is monotone on each cell, the cell's part of
// ∫ w dc lies between min(w(a), w(b))·Δc and max(w(a), w(b))·Δc with
// Δc = c(b) − c(a): half that width is a rigorous bound on the cell's
// error. Cells with the largest bounds are bisected, their midpoints
// evaluated in one batch, until the total bound is below RelTol·|value|
// (or an absolute floor 1e-24·max|c|, or AbsTol) or MaxEvals is spent. A
// cell with Δc = 0 is exactly flat and never refined, so a few levels cost
// about 35 evaluations each and a single level at E_l gives w(E_l)·jump to
// the requested tolerance.
//
// The bound of a cell shrinks only linearly with its width, so a continuum
// (or levels much denser than k_BT) spends MaxEvals and reports a bound of
// ~1e-4 relative at 20 000 evaluations. The value itself is far better:
// the final sum interpolates c by a monotone cubic inside each cell (see
// finalTotals), which stays inside the rigorous interval and is accurate to
// ~1e-10 relative for a parabolic band at 20 000 evaluations (~1e-7 at
// 1 000). Callers integrating continua many times may lower MaxEvals.
//
// Outside the window the weight is below e^(−W) ≈ 4e-18; those tails are
// estimated, not bounded, as e^(−W)·|c| at the window's ends: levels beyond
// E_F + W·k_BT are dropped (each would add at most e^(−W) times its
// degeneracy), and below E_F − W·k_BT everything is fully occupied.
type Integrator struct {
	WindowKT float64 // half-width of the window in k_BT (default WindowFor(RelTol) with an edge, else 40)
	RelTol   float64 // relative tolerance of the error bound (default 1e-9)
	AbsTol   float64 // absolute tolerance, in the units of the result (default: floor only)
	MaxEvals int     // cap on curve evaluations (default 20 000)
	// With HasEdge the curve is zero below Edge (a band edge or the lowest
	// level): the window starts there when E_F − W·k_BT is below it and
	// ends at max(E_F, Edge) + W·k_BT, so a Fermi level far below the edge
	// (the Boltzmann tail) keeps its relative accuracy and nothing below
	// the edge is integrated.
	Edge    float64
	HasEdge bool
}

// Underflows reports whether the occupation e^(−(E − E_F)/k_BT) at and
// above edge is below the smallest normal float64, e^(−708) (E − E_F >
// 708 k_BT): a curve that starts at edge then integrates to zero, to the
// precision floating point holds.
func Underflows(edge, efEV, kTEV float64) bool {
	return edge-efEV > 708*kTEV
}

// WindowFor returns the half-width of the thermal window, in k_BT, that
// keeps the weight outside it below the relative tolerance: beyond
// E_F + W·k_BT the occupation is below e^(−W), and a density of states
// that grows like a power of the energy adds at most a factor of order W
// (the incomplete gamma function Γ(s, W) ≈ W^(s−1)e^(−W)); W = ln(1/tol) + 3
// covers powers up to 1 (modes of a 3D conductor): 16.8 at 1e-6, 23.7 at
// 1e-9 (common practice). It lies between 8 and DefaultWindowKT.
func WindowFor(relTol float64) float64 {
	if !(relTol > 0) {
		relTol = DefaultRelTol
	}
	return math.Min(math.Max(math.Log(1/relTol)+3, 8), DefaultWindowKT)
}

// Estimate is the result of one thermal average.
type Estimate struct {
	Value     float64 // the average
	ErrBound  float64 // bound on |Value − exact| (window rigorous, tails estimated)
	Evals     int     // curve evaluations spent
	Converged bool    // ErrBound met the tolerance before MaxEvals ran out
}

// Occupied returns ∫ c(E)(−∂f/∂E) dE with the default Integrator; for a
// count that vanishes far below (c(−∞) = 0) this is the Stieltjes integral
// ∫ f dc, in which a level at E_l of degeneracy g contributes g·f(E_l). For N(E) it is the number of electrons; for M(E)
// the Landauer mode average G/(q²/h). kTEV = 0 gives exactly c(E_F) from one
// evaluation (levels at E_F occupied). Errors: ErrNegativeTemperature,
// ErrNotFinite, ErrCurveDecreasing, the curve's own error, or ctx.Err().
func Occupied(ctx context.Context, c Curve, efEV, kTEV float64) (value, errBound float64, err error) {
	e, err := Integrator{}.Occupied(ctx, c, efEV, kTEV)
	return e.Value, e.ErrBound, err
}

// Slope returns ∫ (−∂f/∂E) dc = d/dE_F of Occupied with the default
// Integrator: for N(E), the density of states averaged over the thermal
// window (quantum capacitance C_Q = q²·Slope). kTEV must be > 0, else
// ErrZeroTemperature.
func Slope(ctx context.Context, c Curve, efEV, kTEV float64) (value, errBound float64, err error) {
	e, err := Integrator{}.Slope(ctx, c, efEV, kTEV)
	return e.Value, e.ErrBound, err
}

// Occupied is the package function Occupied with this Integrator's settings.
func (in Integrator) Occupied(ctx context.Context, c Curve, efEV, kTEV float64) (Estimate, error) {
	if err := checkArgs(efEV, kTEV); err != nil {
		return Estimate{}, err
	}
	in = in.withDefaults()
	if kTEV == 0 || in.collapsed(efEV, kTEV) {
		// T = 0, or k_BT below the resolution of energies near E_F: f is
		// the step, and ∫ f dc = c(E_F) by right-continuity.
		var out [1]float64
		if err := evaluate(ctx, c, []float64{efEV}, out[:]); err != nil {
			return Estimate{}, err
		}
		return Estimate{Value: out[0], Evals: 1, Converged: true}, nil
	}
	w := func(e float64) float64 { return FermiDirac(e, efEV, kTEV) }
	r, err := in.run(ctx, c, efEV, kTEV, w, true)
	if err != nil {
		return Estimate{}, err
	}
	// ∫ c(−f′)dE = c(lo) + ∫_(lo,∞) f dc − ∫_(−∞,lo) (1−f) dc; the two
	// outer pieces carry weights below e^(−W). From the edge, c(lo) is the
	// jump at lo and carries f(lo).
	return Estimate{
		Value:     r.base + r.sum,
		ErrBound:  r.bound + r.tail(func(e float64) float64 { return 1 - w(e) }, w),
		Evals:     r.evals,
		Converged: r.converged,
	}, nil
}

// OccupiedAndSlope returns Occupied and Slope from one refinement: the
// cells Occupied refines also carry the Slope's sum, with its own bound
// (rigorous in the window like Slope's, but not driven to the tolerance),
// for half the curve evaluations of the two. kTEV must be > 0.
func (in Integrator) OccupiedAndSlope(ctx context.Context, c Curve, efEV, kTEV float64) (occ, slope Estimate, err error) {
	if err := checkArgs(efEV, kTEV); err != nil {
		return occ, slope, err
	}
	in = in.withDefaults()
	if kTEV == 0 || in.collapsed(efEV, kTEV) {
		return occ, slope, fmt.Errorf("thermal: OccupiedAndSlope: %w", ErrZeroTemperature)
	}
	w := func(e float64) float64 { return FermiDirac(e, efEV, kTEV) }
	k := func(e float64) float64 { return Kernel(e, efEV, kTEV) }
	r, err := in.run2(ctx, c, efEV, kTEV, w, k, true)
	if err != nil {
		return occ, slope, err
	}
	base2 := 0.0
	if r.atEdge {
		base2 = k(r.lo) * r.cLo
	}
	occ = Estimate{Value: r.base + r.sum, ErrBound: r.bound + r.tail(func(e float64) float64 { return 1 - w(e) }, w),
		Evals: r.evals, Converged: r.converged}
	bound2 := r.bound2 + r.tail(k, k)
	slope = Estimate{Value: base2 + r.sum2, ErrBound: bound2, Evals: r.evals,
		Converged: bound2 <= in.RelTol*math.Abs(base2+r.sum2)}
	return occ, slope, nil
}

// Slope is the package function Slope with this Integrator's settings.
func (in Integrator) Slope(ctx context.Context, c Curve, efEV, kTEV float64) (Estimate, error) {
	if err := checkArgs(efEV, kTEV); err != nil {
		return Estimate{}, err
	}
	in = in.withDefaults()
	if kTEV == 0 {
		return Estimate{}, fmt.Errorf("thermal: Slope: %w", ErrZeroTemperature)
	}
	if in.collapsed(efEV, kTEV) {
		return Estimate{}, fmt.Errorf("thermal: Slope: kT = %g eV is below the energy resolution at E_F = %g eV: %w",
			kTEV, efEV, ErrZeroTemperature)
	}
	w := func(e float64) float64 { return Kernel(e, efEV, kTEV) }
	r, err := in.run(ctx, c, efEV, kTEV, w, false)
	if err != nil {
		return Estimate{}, err
	}
	return Estimate{Value: r.base + r.sum, ErrBound: r.bound + r.tail(w, w), Evals: r.evals, Converged: r.converged}, nil
}

func checkArgs(efEV, kTEV float64) error {
	if math.IsNaN(efEV) || math.IsInf(efEV, 0) {
		return fmt.Errorf("thermal: Fermi level %g eV: %w", efEV, ErrNotFinite)
	}
	if math.IsNaN(kTEV) || math.IsInf(kTEV, 0) {
		return fmt.Errorf("thermal: kT %g eV: %w", kTEV, ErrNotFinite)
	}
	if kTEV < 0 {
		return fmt.Errorf("thermal: kT %g eV: %w", kTEV, ErrNegativeTemperature)
	}
	return nil
}

func (in Integrator) withDefaults() Integrator {
	if !(in.RelTol > 0) {
		in.RelTol = DefaultRelTol
	}
	if !(in.WindowKT > 0) {
		// Without an edge a Fermi level far below the curve's start needs
		// the wide window to reach it.
		in.WindowKT = DefaultWindowKT
		if in.HasEdge {
			in.WindowKT = WindowFor(in.RelTol)
		}
	}
	if !(in.AbsTol > 0) {
		in.AbsTol = 0
	}
	if in.MaxEvals <= 0 {
		in.MaxEvals = DefaultMaxEvals
	}
	return in
}

// Window returns the energy range an average at (E_F, k_BT) reads:
// E_F ± W·k_BT or, with an edge above E_F − W·k_BT, from the edge to
// max(E_F, Edge) + W·k_BT (atEdge). empty reports that the occupation at
// the edge underflows (Underflows), where the average is exactly zero and
// nothing is read; lo = hi = E_F then.
func (in Integrator) Window(efEV, kTEV float64) (lo, hi float64, atEdge, empty bool) {
	in = in.withDefaults()
	if in.HasEdge && (Underflows(in.Edge, efEV, kTEV) || (kTEV == 0 && in.Edge > efEV)) {
		return efEV, efEV, true, true
	}
	width := in.WindowKT * kTEV
	lo, hi = efEV-width, efEV+width
	if in.HasEdge && lo < in.Edge {
		lo, hi, atEdge = in.Edge, math.Max(efEV, in.Edge)+width, true
	}
	return lo, hi, atEdge, false
}

// collapsed reports whether the first cells of the window round to E_F.
func (in Integrator) collapsed(efEV, kTEV float64) bool {
	step := in.WindowKT * kTEV / initialCells
	return efEV-step == efEV || efEV+step == efEV
}

// cell is (a, b] with the curve and the weight known at both ends. Cells
// form a list in energy order through next (bisection appends the right
// half), so the final pass needs no sort.
type cell struct {
	a, b   float64
	ca, cb float64
	wa, wb float64
	bound  float64
	next   int32 // index of the cell to the right, −1 at the end
}

func (c *cell) jump() float64     { return c.cb - c.ca }
func (c *cell) estimate() float64 { return 0.5 * (c.wa + c.wb) * c.jump() }

// splittable reports whether the midpoint is a new float strictly inside.
func (c *cell) splittable() bool {
	m := 0.5 * (c.a + c.b)
	return m > c.a && m < c.b
}

// setBound computes the cell's bound, checking monotonicity; rounding noise
// below monotoneSlack·|c| is read as a flat cell.
func (c *cell) setBound() error {
	d := c.jump()
	if d < 0 {
		if -d > monotoneSlack*math.Max(math.Abs(c.ca), math.Abs(c.cb)) {
			return fmt.Errorf("%w: c(%g) = %g > c(%g) = %g", ErrCurveDecreasing, c.a, c.ca, c.b, c.cb)
		}
		c.cb = c.ca
		d = 0
	}
	c.bound = 0.5 * math.Abs(c.wa-c.wb) * d
	return nil
}

// workspace holds the buffers of one integral; pooled because solvers and
// sweeps call Occupied many times in a row.
type workspace struct {
	cells        []cell
	heap         []heapEntry // max-heap of refinable cells by bound
	batch        []split
	nodes, vals  []float64
	mids, midVal []float64
}

var workspaces = sync.Pool{New: func() any { return new(workspace) }}

// heapEntry carries the bound with the index, so sifting touches only the
// heap's own contiguous memory.
type heapEntry struct {
	bound float64
	i     int32
}

// split is a cell chosen for bisection and its midpoint.
type split struct {
	mid float64
	i   int32
}

func (ws *workspace) less(i, j int) bool { return ws.heap[i].bound > ws.heap[j].bound }

func (ws *workspace) push(i int32) {
	ws.heap = append(ws.heap, heapEntry{ws.cells[i].bound, i})
	k := len(ws.heap) - 1
	for k > 0 {
		p := (k - 1) / 2
		if !ws.less(k, p) {
			break
		}
		ws.heap[k], ws.heap[p] = ws.heap[p], ws.heap[k]
		k = p
	}
}

func (ws *workspace) pop() int32 {
	top := ws.heap[0]
	n := len(ws.heap) - 1
	ws.heap[0] = ws.heap[n]
	ws.heap = ws.heap[:n]
	k := 0
	for {
		l := 2*k + 1
		if l >= n {
			break
		}
		if r := l + 1; r < n && ws.less(r, l) {
			l = r
		}
		if !ws.less(l, k) {
			break
		}
		ws.heap[k], ws.heap[l] = ws.heap[l], ws.heap[k]
		k = l
	}
	return top.i
}

func (ws *workspace) pushIfRefinable(i int32) {
	if c := &ws.cells[i]; c.bound > 0 && c.splittable() {
		ws.push(i)
	}
}

type runResult struct {
	sum, bound float64 // Σ estimates and Σ bounds over the window's cells
	base       float64 // the part at and below lo: c(lo) (Occupied), or w(lo)·c(lo) from the edge
	atEdge     bool    // the window starts at the curve's edge
	lo, hi     float64 // window ends
	cLo, cHi   float64 // c at the window ends
	evals      int
	converged  bool
	// With a second weight: its Σ estimates and Σ bounds on the same cells.
	sum2, bound2 float64
}

// tail estimates what a weight leaves outside the window: wBelow (the
// part of the weight still missing below lo: 1 − f for Occupied, −f′ for
// Slope) times |c(lo)|, nothing from an edge, and w(hi)·|c(hi)| above.
func (r runResult) tail(wBelow, w func(float64) float64) float64 {
	t := w(r.hi) * math.Abs(r.cHi)
	if !r.atEdge {
		t += wBelow(r.lo) * math.Abs(r.cLo)
	}
	return t
}

// run refines ∫_(lo,hi] w dc. offsetByCLo adds c(lo) to the value the
// relative tolerance is measured against (Occupied).
func (in Integrator) run(ctx context.Context, c Curve, efEV, kTEV float64, w func(float64) float64, offsetByCLo bool) (runResult, error) {
	return in.run2(ctx, c, efEV, kTEV, w, nil, offsetByCLo)
}

// run2 is run that also sums a second weight w2 (if not nil) over the
// cells the first one refined, at no further curve evaluations.
func (in Integrator) run2(ctx context.Context, c Curve, efEV, kTEV float64, w, w2 func(float64) float64, offsetByCLo bool) (runResult, error) {
	ws := workspaces.Get().(*workspace)
	defer workspaces.Put(ws)
	var r runResult
	n := 2 * initialCells
	ws.nodes, ws.vals = slices.Grow(ws.nodes[:0], n+1)[:n+1], slices.Grow(ws.vals[:0], n+1)[:n+1]
	nodes, vals := ws.nodes, ws.vals
	lo, hi, atEdge, empty := in.Window(efEV, kTEV)
	r.atEdge = atEdge
	if empty {
		// Zero in floating point, exactly: nothing to evaluate.
		r.converged = true
		return r, nil
	}
	if lo < efEV && efEV < hi {
		// E_F a node, so no cell straddles the peak of −f′.
		for i := 0; i <= initialCells; i++ {
			nodes[i] = lo + (efEV-lo)*float64(i)/initialCells
			nodes[initialCells+i] = efEV + (hi-efEV)*float64(i)/initialCells
		}
	} else {
		for i := range nodes {
			nodes[i] = lo + (hi-lo)*float64(i)/float64(n)
		}
	}
	nodes[0], nodes[n] = lo, hi
	if err := evaluate(ctx, c, nodes, vals); err != nil {
		return r, err
	}
	r.evals = n + 1
	r.lo, r.hi, r.cLo, r.cHi = nodes[0], nodes[n], vals[0], vals[n]
	switch {
	case r.atEdge:
		r.base = w(r.lo) * r.cLo
	case offsetByCLo:
		r.base = r.cLo
	}

	ws.cells, ws.heap = ws.cells[:0], ws.heap[:0]
	wPrev := w(nodes[0])
	for i := range n {
		wNext := w(nodes[i+1])
		cl := cell{a: nodes[i], b: nodes[i+1], ca: vals[i], cb: vals[i+1], wa: wPrev, wb: wNext, next: int32(i + 1)}
		if err := cl.setBound(); err != nil {
			return r, err
		}
		ws.cells = append(ws.cells, cl)
		wPrev = wNext
	}
	ws.cells[n-1].next = -1
	for i := range ws.cells {
		ws.pushIfRefinable(int32(i))
	}

	offset := r.base
	floor := in.AbsTol
	if floor == 0 {
		// The largest weight in the window times the largest |c|.
		wmax := math.Max(w(r.lo), w(r.hi))
		if !offsetByCLo && r.lo < efEV && efEV < r.hi {
			wmax = w(efEV)
		}
		floor = absFloorScale * math.Max(math.Abs(r.cLo), math.Abs(r.cHi)) * wmax
	}
	sum, bound := totals(ws.cells)
	for {
		if bound <= math.Max(in.RelTol*math.Abs(offset+sum), floor) {
			// Re-add from scratch: the running totals drift by rounding.
			if sum, bound = totals(ws.cells); bound <= math.Max(in.RelTol*math.Abs(offset+sum), floor) {
				r.converged = true
				break
			}
		}
		budget := in.MaxEvals - r.evals
		if len(ws.heap) == 0 || budget <= 0 {
			break
		}
		if err := ctx.Err(); err != nil {
			return r, err
		}
		// Bisect every cell within a factor batchFraction of the worst:
		// the greedy order of a heap, in batches the curve can amortise.
		ws.batch = ws.batch[:0]
		worst := ws.heap[0].bound
		for len(ws.heap) > 0 && len(ws.batch) < budget && ws.heap[0].bound >= batchFraction*worst {
			i := ws.pop()
			ws.batch = append(ws.batch, split{0.5 * (ws.cells[i].a + ws.cells[i].b), i})
		}
		slices.SortFunc(ws.batch, func(x, y split) int { return cmpFloat(x.mid, y.mid) })
		ws.mids = ws.mids[:0]
		for _, s := range ws.batch {
			ws.mids = append(ws.mids, s.mid)
		}
		ws.midVal = slices.Grow(ws.midVal[:0], len(ws.mids))[:len(ws.mids)]
		if err := evaluate(ctx, c, ws.mids, ws.midVal); err != nil {
			return r, err
		}
		r.evals += len(ws.mids)
		for k, s := range ws.batch {
			i := s.i
			p := ws.cells[i]
			m, cm := ws.mids[k], ws.midVal[k]
			wm := w(m)
			j := int32(len(ws.cells))
			left := cell{a: p.a, b: m, ca: p.ca, cb: cm, wa: p.wa, wb: wm, next: j}
			right := cell{a: m, b: p.b, ca: cm, cb: p.cb, wa: wm, wb: p.wb, next: p.next}
			if err := left.setBound(); err != nil {
				return r, err
			}
			if err := right.setBound(); err != nil {
				return r, err
			}
			sum += left.estimate() + right.estimate() - p.estimate()
			bound += left.bound + right.bound - p.bound
			ws.cells[i] = left
			ws.cells = append(ws.cells, right)
			ws.pushIfRefinable(i)
			ws.pushIfRefinable(j)
		}
	}
	r.sum, r.bound = finalTotals(ws.cells, w)
	if w2 != nil {
		for i := range ws.cells {
			ws.cells[i].wa, ws.cells[i].wb = w2(ws.cells[i].a), w2(ws.cells[i].b)
		}
		r.sum2, r.bound2 = finalTotals(ws.cells, w2)
	}
	return r, nil
}

func cmpFloat(x, y float64) int {
	switch {
	case x < y:
		return -1
	case x > y:
		return 1
	}
	return 0
}

// finalTotals sums the cells with a third-order estimate inside each cell's
// rigorous interval. The curve is interpolated between the nodes by the
// monotone piecewise-cubic Hermite interpolant (Fritsch & Carlson, SIAM J.
// Numer. Anal. 17, 238 (1980), with the Fritsch–Butland node slopes), and
// ∫ w dc over each cell is taken with 3-point Gauss–Legendre on w·c′
// (c′ is quadratic, so the rule gives Δc exactly). Since the interpolant is
// monotone, the estimate is a convex combination of values of w times Δc:
// it stays inside [min w, max w]·Δc, and the cell's bound becomes the
// larger distance to the interval's ends. For a continuum this makes the
// value accurate to O(h³) or better instead of O(h²), at no curve
// evaluations; for a staircase it changes nothing the bound does not cover.
func finalTotals(cells []cell, w func(float64) float64) (sum, bound float64) {
	secant := func(i int32) (h, delta float64) {
		c := &cells[i]
		h = c.b - c.a
		if h > 0 {
			delta = c.jump() / h
		}
		return h, delta
	}
	// Slope at the node between cells prev and cur (Fritsch–Butland);
	// one-sided at the ends of the window.
	nodeSlope := func(prev, cur int32) float64 {
		if prev < 0 {
			_, d := secant(cur)
			return d
		}
		if cur < 0 {
			_, d := secant(prev)
			return d
		}
		h0, d0 := secant(prev)
		h1, d1 := secant(cur)
		if d0 <= 0 || d1 <= 0 {
			return 0
		}
		w1, w2 := 2*h1+h0, h1+2*h0
		return (w1 + w2) / (w1/d0 + w2/d1)
	}
	// 3-point Gauss–Legendre nodes on [0, 1] and weights.
	t := [3]float64{0.5 - 0.5*math.Sqrt(0.6), 0.5, 0.5 + 0.5*math.Sqrt(0.6)}
	gw := [3]float64{5.0 / 18, 8.0 / 18, 5.0 / 18}
	var s, cs, b, cb float64
	prev := int32(-1)
	dLeft := nodeSlope(-1, 0)
	for i := int32(0); i >= 0; prev, i = i, cells[i].next {
		c := &cells[i]
		dRight := nodeSlope(i, c.next)
		jump := c.jump()
		if jump <= 0 || c.b <= c.a {
			dLeft = dRight
			continue
		}
		h := c.b - c.a
		// c′(t)·h for the Hermite cubic on t ∈ [0, 1]:
		// 6t(1−t)Δc + (1 − 4t + 3t²)h·d_a + (3t² − 2t)h·d_b.
		est := 0.0
		for q := range t {
			tq := t[q]
			dc := 6*tq*(1-tq)*jump + (1-4*tq+3*tq*tq)*h*dLeft + (3*tq*tq-2*tq)*h*dRight
			est += gw[q] * dc * w(c.a+tq*h)
		}
		lo, hi := math.Min(c.wa, c.wb)*jump, math.Max(c.wa, c.wb)*jump
		est = math.Min(math.Max(est, lo), hi) // rounding only
		s, cs = twoSum(s, cs, est)
		b, cb = twoSum(b, cb, math.Max(est-lo, hi-est))
		dLeft = dRight
	}
	_ = prev
	return s + cs, b + cb
}

// totals returns Σ estimate and Σ bound, compensated (Neumaier) since
// thousands of terms of mixed size are added.
func totals(cells []cell) (sum, bound float64) {
	var s, cs, b, cb float64
	for i := range cells {
		s, cs = twoSum(s, cs, cells[i].estimate())
		b, cb = twoSum(b, cb, cells[i].bound)
	}
	return s + cs, b + cb
}

func twoSum(s, comp, x float64) (float64, float64) {
	t := s + x
	if math.Abs(s) >= math.Abs(x) {
		comp += (s - t) + x
	} else {
		comp += (x - t) + s
	}
	return t, comp
}

// evaluate calls the curve, turning cancellation into ctx.Err() and
// rejecting NaN or infinite values.
func evaluate(ctx context.Context, c Curve, energies, out []float64) error {
	if err := ctx.Err(); err != nil {
		return err
	}
	if err := c(ctx, energies, out); err != nil {
		if ctxErr := ctx.Err(); ctxErr != nil {
			return ctxErr
		}
		return fmt.Errorf("thermal: curve: %w", err)
	}
	for i, v := range out {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("thermal: curve at %g eV is %g: %w", energies[i], v, ErrNotFinite)
		}
	}
	return nil
}

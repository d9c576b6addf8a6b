package thermal

import (
	"container/heap"
	"context"
	"fmt"
	"math"
	"slices"
)

// Curve evaluates a non-decreasing, right-continuous function of energy
// (for example N(E) or M(E)) at the given energies, ascending, writing into
// out (len(out) == len(energiesEV)). Batches let the caller amortise work;
// it must honour ctx cancellation.
type Curve func(ctx context.Context, energiesEV, out []float64) error

// Defaults of Integrator; the zero Integrator uses them.
const (
	DefaultWindowKT = 40    // half-width of the thermal window, in k_BT
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
// Δc = c(b) − c(a). The estimate is the centre of that interval and half
// its width is a rigorous error bound. Cells with the largest bounds are
// bisected, their midpoints evaluated in one batch, until the total bound
// is below RelTol·|value| (or an absolute floor 1e-24·max|c|, or AbsTol) or
// MaxEvals is spent. A cell with Δc = 0 is exactly flat and never refined,
// so a few levels cost about 35 evaluations each and a single level at
// E_l gives w(E_l)·jump to the requested tolerance. Outside the window the
// weight is below e^(−W) ≈ 4e-18; those tails are estimated, not bounded,
// as e^(−W)·|c| at the window's ends (exact for counts that vanish below
// the band edge and grow no faster than a power of E).
type Integrator struct {
	WindowKT float64 // half-width of the window in k_BT (default 40)
	RelTol   float64 // relative tolerance of the error bound (default 1e-9)
	AbsTol   float64 // absolute tolerance, in the units of the result (default: floor only)
	MaxEvals int     // cap on curve evaluations (default 20 000)
}

// Estimate is the result of one thermal average.
type Estimate struct {
	Value     float64 // the average
	ErrBound  float64 // bound on |Value − exact| (window rigorous, tails estimated)
	Evals     int     // curve evaluations spent
	Converged bool    // ErrBound met the tolerance before MaxEvals ran out
}

// Occupied returns ∫ c(E)(−∂f/∂E) dE = ∫ f dc (Stieltjes, c(−∞) = 0) with
// the default Integrator. For N(E) it is the number of electrons; for M(E)
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
	// outer pieces carry weights below e^(−W).
	tail := (1-w(r.lo))*math.Abs(r.cLo) + w(r.hi)*math.Abs(r.cHi)
	return Estimate{
		Value:     r.cLo + r.sum,
		ErrBound:  r.bound + tail,
		Evals:     r.evals,
		Converged: r.converged,
	}, nil
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
	tail := w(r.lo)*math.Abs(r.cLo) + w(r.hi)*math.Abs(r.cHi)
	return Estimate{Value: r.sum, ErrBound: r.bound + tail, Evals: r.evals, Converged: r.converged}, nil
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
	if !(in.WindowKT > 0) {
		in.WindowKT = DefaultWindowKT
	}
	if !(in.RelTol > 0) {
		in.RelTol = DefaultRelTol
	}
	if !(in.AbsTol > 0) {
		in.AbsTol = 0
	}
	if in.MaxEvals <= 0 {
		in.MaxEvals = DefaultMaxEvals
	}
	return in
}

// collapsed reports whether the first cells of the window round to E_F.
func (in Integrator) collapsed(efEV, kTEV float64) bool {
	step := in.WindowKT * kTEV / initialCells
	return efEV-step == efEV || efEV+step == efEV
}

// cell is (a, b] with the curve and the weight known at both ends.
type cell struct {
	a, b   float64
	ca, cb float64
	wa, wb float64
	bound  float64
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

// cellHeap is a max-heap of cell indices by bound.
type cellHeap struct {
	idx   []int
	cells []cell
}

func (h *cellHeap) Len() int           { return len(h.idx) }
func (h *cellHeap) Less(i, j int) bool { return h.cells[h.idx[i]].bound > h.cells[h.idx[j]].bound }
func (h *cellHeap) Swap(i, j int)      { h.idx[i], h.idx[j] = h.idx[j], h.idx[i] }
func (h *cellHeap) Push(x any)         { h.idx = append(h.idx, x.(int)) }
func (h *cellHeap) Pop() any {
	n := len(h.idx) - 1
	v := h.idx[n]
	h.idx = h.idx[:n]
	return v
}

type runResult struct {
	sum, bound float64 // Σ estimates and Σ bounds over the window's cells
	lo, hi     float64 // window ends
	cLo, cHi   float64 // c at the window ends
	evals      int
	converged  bool
}

// run refines ∫_(lo,hi] w dc. offsetByCLo adds c(lo) to the value the
// relative tolerance is measured against (Occupied).
func (in Integrator) run(ctx context.Context, c Curve, efEV, kTEV float64, w func(float64) float64, offsetByCLo bool) (runResult, error) {
	var r runResult
	n := 2 * initialCells
	nodes := make([]float64, n+1)
	for i := range nodes {
		nodes[i] = efEV + float64(i-initialCells)/initialCells*in.WindowKT*kTEV
	}
	nodes[initialCells] = efEV // a node, so no cell straddles the peak of −f′
	vals := make([]float64, n+1)
	if err := evaluate(ctx, c, nodes, vals); err != nil {
		return r, err
	}
	r.evals = n + 1
	r.lo, r.hi, r.cLo, r.cHi = nodes[0], nodes[n], vals[0], vals[n]

	h := &cellHeap{cells: make([]cell, 0, n+in.MaxEvals)}
	wPrev := w(nodes[0])
	for i := range n {
		wNext := w(nodes[i+1])
		cl := cell{a: nodes[i], b: nodes[i+1], ca: vals[i], cb: vals[i+1], wa: wPrev, wb: wNext}
		if err := cl.setBound(); err != nil {
			return r, err
		}
		h.cells = append(h.cells, cl)
		wPrev = wNext
	}
	for i := range h.cells {
		if h.cells[i].bound > 0 && h.cells[i].splittable() {
			h.idx = append(h.idx, i)
		}
	}
	heap.Init(h)

	offset := 0.0
	if offsetByCLo {
		offset = r.cLo
	}
	floor := in.AbsTol
	if floor == 0 {
		scale := math.Max(math.Abs(r.cLo), math.Abs(r.cHi))
		if !offsetByCLo {
			scale /= kTEV
		}
		floor = absFloorScale * scale
	}
	sum, bound := totals(h.cells)
	type split struct {
		mid float64
		i   int
	}
	var batch []split
	var mids, cm []float64
	for {
		if bound <= math.Max(in.RelTol*math.Abs(offset+sum), floor) {
			// Re-add from scratch: the running totals drift by rounding.
			if sum, bound = totals(h.cells); bound <= math.Max(in.RelTol*math.Abs(offset+sum), floor) {
				r.converged = true
				break
			}
		}
		budget := in.MaxEvals - r.evals
		if h.Len() == 0 || budget <= 0 {
			break
		}
		if err := ctx.Err(); err != nil {
			return r, err
		}
		batch = batch[:0]
		worst := h.cells[h.idx[0]].bound
		for h.Len() > 0 && len(batch) < budget && h.cells[h.idx[0]].bound >= batchFraction*worst {
			i := heap.Pop(h).(int)
			batch = append(batch, split{0.5 * (h.cells[i].a + h.cells[i].b), i})
		}
		slices.SortFunc(batch, func(x, y split) int {
			switch {
			case x.mid < y.mid:
				return -1
			case x.mid > y.mid:
				return 1
			}
			return 0
		})
		mids, cm = mids[:0], cm[:0]
		for _, s := range batch {
			mids = append(mids, s.mid)
		}
		cm = slices.Grow(cm, len(mids))[:len(mids)]
		if err := evaluate(ctx, c, mids, cm); err != nil {
			return r, err
		}
		r.evals += len(mids)
		for k, s := range batch {
			p := h.cells[s.i]
			wm := w(s.mid)
			left := cell{a: p.a, b: s.mid, ca: p.ca, cb: cm[k], wa: p.wa, wb: wm}
			right := cell{a: s.mid, b: p.b, ca: cm[k], cb: p.cb, wa: wm, wb: p.wb}
			if err := left.setBound(); err != nil {
				return r, err
			}
			if err := right.setBound(); err != nil {
				return r, err
			}
			sum += left.estimate() + right.estimate() - p.estimate()
			bound += left.bound + right.bound - p.bound
			h.cells[s.i] = left
			h.cells = append(h.cells, right)
			for _, i := range [2]int{s.i, len(h.cells) - 1} {
				if h.cells[i].bound > 0 && h.cells[i].splittable() {
					heap.Push(h, i)
				}
			}
		}
	}
	r.sum, r.bound = finalTotals(h.cells, w)
	return r, nil
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
	order := make([]int, len(cells))
	for i := range order {
		order[i] = i
	}
	slices.SortFunc(order, func(i, j int) int {
		switch {
		case cells[i].a < cells[j].a:
			return -1
		case cells[i].a > cells[j].a:
			return 1
		}
		return 0
	})
	secant := func(k int) (h, delta float64) {
		c := &cells[order[k]]
		h = c.b - c.a
		if h > 0 {
			delta = c.jump() / h
		}
		return h, delta
	}
	// slope at the node between cells k−1 and k (Fritsch–Butland).
	nodeSlope := func(k int) float64 {
		if k == 0 || k == len(order) {
			_, d := secant(min(k, len(order)-1))
			return d
		}
		h0, d0 := secant(k - 1)
		h1, d1 := secant(k)
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
	dLeft := nodeSlope(0)
	for k, i := range order {
		dRight := nodeSlope(k + 1)
		c := &cells[i]
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

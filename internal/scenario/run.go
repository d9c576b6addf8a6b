package scenario

import (
	"context"
	"errors"
	"math"
	"slices"

	"golang.org/x/sync/errgroup"

	"ringbox/internal/phys"
	"ringbox/internal/smooth"
	"ringbox/internal/spectrum"
	"ringbox/internal/thermal"
)

// Variants are the boundary-condition variants every result carries.
var Variants = []string{"scenario", "box", "ring", "continuum"}

// workBudget caps the operations of an exact count (building the column
// lists and evaluating them); above it the count is asymptotic.
const workBudget = 4e9

// PointValues are the counts at one energy.
type PointValues struct {
	EnergyEV float64            `json:"energy_eV"`
	States   map[string]float64 `json:"states"`
	Modes    map[string]float64 `json:"modes"`
	DOS      map[string]float64 `json:"dos_per_eV"`
}

// Observables are what a measurement sees at (E_F, T).
type Observables struct {
	Electrons          float64  `json:"electrons"`
	Density            float64  `json:"density"`
	DensityUnit        string   `json:"density_unit"`
	VolumeDensity      float64  `json:"volume_density"`
	VolumeDensityUnit  string   `json:"volume_density_unit"`
	ConductanceS       float64  `json:"conductance_S"`
	ConductanceG0      float64  `json:"conductance_G0"`
	ResistanceOhm      *float64 `json:"resistance_ohm"`
	Transmission       float64  `json:"transmission"`
	QuantumCapacitance float64  `json:"quantum_capacitance_F"`
	MeanModes          float64  `json:"mean_modes"`
}

// Curves are the figures' data on the energy grid.
type Curves struct {
	EnergyEV     []float64            `json:"energy_eV"`
	States       map[string][]float64 `json:"states"`
	DOS          map[string][]float64 `json:"dos_per_eV"`
	Modes        map[string][]float64 `json:"modes"`
	BroadeningEV float64              `json:"dos_broadening_eV"`
}

// Result is the answer to one count, the same for the CLI, the API and the pages.
type Result struct {
	Scenario      map[string]string      `json:"scenario"`
	Method        string                 `json:"method"`
	ModesMethod   string                 `json:"modes_method"`
	ErrorEstimate *float64               `json:"states_error_estimate,omitempty"`
	EFEV          float64                `json:"ef_eV"`
	TempK         float64                `json:"temp_K"`
	At            []PointValues          `json:"at"`
	Observables   map[string]Observables `json:"observables"`
	Curves        Curves                 `json:"curves"`
	Levels        []spectrum.Level       `json:"levels"`
	Spacing       *float64               `json:"mean_level_spacing_eV,omitempty"`
	StatesBelow   float64                `json:"states_below_emax"`
	Notes         []string               `json:"notes"`

	s Scenario
}

// Scenario returns the validated scenario the result is for.
func (r *Result) Input() Scenario { return r.s }

// source counts one variant: exactly with a Counter, or asymptotically.
type source struct {
	cond    spectrum.Conductor
	states  *spectrum.Counter // nil: asymptotic (Weyl)
	modes   *spectrum.Counter // nil: asymptotic (Weyl modes)
	along   int
	smooth  bool    // the continuum: analytic throughout
	evalOps float64 // cost of one N(E) evaluation
	// weylStates and weylModes are the non-decreasing envelopes of the
	// smooth counts that stand in for the exact ones above the budget.
	weylStates, weylModes func(eEV float64) float64
	// stateAt, modeAt and dosAt memoise N, M and D at every energy of the
	// curves and point values: each is then one batch per variant (and
	// broadening a big confined conductor bins all its levels only once).
	stateAt, modeAt, dosAt map[float64]float64
}

// prepare computes N, M and D at all the energies a run shows, in one
// batch each.
func (v *source) prepare(ctx context.Context, s Scenario, es []float64) error {
	sorted := slices.Clone(es)
	slices.Sort(sorted)
	sorted = slices.Compact(sorted)
	st := make([]float64, len(sorted))
	if err := v.stateCurve(ctx, sorted, st); err != nil {
		return err
	}
	m := make([]float64, len(sorted))
	if err := v.modeCurve(ctx, sorted, m); err != nil {
		return err
	}
	d, err := v.dos(ctx, s, sorted)
	if err != nil {
		return err
	}
	v.stateAt = make(map[float64]float64, len(sorted))
	v.modeAt = make(map[float64]float64, len(sorted))
	v.dosAt = make(map[float64]float64, len(sorted))
	for i, e := range sorted {
		v.stateAt[e], v.modeAt[e], v.dosAt[e] = st[i], m[i], d[i]
	}
	return nil
}

// memo fills out from m when it holds every energy.
func memo(m map[float64]float64, es, out []float64) bool {
	if m == nil {
		return false
	}
	for i, e := range es {
		v, ok := m[e]
		if !ok {
			return false
		}
		out[i] = v
	}
	return true
}

func (v *source) stateCurve(ctx context.Context, es, out []float64) error {
	if memo(v.stateAt, es, out) {
		return nil
	}
	if v.states != nil {
		return v.states.States(ctx, es, out)
	}
	for i, e := range es {
		out[i] = v.weylStates(e)
	}
	return nil
}

func (v *source) modeCurve(ctx context.Context, es, out []float64) error {
	if memo(v.modeAt, es, out) {
		return nil
	}
	if v.modes != nil {
		return v.modes.States(ctx, es, out)
	}
	for i, e := range es {
		out[i] = v.weylModes(e)
	}
	return nil
}

// dos writes D(E): analytic with an open axis, broadened otherwise.
func (v *source) dos(ctx context.Context, s Scenario, es []float64) ([]float64, error) {
	out := make([]float64, len(es))
	if memo(v.dosAt, es, out) {
		return out, nil
	}
	switch {
	case v.states == nil:
		for i, e := range es {
			_, out[i] = smooth.Weyl(v.cond, e)
		}
	case v.cond.Confined():
		d, _, err := v.states.Broadened(ctx, es, s.Eta(), s.Shape)
		if err != nil {
			return nil, err
		}
		copy(out, d)
	default:
		if err := v.states.DensityOfStates(ctx, es, out); err != nil {
			return nil, err
		}
	}
	return out, nil
}

// variants returns the conductor under each name of Variants.
func variants(c spectrum.Conductor) map[string]spectrum.Conductor {
	return map[string]spectrum.Conductor{
		"scenario":  c,
		"box":       c.WithBC(spectrum.Box),
		"ring":      c.WithBC(spectrum.Ring),
		"continuum": c.Continuum(),
	}
}

// Run counts the scenario: curves on the energy grid, point values, levels
// and the observables at (E_F, T), for the scenario's own boundary
// conditions and its box, ring and continuum variants.
func Run(ctx context.Context, s Scenario) (*Result, error) {
	res := &Result{Scenario: flatten(s.Values()), TempK: s.TempK, s: s}
	c := s.Conductor()
	kT := s.KTEV()
	conds := variants(c)

	// The highest energy anything asks for: the grid, the point values and
	// the thermal window around E_F.
	ef := s.EFEV
	if s.HasDensity {
		var err error
		if ef, err = continuumFermiLevel(ctx, s, conds["continuum"]); err != nil {
			return nil, err
		}
	}
	top := math.Max(s.EmaxEV, ef+(thermal.DefaultWindowKT+1)*kT)
	for _, e := range s.AtEV {
		top = math.Max(top, e)
	}
	if s.HasDensity {
		top = math.Max(top, 1.5*ef+0.05) + (thermal.DefaultWindowKT+1)*kT
	}

	srcs, method, err := build(ctx, s, conds, top)
	if err != nil {
		return nil, err
	}
	res.Method = method
	res.ModesMethod = "exact"
	if srcs["scenario"].modes == nil {
		res.ModesMethod = "asymptotic"
	}
	if method == "asymptotic" {
		e := smooth.ErrorEstimate(c, s.EmaxEV)
		res.ErrorEstimate = &e
		res.Notes = append(res.Notes, "More states than the exact budget: box, ring and scenario counts are the smooth (Weyl) counts, with the error estimate given.")
	}

	if s.HasDensity {
		if ef, err = solveFermiLevel(ctx, s, srcs["scenario"], top-(thermal.DefaultWindowKT+1)*kT); err != nil {
			return nil, err
		}
	}
	res.EFEV = ef

	at := s.AtEV
	if len(at) == 0 {
		at = []float64{ef}
	}
	needed := append(grid(s), at...)
	needed = append(needed, ef)
	seen := map[*source]bool{}
	var g errgroup.Group
	for _, name := range Variants {
		if src := srcs[name]; !seen[src] {
			seen[src] = true
			g.Go(func() error { return src.prepare(ctx, s, needed) })
		}
	}
	if err := g.Wait(); err != nil {
		return nil, canceled(err)
	}
	if err := curves(ctx, s, srcs, res); err != nil {
		return nil, err
	}
	if err := points(ctx, s, srcs, at, res); err != nil {
		return nil, err
	}
	if res.Observables, err = observeAll(ctx, s, srcs, ef); err != nil {
		return nil, err
	}
	// Levels is nil when no axis is confined; the JSON wants [].
	var truncated bool
	if res.Levels, truncated, err = spectrum.Levels(ctx, c, 20); err != nil {
		return nil, canceled(err)
	}
	if truncated {
		res.Notes = append(res.Notes, "The level list is cut short: listing more levels would enumerate more than a million states.")
	}
	if res.Levels == nil {
		res.Levels = []spectrum.Level{}
	}
	// Mean spacing between states at E_F: 1/D̄ of the smooth count.
	if _, d := smooth.Weyl(c, ef); d > 0 {
		sp := 1 / d
		res.Spacing = &sp
	}
	top1 := []float64{s.EmaxEV}
	if err := srcs["scenario"].stateCurve(ctx, top1, top1); err != nil {
		return nil, err
	}
	res.StatesBelow = top1[0]
	res.Notes = append(res.Notes, "Idealised model: infinite walls, parabolic or Kane bands, no disorder or self-consistent potential. Design decisions rest on full device simulation, measurement and your own design rules.")
	return res, nil
}

// Point is what a sweep needs of one scenario: the observables at (E_F, T)
// and the states and modes at E_F, for every variant.
type Point struct {
	EFEV        float64                `json:"ef_eV"`
	Method      string                 `json:"method"`
	States      map[string]float64     `json:"states"`
	Modes       map[string]float64     `json:"modes"`
	Observables map[string]Observables `json:"observables"`
}

// Observe computes only what a sweep reads: no curves, no levels. The
// counters cover just the thermal window around E_F.
func Observe(ctx context.Context, s Scenario) (*Point, error) {
	c := s.Conductor()
	kT := s.KTEV()
	conds := variants(c)
	ef := s.EFEV
	top := ef + (thermal.DefaultWindowKT+1)*kT
	if s.HasDensity {
		var err error
		if ef, err = continuumFermiLevel(ctx, s, conds["continuum"]); err != nil {
			return nil, err
		}
		top = 1.5*ef + 0.05 + 2*(thermal.DefaultWindowKT+1)*kT
	}
	top = math.Max(top, 1e-3)
	// The default broadening depends on the grid step: fix it before the
	// grid shrinks to one point.
	if s.EtaEV == 0 {
		s.EtaEV = s.Eta()
	}
	s.Points = 1
	s.AtEV = nil
	srcs, method, err := build(ctx, s, conds, top)
	if err != nil {
		return nil, err
	}
	if s.HasDensity {
		if ef, err = solveFermiLevel(ctx, s, srcs["scenario"], top-(thermal.DefaultWindowKT+1)*kT); err != nil {
			return nil, err
		}
	}
	p := &Point{EFEV: ef, Method: method, States: map[string]float64{}, Modes: map[string]float64{}}
	if p.Observables, err = observeAll(ctx, s, srcs, ef); err != nil {
		return nil, err
	}
	for _, name := range Variants {
		src := srcs[name]
		v := []float64{ef}
		if err := src.stateCurve(ctx, v, v); err != nil {
			return nil, canceled(err)
		}
		p.States[name] = v[0]
		v[0] = ef
		if err := src.modeCurve(ctx, v, v); err != nil {
			return nil, canceled(err)
		}
		p.Modes[name] = v[0]
	}
	return p, nil
}

// observeAll returns the observables of every variant. Variants that share
// a source (a scenario that is all box, say) share its thermal integrals,
// the costly part, instead of computing them again.
func observeAll(ctx context.Context, s Scenario, srcs map[string]*source, ef float64) (map[string]Observables, error) {
	out := make(map[string]Observables, len(Variants))
	done := map[*source]Observables{}
	for _, name := range Variants {
		src := srcs[name]
		o, ok := done[src]
		if !ok {
			var err error
			if o, err = observe(ctx, s, src, ef); err != nil {
				return nil, err
			}
			done[src] = o
		}
		out[name] = o
	}
	return out, nil
}

func flatten(q map[string][]string) map[string]string {
	out := make(map[string]string, len(q))
	for k, v := range q {
		out[k] = v[0]
	}
	return out
}

// build prepares the four variants, exact when the budget allows.
func build(ctx context.Context, s Scenario, conds map[string]spectrum.Conductor, top float64) (map[string]*source, string, error) {
	method := "exact"
	evals := s.Points + len(s.AtEV) + 3*thermal.DefaultMaxEvals/10
	for _, name := range []string{"scenario", "box", "ring"} {
		n, _ := smooth.Weyl(conds[name], top)
		ops, _ := spectrum.Work(conds[name], top, evals)
		if n > s.Budget || ops > workBudget {
			method = "asymptotic"
		}
	}
	srcs := map[string]*source{}
	var g errgroup.Group
	g.SetLimit(4)
	type job struct {
		name string
		src  *source
	}
	// Equal conductors share one source.
	byKey := map[string]*source{}
	for _, name := range Variants {
		cond := conds[name]
		key := bcKey(cond)
		if src, ok := byKey[key]; ok {
			srcs[name] = src
			continue
		}
		src := &source{cond: cond, along: s.Along, smooth: name == "continuum"}
		byKey[key] = src
		srcs[name] = src
		exactStates := method == "exact" || name == "continuum"
		tr := cond.Transverse(s.Along)
		modeOps := 0.0
		if len(tr.Axes) > 0 {
			modeOps, _ = spectrum.Work(tr, top, evals)
		}
		exactModes := modeOps <= workBudget
		if !exactStates {
			src.weylStates = smooth.Monotone(func(e float64) float64 { n, _ := smooth.Weyl(cond, e); return n }, top)
		}
		if !exactModes {
			src.weylModes = smooth.Monotone(func(e float64) float64 { return smooth.WeylModes(cond, s.Along, e) }, top)
		}
		ops1, _ := spectrum.Work(cond, top, 1)
		ops0, _ := spectrum.Work(cond, top, 0)
		src.evalOps = ops1 - ops0
		g.Go(func() error {
			if exactStates {
				k, err := spectrum.NewCounter(ctx, cond, top)
				if err != nil {
					return err
				}
				src.states = k
			}
			if exactModes {
				k, err := spectrum.NewCounter(ctx, tr, top)
				if err != nil {
					return err
				}
				src.modes = k
			}
			return nil
		})
	}
	if err := g.Wait(); err != nil {
		return nil, "", canceled(err)
	}
	return srcs, method, nil
}

func bcKey(c spectrum.Conductor) string {
	b := make([]byte, len(c.Axes))
	for i, a := range c.Axes {
		b[i] = byte('0' + a.BC)
	}
	return string(b)
}

func canceled(err error) error {
	if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
		return &Error{Code: Canceled, Msg: "the computation was stopped: " + err.Error()}
	}
	return err
}

// grid returns the energy grid of the curves.
func grid(s Scenario) []float64 {
	es := make([]float64, s.Points)
	for i := range es {
		es[i] = s.EminEV + (s.EmaxEV-s.EminEV)*float64(i)/float64(s.Points-1)
	}
	return es
}

func curves(ctx context.Context, s Scenario, srcs map[string]*source, res *Result) error {
	n := s.Points
	es := grid(s)
	cv := Curves{EnergyEV: es, States: map[string][]float64{}, DOS: map[string][]float64{}, Modes: map[string][]float64{}}
	done := map[*source][3][]float64{}
	for _, name := range Variants {
		src := srcs[name]
		if d, ok := done[src]; ok {
			cv.States[name], cv.DOS[name], cv.Modes[name] = d[0], d[1], d[2]
			continue
		}
		st := make([]float64, n)
		if err := src.stateCurve(ctx, es, st); err != nil {
			return canceled(err)
		}
		d, err := src.dos(ctx, s, es)
		if err != nil {
			return canceled(err)
		}
		m := make([]float64, n)
		if err := src.modeCurve(ctx, es, m); err != nil {
			return canceled(err)
		}
		done[src] = [3][]float64{st, d, m}
		cv.States[name], cv.DOS[name], cv.Modes[name] = st, d, m
	}
	c := s.Conductor()
	sm := make([]float64, n)
	sd := make([]float64, n)
	for i, e := range es {
		sm[i], sd[i] = smooth.Weyl(c, e)
	}
	cv.States["smooth"], cv.DOS["smooth"] = sm, sd
	cv.BroadeningEV = s.Eta()
	res.Curves = cv
	return nil
}

func points(ctx context.Context, s Scenario, srcs map[string]*source, at []float64, res *Result) error {
	sorted := append([]float64(nil), at...)
	// Counters want ascending batches; keep the user's order in the output.
	order := make([]int, len(at))
	for i := range order {
		order[i] = i
	}
	for i := 1; i < len(order); i++ {
		for j := i; j > 0 && at[order[j]] < at[order[j-1]]; j-- {
			order[j], order[j-1] = order[j-1], order[j]
		}
	}
	for i, o := range order {
		sorted[i] = at[o]
	}
	res.At = make([]PointValues, len(at))
	for i, e := range at {
		res.At[i] = PointValues{EnergyEV: e, States: map[string]float64{}, Modes: map[string]float64{}, DOS: map[string]float64{}}
	}
	for _, name := range Variants {
		src := srcs[name]
		st := make([]float64, len(sorted))
		m := make([]float64, len(sorted))
		if err := src.stateCurve(ctx, sorted, st); err != nil {
			return canceled(err)
		}
		if err := src.modeCurve(ctx, sorted, m); err != nil {
			return canceled(err)
		}
		d, err := src.dos(ctx, s, sorted)
		if err != nil {
			return canceled(err)
		}
		for i, o := range order {
			res.At[o].States[name] = st[i]
			res.At[o].Modes[name] = m[i]
			res.At[o].DOS[name] = d[i]
		}
	}
	c := s.Conductor()
	for i, e := range at {
		res.At[i].States["smooth"], res.At[i].DOS["smooth"] = smooth.Weyl(c, e)
	}
	return nil
}

// integrator bounds the curve evaluations of one thermal average so that
// the work stays near 3×10⁷ operations however big the conductor. Isolated
// levels converge to the tolerance in a few dozen evaluations each; dense
// staircases and continuous curves stop at the cap, where the centred
// estimate is far better than its rigorous first-order bound.
func (v *source) integrator() thermal.Integrator {
	maxEvals := 2000.0
	if v.evalOps > 0 {
		maxEvals = math.Min(maxEvals, math.Max(300, 3e7/v.evalOps))
	}
	return thermal.Integrator{RelTol: 1e-6, MaxEvals: int(maxEvals)}
}

func observe(ctx context.Context, s Scenario, v *source, ef float64) (Observables, error) {
	kT := s.KTEV()
	in := v.integrator()
	o := Observables{DensityUnit: s.DensityUnit()}
	var err error
	if o.Electrons, err = average(ctx, in, v.stateCurve, ef, kT); err != nil {
		return o, err
	}
	o.Density = o.Electrons * s.densityScale()
	vol := v.cond.Volume() * math.Pow(100, float64(s.Dims))
	o.VolumeDensity = o.Electrons / vol
	o.VolumeDensityUnit = [...]string{"", "cm^-1", "cm^-2", "cm^-3"}[s.Dims]
	if o.MeanModes, err = average(ctx, in, v.modeCurve, ef, kT); err != nil {
		return o, err
	}
	o.Transmission = 1
	if s.MFPM > 0 {
		// Landauer–Büttiker with an energy-independent mean free path:
		// T = λ/(λ + L) (Datta, Electronic Transport in Mesoscopic Systems, 1995).
		o.Transmission = s.MFPM / (s.MFPM + s.LengthM[s.Along])
	}
	o.ConductanceS = phys.ConductanceQuantumPerSpin * o.MeanModes * o.Transmission
	o.ConductanceG0 = o.ConductanceS / phys.ConductanceQuantum
	if o.ConductanceS > 0 {
		r := 1 / o.ConductanceS
		o.ResistanceOhm = &r
	}
	// C_Q = q²·∫D(−∂f/∂E)dE; with D in 1/eV that is q·D in F.
	var dq float64
	if kT > 0 {
		est, err := in.Slope(ctx, v.stateCurve, ef, kT)
		if err != nil {
			return o, canceled(err)
		}
		dq = est.Value
	} else {
		d, err := v.dos(ctx, s, []float64{ef})
		if err != nil {
			return o, err
		}
		dq = d[0]
	}
	o.QuantumCapacitance = phys.ElementaryCharge * dq
	return o, nil
}

func average(ctx context.Context, in thermal.Integrator, c thermal.Curve, ef, kT float64) (float64, error) {
	est, err := in.Occupied(ctx, c, ef, kT)
	if err != nil {
		return 0, canceled(err)
	}
	return est.Value, nil
}

// continuumFermiLevel solves the bulk density for E_F: it sets the energy
// range the exact counters must cover.
func continuumFermiLevel(ctx context.Context, s Scenario, cont spectrum.Conductor) (float64, error) {
	// The bulk count is a monotone power of E: no envelope needed.
	src := &source{cond: cont, weylStates: func(e float64) float64 { n, _ := smooth.Weyl(cont, e); return n }}
	hi := 1.0
	kT := s.KTEV()
	scale := s.densityScale()
	for {
		n, _ := smooth.Weyl(cont, hi)
		if n*scale >= s.Density || hi >= MaxEnergyEV/2 {
			break
		}
		hi *= 2
	}
	lo := -40*kT - 1e-3
	ef, err := thermal.SolveFermiLevel(ctx, func(ctx context.Context, e float64) (float64, error) {
		// This E_F only sets the range the exact counters cover: 1e-6 will do.
		v, err := average(ctx, thermal.Integrator{RelTol: 1e-6, MaxEvals: 400}, src.stateCurve, e, kT)
		return v * scale, err
	}, s.Density, lo, hi)
	if err != nil {
		if errors.Is(err, thermal.ErrOutsideBracket) {
			return 0, Errorf("density", "density %g %s needs a Fermi level above %g eV", s.Density, s.DensityUnit(), hi)
		}
		return 0, canceled(err)
	}
	return ef, nil
}

func solveFermiLevel(ctx context.Context, s Scenario, v *source, hi float64) (float64, error) {
	kT := s.KTEV()
	scale := s.densityScale()
	in := v.integrator()
	ef, err := thermal.SolveFermiLevel(ctx, func(ctx context.Context, e float64) (float64, error) {
		n, err := average(ctx, in, v.stateCurve, e, kT)
		return n * scale, err
	}, s.Density, -40*kT-1e-3, hi)
	if err != nil {
		if errors.Is(err, thermal.ErrOutsideBracket) {
			return 0, Errorf("density", "density %g %s is not reached below %.3g eV with these boundary conditions", s.Density, s.DensityUnit(), hi)
		}
		return 0, canceled(err)
	}
	return ef, nil
}

package scenario

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"

	"golang.org/x/sync/errgroup"

	"ringbox/internal/phys"
	"ringbox/internal/smooth"
	"ringbox/internal/spectrum"
	"ringbox/internal/thermal"
)

// Variants are the boundary-condition variants every result carries.
var Variants = []string{"scenario", "box", "ring", "continuum"}

// relTol is the relative accuracy of the thermal integrals; it sets the
// width of the thermal window (thermal.WindowFor).
const relTol = 1e-6

// maxCounterBytes caps what the counters of one variant may hold; a plan
// above it is asymptotic like one above the work budget.
const maxCounterBytes = 512 << 20

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
	cond     spectrum.Conductor
	states   *spectrum.Counter // nil: asymptotic (Weyl)
	modes    *spectrum.Counter // nil: asymptotic (Weyl modes)
	evalOps  float64           // cost of one N(E) evaluation
	modeOps  float64           // and of one M(E) evaluation
	edge     float64           // N(E) is zero below this energy
	modeEdge float64           // and M(E) below this
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
	m := make([]float64, len(sorted))
	if err := v.modeCurve(ctx, sorted, m); err != nil {
		return err
	}
	var d []float64
	if v.states != nil && !v.cond.Confined() {
		// One pass gives N and the analytic D.
		d = make([]float64, len(sorted))
		if err := v.states.StatesAndDensity(ctx, sorted, st, d); err != nil {
			return err
		}
	} else {
		if err := v.stateCurve(ctx, sorted, st); err != nil {
			return err
		}
		var err error
		if d, err = v.dos(ctx, s, sorted); err != nil {
			return err
		}
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
	sp := newSpan(s, conds, ef, true)
	srcs, method, err := build(ctx, s, conds, sp)
	if err != nil {
		return nil, err
	}
	res.Method = method.String()
	res.ModesMethod = "exact"
	if srcs["scenario"].modes == nil {
		res.ModesMethod = "asymptotic"
	}
	if method.asymptotic {
		e := smooth.ErrorEstimate(c, s.EmaxEV)
		res.ErrorEstimate = &e
		res.Notes = append(res.Notes, method.note(s.Budget))
	}

	if s.HasDensity {
		var note string
		if ef, note, err = solveFermiLevel(ctx, s, srcs["scenario"], sp.solveHi); err != nil {
			return nil, err
		}
		if note != "" {
			res.Notes = append(res.Notes, note)
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
	conds := variants(c)
	ef := s.EFEV
	if s.HasDensity {
		var err error
		if ef, err = continuumFermiLevel(ctx, s, conds["continuum"]); err != nil {
			return nil, err
		}
	}
	sp := newSpan(s, conds, ef, false)
	// The default broadening depends on the grid step: fix it before the
	// grid shrinks to one point.
	if s.EtaEV == 0 {
		s.EtaEV = s.Eta()
	}
	s.Points = 1
	s.AtEV = nil
	srcs, method, err := build(ctx, s, conds, sp)
	if err != nil {
		return nil, err
	}
	if s.HasDensity {
		if ef, _, err = solveFermiLevel(ctx, s, srcs["scenario"], sp.solveHi); err != nil {
			return nil, err
		}
	}
	p := &Point{EFEV: ef, Method: method.String(), States: map[string]float64{}, Modes: map[string]float64{}}
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
	// The distinct sources are observed at once, one goroutine each.
	var uniq []*source
	idx := map[*source]int{}
	for _, name := range Variants {
		if _, ok := idx[srcs[name]]; !ok {
			idx[srcs[name]] = len(uniq)
			uniq = append(uniq, srcs[name])
		}
	}
	obs := make([]Observables, len(uniq))
	var g errgroup.Group
	for i, src := range uniq {
		g.Go(func() error {
			var err error
			obs[i], err = observe(ctx, s, src, ef)
			return err
		})
	}
	if err := g.Wait(); err != nil {
		return nil, err
	}
	out := make(map[string]Observables, len(Variants))
	for _, name := range Variants {
		out[name] = obs[idx[srcs[name]]]
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

// span is the energy range a run reads. The thermal integrals of a variant
// read up to max(E_F, edge) + W·k_BT (W from relTol; the edge is the
// variant's lowest level, where the window starts when E_F is below it).
// With curves the range also covers emax and the at energies. A fully
// confined variant's broadened D(E) reads the levels its line shape
// reaches above that, and above E_F at T = 0, where C_Q is D(E_F).
// Nothing else sets it: emax alone never moves the observables.
type span struct {
	ef      float64 // the highest E_F the integrals are centred on
	solveHi float64 // with a density: E_F is looked for below this
	curves  float64 // the top of the curves and point values (0 without)
	reach   float64 // how far above a level its line shape reaches
	kT      float64
	along   int
}

func newSpan(s Scenario, conds map[string]spectrum.Conductor, ef float64, curves bool) span {
	sp := span{ef: ef, kT: s.KTEV(), along: s.Along,
		reach: spectrum.Reach(s.Eta(), s.Shape)}
	if s.HasDensity {
		// The bulk E_F at the same density shifted by the scenario's
		// confinement, with room: the solve brackets below it.
		sp.solveHi = 1.5*math.Max(ef, 0) + conds["scenario"].Edge() + 0.05
		sp.ef = sp.solveHi
	}
	if curves {
		sp.curves = s.EmaxEV
		for _, e := range s.AtEV {
			sp.curves = math.Max(sp.curves, e)
		}
	}
	return sp
}

// top returns the highest energy the run reads on conductor c: its states
// and its modes, which start at the transverse edge.
func (sp span) top(c spectrum.Conductor) float64 {
	t := math.Max(sp.thermal(c.Edge()), sp.thermal(c.Transverse(sp.along).Edge()))
	hi := sp.curves
	if c.Confined() {
		if hi > 0 {
			hi += sp.reach
		}
		if sp.kT == 0 {
			hi = math.Max(hi, sp.ef+sp.reach)
		}
	}
	return math.Max(math.Max(t, hi), 1e-3)
}

// thermal returns the top of the thermal window for a curve that starts at
// edge (thermal.Integrator.Window), or E_F where the window is empty.
func (sp span) thermal(edge float64) float64 {
	_, hi, _, _ := thermal.Integrator{RelTol: relTol, Edge: edge, HasEdge: true}.Window(sp.ef, sp.kT)
	return hi
}

// method says how a run counted: exact, or asymptotic because the cheapest
// exact plan of some variant was over the budget.
type method struct {
	asymptotic bool
	ops, bytes float64 // the dearest variant's plan
	variant    string
}

// consider adds the states plan p of a variant: the method is asymptotic
// when any plan is over the budget or the memory cap, and it keeps the
// dearest plan that is over (or, while none is, the dearest) for its note.
func (m *method) consider(variant string, p spectrum.Plan, budget float64) {
	over := p.Ops > budget || p.Bytes > maxCounterBytes
	if (over && !m.asymptotic) || (over == m.asymptotic && p.Ops > m.ops) {
		m.ops, m.bytes, m.variant, m.asymptotic = p.Ops, p.Bytes, variant, over
	}
}

func (m method) String() string {
	if m.asymptotic {
		return "asymptotic"
	}
	return "exact"
}

func (m method) note(budget float64) string {
	var why []string
	if m.ops > budget {
		why = append(why, fmt.Sprintf("needs about %.2g operations, over the budget of %.2g", m.ops, budget))
	}
	if m.bytes > maxCounterBytes {
		why = append(why, fmt.Sprintf("would hold %.0f MB, over %d MB", m.bytes/1e6, maxCounterBytes>>20))
	}
	return "Asymptotic: the exact " + m.variant + " count is too dear (its cheapest exact plan " + strings.Join(why, " and ") + "), so box, ring and scenario counts are the smooth (Weyl) counts, with the error estimate given."
}

// evals estimates the N(E) evaluations a run makes on one counter of
// conductor c, the states or (modes) the transverse modes, from a probe
// plan of it: the curves and point values; for the states of a fully
// confined conductor the bins of a broadened D(E); and the thermal
// average, one refinement for the electrons and C_Q together, capped by
// the integrator, or one pass over the subbands where bySubband sums
// them; and for the states the averages of a Fermi level solved from a
// density.
func evals(s Scenario, c spectrum.Conductor, probe spectrum.Plan, modes bool) int {
	n := s.Points + len(s.AtEV) + 2
	averages := 1
	if !modes {
		if c.Confined() {
			n += spectrum.MaxBroadeningBins
		}
		if s.HasDensity {
			averages += solveAverages
		}
	}
	per := 1 // at T = 0 an average is one evaluation
	if s.KTEV() > 0 {
		per = maxEvals(probe.PerEval)
		if summedBySubband(c) && probe.Subbands <= maxSubbands {
			per = subbandEvals
		}
	}
	return n + averages*per
}

// solveAverages bounds the averages a Fermi-level solve takes: the
// bracket's 19 steps (bracketBelow) and the ITP solve's at most
// ⌈log₂(range/2ε)⌉ + 1, about 42 for a 1 eV range at ε = 1e-12 eV.
const solveAverages = 60

// subbandEvals is the price of one pass of bySubband in evaluations: each
// subband costs about 30 operations where an evaluation costs about one a
// subband (Plan.PerEval).
const subbandEvals = 30

// summedBySubband reports whether bySubband takes the thermal sums of c:
// one or two open axes, or two confined axes and none open.
func summedBySubband(c spectrum.Conductor) bool {
	open := 0
	for _, a := range c.Axes {
		if a.BC == spectrum.Open {
			open++
		}
	}
	return open < 3 && (open > 0 || len(c.Axes) < 3)
}

// plan prices the exact count of one variant (states and, along the
// transport axis, modes) with the evaluations a run makes.
func plan(s Scenario, c spectrum.Conductor, top float64) (states, modes spectrum.Plan, modesExact bool) {
	probe := spectrum.NewPlan(c, top, spectrum.DefaultEvals)
	states = spectrum.NewPlan(c, top, evals(s, c, probe, false))
	// A conductor with one axis has a transverse conductor of none: one
	// mode per valley and spin above the edge.
	tr := c.Transverse(s.Along)
	probe = spectrum.NewPlan(tr, top, spectrum.DefaultEvals)
	modes = spectrum.NewPlan(tr, top, evals(s, tr, probe, true))
	modesExact = modes.Ops <= s.Budget && modes.Bytes <= maxCounterBytes
	return states, modes, modesExact
}

// build prepares the four variants, exact when the cheapest exact plan of
// each of scenario, box and ring is within the budget (in operations) and
// the memory cap.
func build(ctx context.Context, s Scenario, conds map[string]spectrum.Conductor, sp span) (map[string]*source, method, error) {
	var m method
	plans := map[string][2]spectrum.Plan{}
	exactModes := map[string]bool{}
	for _, name := range Variants {
		st, md, ok := plan(s, conds[name], sp.top(conds[name]))
		plans[name], exactModes[name] = [2]spectrum.Plan{st, md}, ok
		if name == "continuum" {
			continue
		}
		m.consider(name, st, s.Budget)
	}
	srcs := map[string]*source{}
	var g errgroup.Group
	g.SetLimit(4)
	// Equal conductors share one source.
	byKey := map[string]*source{}
	for _, name := range Variants {
		cond := conds[name]
		key := bcKey(cond)
		if src, ok := byKey[key]; ok {
			srcs[name] = src
			continue
		}
		src := &source{cond: cond, edge: cond.Edge()}
		top := sp.top(cond)
		byKey[key] = src
		srcs[name] = src
		exactStates := !m.asymptotic || name == "continuum"
		if !exactStates {
			src.weylStates = smooth.Monotone(func(e float64) float64 { n, _ := smooth.Weyl(cond, e); return n }, top)
			// The smooth count starts at the band edge, not at the lowest level.
			src.edge = 0
		}
		if tr := cond.Transverse(s.Along); len(tr.Axes) > 0 && exactModes[name] {
			src.modeEdge = tr.Edge()
		}
		if !exactModes[name] {
			src.weylModes = smooth.Monotone(func(e float64) float64 { return smooth.WeylModes(cond, s.Along, e) }, top)
		}
		p := plans[name]
		src.evalOps, src.modeOps = p[0].PerEval, p[1].PerEval
		if !exactStates {
			src.evalOps = 1
		}
		if !exactModes[name] {
			src.modeOps = 1
		}
		g.Go(func() error {
			if exactStates {
				k, err := p[0].Counter(ctx)
				if err != nil {
					return err
				}
				src.states = k
			}
			if exactModes[name] {
				k, err := p[1].Counter(ctx)
				if err != nil {
					return err
				}
				src.modes = k
			}
			return nil
		})
	}
	if err := g.Wait(); err != nil {
		return nil, m, canceled(err)
	}
	return srcs, m, nil
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
	return thermal.Integrator{RelTol: relTol, MaxEvals: maxEvals(v.evalOps), Edge: v.edge, HasEdge: true}
}

// maxEvals caps the evaluations of one thermal average by the cost of one.
func maxEvals(evalOps float64) int {
	n := 2000.0
	if evalOps > 0 {
		n = math.Min(n, math.Max(300, 3e7/evalOps))
	}
	return int(n)
}

// bySubband sums the thermal averages of counter k at (E_F, T) one
// subband at a time (thermal.SubbandSum): its electrons Σ w·G and
// dN/dE_F = Σ w·S. ok is false where that does not apply: at T = 0, with
// no counter (an asymptotic count), with three confined axes (each level
// is its own subband: the integrator is cheaper) or with three open ones
// (one smooth curve). Two confined axes and no open one (the transverse
// modes of a wire) are summed level by level, Σ w·f(Eₙ).
func bySubband(ctx context.Context, k *spectrum.Counter, ef, kT float64) (occ, slope float64, ok bool, err error) {
	if k == nil || kT <= 0 {
		return 0, 0, false, nil
	}
	dim := k.OpenDims()
	c := k.Conductor()
	if !summedBySubband(c) {
		return 0, 0, false, nil
	}
	lo := c.Edge()
	_, top, _, _ := thermal.Integrator{RelTol: relTol, Edge: lo, HasEdge: true}.Window(ef, kT)
	top = math.Min(top, k.TopEV())
	n := k.SubbandCount(top)
	if n > maxSubbands {
		return 0, 0, false, nil
	}
	sum, err := thermal.NewSubbandSum(ctx, dim, c.AlphaPerEV, ef, kT, lo, top, int(n))
	if err != nil {
		return 0, 0, false, canceled(err)
	}
	err = k.Subbands(ctx, top, func(e, w float64) {
		g, sl := sum.At(e)
		occ += w * g
		slope += w * sl
	})
	if err != nil {
		return 0, 0, false, canceled(err)
	}
	return occ, slope, true, nil
}

// maxSubbands caps the subbands one thermal sum visits (each costs some
// 30 operations): about the work of one capped curve integral
// (integrator). Beyond it the curve integrator takes over, whose work the
// plan has priced.
const maxSubbands = 1e6

func observe(ctx context.Context, s Scenario, v *source, ef float64) (Observables, error) {
	kT := s.KTEV()
	in := v.integrator()
	o := Observables{DensityUnit: s.DensityUnit()}
	// slope is dN/dE_F averaged over −∂f/∂E, for C_Q (at T > 0).
	occ, slope, bySub, err := bySubband(ctx, v.states, ef, kT)
	if err != nil {
		return o, err
	}
	switch {
	case bySub:
		o.Electrons = occ
	case kT > 0:
		// One refinement gives the electrons and C_Q.
		n, d, err := in.OccupiedAndSlope(ctx, v.stateCurve, ef, kT)
		if err != nil {
			return o, canceled(err)
		}
		o.Electrons, slope = n.Value, d.Value
	default:
		if o.Electrons, err = average(ctx, in, v.stateCurve, ef, kT); err != nil {
			return o, err
		}
	}
	o.Density = o.Electrons * s.densityScale()
	vol := v.cond.Volume() * math.Pow(100, float64(s.Dims))
	o.VolumeDensity = o.Electrons / vol
	o.VolumeDensityUnit = [...]string{"", "cm^-1", "cm^-2", "cm^-3"}[s.Dims]
	inModes := in
	inModes.Edge, inModes.MaxEvals = v.modeEdge, maxEvals(v.modeOps)
	if m, _, ok, err := bySubband(ctx, v.modes, ef, kT); err != nil {
		return o, err
	} else if ok {
		o.MeanModes = m
	} else if o.MeanModes, err = average(ctx, inModes, v.modeCurve, ef, kT); err != nil {
		return o, err
	}
	o.Transmission = 1
	if s.MFPM > 0 {
		// Landauer–Büttiker with an energy-independent mean free path:
		// T = λ/(λ + L), the incoherent series sum (1−T)/T = Σ(1−Tᵢ)/Tᵢ of Büttiker,
		// IBM J. Res. Dev. 32, 63 (1988) (from memory).
		o.Transmission = s.MFPM / (s.MFPM + s.LengthM[s.Along])
	}
	o.ConductanceS = phys.ConductanceQuantumPerSpin * o.MeanModes * o.Transmission
	o.ConductanceG0 = o.ConductanceS / phys.ConductanceQuantum
	if r := 1 / o.ConductanceS; o.ConductanceS > 0 && !math.IsInf(r, 0) {
		o.ResistanceOhm = &r
	}
	// C_Q = q²·∫D(−∂f/∂E)dE; with D in 1/eV that is q·D in F.
	var dq float64
	switch {
	case kT > 0:
		dq = slope
	default:
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
	// This E_F only sets the range the exact counters cover: 1e-6 will do.
	in := thermal.Integrator{RelTol: relTol, MaxEvals: 400, HasEdge: true}
	density := func(ctx context.Context, e float64) (float64, error) {
		v, err := average(ctx, in, src.stateCurve, e, kT)
		return v * scale, err
	}
	lo, err := bracketBelow(ctx, s, density, 0)
	if err != nil {
		return 0, err
	}
	ef, err := thermal.SolveFermiLevel(ctx, density, s.Density, lo, hi)
	if err != nil {
		if errors.Is(err, thermal.ErrOutsideBracket) {
			return 0, Errorf("density", "density %g %s needs a Fermi level above %g eV", s.Density, s.DensityUnit(), hi)
		}
		return 0, canceled(err)
	}
	return ef, nil
}

// bracketBelow returns an energy where the density is below the target:
// just below the edge, then in steps of 40 k_BT into the Boltzmann tail,
// where the density falls by e^(−40) a step, down to 720 k_BT below the
// edge (e^(−720) is near the smallest float).
func bracketBelow(ctx context.Context, s Scenario, density func(context.Context, float64) (float64, error), edge float64) (float64, error) {
	kT := s.KTEV()
	lo := edge - 1e-3
	for step := 0; ; step++ {
		n, err := density(ctx, lo)
		if err != nil {
			return 0, canceled(err)
		}
		if n < s.Density {
			return lo, nil
		}
		if step == 18 || kT == 0 {
			return 0, Errorf("density", "density %g %s is below e^(−720) of the band's effective density: too small to place a Fermi level", s.Density, s.DensityUnit())
		}
		lo -= 40 * kT
	}
}

// solveFermiLevel returns the scenario's E_F for its density and, where
// the answer needs one, a note. At T = 0 in a fully confined conductor the
// electrons come in steps of one level's degeneracy: E_F is the level that
// holds the last electron, and the electrons are those the levels up to it
// hold.
func solveFermiLevel(ctx context.Context, s Scenario, v *source, hi float64) (float64, string, error) {
	kT := s.KTEV()
	scale := s.densityScale()
	if kT == 0 && v.cond.Confined() {
		ef, err := lastLevel(ctx, s.Density/scale, v, hi)
		if err != nil {
			return 0, "", err
		}
		return ef, "At T = 0 in a fully confined conductor the density comes in steps of one level's degeneracy: E_F is the level that holds the last electron, and the electrons shown are those the levels up to it hold.", nil
	}
	in := v.integrator()
	density := func(ctx context.Context, e float64) (float64, error) {
		n, _, ok, err := bySubband(ctx, v.states, e, kT)
		if !ok && err == nil {
			n, err = average(ctx, in, v.stateCurve, e, kT)
		}
		return n * scale, err
	}
	lo, err := bracketBelow(ctx, s, density, v.edge)
	if err != nil {
		return 0, "", err
	}
	ef, err := thermal.SolveFermiLevel(ctx, density, s.Density, lo, hi)
	if err != nil {
		if errors.Is(err, thermal.ErrOutsideBracket) {
			return 0, "", Errorf("density", "density %g %s is not reached below %.3g eV with these boundary conditions", s.Density, s.DensityUnit(), hi)
		}
		return 0, "", canceled(err)
	}
	return ef, "", nil
}

// lastLevel returns the lowest energy E ≤ hi with N(E) ≥ electrons: the
// level holding the last electron, found by bisection to 1e-12 relative
// and returned from above, so that N(E) counts it.
func lastLevel(ctx context.Context, electrons float64, v *source, hi float64) (float64, error) {
	n := []float64{0}
	at := func(e float64) (float64, error) {
		n[0] = e
		err := v.stateCurve(ctx, n, n)
		return n[0], canceled(err)
	}
	if c, err := at(hi); err != nil {
		return 0, err
	} else if c < electrons {
		return 0, Errorf("density", "density %g needs more than the %g states below %.3g eV", electrons, c, hi)
	}
	lo := v.edge - 1e-3
	for hi-lo > 1e-12*math.Max(1, math.Abs(hi)) {
		mid := lo + (hi-lo)/2
		if mid <= lo || mid >= hi {
			break
		}
		c, err := at(mid)
		if err != nil {
			return 0, err
		}
		if c >= electrons {
			hi = mid
		} else {
			lo = mid
		}
	}
	return hi, nil
}

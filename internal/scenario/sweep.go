package scenario

import (
	"context"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"net/url"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"

	"ringbox/internal/phys"
	"ringbox/internal/smooth"
	"ringbox/internal/spectrum"
	"ringbox/internal/sweep"
)

// SweepKeys are the keys a size sweep adds to the scenario keys.
var SweepKeys = []string{"sweep", "from", "to", "steps", "quantity", "tol"}

// Quantities a sweep can follow, in the order forms list them.
var Quantities = []string{"density", "modes", "conductance", "states"}

// SweepAll is Sweep.Axis when every confined axis is scaled together.
const SweepAll = -1

// Defaults and limits of a sweep.
const (
	DefaultSweepSteps = 24
	DefaultSweepTol   = 0.05
	MaxSweepTol       = 10
	// MaxSweepWork caps the estimated operations of a whole sweep (see
	// Sweep.Work). Measured sweeps take 0.2 to 3 ns per estimated
	// operation on two cores, so the cap is a few seconds to half a
	// minute. A step beyond the exact budget falls back to the asymptotic
	// count on its own, so the cap bites only on many large exact steps.
	MaxSweepWork = 1.5e10
)

// Sweep is a validated size sweep: a scenario, the length that changes
// and what is read at each size.
type Sweep struct {
	// Scenario is the conductor at the largest size. For a single axis its
	// swept length is ToM; with SweepAll its largest confined length is
	// ToM and the others keep their ratios to it.
	Scenario Scenario
	// Axis is the swept axis (0, 1, 2 for x, y, z) or SweepAll.
	Axis int
	// FromM and ToM are the smallest and largest swept length in metres;
	// with SweepAll, the largest confined length at each end.
	FromM, ToM float64
	Steps      int
	// Quantity is one of Quantities:
	//   - density: the carrier density at (E_F, T), Observables.Density in
	//     the scenario's unit (per length, area or volume of the open
	//     axes); for a conductor with every axis confined, whose unit would
	//     be "per conductor" and so change meaning with size, the volume
	//     density Observables.VolumeDensity instead;
	//   - modes: the number of conduction modes M(E_F) at the Fermi level
	//     itself (spin and valleys included), the staircase value without
	//     thermal averaging (the "conductance" quantity is the averaged one);
	//   - conductance: the Landauer conductance at (E_F, T) in S,
	//     Observables.ConductanceS (with the mean-free-path transmission);
	//   - states: the count N(E_F) of states at or below E_F.
	Quantity string
	// Tol is the relative tolerance of the crossover, e.g. 0.05.
	Tol float64
}

// SplitSweep separates the sweep keys from the scenario keys, so that the
// scenario parser, which refuses unknown keys, sees only its own.
func SplitSweep(q url.Values) (scenarioKeys, sweepKeys url.Values) {
	scenarioKeys, sweepKeys = url.Values{}, url.Values{}
	for k, v := range q {
		if slices.Contains(SweepKeys, k) {
			sweepKeys[k] = v
		} else {
			scenarioKeys[k] = v
		}
	}
	return scenarioKeys, sweepKeys
}

// ParseSweep reads a sweep from the scenario keys plus SweepKeys. Every
// error names its key. The keys "at" and "points" are accepted but play no
// part (a sweep reads values at E_F only), so they are dropped from the
// canonical form.
func ParseSweep(q url.Values) (Sweep, error) {
	sq, wq := SplitSweep(q)
	for k, v := range wq {
		if nonEmpty(v) > 1 {
			return Sweep{}, Errorf(k, "given more than once")
		}
	}
	delete(sq, "at")
	delete(sq, "points")
	s, err := Parse(sq)
	if err != nil {
		return Sweep{}, err
	}
	get := func(k string) string {
		for _, v := range wq[k] {
			if t := strings.TrimSpace(v); t != "" {
				return t
			}
		}
		return ""
	}
	sw := Sweep{Scenario: s, Axis: SweepAll}
	switch v := strings.ToLower(get("sweep")); v {
	case "", "all":
		if len(sw.confined()) == 0 {
			return Sweep{}, Errorf("sweep", "every axis is open: there is no confined length to scale (sweep one axis with lx, ly or lz)")
		}
	case "lx", "ly", "lz":
		sw.Axis = int(v[1] - 'x')
		if sw.Axis >= s.Dims {
			return Sweep{}, Errorf("sweep", "%s is not a length of a conductor with dims = %d", v, s.Dims)
		}
	default:
		return Sweep{}, Errorf("sweep", "unknown sweep %q (lx, ly, lz or all)", v)
	}
	length := func(k string, def float64) (float64, error) {
		v := get(k)
		if v == "" {
			return def, nil
		}
		l, err := phys.ParseLength(v)
		if err != nil {
			return 0, Errorf(k, "%v", err)
		}
		if !(l >= MinLengthM && l <= MaxLengthM) {
			return 0, Errorf(k, "length %s out of range (0.1 nm to 1 m)", v)
		}
		return l, nil
	}
	if sw.FromM, err = length("from", 2e-9); err != nil {
		return Sweep{}, err
	}
	if sw.ToM, err = length("to", 100e-9); err != nil {
		return Sweep{}, err
	}
	if !(sw.ToM > sw.FromM) {
		return Sweep{}, Errorf("to", "to (%s) must be above from (%s)", phys.FormatLength(sw.ToM), phys.FormatLength(sw.FromM))
	}
	if sw.Steps, err = integer(get("steps"), "steps", DefaultSweepSteps, sweep.MinSteps, sweep.MaxSteps); err != nil {
		return Sweep{}, err
	}
	sw.Quantity = strings.ToLower(get("quantity"))
	if sw.Quantity == "" {
		sw.Quantity = "density"
	}
	if !slices.Contains(Quantities, sw.Quantity) {
		return Sweep{}, Errorf("quantity", "unknown quantity %q (%s)", get("quantity"), strings.Join(Quantities, ", "))
	}
	if sw.Tol, err = number(get("tol"), "tol", DefaultSweepTol, 0, MaxSweepTol); err != nil {
		return Sweep{}, err
	}
	if sw.Tol <= 0 {
		return Sweep{}, Errorf("tol", "tolerance must be above 0")
	}
	if sw.Axis == SweepAll {
		// The smallest confined axis shrinks in proportion; it must stay a
		// valid length at the small end.
		ratio := 1.0
		for _, i := range sw.confined() {
			ratio = math.Min(ratio, s.LengthM[i]/sw.maxConfined())
		}
		if sw.FromM*ratio < MinLengthM {
			return Sweep{}, Errorf("from", "at %s the shortest confined axis would be %s (below 0.1 nm)",
				phys.FormatLength(sw.FromM), phys.FormatLength(sw.FromM*ratio))
		}
	}
	sw.Scenario = sw.At(sw.ToM)
	if w := sw.Work(); w > MaxSweepWork {
		return Sweep{}, &Error{Code: TooLarge, Key: "to", Msg: fmt.Sprintf(
			"the sweep would take about %.2g operations (limit %.2g): lower to, steps or the temperature", w, float64(MaxSweepWork))}
	}
	return sw, nil
}

// confined lists the axes that are not open.
func (sw Sweep) confined() []int {
	var out []int
	for i := 0; i < sw.Scenario.Dims; i++ {
		if sw.Scenario.BC[i] != spectrum.Open {
			out = append(out, i)
		}
	}
	return out
}

func (sw Sweep) maxConfined() float64 {
	m := 0.0
	for _, i := range sw.confined() {
		m = math.Max(m, sw.Scenario.LengthM[i])
	}
	return m
}

// Lengths returns the swept lengths in metres, log-spaced from FromM to ToM.
func (sw Sweep) Lengths() []float64 {
	g, err := sweep.LogGrid(sw.FromM, sw.ToM, sw.Steps)
	if err != nil {
		panic("scenario: sweep not validated: " + err.Error())
	}
	return g
}

// At returns the scenario at swept length lengthM: the swept axis set to it,
// or with SweepAll every confined axis scaled so the largest is lengthM.
func (sw Sweep) At(lengthM float64) Scenario {
	s := sw.Scenario
	if sw.Axis != SweepAll {
		s.LengthM[sw.Axis] = lengthM
		return s
	}
	f := lengthM / sw.maxConfined()
	for _, i := range sw.confined() {
		s.LengthM[i] *= f
	}
	return s
}

// AxisName is the sweep key's value: "lx", "ly", "lz" or "all".
func (sw Sweep) AxisName() string {
	if sw.Axis == SweepAll {
		return "all"
	}
	return "l" + axisNames[sw.Axis]
}

// Values returns the canonical keys of the sweep: the scenario's (at the
// largest size) and the sweep's own.
func (sw Sweep) Values() url.Values {
	q := sw.Scenario.Values()
	q.Set("sweep", sw.AxisName())
	q.Set("from", phys.FormatLength(sw.FromM))
	q.Set("to", phys.FormatLength(sw.ToM))
	q.Set("steps", strconv.Itoa(sw.Steps))
	q.Set("quantity", sw.Quantity)
	q.Set("tol", fmtFloat(sw.Tol))
	return q
}

// Canonical returns the canonical query string of the sweep: its cache key
// and shareable link.
func (sw Sweep) Canonical() string { return sw.Values().Encode() }

// Unit names the unit of the swept quantity.
func (sw Sweep) Unit() string {
	switch sw.Quantity {
	case "density":
		if sw.Scenario.OpenAxes() == 0 {
			return [...]string{"", "cm^-1", "cm^-2", "cm^-3"}[sw.Scenario.Dims]
		}
		return sw.Scenario.DensityUnit()
	case "conductance":
		return "S"
	}
	return "count"
}

// Work estimates the operations of the whole sweep: for each step and each
// of the scenario, box and ring variants, the plans Observe would run
// (plan: the counters and their evaluations, thermal integrals and a
// density solve included). A step beyond the exact budget is asymptotic
// and nearly free.
func (sw Sweep) Work() float64 {
	total := 0.0
	for _, l := range sw.Lengths() {
		s := sw.At(l)
		s.Points, s.AtEV = 1, nil
		conds := variants(s.Conductor())
		sp := newSpan(s, conds, bulkFermiBound(s), false)
		step, exact := 0.0, true
		for _, name := range []string{"scenario", "box", "ring"} {
			st, md, modesExact := plan(s, conds[name], sp.top(conds[name]))
			if st.Ops > s.Budget || st.Bytes > maxCounterBytes {
				exact = false
			}
			step += st.Ops
			if modesExact {
				step += md.Ops
			}
		}
		if !exact {
			step = 1e6
		}
		total += step
	}
	return total
}

// bulkFermiBound bounds from above the E_F Observe starts from: the
// scenario's, or with a density the continuum's at T = 0, which is above
// the Fermi level at any T.
func bulkFermiBound(s Scenario) float64 {
	if !s.HasDensity {
		return s.EFEV
	}
	cont := s.Conductor().Continuum()
	scale := s.densityScale()
	lo, hi := 0.0, 1.0
	for n, _ := smooth.Weyl(cont, hi); n*scale < s.Density && hi < MaxEnergyEV/2; n, _ = smooth.Weyl(cont, hi) {
		lo, hi = hi, 2*hi
	}
	for range 60 {
		mid := (lo + hi) / 2
		if n, _ := smooth.Weyl(cont, mid); n*scale < s.Density {
			lo = mid
		} else {
			hi = mid
		}
	}
	return hi
}

// SweepResult is a finished sweep, the same for the CLI, the API and the
// page. Deviations are (variant − continuum)/|continuum|, null where the
// continuum is zero and the variant is not. A crossover is the smallest
// swept length at and above which |deviation| ≤ tol at every swept length
// (sweep.Crossover), null if the largest length is still beyond tol.
type SweepResult struct {
	Input         map[string]string     `json:"input"`
	Sweep         string                `json:"sweep"`
	Quantity      string                `json:"quantity"`
	Unit          string                `json:"unit"`
	Tol           float64               `json:"tol"`
	TempK         float64               `json:"temp_K"`
	LengthsNM     []float64             `json:"lengths_nm"`
	AxisLengthsNM [][]float64           `json:"axis_lengths_nm"`
	Scenario      []float64             `json:"scenario"`
	Box           []float64             `json:"box"`
	Ring          []float64             `json:"ring"`
	Continuum     []float64             `json:"continuum"`
	Deviations    map[string][]*float64 `json:"deviations"`
	CrossoverNM   map[string]*float64   `json:"crossover_nm"`
	Method        []string              `json:"method"`
	EFEV          []float64             `json:"ef_eV"`
	Notes         []string              `json:"notes"`

	sw Sweep
}

// Compared are the variants a sweep compares with the continuum.
var Compared = []string{"scenario", "box", "ring"}

// Spec returns the sweep the result is for.
func (r *SweepResult) Spec() Sweep { return r.sw }

// Values returns the values of variant name (one of Variants).
func (r *SweepResult) Values(name string) []float64 {
	switch name {
	case "scenario":
		return r.Scenario
	case "box":
		return r.Box
	case "ring":
		return r.Ring
	case "continuum":
		return r.Continuum
	}
	panic("scenario: unknown variant " + name)
}

// value reads the swept quantity from one Observe point.
func (sw Sweep) value(p *Point, name string) float64 {
	o := p.Observables[name]
	switch sw.Quantity {
	case "density":
		if sw.Scenario.OpenAxes() == 0 {
			return o.VolumeDensity
		}
		return o.Density
	case "modes":
		return p.Modes[name]
	case "conductance":
		return o.ConductanceS
	case "states":
		return p.States[name]
	}
	panic("scenario: unknown sweep quantity " + sw.Quantity)
}

// RunSweep observes the scenario at every swept length on a bounded pool
// of GOMAXPROCS workers and finds the crossovers. It stops when ctx ends,
// between steps and inside them (Observe honours ctx), and returns a
// Canceled error. progress, if not nil, gets (done, total) after each step,
// from one goroutine at a time (see sweep.Map).
func RunSweep(ctx context.Context, sw Sweep, progress func(done, total int)) (*SweepResult, error) {
	ls := sw.Lengths()
	pts := make([]*Point, len(ls))
	err := sweep.Map(ctx, len(ls), 0, func(ctx context.Context, i int) error {
		p, err := Observe(ctx, sw.At(ls[i]))
		if err != nil {
			if e, ok := AsError(err); ok && e.Code != Canceled {
				return &Error{Code: e.Code, Key: e.Key, Msg: fmt.Sprintf("at %s = %s: %s", sw.AxisName(), phys.FormatLength(ls[i]), e.Msg)}
			}
			return canceled(err)
		}
		pts[i] = p
		return nil
	}, progress)
	if err != nil {
		return nil, canceled(err)
	}
	s := sw.Scenario
	r := &SweepResult{
		Input: flatten(sw.Values()), Sweep: sw.AxisName(), Quantity: sw.Quantity, Unit: sw.Unit(),
		Tol: sw.Tol, TempK: s.TempK, Deviations: map[string][]*float64{}, CrossoverNM: map[string]*float64{}, sw: sw,
	}
	for i, l := range ls {
		r.LengthsNM = append(r.LengthsNM, l*1e9)
		at := sw.At(l)
		axes := make([]float64, at.Dims)
		for j := range axes {
			axes[j] = at.LengthM[j] * 1e9
		}
		r.AxisLengthsNM = append(r.AxisLengthsNM, axes)
		p := pts[i]
		r.Scenario = append(r.Scenario, sw.value(p, "scenario"))
		r.Box = append(r.Box, sw.value(p, "box"))
		r.Ring = append(r.Ring, sw.value(p, "ring"))
		r.Continuum = append(r.Continuum, sw.value(p, "continuum"))
		r.Method = append(r.Method, p.Method)
		r.EFEV = append(r.EFEV, p.EFEV)
	}
	for _, name := range Compared {
		dev := sweep.Deviations(r.Values(name), r.Continuum)
		out := make([]*float64, len(dev))
		for i, d := range dev {
			if !math.IsNaN(d) && !math.IsInf(d, 0) {
				out[i] = &dev[i]
			}
		}
		r.Deviations[name] = out
		if c, ok := sweep.Crossover(r.LengthsNM, dev, sw.Tol); ok {
			r.CrossoverNM[name] = &c
		} else {
			r.CrossoverNM[name] = nil
		}
	}
	if slices.Contains(r.Method, "asymptotic") {
		r.Notes = append(r.Notes, "Some sizes exceed the exact budget: there box, ring and scenario values come from the smooth (Weyl) counts.")
	}
	if sw.Quantity == "density" && s.OpenAxes() == 0 {
		r.Notes = append(r.Notes, "Every axis is confined, so the density is per volume of the conductor.")
	}
	r.Notes = append(r.Notes, "Idealised model: infinite walls, parabolic or Kane bands, no disorder or self-consistent potential.")
	return r, nil
}

// Deviation returns the deviation of variant name at step i, NaN where it
// is undefined.
func (r *SweepResult) Deviation(name string, i int) float64 {
	if d := r.Deviations[name][i]; d != nil {
		return *d
	}
	return math.NaN()
}

// WriteCSV writes one row per swept length: the lengths of every axis, the
// values, the deviations, E_F and the method, with units in the header.
func (r *SweepResult) WriteCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	unit := strings.NewReplacer("^", "").Replace(r.Unit)
	header := []string{r.Sweep + "_nm"}
	dims := r.sw.Scenario.Dims
	for j := 0; j < dims; j++ {
		header = append(header, "l"+axisNames[j]+"_nm")
	}
	for _, name := range Variants {
		header = append(header, r.Quantity+"_"+name+"_"+unit)
	}
	for _, name := range Compared {
		header = append(header, "rel_dev_"+name)
	}
	header = append(header, "ef_eV", "method")
	if err := cw.Write(header); err != nil {
		return err
	}
	g := func(x float64) string {
		if math.IsNaN(x) {
			return ""
		}
		return strconv.FormatFloat(x, 'g', 10, 64)
	}
	for i, l := range r.LengthsNM {
		row := []string{g(l)}
		for _, a := range r.AxisLengthsNM[i] {
			row = append(row, g(a))
		}
		for _, name := range Variants {
			row = append(row, g(r.Values(name)[i]))
		}
		for _, name := range Compared {
			row = append(row, g(r.Deviation(name, i)))
		}
		row = append(row, g(r.EFEV[i]), r.Method[i])
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// WriteTable writes a readable table of the sweep with the crossovers.
func (r *SweepResult) WriteTable(w io.Writer) error {
	s := r.sw.Scenario
	fmt.Fprintf(w, "ringbox sweep — %s (%s)\n", s.Material.Name, s.String())
	fmt.Fprintf(w, "sweep    %s from %s to %s in %d log steps; %s at T = %g K\n", r.Sweep,
		phys.FormatLength(r.sw.FromM), phys.FormatLength(r.sw.ToM), r.sw.Steps, r.Quantity, r.TempK)
	fmt.Fprintf(w, "crossover (|rel. dev.| ≤ %g from there up):", r.Tol)
	for _, name := range Compared {
		if c := r.CrossoverNM[name]; c != nil {
			fmt.Fprintf(w, " %s %.4g nm;", name, *c)
		} else {
			fmt.Fprintf(w, " %s none;", name)
		}
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w)
	tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintf(tw, "%s (nm)\tscenario\tbox\tring\tcontinuum\tdev scenario\tdev box\tdev ring\tE_F (eV)\tmethod\t\n", r.Sweep)
	dev := func(x float64) string {
		if math.IsNaN(x) {
			return "—"
		}
		return fmt.Sprintf("%+.3g", x)
	}
	for i, l := range r.LengthsNM {
		fmt.Fprintf(tw, "%.4g\t%.5g\t%.5g\t%.5g\t%.5g\t%s\t%s\t%s\t%.5g\t%s\t\n", l,
			r.Scenario[i], r.Box[i], r.Ring[i], r.Continuum[i],
			dev(r.Deviation("scenario", i)), dev(r.Deviation("box", i)), dev(r.Deviation("ring", i)), r.EFEV[i], r.Method[i])
	}
	tw.Flush()
	fmt.Fprintf(w, "values in %s\n", r.Unit)
	for _, n := range r.Notes {
		fmt.Fprintf(w, "note: %s\n", n)
	}
	return nil
}

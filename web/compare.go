package web

import (
	"context"
	"errors"
	"fmt"
	"math"
	"net/http"
	"net/url"
	"runtime"
	"slices"
	"strconv"
	"strings"

	"github.com/go-chi/chi/v5"
	"golang.org/x/sync/errgroup"

	"ringbox/internal/figure"
	"ringbox/internal/phys"
	"ringbox/internal/scenario"
	"ringbox/internal/spectrum"
	"ringbox/internal/store"
	"ringbox/web/views"
)

// The comparison page, /compare?s=…&s=…, overlays up to eight scenarios
// (each s a scenario query string, e.g. "material=gaas&lx=6nm") in three
// figures and a side-by-side table. It needs no script: the links on it,
// and the conductor page's "Add to comparison" link (compareLinks), are
// plain URLs that carry the whole comparison.

// maxCompare is the number of scenarios one comparison holds: the
// figure's palette has eight colours, and a saved review holds as many.
const maxCompare = store.MaxScenarios

// compareParam is the query key of one scenario on /compare and of the
// review form; cmpParam carries the rest of a comparison on the conductor
// page while one of its scenarios is edited there.
const (
	compareParam = "s"
	cmpParam     = "cmp"
)

func init() {
	addRoutes(func(a *App, r chi.Router) {
		r.Get("/compare", a.handle(a.comparePage))
		for _, k := range plotKinds {
			r.Get("/compare/plot/"+string(k)+".svg", a.handle(a.comparePlot(k, "svg")))
			r.Get("/compare/plot/"+string(k)+".png", a.handle(a.comparePlot(k, "png")))
		}
	})
}

// compareLinks returns the conductor page's "Add to comparison" link: the
// comparison of others (the page's cmp values, already canonical scenario
// queries) with current (the page's canonical query) appended. current is
// not added twice; with others already full the link would be refused, so
// compareLinks returns "" and the page should show no link.
func compareLinks(current string, others []string) (add string) {
	list := slices.DeleteFunc(slices.Clone(others), func(s string) bool { return s == "" })
	if !slices.Contains(list, current) && current != "" {
		list = append(list, current)
	}
	if len(list) == 0 || len(list) > maxCompare {
		return ""
	}
	return compareURL(list)
}

// splitCompare separates a conductor-page query into the scenario's own
// keys (for scenario.Parse, which refuses unknown keys) and the cmp values
// that carry the rest of a comparison being edited. Empty cmp values are
// dropped; q is not modified.
func splitCompare(q url.Values) (scenarioQuery url.Values, cmp []string) {
	scenarioQuery = make(url.Values, len(q))
	for k, v := range q {
		if k == cmpParam {
			for _, c := range v {
				if c != "" {
					cmp = append(cmp, c)
				}
			}
			continue
		}
		scenarioQuery[k] = v
	}
	return scenarioQuery, cmp
}

// compareURL is /compare with the given scenario queries, in order.
func compareURL(queries []string) string {
	if len(queries) == 0 {
		return "/compare"
	}
	return "/compare?" + compareQuery(queries)
}

// compareQuery encodes queries as repeated s parameters, in order (so it
// is also the render-cache key of a comparison's figures).
func compareQuery(queries []string) string {
	var b strings.Builder
	for i, q := range queries {
		if i > 0 {
			b.WriteByte('&')
		}
		b.WriteString(compareParam + "=" + url.QueryEscape(q))
	}
	return b.String()
}

// parseComparison parses and validates each scenario query of a
// comparison, numbering them from 1 in errors. Empty values are skipped
// (an empty box of the form). More than maxCompare is a 400 naming s.
func parseComparison(raw []string) ([]scenario.Scenario, error) {
	raw = slices.DeleteFunc(slices.Clone(raw), func(s string) bool { return strings.TrimSpace(s) == "" })
	if len(raw) > maxCompare {
		return nil, scenario.Errorf(compareParam, "a comparison holds at most %d scenarios, got %d", maxCompare, len(raw))
	}
	out := make([]scenario.Scenario, len(raw))
	for i, q := range raw {
		s, err := parseOne(i+1, q)
		if err != nil {
			return nil, err
		}
		out[i] = s
	}
	return out, nil
}

// parseOne parses scenario number n of a comparison from its query string.
func parseOne(n int, q string) (scenario.Scenario, error) {
	if len(q) > store.MaxScenarioLen {
		return scenario.Scenario{}, scenario.Errorf(compareParam, "scenario %d: longer than %d bytes", n, store.MaxScenarioLen)
	}
	vals, err := url.ParseQuery(strings.TrimPrefix(strings.TrimSpace(q), "?"))
	if err != nil {
		return scenario.Scenario{}, scenario.Errorf(compareParam, "scenario %d: not a URL query string (%v)", n, err)
	}
	s, err := scenario.Parse(vals)
	if err != nil {
		e, ok := scenario.AsError(err)
		if !ok || e.Code == scenario.Canceled {
			return scenario.Scenario{}, err
		}
		// The key stays s (the field of the form at fault); the message
		// names the scenario and its own key.
		return scenario.Scenario{}, &scenario.Error{Code: e.Code, Key: compareParam,
			Msg: fmt.Sprintf("scenario %d, key %s: %s", n, e.Key, e.Msg)}
	}
	return s, nil
}

// canonicals returns the canonical query of each scenario.
func canonicals(ss []scenario.Scenario) []string {
	out := make([]string, len(ss))
	for i, s := range ss {
		out[i] = s.Canonical()
	}
	return out
}

// runAll runs every scenario through the shared result cache, at most
// GOMAXPROCS at a time (the engines are CPU-bound; one comparison should
// not take more of the machine than that), under ctx. The first error
// cancels the rest and is returned with the scenario's number.
func (a *App) runAll(ctx context.Context, ss []scenario.Scenario) ([]*scenario.Result, error) {
	res := make([]*scenario.Result, len(ss))
	g, gctx := errgroup.WithContext(ctx)
	g.SetLimit(runtime.GOMAXPROCS(0))
	for i, s := range ss {
		g.Go(func() error {
			r, err := a.count(gctx, s)
			if err != nil {
				return numbered(i+1, err)
			}
			res[i] = r
			return nil
		})
	}
	if err := g.Wait(); err != nil {
		return nil, err
	}
	return res, nil
}

// numbered prefixes a user-facing scenario error with the scenario's number.
func numbered(n int, err error) error {
	if e, ok := scenario.AsError(err); ok && e.Code != scenario.Canceled {
		return &scenario.Error{Code: e.Code, Key: e.Key, Msg: fmt.Sprintf("scenario %d: %s", n, e.Msg)}
	}
	return err
}

// comparePage answers /compare.
func (a *App) comparePage(w http.ResponseWriter, r *http.Request) error {
	raw := r.URL.Query()[compareParam]
	ss, err := parseComparison(raw)
	if err != nil {
		return err
	}
	if len(ss) == 0 {
		return render(w, r, http.StatusOK, views.Page("Compare", views.NavCompare, views.CompareEmpty(maxCompare)))
	}
	cmp, err := a.comparison(r.Context(), ss)
	if err != nil {
		return err
	}
	save := views.SaveForm{Show: !a.cfg.ReadOnly && a.Reviews != nil, Scenarios: cmp.Scenarios,
		MaxTitle: store.MaxTitle, MaxNotes: store.MaxNotes}
	return render(w, r, http.StatusOK, views.Page("Compare", views.NavCompare, views.ComparePage(cmp, save, a.cfg.ReadOnly)))
}

// comparison runs the scenarios and builds what the page and the review
// page show of them.
func (a *App) comparison(ctx context.Context, ss []scenario.Scenario) (views.Comparison, error) {
	res, err := a.runAll(ctx, ss)
	if err != nil {
		return views.Comparison{}, err
	}
	canon := canonicals(ss)
	cmp := views.Comparison{Scenarios: canon, PlotQuery: compareQuery(canon)}
	for _, kind := range plotKinds {
		cmp.Figures = append(cmp.Figures, views.CompareFigure{
			Title: compareTitle(kind),
			SVG:   "/compare/plot/" + string(kind) + ".svg?" + cmp.PlotQuery,
			PNG:   "/compare/plot/" + string(kind) + ".png?" + cmp.PlotQuery,
		})
	}
	all := make([]facts, len(ss))
	g, gctx := errgroup.WithContext(ctx)
	g.SetLimit(runtime.GOMAXPROCS(0))
	for i, s := range ss {
		g.Go(func() error {
			f, err := a.facts(gctx, s, res[i])
			if err != nil {
				return numbered(i+1, err)
			}
			all[i] = f
			return nil
		})
		cmp.Columns = append(cmp.Columns, column(i, s, canon))
	}
	if err := g.Wait(); err != nil {
		return views.Comparison{}, err
	}
	cmp.Rows = factRows(all)
	return cmp, nil
}

// column is scenario i's heading and links: open it on the conductor page,
// edit it there with the rest of the comparison carried along in cmp
// parameters, or drop it from the comparison.
func column(i int, s scenario.Scenario, canon []string) views.CompareColumn {
	others := slices.Delete(slices.Clone(canon), i, i+1)
	edit := s.Values()
	for _, o := range others {
		edit.Add(cmpParam, o)
	}
	return views.CompareColumn{
		Number:    i + 1,
		Label:     scenarioDescription(s),
		OpenURL:   "/?" + canon[i],
		EditURL:   "/?" + edit.Encode(),
		RemoveURL: compareURL(others),
	}
}

// levelsShown is how many of the lowest levels the table lists.
const levelsShown = 3

// facts are one scenario's entries of the table, formatted.
type facts struct {
	material, geometry, transport string
	levels                        []string
	ef, temp                      string
	states, modes                 string
	density                       string
	conductanceS, conductanceG0   string
	crossover                     string // "" when no sweep applies
	method                        string
}

// facts formats what the table shows of s.
func (a *App) facts(ctx context.Context, s scenario.Scenario, res *scenario.Result) (facts, error) {
	f := facts{
		material:  s.Material.Name,
		geometry:  geometry(s),
		transport: "along " + string("xyz"[s.Along]),
		ef:        phys.FormatSI(res.EFEV, "eV", 4),
		temp:      strconv.FormatFloat(s.TempK, 'g', 4, 64) + " K",
		method:    res.Method,
	}
	for _, l := range res.Levels[:min(levelsShown, len(res.Levels))] {
		f.levels = append(f.levels, fmt.Sprintf("%s ×%d", phys.FormatSI(l.EnergyEV, "eV", 4), l.Degeneracy))
	}
	if len(f.levels) == 0 {
		f.levels = []string{"none (all axes open)"}
	}
	states, modes, err := a.atFermi(ctx, s, res)
	if err != nil {
		return facts{}, err
	}
	f.states, f.modes = formatCount(states), formatCount(modes)
	if f.crossover, err = crossover(ctx, s); err != nil {
		return facts{}, err
	}
	if o, ok := res.Observables["scenario"]; ok {
		f.density = sci(o.Density) + " " + unitText(o.DensityUnit)
		f.conductanceS = phys.FormatSI(o.ConductanceS, "S", 4)
		f.conductanceG0 = strconv.FormatFloat(o.ConductanceG0, 'g', 4, 64)
	}
	return f, nil
}

// factRows lays the facts out as the table's rows. The crossover row is
// left out when no scenario has one.
func factRows(fs []facts) []views.CompareRow {
	row := func(label string, num bool, get func(facts) []string) views.CompareRow {
		r := views.CompareRow{Label: label, Num: num}
		for _, f := range fs {
			r.Cells = append(r.Cells, get(f))
		}
		return r
	}
	one := func(get func(facts) string) func(facts) []string {
		return func(f facts) []string { return []string{get(f)} }
	}
	rows := []views.CompareRow{
		row("Material", false, one(func(f facts) string { return f.material })),
		row("Axes", false, one(func(f facts) string { return f.geometry })),
		row("Transport", false, one(func(f facts) string { return f.transport })),
		row("Lowest levels", true, func(f facts) []string { return f.levels }),
		row("Fermi level E_F", true, one(func(f facts) string { return f.ef })),
		row("Temperature", true, one(func(f facts) string { return f.temp })),
		row("States N(E_F)", true, one(func(f facts) string { return f.states })),
		row("Modes M(E_F)", true, one(func(f facts) string { return f.modes })),
		row("Carrier density", true, one(func(f facts) string { return f.density })),
		row("Conductance", true, one(func(f facts) string { return f.conductanceS })),
		row("Conductance (2e²/h)", true, one(func(f facts) string { return f.conductanceG0 })),
	}
	if slices.ContainsFunc(fs, func(f facts) bool { return f.crossover != "" }) {
		rows = append(rows, row(crossoverLabel, true, one(func(f facts) string { return f.crossover })))
	}
	return append(rows, row("Count", false, one(func(f facts) string { return f.method })))
}

// The crossover estimate: a short size sweep (scenario.RunSweep) of the
// carrier density with every confined length scaled together, from a tenth
// of the scenario's largest confined length to ten times it, and the
// smallest size above which the scenario's own density stays within the
// sweep's default tolerance of the continuum. The Sweep page gives the
// full curve; this is one cell of a table.
const (
	crossoverSteps = 10
	crossoverSpan  = 10.0
	// crossoverWork bounds the estimate's work (Sweep.Work, an
	// overestimate) at 1/400 of a full sweep's cap, a few tenths of a
	// second on one core; the range is shortened to fit, and past that
	// the cell points to the Sweep page.
	crossoverWork = scenario.MaxSweepWork / 400
)

var crossoverLabel = fmt.Sprintf("Crossover size (density within %g %% of bulk)", 100*scenario.DefaultSweepTol)

// crossovers keeps estimates by canonical scenario: a review is opened
// again and again, and the estimate is the dearest cell of the table.
var crossovers = newLRU[string](256)

// crossover returns the formatted crossover estimate of s, "" when no
// sweep applies (every axis open), or a short reason when the estimate
// is not available. Only a canceled request is an error.
func crossover(ctx context.Context, s scenario.Scenario) (string, error) {
	key := s.Canonical()
	if v, ok := crossovers.Get(key); ok {
		return v, nil
	}
	maxL, minRatio := 0.0, 1.0
	for i := range s.Dims {
		if s.BC[i] != spectrum.Open {
			maxL = math.Max(maxL, s.LengthM[i])
		}
	}
	if maxL == 0 {
		return "", nil
	}
	for i := range s.Dims {
		if s.BC[i] != spectrum.Open {
			minRatio = math.Min(minRatio, s.LengthM[i]/maxL)
		}
	}
	from := math.Max(maxL/crossoverSpan, scenario.MinLengthM/minRatio*1.001)
	to := math.Min(maxL*crossoverSpan, scenario.MaxLengthM)
	if !(to > from) {
		return "n/a", nil
	}
	q := s.Values()
	q.Set("sweep", "all")
	q.Set("from", nm(from))
	q.Set("to", nm(to))
	q.Set("steps", strconv.Itoa(crossoverSteps))
	q.Set("quantity", "density")
	sw, err := scenario.ParseSweep(q)
	// Large conductors cost the most: shorten the top of the range until
	// the estimate is cheap, keeping at least a factor of two above from.
	for err == nil && sw.Work() > crossoverWork {
		if to /= 2; to < 2*from {
			err = scenario.Errorf("to", "too costly for an estimate")
			break
		}
		q.Set("to", nm(to))
		sw, err = scenario.ParseSweep(q)
	}
	var out string
	if err == nil {
		var r *scenario.SweepResult
		if r, err = scenario.RunSweep(ctx, sw, nil); err == nil {
			c := r.CrossoverNM["scenario"]
			lengths := r.LengthsNM
			switch {
			case c == nil:
				out = "above " + nm(lengths[len(lengths)-1]*1e-9)
			case *c <= lengths[0]:
				out = "at most " + nm(lengths[0]*1e-9)
			default:
				out = "≈ " + nm(*c*1e-9)
			}
		}
	}
	if err != nil {
		if e, ok := scenario.AsError(err); !ok || e.Code == scenario.Canceled {
			return "", err
		}
		// Not cached: a lighter load or a later build may manage it.
		return "see the Sweep page", nil
	}
	crossovers.Add(key, out)
	return out, nil
}

// nm formats a length in nanometres to three significant digits, "22.8nm".
func nm(lengthM float64) string {
	return strconv.FormatFloat(lengthM*1e9, 'g', 3, 64) + "nm"
}

// atFermi returns N(E_F) and M(E_F) for the scenario's own boundary
// conditions. Run evaluates the point values at E_F unless the scenario
// asks for other energies (at); then the lean Observe path supplies them.
func (a *App) atFermi(ctx context.Context, s scenario.Scenario, res *scenario.Result) (states, modes float64, err error) {
	for _, p := range res.At {
		if p.EnergyEV == res.EFEV {
			return p.States["scenario"], p.Modes["scenario"], nil
		}
	}
	pt, err := scenario.Observe(ctx, s)
	if err != nil {
		return 0, 0, err
	}
	return pt.States["scenario"], pt.Modes["scenario"], nil
}

// scenarioLabel is the legend text of scenario i: its number and a brief
// description, "1: GaAs 6nm box×box×open" (lengths as "6×8nm" when they
// differ). It must stay short: a long legend finds no free corner and is
// put beside the plot, which narrows the data area.
func scenarioLabel(i int, s scenario.Scenario) string {
	name, _, _ := strings.Cut(s.Material.Name, " (")
	lengths := make([]string, s.Dims)
	bcs := make([]string, s.Dims)
	same := true
	for k := range s.Dims {
		lengths[k] = phys.FormatLength(s.LengthM[k])
		bcs[k] = s.BC[k].String()
		same = same && lengths[k] == lengths[0]
	}
	size := strings.Join(lengths, "×")
	if same {
		size = lengths[0]
	}
	return strconv.Itoa(i+1) + ": " + name + " " + size + " " + strings.Join(bcs, "×")
}

// scenarioDescription is the longer text of the numbered list under the
// table: the material's full name and each axis.
func scenarioDescription(s scenario.Scenario) string {
	return s.Material.Name + ", " + geometry(s)
}

// geometry is the axes of s with their lengths and boundary conditions.
func geometry(s scenario.Scenario) string {
	parts := make([]string, s.Dims)
	for i := range parts {
		parts[i] = phys.FormatLength(s.LengthM[i]) + " " + s.BC[i].String()
	}
	return strings.Join(parts, " × ")
}

// formatCount shows a count: whole numbers as integers (an exact staircase
// counts states one by one), anything else to four significant digits.
func formatCount(v float64) string {
	if v == math.Trunc(v) && math.Abs(v) < 1e15 {
		return strconv.FormatFloat(v, 'f', 0, 64)
	}
	return sci(v)
}

// sci formats v to three significant digits, as 8.47×10²² beyond the
// range where plain digits read easily.
func sci(v float64) string {
	if v == 0 || (math.Abs(v) >= 1e-3 && math.Abs(v) < 1e5) {
		return strconv.FormatFloat(v, 'g', 3, 64)
	}
	m, e, _ := strings.Cut(strconv.FormatFloat(v, 'e', 2, 64), "e")
	n, _ := strconv.Atoi(e)
	return m + "×10" + supDigits.Replace(strconv.Itoa(n))
}

// compareTitle is a figure's heading on the page.
func compareTitle(kind plotKind) string {
	switch kind {
	case plotStates:
		return "N(E): states at or below E"
	case plotDOS:
		return "D(E): density of states"
	default:
		return "M(E): conduction modes"
	}
}

// comparePlot answers /compare/plot/{kind}.{format}.
func (a *App) comparePlot(kind plotKind, format string) handler {
	return func(w http.ResponseWriter, r *http.Request) error {
		ss, err := parseComparison(r.URL.Query()[compareParam])
		if err != nil {
			return err
		}
		if len(ss) == 0 {
			return scenario.Errorf(compareParam, "no scenario to plot; add s=<scenario query>")
		}
		ctx := r.Context()
		key := "compare/plot/" + string(kind) + "." + format + "?" + compareQuery(canonicals(ss))
		p, err := a.renderFigure(key, format, func() (figure.Figure, error) {
			res, err := a.runAll(ctx, ss)
			if err != nil {
				return figure.Figure{}, err
			}
			return compareFigure(kind, ss, res), nil
		})
		if err != nil {
			if errors.Is(err, figure.ErrNoData) || errors.Is(err, figure.ErrNonFinite) {
				return &StatusError{Status: http.StatusUnprocessableEntity, Msg: "these scenarios give no drawable curve: " + err.Error()}
			}
			return err
		}
		if format == "png" {
			w.Header().Set("Content-Disposition", `inline; filename="ringbox-compare-`+string(kind)+`.png"`)
		}
		writeFigure(w, r, p)
		return nil
	}
}

// compareFigure overlays the scenario's own curve of each result, one
// series per scenario coloured by its position (figure.RoleOther with
// Index), named by scenarioLabel.
//
// Counts get a log y axis when the drawn values span more than logSpan:
// scenarios of different sizes easily differ by decades, and on a linear
// axis the smaller ones would lie flat on it.
func compareFigure(kind plotKind, ss []scenario.Scenario, res []*scenario.Result) figure.Figure {
	f := figure.Figure{XLabel: "energy E (eV)", WidthIn: plotWidthIn, HeightIn: plotHeightIn,
		Title: compareTitle(kind), Caption: "each scenario with its own boundary conditions; idealised model"}
	switch kind {
	case plotStates:
		f.YLabel = "states N(E)"
	case plotDOS:
		f.YLabel = "D(E) (states/eV)"
	case plotModes:
		f.YLabel = "modes M(E)"
	default:
		panic("web: unknown plot kind " + string(kind))
	}
	ys := make([][]float64, len(res))
	for i, r := range res {
		switch kind {
		case plotStates:
			ys[i] = r.Curves.States["scenario"]
		case plotDOS:
			ys[i] = r.Curves.DOS["scenario"]
		default:
			ys[i] = r.Curves.Modes["scenario"]
		}
	}
	if kind != plotDOS {
		hi, lo := 0.0, math.Inf(1)
		for _, y := range ys {
			for _, v := range y {
				if v >= countFloor {
					hi, lo = math.Max(hi, v), math.Min(lo, v)
				}
			}
		}
		f.LogY = hi > 0 && hi/lo > logSpan
	}
	for i, r := range res {
		y := ys[i]
		if f.LogY {
			// The result's curves are shared: copy before flooring.
			y = slices.Clone(y)
			for j, v := range y {
				if v < countFloor {
					y[j] = 0
				}
			}
		}
		f.Series = append(f.Series, figure.Series{Name: scenarioLabel(i, ss[i]), X: r.Curves.EnergyEV, Y: y,
			Kind: compareLook(kind, ss[i], r), Role: figure.RoleOther, Index: i})
	}
	return f
}

// compareLook draws exact counts of a fully confined conductor (N) or of
// one whose transverse axes are all confined (M) as the staircases they
// are, and everything else as lines.
func compareLook(kind plotKind, s scenario.Scenario, r *scenario.Result) figure.Kind {
	c := s.Conductor()
	switch {
	case kind == plotStates && r.Method == "exact" && c.Confined():
		return figure.Staircase
	case kind == plotModes && r.ModesMethod == "exact" && c.Transverse(s.Along).Confined():
		return figure.Staircase
	}
	return figure.Line
}

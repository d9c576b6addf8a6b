package web

import (
	"context"
	"fmt"
	"io"
	"math"
	"net/http"
	"net/url"
	"slices"
	"strings"
	"time"

	"github.com/a-h/templ"
	"github.com/go-chi/chi/v5"

	"ringbox/internal/figure"
	"ringbox/internal/phys"
	"ringbox/internal/scenario"
	"ringbox/web/views"
)

// The size sweep: the page GET /sweep?KEY=VALUE&… (the scenario keys plus
// sweep, from, to, steps, quantity, tol), its two figures against size at
// /sweep/plot/{values,deviation}.{svg,png}, the CSV at /export/sweep.csv
// and the JSON at /api/v1/sweep, the same document as `ringbox sweep
// --format json`.
//
// A sweep not yet in the cache is streamed: the page head and the form go
// out at once, then a line of progress grows as sizes finish, then the
// result. It needs no script (the content security policy forbids inline
// code), and the request's context stops the sweep's workers when the
// client goes away or the deadline passes.

func init() {
	addRoutes(func(a *App, r chi.Router) {
		r.Get("/sweep", a.handle(a.sweepPage))
		r.Get("/api/v1/sweep", a.handle(a.sweepAPI))
		r.Get("/export/sweep.csv", a.handle(a.sweepCSV))
		for _, k := range sweepPlotKinds {
			r.Get("/sweep/plot/"+k+".svg", a.handle(a.sweepPlot(k, "svg")))
			r.Get("/sweep/plot/"+k+".png", a.handle(a.sweepPlot(k, "png")))
		}
	})
}

// sweepEntries bounds the finished sweeps kept: one of 200 steps is about
// 20 kB, so the cache stays under a megabyte.
const sweepEntries = 48

// sweeps keeps finished sweeps by canonical query; concurrent misses on one
// key share a single run. Results depend on the query alone, so Apps may
// share them.
var sweeps = newResultCache[*scenario.SweepResult](sweepEntries)

// runSweep is scenario.RunSweep; tests replace it to watch the workers.
var runSweep = scenario.RunSweep

// sweepResult returns the finished sweep of sw from the cache, or runs it
// under ctx. progress, if not nil, follows the run of this caller; a caller
// that joins a run already going gets no progress. Errors are not kept.
func (a *App) sweepResult(ctx context.Context, sw scenario.Sweep, progress func(done, total int)) (*scenario.SweepResult, error) {
	return sweeps.get(sw.Canonical(), func() (*scenario.SweepResult, error) {
		return runSweep(ctx, sw, progress)
	})
}

// sweepAPI answers /api/v1/sweep.
func (a *App) sweepAPI(w http.ResponseWriter, r *http.Request) error {
	sw, err := scenario.ParseSweep(r.URL.Query())
	if err != nil {
		return err
	}
	ctx := r.Context()
	return a.serveJSON(w, r, "api/v1/sweep?"+sw.Canonical(), func() (any, error) {
		return a.sweepResult(ctx, sw, nil)
	})
}

// sweepCSV answers /export/sweep.csv.
func (a *App) sweepCSV(w http.ResponseWriter, r *http.Request) error {
	sw, err := scenario.ParseSweep(r.URL.Query())
	if err != nil {
		return err
	}
	ctx := r.Context()
	return a.serveCSV(w, r, "export/sweep.csv?"+sw.Canonical(), "ringbox-sweep.csv", func() (csvWriter, error) {
		return a.sweepResult(ctx, sw, nil)
	})
}

// The two figures of a sweep.
const (
	sweepValues    = "values"
	sweepDeviation = "deviation"
)

var sweepPlotKinds = []string{sweepValues, sweepDeviation}

// sweepPlotKey is the render-cache key (and, with a leading slash, the URL)
// of one figure of sw.
func sweepPlotKey(kind, format string, sw scenario.Sweep) string {
	return "sweep/plot/" + kind + "." + format + "?" + sw.Canonical()
}

// sweepPlot answers /sweep/plot/{kind}.{format}.
func (a *App) sweepPlot(kind, format string) handler {
	return func(w http.ResponseWriter, r *http.Request) error {
		sw, err := scenario.ParseSweep(r.URL.Query())
		if err != nil {
			return err
		}
		res, err := a.sweepResult(r.Context(), sw, nil)
		if err != nil {
			return err
		}
		p, err := a.sweepFigureImage(kind, format, res)
		if err != nil {
			return err
		}
		writeFigure(w, r, p)
		return nil
	}
}

// sweepFigureImage returns one figure of res as format (with its frame for
// an SVG), from the render cache or drawn now (drawing is cheap next to
// the sweep).
func (a *App) sweepFigureImage(kind, format string, res *scenario.SweepResult) (svgPlot, error) {
	return a.renderFigure(sweepPlotKey(kind, format, res.Spec()), format, func() (figure.Figure, error) {
		return sweepFigure(kind, res), nil
	})
}

// quantityLabel names each swept quantity on axes and in tables.
var quantityLabel = map[string]string{
	"density":     "carrier density n",
	"modes":       "modes M(E_F)",
	"conductance": "conductance G",
	"states":      "states N(E_F)",
}

// sweepFigure draws the values against size (log x; log y when they span
// more than logSpan) or |relative deviation| against size (log–log) with
// the tolerance as a rule. Variants with equal values are drawn once and
// named together, as on the conductor page; undefined deviations (NaN)
// and zeros, which a log axis cannot show, are left out.
func sweepFigure(kind string, res *scenario.SweepResult) figure.Figure {
	sw := res.Spec()
	xl := "swept length " + res.Sweep + " (nm)"
	if res.Sweep == "all" {
		xl = "largest confined length (nm)"
	}
	f := figure.Figure{XLabel: xl, LogX: true, WidthIn: plotWidthIn, HeightIn: plotHeightIn}
	type curve struct {
		names []string
		y     []float64
	}
	var curves []curve
	add := func(name string, y []float64) {
		for i := range curves {
			if slices.Equal(curves[i].y, y) {
				curves[i].names = append(curves[i].names, name)
				return
			}
		}
		curves = append(curves, curve{names: []string{name}, y: y})
	}
	unit := unitText(res.Unit)
	switch kind {
	case sweepValues:
		f.Title = quantityLabel[res.Quantity] + " against size"
		f.YLabel = quantityLabel[res.Quantity]
		if res.Unit != "count" {
			f.YLabel += " (" + unit + ")"
		}
		for _, name := range scenario.Variants {
			add(name, res.Values(name))
		}
		hi, lo := 0.0, math.Inf(1)
		for _, name := range scenario.Variants {
			for _, v := range res.Values(name) {
				if v > 0 {
					hi, lo = math.Max(hi, v), math.Min(lo, v)
				}
			}
		}
		f.LogY = hi > 0 && hi/lo > logSpan
	case sweepDeviation:
		f.Title = "|relative deviation| from the continuum"
		f.YLabel = "|(variant − continuum) / continuum|"
		f.LogY = true
		for _, name := range scenario.Compared {
			y := make([]float64, len(res.LengthsNM))
			for i := range y {
				y[i] = math.Abs(res.Deviation(name, i))
			}
			add(name, y)
		}
	default:
		panic("web: unknown sweep figure " + kind)
	}
	for _, cv := range curves {
		var xs, ys []float64
		for i, v := range cv.y {
			if math.IsNaN(v) || math.IsInf(v, 0) || (f.LogY && v <= 0) {
				continue
			}
			xs, ys = append(xs, res.LengthsNM[i]), append(ys, v)
		}
		if len(xs) == 0 {
			continue
		}
		name := cv.names[0]
		if len(cv.names) > 1 {
			name += " (= " + strings.Join(cv.names[1:], " = ") + ")"
		}
		f.Series = append(f.Series, figure.Series{Name: name, X: xs, Y: ys, Kind: figure.Line, Role: variantRole[cv.names[0]]})
	}
	if kind == sweepDeviation {
		ls := res.LengthsNM
		f.Series = append(f.Series, figure.Series{Name: fmt.Sprintf("tol = %g", res.Tol),
			X: []float64{ls[0], ls[len(ls)-1]}, Y: []float64{res.Tol, res.Tol}, Kind: figure.Line, Role: figure.RoleOther, Index: 7})
	}
	f.Caption = fmt.Sprintf("%s; %s at E_F, T = %g K; idealised model", sw.Scenario.Material.ID, res.Quantity, res.TempK)
	if slices.Contains(res.Method, "asymptotic") {
		f.Caption += "; some sizes asymptotic"
	}
	return f
}

// sweepPage answers /sweep: the form alone for an empty query, the form
// with the error beside its field for a bad one (400, or 422 when the
// work is too large), the whole page at once for a cached sweep, and a
// streamed page for one that must be computed.
func (a *App) sweepPage(w http.ResponseWriter, r *http.Request) error {
	q := r.URL.Query()
	page := views.Sweep{}
	sw, err := scenario.ParseSweep(q)
	page.Sets, page.Hidden = sweepFormFields(q)
	if len(q) == 0 {
		return render(w, r, http.StatusOK, views.Page("Size sweep", views.NavSweep, views.SweepPage(page, nil)))
	}
	if err != nil {
		e, status, ok := inputError(err)
		if !ok {
			return err
		}
		page.ErrorKey, page.ErrorMsg = e.Key, e.Msg
		page.FieldLess = true
		for _, set := range page.Sets {
			for i := range set.Fields {
				if f := &set.Fields[i]; f.Key == e.Key {
					f.Error = e.Msg
					page.FieldLess = false
				}
			}
		}
		return render(w, r, status, views.Page("Size sweep", views.NavSweep, views.SweepPage(page, nil)))
	}
	title := "Sweep: " + sw.Scenario.Material.ID
	if res, ok := sweeps.lru.Get(sw.Canonical()); ok {
		v, err := a.sweepView(res)
		if err != nil {
			return err
		}
		return render(w, r, http.StatusOK, views.Page(title, views.NavSweep, views.SweepPage(page, v)))
	}
	if r.Method == http.MethodHead {
		w.Header().Set("Content-Type", "text/html; charset=utf-8")
		w.WriteHeader(http.StatusOK)
		return nil
	}
	return a.streamSweep(w, r, title, page, sw)
}

// progressChunks is how many progress marks a streamed sweep writes at
// most: enough to see it move, few enough to keep the line short.
const progressChunks = 20

// streamSweep writes the page while the sweep runs. Once the first byte is
// out the status is 200 whatever happens, so a sweep that stops (client
// gone, deadline) ends the page with a message instead of an error page;
// render's rule of complete bodies is waived here on purpose, as progress
// is the point.
func (a *App) streamSweep(w http.ResponseWriter, r *http.Request, title string, page views.Sweep, sw scenario.Sweep) error {
	rc := http.NewResponseController(w)
	out := flushWriter{w: w, rc: rc}
	h := w.Header()
	h.Set("Content-Type", "text/html; charset=utf-8")
	// Proxies that buffer would hold the progress back.
	h.Set("X-Accel-Buffering", "no")
	h.Set("Cache-Control", "no-store")
	ctx := r.Context()
	body := templ.ComponentFunc(func(ctx context.Context, bw io.Writer) error {
		if err := views.SweepForm(page).Render(ctx, bw); err != nil {
			return err
		}
		flush := func() {
			if f, ok := bw.(interface{ Flush() error }); ok {
				_ = f.Flush()
			}
		}
		fmt.Fprintf(bw, `<p class="note sweep-progress" id="sweep-progress" role="status">Counting %d sizes: `, sw.Steps)
		flush()
		start := time.Now()
		last := 0
		res, err := a.sweepResult(ctx, sw, func(done, total int) {
			if done*progressChunks/total > last*progressChunks/total || done == total {
				last = done
				fmt.Fprintf(bw, "<span>%d/%d</span> ", done, total)
				flush()
			}
		})
		if err != nil {
			io.WriteString(bw, "stopped.</p>")
			_, msg, _ := classify(r, err)
			if e, ok := scenario.AsError(err); ok && e.Code != scenario.Canceled {
				msg = e.Error()
			}
			a.log.Debug("sweep stopped", "err", err)
			return views.SweepStopped("The sweep did not finish: "+msg).Render(ctx, bw)
		}
		fmt.Fprintf(bw, "done in %s.</p>", time.Since(start).Round(10*time.Millisecond))
		v, err := a.sweepView(res)
		if err != nil {
			return err
		}
		return views.SweepResults(*v).Render(ctx, bw)
	})
	w.WriteHeader(http.StatusOK)
	if err := views.Page(title, views.NavSweep, body).Render(ctx, out); err != nil {
		// Nothing can be answered now; the log says why the page is short.
		a.log.Warn("sweep page cut short", "err", err)
	}
	return nil
}

// flushWriter hands templ's buffer an http.Flusher that reaches through
// the middleware's wrappers (http.ResponseController unwraps them).
type flushWriter struct {
	w  http.ResponseWriter
	rc *http.ResponseController
}

func (f flushWriter) Write(p []byte) (int, error) { return f.w.Write(p) }
func (f flushWriter) Flush()                      { _ = f.rc.Flush() }

// sweepView formats a finished sweep for the page, drawing its two SVG
// figures now so that their frames (for the readout) are known and the
// browser's requests for them hit the cache.
func (a *App) sweepView(res *scenario.SweepResult) (*views.SweepResult, error) {
	sw := res.Spec()
	canon := sw.Canonical()
	s := sw.Scenario
	against := res.Sweep
	if sw.Axis == scenario.SweepAll {
		against = "the confined lengths"
	}
	v := &views.SweepResult{
		Heading: fmt.Sprintf("%s: %s against %s, %s to %s", s.Material.Name, quantityLabel[res.Quantity],
			against, phys.FormatLength(sw.FromM), phys.FormatLength(sw.ToM)),
		Link: "/sweep?" + canon,
		CSV:  "/export/sweep.csv?" + canon,
		JSON: "/api/v1/sweep?" + canon,
	}
	last := len(res.LengthsNM) - 1
	for _, name := range scenario.Compared {
		c := views.Card{Label: "crossover, " + name}
		if x := res.CrossoverNM[name]; x != nil {
			c.Value, c.Unit = plainText(*x, 4), "nm"
			c.Note = fmt.Sprintf("within %s of the continuum from here to %s nm", pct(res.Tol), plainText(res.LengthsNM[last], 4))
		} else {
			c.Value = "none"
			c.Note = fmt.Sprintf("still %s off at %s nm (tolerance %s)", pct(math.Abs(res.Deviation(name, last))), plainText(res.LengthsNM[last], 4), pct(res.Tol))
		}
		v.Cards = append(v.Cards, c)
	}
	unit := unitText(res.Unit)
	if res.Unit == "count" {
		unit = ""
	}
	v.Cards = append(v.Cards, views.Card{Label: "continuum at " + plainText(res.LengthsNM[last], 4) + " nm",
		Value: sciText(res.Continuum[last], 4), Unit: unit, Note: quantityLabel[res.Quantity] + fmt.Sprintf(", T = %g K", res.TempK)})

	alts := map[string]string{
		sweepValues:    "The swept quantity against size for the scenario, box, ring and continuum",
		sweepDeviation: "Absolute relative deviation from the continuum against size, with the tolerance",
	}
	caps := map[string]string{
		sweepValues:    quantityLabel[res.Quantity] + " at each size.",
		sweepDeviation: "|relative deviation| from the continuum; the rule is the tolerance.",
	}
	for _, k := range sweepPlotKinds {
		p, err := a.sweepFigureImage(k, "svg", res)
		if err != nil {
			return nil, err
		}
		v.Plots = append(v.Plots, views.Plot{ID: "plot-sweep-" + k, Src: "/" + sweepPlotKey(k, "svg", sw),
			PNG: "/" + sweepPlotKey(k, "png", sw), Alt: alts[k], Caption: caps[k], Frame: frameAttr(p.frame)})
	}

	t := views.Table{ID: "sweep-table", Caption: fmt.Sprintf("%s and relative deviation from the continuum, T = %g K",
		quantityLabel[res.Quantity], res.TempK)}
	t.Head = append(t.Head, views.HeadCell{Text: res.Sweep, Unit: "nm", Num: true})
	for _, name := range scenario.Variants {
		t.Head = append(t.Head, views.HeadCell{Text: name, Unit: unit, Num: true})
	}
	for _, name := range scenario.Compared {
		t.Head = append(t.Head, views.HeadCell{Text: "dev. " + name, Num: true})
	}
	t.Head = append(t.Head, views.HeadCell{Text: "E_F", Unit: "eV", Num: true}, views.HeadCell{Text: "method"})
	for i, l := range res.LengthsNM {
		row := []views.Cell{{Text: plainText(l, 4), Num: true}}
		for _, name := range scenario.Variants {
			row = append(row, views.Cell{Text: countText(res.Values(name)[i], 5), Num: true})
		}
		for _, name := range scenario.Compared {
			row = append(row, views.Cell{Text: signedPct(res.Deviation(name, i)), Num: true})
		}
		row = append(row, views.Cell{Text: plainText(res.EFEV[i], 5), Num: true}, views.Cell{Text: res.Method[i]})
		t.Rows = append(t.Rows, row)
	}
	v.Table = t
	v.Notes = append(v.Notes, res.Notes...)
	v.Notes = append(v.Notes, "The crossover is the smallest swept size from which the deviation stays within the tolerance at every larger swept size; "+
		"between grid points it is not resolved, so refine the grid around it before relying on it. "+
		"Design decisions rest on full device simulation, measurement and your own design rules.")
	return v, nil
}

// pct writes a fraction as a percentage with three significant digits.
func pct(x float64) string {
	if math.IsNaN(x) {
		return "—"
	}
	return plainText(100*x, 3) + " %"
}

// signedPct is pct with its sign.
func signedPct(x float64) string {
	if math.IsNaN(x) {
		return "—"
	}
	if x == 0 {
		return "0 %"
	}
	return fmt.Sprintf("%+.3g %%", 100*x)
}

// sweepFormFields builds the form: the conductor page's scenario fields
// without the energy grid (a sweep reads E_F only), then the sweep's own.
// Keys given in the query that no field shows travel as hidden fields.
func sweepFormFields(q url.Values) ([]views.FieldSet, []views.Field) {
	sq, wq := scenario.SplitSweep(q)
	delete(sq, "at")
	delete(sq, "points")
	s, err := scenario.Parse(sq)
	sets, hidden := formFields(sq, s, err == nil)
	var out []views.FieldSet
	shown := map[string]bool{}
	for _, set := range sets {
		if set.ID == "set-energy" {
			continue
		}
		set.Fields = slices.DeleteFunc(slices.Clone(set.Fields), func(f views.Field) bool { return f.Key == "at" })
		for _, f := range set.Fields {
			shown[f.Key] = true
		}
		out = append(out, set)
	}
	get := func(k string) string { return strings.TrimSpace(wq.Get(k)) }
	val := func(k, def string) string {
		if v := get(k); v != "" {
			return v
		}
		return def
	}
	opt := func(v, label string) views.Option { return views.Option{Value: v, Label: label} }
	sweepSel := views.Field{Key: "sweep", Label: "sweep", Value: strings.ToLower(val("sweep", "all")), Options: []views.Option{
		opt("all", "all"), opt("lx", "lx"), opt("ly", "ly"), opt("lz", "lz")}}
	qty := views.Field{Key: "quantity", Label: "quantity", Value: strings.ToLower(val("quantity", "density"))}
	for _, k := range scenario.Quantities {
		qty.Options = append(qty.Options, opt(k, k))
	}
	for _, f := range []*views.Field{&sweepSel, &qty} {
		if !slices.ContainsFunc(f.Options, func(o views.Option) bool { return o.Value == f.Value }) {
			f.Options = append(f.Options, views.Option{Value: f.Value, Label: f.Value + " (not valid)"})
		}
	}
	out = append(out, views.FieldSet{ID: "set-sweep", Legend: "Sweep", Note: "log-spaced sizes; with all, from and to give the largest confined length",
		Fields: []views.Field{
			sweepSel,
			{Key: "from", Label: "from", Value: val("from", "2nm")},
			{Key: "to", Label: "to", Value: val("to", "100nm")},
			{Key: "steps", Label: "steps", Value: val("steps", fmt.Sprint(scenario.DefaultSweepSteps)), Hint: "2 to 200"},
			qty,
			{Key: "tol", Label: "tolerance", Value: val("tol", fmt.Sprint(scenario.DefaultSweepTol)), Hint: "relative, e.g. 0.05"},
		}})
	for _, k := range []string{"emin", "emax", "eta", "shape"} {
		if v := strings.TrimSpace(sq.Get(k)); v != "" && !shown[k] {
			hidden = append(hidden, views.Field{Key: k, Value: v})
		}
	}
	return out, hidden
}

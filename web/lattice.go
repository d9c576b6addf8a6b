package web

import (
	"context"
	"fmt"
	"math"
	"net/http"
	"net/url"
	"slices"
	"strconv"
	"strings"

	"github.com/go-chi/chi/v5"

	"ringbox/internal/figure"
	"ringbox/internal/lattice"
	"ringbox/internal/phys"
	"ringbox/internal/scenario"
	"ringbox/web/views"
)

// The lattice section: graphene ribbons and nanotubes in nearest-neighbour
// tight binding (internal/lattice through scenario.ParseLattice and
// RunLattice).
//
//	GET /api/v1/lattice?…              the JSON of RunLattice, as `ringbox lattice --format json`
//	GET /lattice?…                     the page: form, summary beside the partner, four figures
//	GET /lattice/plot/{kind}.svg|png   kind: bands, dos, modes, family
//
// Bad input is a 400 naming the key: JSON {"error", "key"} from the API,
// the form again with the message beside its field from the page.

// latticePlotKind names one lattice figure; it is also its file name in the
// route, /lattice/plot/{kind}.svg.
type latticePlotKind string

const (
	latticeBands  latticePlotKind = "bands"
	latticeDOS    latticePlotKind = "dos"
	latticeModes  latticePlotKind = "modes"
	latticeFamily latticePlotKind = "family"
)

// latticePlotKinds are the figures in the order the page shows them.
var latticePlotKinds = []latticePlotKind{latticeBands, latticeDOS, latticeModes, latticeFamily}

// Figure size: the size of the conductor page's figures (one of three
// columns on a laptop screen, 12 pt labels near their own size); PNGs are
// drawn at plotPNGDPI like every figure.
const (
	latticePlotWidthIn  = 5.6
	latticePlotHeightIn = 4.2
)

func init() {
	addRoutes(func(a *App, r chi.Router) {
		r.Get("/api/v1/lattice", a.handle(a.latticeAPI))
		r.Get("/lattice", a.handle(a.latticePage))
		for _, k := range latticePlotKinds {
			r.Get("/lattice/plot/"+string(k)+".svg", a.handle(a.latticePlotHandler(k, "svg")))
			r.Get("/lattice/plot/"+string(k)+".png", a.handle(a.latticePlotHandler(k, "png")))
		}
	})
}

// ---- results ----

// latticeEntries bounds the results kept. A result at the default grids
// (80 bands × 401 k points, 600 bins) is about 0.3 MB; at the largest k
// grid about 3 MB.
const latticeEntries = 16

// latticeResults keeps recent results by canonical query, so that a page,
// its four figures and the partner's, asked for at once, compute each
// structure once. Results depend on the request alone, so Apps share them.
var latticeResults = newResultCache[*lattice.Result](latticeEntries)

// latticeResult returns the result of req, from the cache or by running it
// under ctx. Concurrent callers for one request share one run; errors are
// not kept. The result is shared: callers must not modify it.
func latticeResult(ctx context.Context, req scenario.LatticeRequest) (*lattice.Result, error) {
	return latticeResults.get(req.Canonical(), func() (*lattice.Result, error) {
		res, err := scenario.RunLattice(ctx, req)
		if err != nil {
			return nil, err
		}
		return &res, nil
	})
}

// latticePartner returns the full result of req's partner (the rolled-up
// or unrolled counterpart, with the same model, grids, E_F and T; see
// lattice.PartnerParams) and its request, or nil when there is none or it
// is outside the bounds. Result.Partner holds only its summary; the page
// needs its curves to overlay them.
func latticePartner(ctx context.Context, req scenario.LatticeRequest) (*lattice.Result, *scenario.LatticeRequest, error) {
	q, _, _, ok := lattice.PartnerParams(req.Params)
	if !ok || q.Validate() != nil {
		return nil, nil, nil
	}
	preq := scenario.LatticeRequest{Params: q}
	res, err := latticeResult(ctx, preq)
	if err != nil {
		if e, ok := scenario.AsError(err); ok && e.Code != scenario.Canceled {
			return nil, nil, nil // over a budget: shown without its curves
		}
		return nil, nil, err
	}
	return res, &preq, nil
}

// ---- API ----

// latticeAPI answers /api/v1/lattice with the JSON of RunLattice.
func (a *App) latticeAPI(w http.ResponseWriter, r *http.Request) error {
	req, err := scenario.ParseLattice(r.URL.Query())
	if err != nil {
		return err
	}
	ctx := r.Context()
	return a.serveJSON(w, r, "api/v1/lattice?"+req.Canonical(), func() (any, error) {
		return latticeResult(ctx, req)
	})
}

// ---- figures ----

// latticePlotHandler answers /lattice/plot/{kind}.{format}.
func (a *App) latticePlotHandler(kind latticePlotKind, format string) handler {
	return func(w http.ResponseWriter, r *http.Request) error {
		req, err := scenario.ParseLattice(r.URL.Query())
		if err != nil {
			return err
		}
		p, err := a.latticeFigureImage(r.Context(), kind, format, req)
		if err != nil {
			return err
		}
		writeFigure(w, r, p)
		return nil
	}
}

// latticePlotKey is the render-cache key of one figure of req.
func latticePlotKey(kind latticePlotKind, format string, req scenario.LatticeRequest) string {
	return "lattice/plot/" + string(kind) + "." + format + "?" + req.Canonical()
}

// latticePlotPath is the figure's URL, as the page links it.
func latticePlotPath(kind latticePlotKind, format string, req scenario.LatticeRequest) string {
	return "/" + latticePlotKey(kind, format, req)
}

// latticeFigureImage returns the figure kind of req as format (with its
// frame for an SVG), computing and drawing on a miss of the caches.
func (a *App) latticeFigureImage(ctx context.Context, kind latticePlotKind, format string, req scenario.LatticeRequest) (svgPlot, error) {
	return a.renderFigure(latticePlotKey(kind, format, req), format, func() (figure.Figure, error) {
		return latticeFigureFor(ctx, kind, req)
	})
}

// latticeFigureFor computes what kind needs and builds the figure.
func latticeFigureFor(ctx context.Context, kind latticePlotKind, req scenario.LatticeRequest) (figure.Figure, error) {
	res, err := latticeResult(ctx, req)
	if err != nil {
		return figure.Figure{}, err
	}
	var partner *lattice.Result
	if kind == latticeDOS || kind == latticeModes {
		if partner, _, err = latticePartner(ctx, req); err != nil {
			return figure.Figure{}, err
		}
	}
	return latticeFigure(kind, res, partner), nil
}

// latticeFigure builds one figure of res; partner (nil when there is none)
// is overlaid on D(E) and M(E).
//
// Roles: the requested structure is drawn bold (RoleScenario); its
// partner in the colour of what it is, RoleRing for a tube (a periodic
// circumference) and RoleBox for a ribbon (hard edges), the same colours
// as ring and box on the conductor page.
func latticeFigure(kind latticePlotKind, res, partner *lattice.Result) figure.Figure {
	f := figure.Figure{WidthIn: latticePlotWidthIn, HeightIn: latticePlotHeightIn}
	this := latticeShortName(res.Structure, res.Lines, res.N, res.M)
	switch kind {
	case latticeBands:
		latticeBandsFigure(&f, res)
	case latticeDOS, latticeModes:
		c := res.Curves
		y := make([]float64, len(c.EnergyEV))
		f.XLabel = "energy E (eV)"
		if kind == latticeDOS {
			f.Title = "D(E): density of states per length"
			f.YLabel = "D(E) (states/(eV·nm))"
			copy(y, c.DOS)
		} else {
			f.Title = "M(E): conduction modes"
			f.YLabel = "modes M(E)"
			for i, m := range c.Modes {
				y[i] = float64(m)
			}
		}
		look := figure.Line
		if kind == latticeModes {
			look = figure.Staircase
		}
		f.Series = append(f.Series, figure.Series{Name: this, X: c.EnergyEV, Y: y, Kind: look, Role: figure.RoleScenario})
		if partner != nil {
			py := make([]float64, len(partner.Curves.EnergyEV))
			if kind == latticeDOS {
				copy(py, partner.Curves.DOS)
			} else {
				for i, m := range partner.Curves.Modes {
					py[i] = float64(m)
				}
			}
			role := figure.RoleBox
			if partner.Structure == lattice.Tube {
				role = figure.RoleRing
			}
			f.Series = append(f.Series, figure.Series{
				Name: "partner " + latticePartnerLegend(partner),
				X:    partner.Curves.EnergyEV, Y: py, Kind: look, Role: role})
		}
		if kind == latticeDOS {
			if cap := latticeClipDOS(f.Series); cap > 0 {
				f.Caption = fmt.Sprintf("peaks clipped at %.3g; ", cap)
			}
		}
		// E_F as one marker on the energy axis: a full-height rule would
		// cut through the legend's corner.
		if c0 := c.EnergyEV; len(c0) > 0 && res.EFEV >= c0[0]-c.BinEV && res.EFEV <= c0[len(c0)-1]+c.BinEV {
			f.Series = append(f.Series, figure.Series{Name: "E_F", X: []float64{res.EFEV}, Y: []float64{0},
				Kind: figure.Markers, Role: figure.RoleOther, Index: 7})
		}
		f.Caption += this + "; spin included; " + latticeModelCaption(res)
	case latticeFamily:
		latticeFamilyFigure(&f, res)
	default:
		panic("web: unknown lattice plot kind " + string(kind))
	}
	return f
}

// latticeDOSPeakFactor times the 90th percentile of the nonzero D(E)
// values is the most the D(E) axis shows. Flat bands (the E = ±γ0 bands of
// an (n, 0) tube with even n, the zigzag edge states) put nearly a δ peak
// into one bin, tens of times the van Hove peaks around it; unclipped, they
// flatten the part of D(E) one reads, near the gap, into the axis. The van
// Hove peaks of the bin averages stay under the cap.
const latticeDOSPeakFactor = 5

// latticeClipDOS clips the D(E) series in place (on copies it owns) at
// latticeDOSPeakFactor times their 90th percentile and returns the cap, or
// 0 when nothing reaches it.
func latticeClipDOS(series []figure.Series) float64 {
	var vals []float64
	for _, s := range series {
		for _, y := range s.Y {
			if y > 0 {
				vals = append(vals, y)
			}
		}
	}
	if len(vals) < 10 {
		return 0
	}
	slices.Sort(vals)
	limit := latticeDOSPeakFactor * vals[len(vals)*9/10]
	if vals[len(vals)-1] <= limit {
		return 0
	}
	limit = latticeRoundUp(limit)
	for _, s := range series {
		for i, y := range s.Y {
			s.Y[i] = math.Min(y, limit)
		}
	}
	return limit
}

// latticeRoundUp rounds x > 0 up to two significant digits, a cap that
// reads cleanly in the caption.
func latticeRoundUp(x float64) float64 {
	p := math.Pow(10, math.Floor(math.Log10(x))-1)
	return math.Ceil(x/p) * p
}

// latticeBandsFigure draws the bands inside the energy window of the
// request (emin…emax, the window of D(E) and M(E) too), all in one thin
// style, with E_F as a horizontal rule. Bands leave the window through
// points interpolated on its edge, so the axis spans the window exactly.
// When no band enters the window (a window inside a gap, or beyond the
// bandwidth ±3γ0) the whole set of plotted bands is drawn instead.
func latticeBandsFigure(f *figure.Figure, res *lattice.Result) {
	b := res.Bands
	// The window is emin…emax, the outer edges of the first and last bins,
	// rounded back to the digits the user gave.
	c := res.Curves
	lo, hi := latticeRound(c.EnergyEV[0]-c.BinEV/2), latticeRound(c.EnergyEV[len(c.EnergyEV)-1]+c.BinEV/2)
	f.Title = "E(k): π bands"
	f.XLabel = "wave number k along the axis (1/nm)"
	f.YLabel = "energy E (eV)"
	k, bands := latticeThinBands(b.KPerNM, b.EnergyEV)
	series := latticeClipBands(k, bands, lo, hi)
	// The window shows on the axis; the caption names it only when it
	// could not be used.
	var notes []string
	if len(series) == 0 {
		series = latticeClipBands(k, bands, math.Inf(-1), math.Inf(1))
		notes = append(notes, "no band enters E = "+latticeSigned(lo)+"…"+latticeSigned(hi)+" eV")
	}
	// The legend stays one word: a long entry is placed beside the plot
	// and takes its width. How many bands are drawn goes in the caption.
	if b.Shown < b.Total {
		notes = append(notes, fmt.Sprintf("%d of %d bands, those nearest E = 0", b.Shown, b.Total))
	}
	for i := range series {
		series[i].Role = figure.RoleContinuum
		series[i].Kind = figure.Line
		if i == 0 {
			series[i].Name = "bands"
		}
	}
	f.Series = series
	if k := b.KPerNM; len(k) > 1 && res.EFEV >= lo && res.EFEV <= hi {
		f.Series = append(f.Series, figure.Series{Name: "E_F",
			X: []float64{k[0], k[len(k)-1]}, Y: []float64{res.EFEV, res.EFEV},
			Kind: figure.Line, Role: figure.RoleOther, Index: 1})
	}
	x0, x1 := b.KPerNM[0], b.KPerNM[len(b.KPerNM)-1]
	f.XMin, f.XMax = &x0, &x1
	parts := append([]string{latticeShortName(res.Structure, res.Lines, res.N, res.M)}, notes...)
	f.Caption = strings.Join(append(parts, latticeModelCaption(res)), "; ")
}

// latticeSigned formats x with a true minus sign.
func latticeSigned(x float64) string {
	return strings.Replace(strconv.FormatFloat(x, 'g', 4, 64), "-", "−", 1)
}

// latticeBandPoints bounds the band samples drawn: about 14 bytes each in
// the SVG path, it keeps the band figure near 200 kB when 80 bands fill
// the window (a wide ribbon), below the 300 kB a page figure may take.
const latticeBandPoints = 12000

// latticeThinBands keeps every s-th k sample, s chosen so that the bands
// hold at most latticeBandPoints samples, always keeping k = 0 and the
// zone edges, where ribbon and zigzag-tube bands have their extrema. The
// bands are smooth in k, so at a few points' spacing the polyline still
// reads as the curve; the decimation of the figure package keeps only
// pixel columns, which for 80 overlapping curves is not enough.
func latticeThinBands(k []float64, bands [][]float64) ([]float64, [][]float64) {
	n := len(k)
	s := (len(bands)*n + latticeBandPoints - 1) / latticeBandPoints
	if s <= 1 || n < 3 {
		return k, bands
	}
	mid := n / 2
	var idx []int
	for i := range n {
		if i == 0 || i == n-1 || (i-mid)%s == 0 {
			idx = append(idx, i)
		}
	}
	pick := func(v []float64) []float64 {
		out := make([]float64, len(idx))
		for j, i := range idx {
			out[j] = v[i]
		}
		return out
	}
	thin := make([][]float64, len(bands))
	for b, e := range bands {
		thin[b] = pick(e)
	}
	return pick(k), thin
}

// latticeRound rounds x to 10 significant digits.
func latticeRound(x float64) float64 {
	y, _ := strconv.ParseFloat(strconv.FormatFloat(x, 'g', 10, 64), 64)
	return y
}

// latticeClipBands splits each band into the runs that lie inside [lo, hi],
// ending each run on the window's edge by linear interpolation between the
// samples either side.
func latticeClipBands(k []float64, bands [][]float64, lo, hi float64) []figure.Series {
	var out []figure.Series
	for _, e := range bands {
		var x, y []float64
		flush := func() {
			if len(x) > 1 {
				out = append(out, figure.Series{X: x, Y: y})
			}
			x, y = nil, nil
		}
		// edge returns where the segment from sample i−1 to i crosses the
		// window edge v.
		edge := func(i int, v float64) float64 {
			t := (v - e[i-1]) / (e[i] - e[i-1])
			return k[i-1] + t*(k[i]-k[i-1])
		}
		for i, v := range e {
			in := v >= lo && v <= hi
			if i > 0 {
				prevIn := e[i-1] >= lo && e[i-1] <= hi
				switch {
				case prevIn && !in:
					w := hi
					if v < lo {
						w = lo
					}
					x, y = append(x, edge(i, w)), append(y, w)
					flush()
				case !prevIn && in:
					w := hi
					if e[i-1] < lo {
						w = lo
					}
					x, y = append(x, edge(i, w)), append(y, w)
				case !prevIn && !in && (e[i-1] < lo) != (v < lo):
					// Crossing the whole window between two samples.
					a, b := lo, hi
					if e[i-1] > hi {
						a, b = hi, lo
					}
					x, y = append(x, edge(i, a), edge(i, b)), append(y, a, b)
					flush()
				}
			}
			if in {
				x, y = append(x, k[i]), append(y, v)
			}
		}
		flush()
	}
	return out
}

// latticeFamilyFigure draws the gap against width (ribbons) or diameter
// (tubes) of the structures around the request, one marker series per
// family (N mod 3 or (n − m) mod 3), with the request itself marked.
func latticeFamilyFigure(f *figure.Figure, res *lattice.Result) {
	v := res.FamilyView
	tube := res.Structure == lattice.Tube
	f.YLabel = "gap (eV)"
	if tube {
		f.Title = "Gap against diameter: (n, m) tubes"
		f.XLabel = "diameter d (nm)"
	} else {
		f.Title = "Gap against width: " + string(res.Structure) + " ribbons"
		f.XLabel = "width w (nm)"
	}
	var xs, ys [3][]float64
	shown := 0
	for _, p := range v.Points {
		// N = 1 and 2 are a dimer chain and a polyacene-like strip rather
		// than ribbons; N = 1's gap of 2γ0 would squash the ribbons' 1/w
		// decay into the axis.
		if p.Family < 0 || p.Family > 2 || (!tube && p.Lines < latticeFamilyMinLines) {
			continue
		}
		shown++
		xs[p.Family] = append(xs[p.Family], p.SizeNM)
		ys[p.Family] = append(ys[p.Family], p.GapEV)
	}
	for fam := range 3 {
		if len(xs[fam]) == 0 {
			continue
		}
		name := res.Structure.FamilyLabel(fam)
		// The metallic families of the model: N = 3j + 2 armchair ribbons
		// (Nakada et al. 1996) and (n − m) ≡ 0 (mod 3) tubes (Hamada et
		// al. 1992). Zigzag ribbons are all gapless.
		if (tube && fam == 0) || (res.Structure == lattice.Armchair && fam == 2) {
			name += " (metallic)"
		}
		f.Series = append(f.Series, figure.Series{Name: name, X: xs[fam], Y: ys[fam],
			Kind: figure.Markers, Role: figure.RoleOther, Index: fam + 1})
	}
	size := res.WidthNM
	if tube {
		size = res.DiameterNM
	}
	if size != nil {
		f.Series = append(f.Series, figure.Series{Name: "this structure", X: []float64{*size}, Y: []float64{res.GapEV},
			Kind: figure.Markers, Role: figure.RoleScenario})
	}
	what := fmt.Sprintf("%d ribbons, N ≥ %d", shown, latticeFamilyMinLines)
	if tube {
		what = fmt.Sprintf("%d tubes", shown)
	}
	f.Caption = what + "; " + latticeModelCaption(res)
}

// latticeFamilyMinLines is the narrowest ribbon the family figure shows.
const latticeFamilyMinLines = 3

// latticeModelCaption is the model in a few words, for a figure that
// travels without the page.
func latticeModelCaption(res *lattice.Result) string {
	return fmt.Sprintf("nearest-neighbour TB, γ0 = %g eV", res.Gamma0EV)
}

// ---- page ----

// latticeFieldSpec is one form field: its key, label, hint and, for a
// select, its options.
type latticeFieldSpec struct {
	key, label, hint string
	options          []views.LatticeOption
}

// latticeSets is the form's layout.
var latticeSets = []struct {
	id, legend string
	fields     []latticeFieldSpec
}{
	// Hints stay to a few words: a field's control column is about 6 rem.
	{"structure-set", "Structure", []latticeFieldSpec{
		{key: "structure", label: "structure", options: []views.LatticeOption{
			{Value: "armchair", Label: "armchair ribbon"},
			{Value: "zigzag", Label: "zigzag ribbon"},
			{Value: "tube", Label: "nanotube (n, m)"},
		}},
		{key: "lines", label: "N (ribbon)", hint: "dimer lines or chains"},
		{key: "n", label: "n (tube)"},
		{key: "m", label: "m (tube)", hint: "0 ≤ m ≤ n"},
	}},
	{"model-set", "Model", []latticeFieldSpec{
		{key: "gamma0", label: "γ0 (eV)", hint: "hopping"},
		{key: "acc", label: "a_cc (nm)", hint: "or 1.42A"},
		{key: "gs", label: "g_s", hint: "spin, 1 or 2"},
	}},
	{"fermi-set", "Fermi level", []latticeFieldSpec{
		{key: "ef", label: "E_F (eV)", hint: "from neutrality"},
		{key: "temp", label: "T (K)"},
		{key: "at", label: "at (eV)", hint: "comma list"},
	}},
	{"grid-set", "Grids", []latticeFieldSpec{
		{key: "emin", label: "E min (eV)"},
		{key: "emax", label: "E max (eV)"},
		{key: "points", label: "E bins"},
		{key: "kpoints", label: "k points", hint: "odd"},
	}},
}

// latticeDefaults are the form's values for keys not given: the canonical
// defaults, with n and m for a tube and lines for a ribbon.
func latticeDefaults() url.Values {
	p := lattice.DefaultParams()
	d := scenario.LatticeRequest{Params: p}.Values()
	d.Set("n", strconv.Itoa(p.N))
	d.Set("m", strconv.Itoa(p.M))
	return d
}

// latticeForm fills the form: the canonical value of each key the request
// uses, else what the user typed, else the default. With an error the
// typed values stay, so the user can correct them.
func latticeForm(q url.Values, req *scenario.LatticeRequest, errKey, errMsg string) []views.LatticeFieldSet {
	def := latticeDefaults()
	var canon url.Values
	if req != nil {
		canon = req.Values()
	}
	value := func(k string) string {
		if canon.Has(k) {
			return canon.Get(k)
		}
		for _, v := range q[k] {
			if s := strings.TrimSpace(v); s != "" {
				return s
			}
		}
		return def.Get(k)
	}
	sets := make([]views.LatticeFieldSet, 0, len(latticeSets))
	for _, s := range latticeSets {
		fs := views.LatticeFieldSet{ID: s.id, Legend: s.legend}
		for _, spec := range s.fields {
			fld := views.LatticeField{Key: spec.key, Label: spec.label, Value: value(spec.key), Hint: spec.hint, Options: spec.options}
			if spec.key == errKey {
				fld.Error = errMsg
			}
			fs.Fields = append(fs.Fields, fld)
		}
		sets = append(sets, fs)
	}
	return sets
}

// latticeFormKey reports whether key is a field of the form.
func latticeFormKey(key string) bool {
	for _, s := range latticeSets {
		for _, f := range s.fields {
			if f.key == key {
				return true
			}
		}
	}
	return false
}

// latticePage answers /lattice: the form and, for a valid request (no
// query is the default N = 7 armchair ribbon), its result. Bad input shows
// the form again with the message beside the field, status 400 (422 when
// the work asked for is over budget).
func (a *App) latticePage(w http.ResponseWriter, r *http.Request) error {
	q := r.URL.Query()
	req, err := scenario.ParseLattice(q)
	if err != nil {
		e, status, ok := inputError(err)
		if !ok {
			return err
		}
		page := views.Lattice{
			Sets:      latticeForm(q, nil, e.Key, e.Msg),
			ErrorKey:  e.Key,
			ErrorMsg:  e.Msg,
			FieldLess: !latticeFormKey(e.Key),
		}
		return render(w, r, status, views.Page("Lattice", views.NavLattice, views.LatticePage(page)))
	}
	ctx := r.Context()
	res, err := latticeResult(ctx, req)
	if err != nil {
		return err
	}
	partner, preq, err := latticePartner(ctx, req)
	if err != nil {
		return err
	}
	result := latticeResultView(res, partner, req, preq)
	for i, kind := range latticePlotKinds {
		p, err := a.latticeFigureImage(ctx, kind, "svg", req)
		if err != nil {
			return err
		}
		view := views.LatticePlot{
			ID:      "plot-" + string(kind),
			Src:     latticePlotPath(kind, "svg", req),
			PNG:     latticePlotPath(kind, "png", req),
			Alt:     latticePlotAlt[kind],
			Caption: latticePlotCaption[kind],
			Frame:   frameAttr(p.frame),
		}
		if i < 3 {
			result.Plots = append(result.Plots, view)
		} else {
			result.Family = view
		}
	}
	page := views.Lattice{Sets: latticeForm(q, &req, "", ""), Result: &result}
	return render(w, r, http.StatusOK, views.Page("Lattice", views.NavLattice, views.LatticePage(page)))
}

var latticePlotAlt = map[latticePlotKind]string{
	latticeBands:  "band structure E(k) of the structure",
	latticeDOS:    "density of states D(E) of the structure and its partner",
	latticeModes:  "conduction modes M(E) of the structure and its partner",
	latticeFamily: "gap against size for the three families",
}

var latticePlotCaption = map[latticePlotKind]string{
	latticeBands:  "Band structure E(k) in the energy window.",
	latticeDOS:    "D(E) per nm, with the partner.",
	latticeModes:  "M(E), with the partner.",
	latticeFamily: "Gap against size, by family.",
}

// latticeResultView formats a result and its partner for the page.
func latticeResultView(res, partner *lattice.Result, req scenario.LatticeRequest, preq *scenario.LatticeRequest) views.LatticeResult {
	p := res.Partner
	name := res.Name()
	v := views.LatticeResult{
		Link:        "/lattice?" + req.Canonical(),
		JSON:        "/api/v1/lattice?" + req.Canonical(),
		ThisHead:    name,
		PartnerNote: p.Note,
	}
	if res.Structure == lattice.Tube {
		v.Heading = name + " and the ribbon it unrolls to"
	} else {
		v.Heading = name + " and the tube it rolls into"
	}
	has := p.Structure != "none"
	v.PartnerHead = "no partner"
	if has {
		v.PartnerHead = "partner: " + p.Name()
		if !p.Exact {
			v.PartnerHead += " (nearest)"
		}
	}
	if preq != nil {
		v.PartnerLink = "/lattice?" + preq.Canonical()
	}
	dash := "—"
	both := func(this, other string) (string, string) {
		if !has {
			return this, dash
		}
		return this, other
	}
	row := func(id, label, unit, this, other string) {
		v.Rows = append(v.Rows, views.LatticeRow{ID: id, Label: label, Unit: unit, This: this, Partner: other})
	}
	t, o := both(latticeSize(res.WidthNM, res.DiameterNM), latticeSize(p.WidthNM, p.DiameterNM))
	row("row-size", "width or diameter", "nm", t, o)
	t, o = both(latticeEV(res.GapEV), latticeEV(p.GapEV))
	row("row-gap", "gap", "eV", t, o)
	t, o = both(latticeYesNo(res.Metallic), latticeYesNo(p.Metallic))
	row("row-metallic", "metallic", "", t, o)
	t, o = both(res.Structure.FamilyLabel(res.Family), p.Structure.FamilyLabel(p.Family))
	row("row-family", "family", "", t, o)
	t, o = both(strconv.Itoa(res.Observables.ModesAtEF), strconv.Itoa(p.ModesAtEF))
	row("row-modes", "modes at E_F", "spin included", t, o)
	t, o = both(phys.FormatSI(res.Observables.ConductanceS, "S", 4), phys.FormatSI(p.ConductanceS, "S", 4))
	row("row-g", "G at E_F", "S", t, o)
	t, o = both(latticeQuanta(res.Observables.ConductanceS), latticeQuanta(p.ConductanceS))
	row("row-g0", "G at E_F", "2e²/h", t, o)
	ptxt := func(f func(*lattice.Result) string) string {
		if partner == nil {
			return dash
		}
		return f(partner)
	}
	row("row-dos", "D at E_F", "states/(eV·nm)", fmt.Sprintf("%.4g", res.Observables.DOSAtEF),
		ptxt(func(r *lattice.Result) string { return fmt.Sprintf("%.4g", r.Observables.DOSAtEF) }))
	row("row-period", "period along the axis", "nm", fmt.Sprintf("%.4g", res.PeriodNM),
		ptxt(func(r *lattice.Result) string { return fmt.Sprintf("%.4g", r.PeriodNM) }))
	row("row-atoms", "atoms per cell", "", strconv.Itoa(res.AtomsPerCell),
		ptxt(func(r *lattice.Result) string { return strconv.Itoa(r.AtomsPerCell) }))

	for _, pt := range res.At {
		v.Points = append(v.Points, views.LatticePoint{
			Energy: strconv.FormatFloat(pt.EnergyEV, 'g', 6, 64),
			Modes:  strconv.Itoa(pt.Modes),
			DOS:    fmt.Sprintf("%.4g", pt.DOS),
		})
	}
	v.Notes = append(v.Notes,
		fmt.Sprintf("Nearest-neighbour π-band tight binding (γ0 = %g eV, a_cc = %g nm, one p_z orbital per atom, "+
			"no overlap): no edge relaxation, no curvature, no spin–orbit coupling. Ribbons of the metallic "+
			"armchair family and non-armchair metallic tubes gain small gaps from edge relaxation and curvature, "+
			"which this model leaves out.", res.Gamma0EV, res.AccNM),
		"Use the numbers to size and compare options; base design decisions on full simulation, "+
			"measurement and your own design rules.",
		"D(E): "+res.DOSMethod+".")
	for _, n := range res.Notes {
		v.Notes = append(v.Notes, strings.ToUpper(n[:1])+n[1:]+".")
	}
	return v
}

// latticeShortName is the name for a legend: "ribbon N = 7", "tube (4, 0)".
func latticeShortName(s lattice.Structure, lines int, n, m *int) string {
	if s == lattice.Tube && n != nil && m != nil {
		return fmt.Sprintf("tube (%d, %d)", *n, *m)
	}
	return fmt.Sprintf("%s N = %d", s, lines)
}

// latticePartnerLegend is the partner's short legend name, "N = 20" or
// "(4, 0)": its kind follows from the structure it partners, and a short
// legend leaves the plot its width.
func latticePartnerLegend(r *lattice.Result) string {
	if r.Structure == lattice.Tube && r.N != nil && r.M != nil {
		return fmt.Sprintf("(%d, %d)", *r.N, *r.M)
	}
	return fmt.Sprintf("N = %d", r.Lines)
}

func latticeSize(widthNM, diameterNM *float64) string {
	switch {
	case widthNM != nil:
		return fmt.Sprintf("%.4g (width)", *widthNM)
	case diameterNM != nil:
		return fmt.Sprintf("%.4g (diameter)", *diameterNM)
	}
	return "—"
}

func latticeEV(e float64) string { return fmt.Sprintf("%.4g", e) }

func latticeQuanta(gS float64) string { return fmt.Sprintf("%.4g", gS/phys.ConductanceQuantum) }

func latticeYesNo(b bool) string {
	if b {
		return "yes"
	}
	return "no"
}

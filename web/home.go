package web

import (
	"fmt"
	"math"
	"net/http"
	"net/url"
	"slices"
	"strconv"
	"strings"

	"github.com/go-chi/chi/v5"
	"golang.org/x/sync/errgroup"

	"ringbox/internal/material"
	"ringbox/internal/phys"
	"ringbox/internal/scenario"
	"ringbox/internal/spectrum"
	"ringbox/web/views"
)

// The conductor page, GET /?KEY=VALUE&…: the form of every scenario key a
// user sets, prefilled from the query, and once a query is given the
// result — summary tables, the observables at (E_F, T) and the three
// figures. A bad value re-renders the form (400) with the message beside
// its field.

func init() {
	addRoutes(func(a *App, r chi.Router) {
		r.Get("/", a.handle(a.conductorPage))
	})
}

// pageLevels is how many of the lowest levels the page lists: enough to
// see the first subbands and their degeneracies without a long table.
const pageLevels = 10

// conductorPage answers /.
func (a *App) conductorPage(w http.ResponseWriter, r *http.Request) error {
	// cmp carries the other scenarios of a comparison the user is editing
	// this one from; it is not a scenario key.
	q, cmp := splitCompare(r.URL.Query())
	page := views.Conductor{}
	status := http.StatusOK
	s, err := scenario.Parse(q)
	if err == nil && len(q) > 0 {
		var res *scenario.Result
		var plots [3]svgPlot
		res, plots, err = a.countAndDraw(r, s)
		if err == nil {
			page.Result = resultView(r, res, plots)
			page.Result.AddToCompare = compareLinks(s.Canonical(), cmp)
			if len(cmp) > 0 {
				page.Result.BackToCompare = compareURL(cmp)
			}
		}
	}
	if err != nil {
		e, st, ok := inputError(err)
		if !ok {
			return err // the error page: 503/504, or a 500 for a bug
		}
		status = st
		page.ErrorKey, page.ErrorMsg = e.Key, e.Msg
	}
	page.Sets, page.Hidden = formFields(q, s, err == nil)
	for _, c := range cmp {
		page.Hidden = append(page.Hidden, views.Field{Key: "cmp", Value: c})
	}
	page.FieldLess = true
	for _, set := range page.Sets {
		for i := range set.Fields {
			if f := &set.Fields[i]; page.ErrorKey != "" && f.Key == page.ErrorKey {
				f.Error = page.ErrorMsg
				page.FieldLess = false
			}
		}
	}
	title := "Conductor"
	if page.Result != nil {
		title = s.String()
	}
	return render(w, r, status, views.Page(title, views.NavConductor, views.ConductorPage(page)))
}

// countAndDraw counts s once and draws its three SVG figures in parallel,
// so the figures the page embeds are in the render cache before the
// browser asks for them, and their frames are known for the readout.
func (a *App) countAndDraw(r *http.Request, s scenario.Scenario) (*scenario.Result, [3]svgPlot, error) {
	var plots [3]svgPlot
	ctx := r.Context()
	res, err := a.count(ctx, s)
	if err != nil {
		return nil, plots, err
	}
	var g errgroup.Group
	for i, k := range plotKinds {
		g.Go(func() error {
			p, err := a.plotSVG(ctx, k, s)
			plots[i] = p
			return err
		})
	}
	return res, plots, g.Wait()
}

// defaultScenario is the scenario of an empty query: the defaults a form
// shows when the query it came with is invalid.
var defaultScenario = func() scenario.Scenario {
	s, err := scenario.Parse(url.Values{})
	if err != nil {
		panic("web: the default scenario does not parse: " + err.Error())
	}
	return s
}()

// formFields builds the form. A field carries the query's value when it
// has one. Otherwise it carries the default when the default does not
// depend on the material (lengths, boundary conditions, grid, temperature),
// and is left blank with the default as placeholder when it does (α, the
// top of the grid, E_F): a value that was only a default for GaAs must not
// follow the user to copper. valid says whether s parsed from q.
func formFields(q url.Values, s scenario.Scenario, valid bool) ([]views.FieldSet, []views.Field) {
	if !valid {
		s = defaultScenario
	}
	d := s.Values()
	get := func(k string) string { return strings.TrimSpace(q.Get(k)) }
	// filled: the query's value, or the scenario's default value.
	filled := func(k, label, hint string) views.Field {
		v := get(k)
		if v == "" {
			v = d.Get(k)
		}
		return views.Field{Key: k, Label: label, Value: v, Hint: hint}
	}
	// blank: the query's value, or empty with the default as placeholder.
	blank := func(k, label, placeholder, hint string) views.Field {
		return views.Field{Key: k, Label: label, Value: get(k), Placeholder: placeholder, Hint: hint}
	}
	choice := func(f views.Field, opts ...views.Option) views.Field {
		f.Options = opts
		return f
	}
	opt := func(v, label string) views.Option { return views.Option{Value: v, Label: label} }

	var mats []views.Option
	for _, m := range material.All() {
		// The short name fits the narrow select; the page heading gives
		// the full one ("Si (six X valleys)").
		name, _, _ := strings.Cut(m.Name, " (")
		mats = append(mats, opt(m.ID, name))
	}
	mats = append(mats, opt(material.CustomID, "custom"))
	matField := filled("material", "material", "")
	matField.Value = strings.ToLower(matField.Value)
	matField.Options = mats

	bcs := []views.Option{opt("box", "box"), opt("ring", "ring"), opt("open", "open")}
	axisField := func(i int) []views.Field {
		ax := string("xyz"[i])
		lf := filled("l"+ax, "length "+ax, "")
		bf := filled("b"+ax, "boundary "+ax, "")
		if i >= s.Dims {
			// Axes beyond dims keep the three-axis defaults, for when the
			// user raises dims; they are ignored until then.
			dv := defaultScenario.Values()
			if lf.Value == "" {
				lf.Value = dv.Get("l" + ax)
			}
			if bf.Value == "" {
				bf.Value = dv.Get("b" + ax)
			}
			lf.Hint = fmt.Sprintf("used if dims ≥ %d", i+1)
		}
		return []views.Field{lf, choice(bf, bcs...)}
	}

	axes := [3][]views.Field{axisField(0), axisField(1), axisField(2)}
	// Placeholders show the material's own values.
	alphaDefault := strconv.FormatFloat(s.Material.AlphaPerEV, 'g', 4, 64)
	efDefault := strconv.FormatFloat(s.Material.FermiEV, 'g', 4, 64)
	emaxDefault := "0.3"
	if md, err := scenario.Parse(url.Values{"material": {s.Material.ID}}); err == nil {
		emaxDefault = strconv.FormatFloat(md.EmaxEV, 'g', -1, 64)
	}

	sets := []views.FieldSet{
		{ID: "set-material", Legend: "Material", Fields: []views.Field{
			matField,
			choice(filled("gs", "spin g_s", ""), opt("2", "2"), opt("1", "1")),
			blank("alpha", "Kane α (1/eV)", alphaDefault, "blank: material's"),
		}},
		{ID: "set-custom", Legend: "Custom material", Note: "used only when material is custom", Fields: []views.Field{
			blank("m", "mass m* (m₀)", "1", "all axes"),
			blank("mx", "mass x (m₀)", "m", ""),
			blank("my", "mass y (m₀)", "m", ""),
			blank("mz", "mass z (m₀)", "m", ""),
			blank("gv", "valleys g_v", "1", ""),
		}},
		{ID: "set-geometry", Legend: "Geometry", Note: "lengths with units; bare numbers are nm", Fields: []views.Field{
			// Lengths in one row and boundary conditions below them, on a
			// five-column form.
			axes[0][0], axes[1][0], axes[2][0],
			choice(filled("dims", "dims", ""), opt("1", "1"), opt("2", "2"), opt("3", "3")),
			choice(blank("along", "transport", "", ""),
				opt("", "last axis"), opt("x", "along x"), opt("y", "along y"), opt("z", "along z")),
			axes[0][1], axes[1][1], axes[2][1],
		}},
		{ID: "set-energy", Legend: "Energy grid and broadening", Note: "energies in eV above the band edge; η applies when every axis is confined", Fields: []views.Field{
			filled("emin", "E min (eV)", ""),
			blank("emax", "E max (eV)", emaxDefault, ""),
			filled("points", "points", "2 to 4000"),
			blank("eta", "η (eV)", "auto", "blank: max(k_BT, 2 steps)"),
			choice(filled("shape", "line shape", ""), opt("gaussian", "Gaussian"), opt("lorentzian", "Lorentzian")),
		}},
		{ID: "set-operating", Legend: "Operating point", Note: "give E_F or a density, not both", Fields: []views.Field{
			filled("temp", "T (K)", ""),
			blank("ef", "E_F (eV)", efDefault, ""),
			blank("density", "density", "", unitText(s.DensityUnit())),
			blank("mfp", "mean free path", "ballistic", "T = λ/(λ+L)"),
			blank("at", "at E (eV)", "E_F", "comma list"),
		}},
	}
	for i := range sets {
		for j := range sets[i].Fields {
			f := &sets[i].Fields[j]
			if f.Key == "shape" && f.Value == "" {
				f.Value = "gaussian"
			}
			if len(f.Options) > 0 {
				f.Value = strings.ToLower(f.Value)
				// A value no option has (a typed URL) stays visible and
				// is submitted again until the user picks another.
				if !slices.ContainsFunc(f.Options, func(o views.Option) bool { return o.Value == f.Value }) {
					f.Options = append(f.Options, views.Option{Value: f.Value, Label: f.Value + " (not valid)"})
				}
			}
		}
	}
	var hidden []views.Field
	if v := get("budget"); v != "" {
		hidden = append(hidden, views.Field{Key: "budget", Value: v})
	}
	return sets, hidden
}

// resultView formats a result for the page.
func resultView(r *http.Request, res *scenario.Result, plots [3]svgPlot) *views.ConductorResult {
	s := res.Input()
	canon := s.Canonical()
	scheme := "http"
	if r.TLS != nil {
		scheme = "https"
	}
	v := &views.ConductorResult{
		Heading:  s.Material.Name + ": " + bcText(s, -1, true),
		Link:     "/?" + canon,
		LinkText: strings.SplitAfter(scheme+"://"+r.Host+"/?"+canon, "&"),
		CSV:      "/export/curves.csv?" + canon,
		JSON:     "/api/v1/count?" + canon,
	}
	v.Cards = cards(res, strings.TrimSpace(r.URL.Query().Get("ef")) != "")
	v.Tables = append(v.Tables, summaryTable(res), methodTable(res))
	if len(res.Levels) > 0 {
		v.Tables = append(v.Tables, levelsTable(res))
	}
	if _, ok := atFermi(res); !ok || len(res.At) > 1 {
		v.Tables = append(v.Tables, pointsTable(res))
	}
	alts := map[plotKind]string{
		plotStates: "Number of states N(E) against energy for the scenario, box, ring, continuum and smooth counts",
		plotDOS:    "Density of states D(E) against energy",
		plotModes:  "Number of conduction modes M(E) against energy",
	}
	caps := map[plotKind]string{
		plotStates: "States at or below E, spin and valleys included.",
		plotDOS:    "Density of states per eV.",
		plotModes:  "Transverse modes open at E.",
	}
	for i, k := range plotKinds {
		v.Plots = append(v.Plots, views.Plot{
			ID:      "plot-" + string(k),
			Src:     plotPath(k, "svg", s),
			PNG:     plotPath(k, "png", s),
			Alt:     alts[k],
			Caption: caps[k],
			Frame:   frameAttr(plots[i].frame),
		})
	}
	if s.AlphaPerEV != s.Material.AlphaPerEV {
		v.Notes = append(v.Notes, fmt.Sprintf("Kane α = %g /eV is set by hand; %s has %.4g /eV in the catalogue.",
			s.AlphaPerEV, s.Material.Name, s.Material.AlphaPerEV))
	}
	said := false
	for _, n := range res.Notes {
		v.Notes = append(v.Notes, n)
		said = said || strings.Contains(strings.ToLower(n), "idealised")
	}
	if !said {
		v.Notes = append(v.Notes, "Idealised model: infinite walls, parabolic or Kane bands, no disorder or "+
			"self-consistent potential. Design decisions rest on full device simulation, measurement and your own design rules.")
	}
	return v
}

// bcText describes the axes of s, "10nm box × 10nm box × 100nm open",
// with every confined axis set to bc when bc ≥ 0, or all open when bc is
// spectrum.Open. withLengths adds the lengths.
func bcText(s scenario.Scenario, bc spectrum.BC, withLengths bool) string {
	var parts []string
	for i := 0; i < s.Dims; i++ {
		b := s.BC[i]
		if bc >= 0 && (b != spectrum.Open || bc == spectrum.Open) {
			b = bc
		}
		p := b.String()
		if withLengths {
			p = phys.FormatLength(s.LengthM[i]) + " " + p
		}
		parts = append(parts, p)
	}
	return strings.Join(parts, " × ")
}

// atFermi returns the point values at E_F: the only point when the user
// gave no energies of their own.
func atFermi(res *scenario.Result) (scenario.PointValues, bool) {
	for _, p := range res.At {
		if p.EnergyEV == res.EFEV {
			return p, true
		}
	}
	return scenario.PointValues{}, false
}

// cards are the observables of the scenario's own boundary conditions;
// efGiven says whether the query set E_F itself.
func cards(res *scenario.Result, efGiven bool) []views.Card {
	s := res.Input()
	o := res.Observables["scenario"]
	unit := unitText(o.DensityUnit)
	dens := views.Card{Label: "carrier density n", Value: sciText(o.Density, 4), Unit: unit,
		Note: fmt.Sprintf("%s electrons in the conductor", sciText(o.Electrons, 4))}
	if o.VolumeDensityUnit != o.DensityUnit && o.VolumeDensityUnit != "" {
		dens.Note += fmt.Sprintf("; %s %s by volume", sciText(o.VolumeDensity, 3), unitText(o.VolumeDensityUnit))
	}
	g := views.Card{Label: "conductance G", Value: siValue(o.ConductanceS, "S", 4),
		Note: fmt.Sprintf("⟨M⟩ = %s modes, transmission %s", plainText(o.MeanModes, 4), plainText(o.Transmission, 3))}
	g.Value, g.Unit = splitUnit(g.Value)
	g0 := views.Card{Label: "G / (2e²/h)", Value: plainText(o.ConductanceG0, 4),
		Note: "in conductance quanta, 2e²/h = 77.48 µS"}
	rc := views.Card{Label: "resistance R = 1/G", Value: "∞", Note: "no mode open at E_F"}
	if o.ResistanceOhm != nil {
		rc.Value, rc.Unit = splitUnit(siValue(*o.ResistanceOhm, "Ω", 4))
		rc.Note = "ballistic (contact) resistance"
		if s.MFPM > 0 {
			rc.Note = "with mean free path " + phys.FormatLength(s.MFPM)
		}
	}
	cq := views.Card{Label: "quantum capacitance C_Q", Note: "q² ∫ D(E)(−∂f/∂E) dE"}
	cq.Value, cq.Unit = splitUnit(siValue(o.QuantumCapacitance, "F", 4))
	src := "given"
	switch {
	case s.HasDensity:
		src = "solved from the density"
	case !efGiven:
		src = "material default"
	}
	ef := views.Card{Label: "Fermi level E_F", Value: plainText(res.EFEV, 5), Unit: "eV",
		Note: fmt.Sprintf("%s; T = %g K (k_BT = %s)", src, s.TempK, siValue(s.KTEV(), "eV", 3))}
	return []views.Card{dens, g, g0, rc, cq, ef}
}

// summaryTable compares the four variants at E_F.
func summaryTable(res *scenario.Result) views.Table {
	s := res.Input()
	p, havePoint := atFermi(res)
	t := views.Table{ID: "summary", Caption: fmt.Sprintf("Counts at E_F = %s eV and T = %g K", plainText(res.EFEV, 5), s.TempK),
		Head: []views.HeadCell{
			{Text: "variant"}, {Text: "boundary conditions"},
			{Text: "states N(E_F)", Num: true}, {Text: "modes M(E_F)", Num: true},
			{Text: "D(E_F)", Unit: "states/eV", Num: true},
			{Text: "electrons at T", Num: true}, {Text: "⟨modes⟩ at T", Num: true},
			{Text: "G", Unit: "2e²/h", Num: true},
		}}
	bcs := map[string]string{
		"scenario":  bcText(s, -1, false),
		"box":       bcText(s, spectrum.Box, false),
		"ring":      bcText(s, spectrum.Ring, false),
		"continuum": bcText(s, spectrum.Open, false),
	}
	type vals [6]float64
	get := func(name string) vals {
		o := res.Observables[name]
		v := vals{math.NaN(), math.NaN(), math.NaN(), o.Electrons, o.MeanModes, o.ConductanceG0}
		if havePoint {
			v[0], v[1], v[2] = p.States[name], p.Modes[name], p.DOS[name]
		}
		return v
	}
	for _, name := range scenario.Variants {
		v := get(name)
		row := []views.Cell{{Text: name}, {Text: bcs[name]}}
		for i, x := range v {
			digits := 5
			if i == 2 || i == 5 {
				digits = 4
			}
			row = append(row, views.Cell{Text: countText(x, digits), Num: true})
		}
		t.Rows = append(t.Rows, row)
	}
	b, r := get("box"), get("ring")
	foot := []views.Cell{{Text: "box vs ring"}, {Text: "(box − ring) / mean"}}
	for i := range b {
		foot = append(foot, views.Cell{Text: relDiff(b[i], r[i]), Num: true})
	}
	t.Foot = [][]views.Cell{foot}
	return t
}

// relDiff is (a − b) over their mean, as a signed percentage: symmetric in
// which variant is taken as reference, and bounded by ±200 %.
func relDiff(a, b float64) string {
	if math.IsNaN(a) || math.IsNaN(b) {
		return "—"
	}
	if a == b {
		return "0 %"
	}
	m := (a + b) / 2
	if m == 0 {
		return "—"
	}
	d := 100 * (a - b) / math.Abs(m)
	return fmt.Sprintf("%+.3g %%", d)
}

// methodTable states how the count was made.
func methodTable(res *scenario.Result) views.Table {
	s := res.Input()
	method := res.Method
	if res.ErrorEstimate != nil {
		method += fmt.Sprintf(" (smooth Weyl count, error ± %s states)", sciText(*res.ErrorEstimate, 3))
	} else if method == "exact" {
		method += " (level by level)"
	}
	rows := [][]views.Cell{
		{{Text: "states count"}, {Text: method}},
		{{Text: "modes count"}, {Text: res.ModesMethod}},
		{{Text: "transport axis"}, {Text: string("xyz"[s.Along])}},
		{{Text: fmt.Sprintf("states with E ≤ E max = %g eV", s.EmaxEV)}, {Text: countText(res.StatesBelow, 6), Num: true}},
	}
	if res.Spacing != nil {
		rows = append(rows, []views.Cell{{Text: "mean level spacing at E_F (1/D̄)"}, {Text: siValue(*res.Spacing, "eV", 3), Num: true}})
	}
	if s.Conductor().Confined() {
		rows = append(rows, []views.Cell{{Text: "D(E) broadening η"}, {Text: siValue(res.Curves.BroadeningEV, "eV", 3), Num: true}})
	}
	return views.Table{ID: "method", Caption: "Method", Head: []views.HeadCell{{Text: "quantity"}, {Text: "value"}}, Rows: rows}
}

// levelsTable lists the lowest levels of the confined axes.
func levelsTable(res *scenario.Result) views.Table {
	t := views.Table{ID: "levels", Caption: "Lowest levels of the confined axes (scenario boundary conditions)",
		Head: []views.HeadCell{{Text: "#"}, {Text: "E", Unit: "eV", Num: true}, {Text: "degeneracy", Num: true},
			{Text: "valleys"}, {Text: "quantum numbers n"}}}
	for i, l := range res.Levels {
		if i == pageLevels {
			break
		}
		ns := make([]string, len(l.N))
		for j, n := range l.N {
			ns[j] = strconv.Itoa(n)
		}
		valleys := strings.Join(l.Valleys, ", ")
		if valleys == "" {
			valleys = "—"
		}
		t.Rows = append(t.Rows, []views.Cell{{Text: strconv.Itoa(i + 1)}, {Text: plainText(l.EnergyEV, 5), Num: true},
			{Text: strconv.Itoa(l.Degeneracy), Num: true}, {Text: valleys}, {Text: "(" + strings.Join(ns, ", ") + ")"}})
	}
	return t
}

// pointsTable lists the point values at the user's energies.
func pointsTable(res *scenario.Result) views.Table {
	t := views.Table{ID: "point-values", Caption: "Point values at the requested energies (T = 0 counts)",
		Head: []views.HeadCell{{Text: "E", Unit: "eV", Num: true}}}
	for _, q := range []string{"N", "M"} {
		for _, name := range scenario.Variants {
			t.Head = append(t.Head, views.HeadCell{Text: q + " " + name, Num: true})
		}
	}
	for _, p := range res.At {
		row := []views.Cell{{Text: plainText(p.EnergyEV, 5), Num: true}}
		for _, m := range []map[string]float64{p.States, p.Modes} {
			for _, name := range scenario.Variants {
				row = append(row, views.Cell{Text: countText(m[name], 5), Num: true})
			}
		}
		t.Rows = append(t.Rows, row)
	}
	return t
}

// unitText writes a unit's exponent as superscript: cm^-3 → cm⁻³.
func unitText(u string) string {
	base, exp, ok := strings.Cut(u, "^")
	if !ok {
		return u
	}
	return base + supDigits.Replace(exp)
}

// supDigits maps the characters of an exponent to superscript.
var supDigits = strings.NewReplacer("-", "⁻", "0", "⁰", "1", "¹", "2", "²", "3", "³", "4", "⁴",
	"5", "⁵", "6", "⁶", "7", "⁷", "8", "⁸", "9", "⁹")

// sci formats v with digits significant digits, in plain notation between
// 10⁻³ and 10⁵ and as "m × 10ᵉ" outside.
func sciText(v float64, digits int) string {
	a := math.Abs(v)
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) || (a >= 1e-3 && a < 1e5) {
		return plainText(v, digits)
	}
	e := int(math.Floor(math.Log10(a)))
	m := v / math.Pow(10, float64(e))
	if math.Abs(m) >= 9.9999999 { // rounding at the top of a decade
		m, e = m/10, e+1
	}
	ms := strconv.FormatFloat(m, 'f', digits-1, 64)
	return ms + " × 10" + supDigits.Replace(strconv.Itoa(e))
}

// plain formats v with digits significant digits without an exponent;
// whole numbers keep every digit.
func plainText(v float64, digits int) string {
	switch {
	case math.IsNaN(v):
		return "—"
	case math.IsInf(v, 0):
		return "∞"
	case v == 0:
		return "0"
	case v == math.Trunc(v) && math.Abs(v) < 1e15:
		return strconv.FormatFloat(v, 'f', 0, 64)
	}
	dec := digits - 1 - int(math.Floor(math.Log10(math.Abs(v))))
	if dec <= 0 {
		return strconv.FormatFloat(v, 'f', 0, 64)
	}
	// Trailing zeros would claim digits the value does not have.
	out := strings.TrimRight(strconv.FormatFloat(v, 'f', dec, 64), "0")
	return strings.TrimSuffix(out, ".")
}

// count formats a count: exact integers in full up to 10⁹, else sci.
func countText(v float64, digits int) string {
	if v == math.Trunc(v) && math.Abs(v) < 1e9 {
		return plainText(v, digits)
	}
	return sciText(v, digits)
}

// siValue is phys.FormatSI with a dash for values it cannot show.
func siValue(v float64, unit string, digits int) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "—"
	}
	return phys.FormatSI(v, unit, digits)
}

// splitUnit splits "77.48 µS" into "77.48" and "µS".
func splitUnit(s string) (string, string) {
	if i := strings.LastIndexByte(s, ' '); i > 0 {
		return s[:i], s[i+1:]
	}
	return s, ""
}

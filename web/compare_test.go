package web

import (
	"net/http"
	"net/url"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"golang.org/x/net/html"

	"ringbox/internal/scenario"
)

// compareTarget is /compare (or a figure of it) with the given scenarios.
func compareTarget(path string, scens ...string) string {
	return path + "?" + compareQuery(scens)
}

// legendEntries returns the texts of an SVG figure that are scenario
// legend labels ("1: …"), parsed by element.
func legendEntries(t *testing.T, svg string) []string {
	t.Helper()
	doc := parseHTML(t, strings.NewReader(svg))
	var out []string
	for _, n := range findAll(doc, byTag("text")) {
		s := text(n)
		if num, _, ok := strings.Cut(s, ": "); ok {
			if _, err := strconv.Atoi(num); err == nil {
				out = append(out, s)
			}
		}
	}
	return out
}

func TestCompareFiguresOneSeriesPerScenario(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	h := a.Handler()
	scens := []string{scenWire, scenRing, scenSi}
	for _, k := range plotKinds {
		t.Run(string(k), func(t *testing.T) {
			rec := do(h, http.MethodGet, compareTarget("/compare/plot/"+string(k)+".svg", scens...))
			if rec.Code != http.StatusOK || rec.Header().Get("Content-Type") != "image/svg+xml" {
				t.Fatalf("status %d, type %q:\n%s", rec.Code, rec.Header().Get("Content-Type"), rec.Body)
			}
			got := legendEntries(t, rec.Body.String())
			want := []string{"1: GaAs 8nm box×box", "2: GaAs 8nm ring×ring", "3: Si 20nm box"}
			if !slices.Equal(got, want) {
				t.Errorf("legend entries %q, want %q", got, want)
			}
		})
	}
	t.Run("png", func(t *testing.T) {
		rec := do(h, http.MethodGet, compareTarget("/compare/plot/dos.png", scens...))
		if rec.Code != http.StatusOK || rec.Header().Get("Content-Type") != "image/png" || !strings.HasPrefix(rec.Body.String(), "\x89PNG") {
			t.Errorf("PNG: status %d, type %q", rec.Code, rec.Header().Get("Content-Type"))
		}
	})
	t.Run("figure series", func(t *testing.T) {
		ss, err := parseComparison(scens)
		if err != nil {
			t.Fatal(err)
		}
		res, err := a.runAll(t.Context(), ss)
		if err != nil {
			t.Fatal(err)
		}
		f := compareFigure(plotModes, ss, res)
		if len(f.Series) != len(scens) {
			t.Fatalf("%d series, want %d", len(f.Series), len(scens))
		}
		for i, s := range f.Series {
			if s.Index != i {
				t.Errorf("series %d has colour index %d", i, s.Index)
			}
		}
	})
}

func TestComparePage(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	h := a.Handler()
	rec := do(h, http.MethodGet, compareTarget("/compare", scenWire, scenRing))
	if rec.Code != http.StatusOK {
		t.Fatalf("status %d:\n%s", rec.Code, rec.Body)
	}
	doc := parseHTML(t, rec.Body)
	if cols := findAll(doc, byClass("compare-col")); len(cols) != 2 {
		t.Errorf("%d scenario columns, want 2", len(cols))
	}
	imgs := findAll(doc, func(n *html.Node) bool { return n.Data == "img" && strings.HasPrefix(attr(n, "src"), "/compare/plot/") })
	if len(imgs) != 3 {
		t.Errorf("%d figures, want 3", len(imgs))
	}
	canon := make([]string, 2)
	for i, q := range []string{scenWire, scenRing} {
		s, err := parseOne(i+1, q)
		if err != nil {
			t.Fatal(err)
		}
		canon[i] = s.Canonical()
	}

	// Each row has one cell per scenario; the physics rows hold numbers.
	rows := map[string][]string{}
	for _, tr := range findAll(doc, byTag("tr")) {
		ths := findAll(tr, func(n *html.Node) bool { return n.Data == "th" && attr(n, "scope") == "row" })
		if len(ths) != 1 {
			continue
		}
		var cells []string
		for _, td := range findAll(tr, byTag("td")) {
			cells = append(cells, text(td))
		}
		rows[text(ths[0])] = cells
	}
	for _, label := range []string{"Material", "Axes", "Lowest levels", "States N(E_F)", "Modes M(E_F)", "Carrier density",
		"Conductance", "Conductance (2e²/h)", crossoverLabel} {
		if len(rows[label]) != 2 {
			t.Errorf("row %q has cells %q, want 2", label, rows[label])
		}
	}
	// A periodic square has a k = 0 level at the band edge, counted with
	// spin: N(E_F) = 2 at E_F = 50 meV, below the next ring level at
	// 4·ħ²π²/(2m*L²)·… ≈ 0.3 eV (its k = 2π/L); common practice.
	if got := rows["States N(E_F)"]; len(got) == 2 && got[1] != "2" {
		t.Errorf("N(E_F) of the 8 nm ring×ring square = %q, want 2", got[1])
	}
	if got := rows["Axes"]; len(got) == 2 && got[0] != "8nm box × 8nm box" {
		t.Errorf("axes of scenario 1 = %q", got[0])
	}

	links := func(class string) []string {
		var out []string
		for _, n := range findAll(doc, byClass(class)) {
			out = append(out, attr(n, "href"))
		}
		return out
	}
	if got, want := links("compare-remove"), []string{compareURL(canon[1:]), compareURL(canon[:1])}; !slices.Equal(got, want) {
		t.Errorf("remove links %q, want %q", got, want)
	}
	if got := links("compare-open"); len(got) != 2 || got[0] != "/?"+canon[0] {
		t.Errorf("open links %q", got)
	}
	edit := links("compare-edit")
	if len(edit) != 2 {
		t.Fatalf("edit links %q", edit)
	}
	u, err := url.Parse(edit[0])
	if err != nil {
		t.Fatal(err)
	}
	sq, cmp := splitCompare(u.Query())
	if s, err := scenario.Parse(sq); err != nil || s.Canonical() != canon[0] || !slices.Equal(cmp, canon[1:]) {
		t.Errorf("edit link %q: scenario %v, cmp %q", edit[0], err, cmp)
	}
	// Coming back from the edit: the conductor page's add link gives the
	// comparison again (the edited scenario last).
	if got, want := compareLinks(canon[0], cmp), compareURL([]string{canon[1], canon[0]}); got != want {
		t.Errorf("add link %q, want %q", got, want)
	}

	// The save form carries the canonical scenarios.
	var hidden []string
	for _, in := range findAll(doc, func(n *html.Node) bool { return n.Data == "input" && attr(n, "type") == "hidden" }) {
		hidden = append(hidden, attr(in, "value"))
	}
	if !slices.Equal(hidden, canon) {
		t.Errorf("save form scenarios %q, want %q", hidden, canon)
	}
}

func TestCompareRefusesBadScenarios(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	h := a.Handler()
	tests := []struct {
		name    string
		scens   []string
		status  int
		contain []string
	}{
		{"bad length", []string{scenWire, "material=gaas&lx=-1nm"}, 400, []string{"scenario 2", "lx"}},
		{"unknown material", []string{"material=unobtainium"}, 400, []string{"scenario 1", "material"}},
		{"nine", slices.Repeat([]string{scenSi}, 9), 400, []string{"8"}},
		{"not a query", []string{scenSi, "%zz"}, 400, []string{"scenario 2"}},
	}
	for _, tt := range tests {
		for _, path := range []string{"/compare", "/compare/plot/states.svg"} {
			t.Run(tt.name+" "+path, func(t *testing.T) {
				rec := do(h, http.MethodGet, compareTarget(path, tt.scens...))
				if rec.Code != tt.status {
					t.Fatalf("status %d, want %d", rec.Code, tt.status)
				}
				msg := text(parseHTML(t, rec.Body))
				for _, c := range tt.contain {
					if !strings.Contains(msg, c) {
						t.Errorf("error page %q lacks %q", msg, c)
					}
				}
			})
		}
	}
	t.Run("empty", func(t *testing.T) {
		rec := do(h, http.MethodGet, "/compare")
		if rec.Code != http.StatusOK {
			t.Fatalf("status %d", rec.Code)
		}
		if forms := findAll(parseHTML(t, rec.Body), byTag("form")); len(forms) != 1 || attr(forms[0], "method") != "get" {
			t.Error("the empty comparison page has no GET form to start one")
		}
	})
}

func TestCompareLinks(t *testing.T) {
	full := slices.Repeat([]string{"a=1"}, maxCompare)
	tests := []struct {
		name    string
		current string
		others  []string
		want    string
	}{
		{"first", "material=gaas", nil, "/compare?s=material%3Dgaas"},
		{"appended", "b=2", []string{"a=1"}, "/compare?s=a%3D1&s=b%3D2"},
		{"not twice", "a=1", []string{"a=1", "b=2"}, "/compare?s=a%3D1&s=b%3D2"},
		{"empty others dropped", "b=2", []string{"", "a=1"}, "/compare?s=a%3D1&s=b%3D2"},
		{"full", "b=2", full, ""},
		{"nothing", "", nil, ""},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := compareLinks(tt.current, tt.others); got != tt.want {
				t.Errorf("compareLinks = %q, want %q", got, tt.want)
			}
		})
	}
}

func TestSplitCompare(t *testing.T) {
	q := url.Values{"material": {"gaas"}, "lx": {"6nm"}, "cmp": {"a=1", "", "b=2"}}
	sq, cmp := splitCompare(q)
	if _, ok := sq["cmp"]; ok || sq.Get("material") != "gaas" || sq.Get("lx") != "6nm" {
		t.Errorf("scenario keys %v", sq)
	}
	if !slices.Equal(cmp, []string{"a=1", "b=2"}) {
		t.Errorf("cmp %q", cmp)
	}
	if len(q["cmp"]) != 3 {
		t.Error("splitCompare modified its input")
	}
}

func TestSci(t *testing.T) {
	for _, tt := range []struct {
		v    float64
		want string
	}{
		{8.47e22, "8.47×10²²"},
		{2.8e-5, "2.80×10⁻⁵"},
		{12.5, "12.5"},
		{0, "0"},
	} {
		if got := sci(tt.v); got != tt.want {
			t.Errorf("sci(%g) = %q, want %q", tt.v, got, tt.want)
		}
	}
}

// FuzzParseComparison: any list of scenario queries is either parsed or
// refused with a user error naming s; never a panic.
func FuzzParseComparison(f *testing.F) {
	f.Add(scenWire, scenSi)
	f.Add("material=gaas&lx=-1nm", "")
	f.Add("%zz", "material=custom&m=0.1&mx=0.2")
	f.Add("?dims=3&lx=1e-9m&ly=200A&lz=0.02um", "a=b=c&&")
	f.Fuzz(func(t *testing.T, q1, q2 string) {
		ss, err := parseComparison([]string{q1, q2})
		if err != nil {
			e, ok := scenario.AsError(err)
			if !ok || e.Key != compareParam || e.Msg == "" {
				t.Fatalf("error %v is not a user error naming s", err)
			}
			return
		}
		for _, s := range ss {
			// The canonical form parses back to itself.
			back, err := parseOne(1, s.Canonical())
			if err != nil || back.Canonical() != s.Canonical() {
				t.Fatalf("canonical %q does not round-trip: %v", s.Canonical(), err)
			}
		}
	})
}

// BenchmarkComparePage renders /compare of three scenarios whose results
// are cached: the cost of the page itself (table, links, template).
func BenchmarkComparePage(b *testing.B) {
	log, _ := testLogger()
	a, err := New(Config{DBPath: filepath.Join(b.TempDir(), "b.db"), Logger: log})
	if err != nil {
		b.Fatal(err)
	}
	defer a.Close()
	h := a.Handler()
	target := compareTarget("/compare", scenWire, scenRing, scenSi)
	if rec := do(h, http.MethodGet, target); rec.Code != http.StatusOK {
		b.Fatalf("status %d", rec.Code)
	}
	b.ReportAllocs()
	for b.Loop() {
		do(h, http.MethodGet, target)
	}
}

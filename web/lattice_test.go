package web

import (
	"context"
	"encoding/json"
	"log/slog"
	"math"
	"net/http"
	"net/url"
	"slices"
	"strings"
	"testing"

	"golang.org/x/net/html"

	"ringbox/internal/figure"
	"ringbox/internal/scenario"
)

func TestLatticeAPIEqualsRun(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	tests := []struct {
		name  string
		query string
	}{
		{"default", ""},
		{"metallic armchair", "lines=8&ef=0.2&at=0.1,0.5"},
		{"zigzag", "structure=zigzag&lines=10&temp=4"},
		{"chiral tube", "structure=tube&n=8&m=3&emin=-1&emax=1&points=300"},
		{"units", "structure=tube&n=9&acc=1.42A&gamma0=2900meV"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			rec := do(a.Handler(), http.MethodGet, "/api/v1/lattice?"+tc.query)
			if rec.Code != http.StatusOK {
				t.Fatalf("status %d: %s", rec.Code, rec.Body)
			}
			if ct := rec.Header().Get("Content-Type"); !strings.HasPrefix(ct, "application/json") {
				t.Errorf("Content-Type %q", ct)
			}
			q, _ := url.ParseQuery(tc.query)
			req, err := scenario.ParseLattice(q)
			if err != nil {
				t.Fatal(err)
			}
			res, err := scenario.RunLattice(context.Background(), req)
			if err != nil {
				t.Fatal(err)
			}
			want, _ := json.Marshal(res)
			if got := strings.TrimSuffix(rec.Body.String(), "\n"); got != string(want) {
				t.Errorf("API body (%d bytes) differs from json.Marshal(RunLattice) (%d bytes)", len(got), len(want))
			}
		})
	}
}

func TestLatticeAPIErrorsNameKey(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	tests := []struct {
		query  string
		status int
		key    string
	}{
		{"lines=0", http.StatusBadRequest, "lines"},
		{"lines=seven", http.StatusBadRequest, "lines"},
		{"structure=sheet", http.StatusBadRequest, "structure"},
		{"structure=tube&n=4&m=5", http.StatusBadRequest, "m"},
		{"gamma0=-1", http.StatusBadRequest, "gamma0"},
		{"acc=2parsec", http.StatusBadRequest, "acc"},
		{"emin=1&emax=-1", http.StatusBadRequest, "emax"},
		{"width=3", http.StatusBadRequest, "width"},
		{"lines=7&lines=8", http.StatusBadRequest, "lines"},
		// Valid but over the work budget: 422 (see codeStatus).
		{"structure=tube&n=200&m=199&kpoints=4001", http.StatusUnprocessableEntity, "kpoints"},
	}
	for _, tc := range tests {
		t.Run(tc.query, func(t *testing.T) {
			rec := do(a.Handler(), http.MethodGet, "/api/v1/lattice?"+tc.query)
			if rec.Code != tc.status {
				t.Fatalf("status %d, want %d: %s", rec.Code, tc.status, rec.Body)
			}
			var body struct{ Error, Key string }
			if err := json.Unmarshal(rec.Body.Bytes(), &body); err != nil {
				t.Fatalf("not JSON: %v: %s", err, rec.Body)
			}
			if body.Key != tc.key || body.Error == "" {
				t.Errorf("body %+v, want key %q and a message", body, tc.key)
			}
		})
	}
}

// fieldValue returns the value of the form control named key: an input's
// value or a select's selected option.
func fieldValue(t *testing.T, doc *html.Node, key string) string {
	t.Helper()
	els := findAll(doc, func(n *html.Node) bool {
		return (n.Data == "input" || n.Data == "select") && attr(n, "name") == key
	})
	if len(els) != 1 {
		t.Fatalf("%d controls named %q", len(els), key)
	}
	if els[0].Data == "input" {
		return attr(els[0], "value")
	}
	for _, o := range findAll(els[0], byTag("option")) {
		for _, a := range o.Attr {
			if a.Key == "selected" {
				return attr(o, "value")
			}
		}
	}
	return ""
}

// summaryCells returns the structure and partner cells of a summary row.
func summaryCells(t *testing.T, doc *html.Node, id string) (this, partner string) {
	t.Helper()
	rows := findAll(doc, func(n *html.Node) bool { return n.Data == "tr" && attr(n, "id") == id })
	if len(rows) != 1 {
		t.Fatalf("%d summary rows %q", len(rows), id)
	}
	a, b := findAll(rows[0], byClass("this")), findAll(rows[0], byClass("partner"))
	if len(a) != 1 || len(b) != 1 || len(findAll(rows[0], byTag("td"))) != 3 {
		t.Fatalf("row %q: want a label, a structure and a partner cell", id)
	}
	return text(a[0]), text(b[0])
}

func TestLatticePage(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	tests := []struct {
		name          string
		query         string
		fields        map[string]string
		gap, gapOther string
		metallic      string
		modes         string
		g0            string
		partnerHead   string
	}{
		// N = 7: 1.267 eV (Nakada et al., PRB 54, 17954 (1996) formula, DESIGN
		// check values); its nearest tube (4, 0) has n ≢ 0 (mod 3), a gap.
		{"default", "", map[string]string{"structure": "armchair", "lines": "7", "gamma0": "2.7", "acc": "0.142",
			"gs": "2", "ef": "0", "temp": "300", "emin": "-3", "emax": "3", "kpoints": "401", "n": "10", "m": "0"},
			"1.267", "2.237", "no", "0", "", "partner: zigzag tube (4, 0) (nearest)"},
		// N = 8 = 3·2 + 2 is metallic (Nakada et al. 1996): one channel per
		// spin, G = 2e²/h (Landauer; common practice).
		{"metallic ribbon", "lines=8", map[string]string{"lines": "8"},
			"0", "2.237", "yes", "2", "1", "partner: zigzag tube (4, 0)"},
		// (10, 0): 0.948 eV (Saito, Dresselhaus & Dresselhaus 1998 formula);
		// it unrolls to the N = 20 armchair ribbon, which is metallic (20 = 3·6 + 2).
		{"tube", "structure=tube&n=10&m=0", map[string]string{"structure": "tube", "n": "10", "m": "0"},
			"0.9481", "0", "no", "0", "", "partner: armchair ribbon N = 20"},
		// A metallic tube: M = 2 per spin, G = 4e²/h (common practice).
		{"armchair tube", "structure=tube&n=5&m=5&temp=4", map[string]string{"n": "5", "m": "5", "temp": "4"},
			"0", "0", "yes", "4", "2", "partner: zigzag ribbon N = 10"},
		{"chiral tube", "structure=tube&n=6&m=2", map[string]string{"n": "6", "m": "2"},
			"", "—", "", "", "", "no partner"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			rec := do(a.Handler(), http.MethodGet, "/lattice?"+tc.query)
			if rec.Code != http.StatusOK {
				t.Fatalf("status %d: %s", rec.Code, rec.Body)
			}
			doc := parseHTML(t, rec.Body)
			for k, want := range tc.fields {
				if got := fieldValue(t, doc, k); got != want {
					t.Errorf("field %s = %q, want %q", k, got, want)
				}
			}
			if n := len(findAll(doc, func(n *html.Node) bool { return n.Data == "form" && attr(n, "method") == "get" })); n != 1 {
				t.Errorf("%d GET forms", n)
			}
			this, other := summaryCells(t, doc, "row-gap")
			if tc.gap != "" && this != tc.gap {
				t.Errorf("gap %q, want %q", this, tc.gap)
			}
			if other != tc.gapOther {
				t.Errorf("partner gap %q, want %q", other, tc.gapOther)
			}
			if this, _ := summaryCells(t, doc, "row-metallic"); tc.metallic != "" && this != tc.metallic {
				t.Errorf("metallic %q, want %q", this, tc.metallic)
			}
			if this, _ := summaryCells(t, doc, "row-modes"); tc.modes != "" && this != tc.modes {
				t.Errorf("modes %q, want %q", this, tc.modes)
			}
			if this, _ := summaryCells(t, doc, "row-g0"); tc.g0 != "" && this != tc.g0 {
				t.Errorf("G in 2e²/h %q, want %q", this, tc.g0)
			}
			for _, id := range []string{"row-size", "row-family", "row-g"} {
				if this, _ := summaryCells(t, doc, id); this == "" {
					t.Errorf("row %s is empty", id)
				}
			}
			heads := findAll(doc, func(n *html.Node) bool { return n.Data == "th" && attr(n, "id") == "partner-head" })
			if len(heads) != 1 || !strings.HasPrefix(text(heads[0]), tc.partnerHead) {
				t.Errorf("partner column head %v, want %q", heads, tc.partnerHead)
			}
			figs := findAll(doc, func(n *html.Node) bool { return n.Data == "figure" && byClass("plot")(n) })
			var srcs []string
			for _, f := range figs {
				img := findAll(f, byTag("img"))
				if len(img) != 1 {
					t.Fatalf("figure %s has %d images", attr(f, "id"), len(img))
				}
				srcs = append(srcs, strings.SplitN(attr(img[0], "src"), "?", 2)[0])
				var fr map[string]any
				if err := json.Unmarshal([]byte(attr(f, "data-frame")), &fr); err != nil || fr["right"] == nil {
					t.Errorf("figure %s data-frame %q", attr(f, "id"), attr(f, "data-frame"))
				}
			}
			want := []string{"/lattice/plot/bands.svg", "/lattice/plot/dos.svg", "/lattice/plot/modes.svg", "/lattice/plot/family.svg"}
			if !slices.Equal(srcs, want) {
				t.Errorf("figures %q, want %q", srcs, want)
			}
			notes := findAll(doc, func(n *html.Node) bool { return attr(n, "id") == "notes" })
			if len(notes) != 1 || !strings.Contains(text(notes[0]), "no edge relaxation") ||
				!strings.Contains(text(notes[0]), "design rules") {
				t.Errorf("model note missing")
			}
		})
	}
}

func TestLatticePageBadInput(t *testing.T) {
	a, lb := newTestApp(t, Config{})
	tests := []struct {
		query, key string
		status     int
		beside     bool // the message sits beside the field
	}{
		{"lines=0", "lines", http.StatusBadRequest, true},
		{"structure=tube&n=abc", "n", http.StatusBadRequest, true},
		{"structure=tube&n=4&m=9", "m", http.StatusBadRequest, true},
		{"ef=fifty", "ef", http.StatusBadRequest, true},
		{"emin=2&emax=1", "emax", http.StatusBadRequest, true},
		{"bogus=1", "bogus", http.StatusBadRequest, false},
		{"structure=tube&n=200&m=199&kpoints=4001", "kpoints", http.StatusUnprocessableEntity, true},
	}
	for _, tc := range tests {
		t.Run(tc.query, func(t *testing.T) {
			rec := do(a.Handler(), http.MethodGet, "/lattice?"+tc.query)
			if rec.Code != tc.status {
				t.Fatalf("status %d, want %d", rec.Code, tc.status)
			}
			doc := parseHTML(t, rec.Body)
			errs := findAll(doc, byClass("field-error"))
			if tc.beside {
				if len(errs) != 1 || attr(errs[0], "id") != tc.key+"-error" || text(errs[0]) == "" {
					t.Fatalf("field errors %d, want one beside %q", len(errs), tc.key)
				}
				ctl := findAll(doc, func(n *html.Node) bool { return attr(n, "name") == tc.key })
				if len(ctl) != 1 || attr(ctl[0], "aria-invalid") != "true" {
					t.Errorf("control %q not marked invalid", tc.key)
				}
			} else if len(errs) != 0 {
				t.Errorf("%d field errors for a key outside the form", len(errs))
			}
			callout := findAll(doc, func(n *html.Node) bool { return attr(n, "id") == "form-error" })
			if len(callout) != 1 || !strings.Contains(text(callout[0]), tc.key) {
				t.Errorf("no error callout naming %q", tc.key)
			}
			if len(findAll(doc, func(n *html.Node) bool { return attr(n, "id") == "result" })) != 0 {
				t.Error("a result is shown for bad input")
			}
		})
	}
	// The typed value stays in the form so the user can correct it.
	rec := do(a.Handler(), http.MethodGet, "/lattice?structure=tube&n=abc&temp=77")
	doc := parseHTML(t, rec.Body)
	if got := fieldValue(t, doc, "n"); got != "abc" {
		t.Errorf("n = %q, want the typed abc", got)
	}
	if got := fieldValue(t, doc, "temp"); got != "77" {
		t.Errorf("temp = %q, want 77", got)
	}
	if strings.Contains(lb.String(), `"level":"ERROR"`) {
		t.Errorf("bad input logged an error:\n%s", lb)
	}
}

func TestLatticePlots(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	queries := []string{"", "lines=8", "structure=zigzag&lines=12", "structure=tube&n=10&m=0",
		"structure=tube&n=7&m=4", "lines=40&emin=-0.3&emax=0.3", "emin=9&emax=12",
		// The widest ribbon: 80 bands fill the ±3 eV window.
		"lines=1998"}
	for _, q := range queries {
		for _, k := range latticePlotKinds {
			for _, format := range []string{"svg", "png"} {
				path := "/lattice/plot/" + string(k) + "." + format + "?" + q
				t.Run(path, func(t *testing.T) {
					rec := do(a.Handler(), http.MethodGet, path)
					if rec.Code != http.StatusOK {
						t.Fatalf("status %d: %s", rec.Code, rec.Body)
					}
					want := "image/svg+xml"
					if format == "png" {
						want = "image/png"
					}
					if ct := rec.Header().Get("Content-Type"); ct != want {
						t.Errorf("Content-Type %q, want %q", ct, want)
					}
					if n := rec.Body.Len(); n < 1000 || (format == "svg" && n >= 300<<10) {
						t.Errorf("%s is %d bytes, want 1 kB … 300 kB", format, n)
					}
				})
			}
		}
	}
	rec := do(a.Handler(), http.MethodGet, "/lattice/plot/bands.svg?lines=-1")
	if rec.Code != http.StatusBadRequest {
		t.Errorf("bad query: status %d, want 400", rec.Code)
	}
}

func TestLatticeFigures(t *testing.T) {
	ctx := context.Background()
	run := func(q string) *scenario.LatticeRequest {
		v, _ := url.ParseQuery(q)
		req, err := scenario.ParseLattice(v)
		if err != nil {
			t.Fatal(err)
		}
		return &req
	}
	t.Run("bands clipped to the window", func(t *testing.T) {
		req := run("lines=30&emin=-2&emax=2")
		res, err := latticeResult(ctx, *req)
		if err != nil {
			t.Fatal(err)
		}
		f := latticeFigure(latticeBands, res, nil)
		lo, hi := math.Inf(1), math.Inf(-1)
		named := 0
		for _, s := range f.Series {
			if s.Name != "" {
				named++
			}
			for _, y := range s.Y {
				lo, hi = math.Min(lo, y), math.Max(hi, y)
			}
		}
		// The N = 30 ribbon's bands reach ±3γ0 = ±8.1 eV (Nakada et al.
		// 1996), so clipping must bring them to the window exactly.
		if lo != -2 || hi != 2 {
			t.Errorf("band figure spans %g…%g eV, want −2…2", lo, hi)
		}
		if named != 2 { // "bands" and E_F
			t.Errorf("%d legend entries, want 2", named)
		}
	})
	t.Run("partner overlaid in its own role", func(t *testing.T) {
		req := run("lines=8")
		res, _ := latticeResult(ctx, *req)
		partner, _, err := latticePartner(ctx, *req)
		if err != nil || partner == nil {
			t.Fatalf("partner %v, %v", partner, err)
		}
		// The page's partner is the same structure the result summarises.
		if partner.GapEV != res.Partner.GapEV || partner.Observables.ConductanceS != res.Partner.ConductanceS {
			t.Errorf("partner result gap %g G %g, summary gap %g G %g", partner.GapEV,
				partner.Observables.ConductanceS, res.Partner.GapEV, res.Partner.ConductanceS)
		}
		for _, k := range []latticePlotKind{latticeDOS, latticeModes} {
			f := latticeFigure(k, res, partner)
			var roles []figure.Role
			for _, s := range f.Series {
				roles = append(roles, s.Role)
			}
			if len(roles) < 2 || roles[0] != figure.RoleScenario || roles[1] != figure.RoleRing {
				t.Errorf("%s roles %v, want the ribbon as scenario and the tube as ring", k, roles)
			}
			if k == latticeModes && f.Series[0].Kind != figure.Staircase {
				t.Errorf("M(E) is not a staircase")
			}
		}
	})
	t.Run("families as separate series", func(t *testing.T) {
		res, _ := latticeResult(ctx, *run("structure=tube&n=10&m=0"))
		f := latticeFigure(latticeFamily, res, nil)
		var names []string
		for _, s := range f.Series {
			names = append(names, s.Name)
			if s.Kind != figure.Markers {
				t.Errorf("series %q is not markers", s.Name)
			}
			// (n − m) ≡ 0 (mod 3) tubes are metallic in zone folding
			// (Hamada et al., PRL 68, 1579 (1992)).
			if s.Name == "(n − m) mod 3 = 0 (metallic)" && slices.Max(s.Y) != 0 {
				t.Errorf("family 0 has a gap %g eV", slices.Max(s.Y))
			}
		}
		want := []string{"(n − m) mod 3 = 0 (metallic)", "(n − m) mod 3 = 1", "(n − m) mod 3 = 2", "this structure"}
		if !slices.Equal(names, want) {
			t.Errorf("series %q, want %q", names, want)
		}
	})
}

// BenchmarkLatticeFigures draws each figure of the default N = 7 ribbon as
// SVG from a cached result: the cost of a render-cache miss.
func BenchmarkLatticeFigures(b *testing.B) {
	req, err := scenario.ParseLattice(url.Values{})
	if err != nil {
		b.Fatal(err)
	}
	ctx := context.Background()
	res, err := latticeResult(ctx, req)
	if err != nil {
		b.Fatal(err)
	}
	partner, _, err := latticePartner(ctx, req)
	if err != nil {
		b.Fatal(err)
	}
	for _, k := range latticePlotKinds {
		b.Run(string(k), func(b *testing.B) {
			b.ReportAllocs()
			var buf strings.Builder
			for b.Loop() {
				buf.Reset()
				if _, err := latticeFigure(k, res, partner).SVG(&buf); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(buf.Len()), "bytes/svg")
		})
	}
}

// BenchmarkLatticePage serves /lattice with warm caches: the page itself.
func BenchmarkLatticePage(b *testing.B) {
	a, err := New(Config{Logger: slog.New(slog.DiscardHandler)})
	if err != nil {
		b.Fatal(err)
	}
	defer a.Close()
	h := a.Handler()
	b.ReportAllocs()
	for b.Loop() {
		if rec := do(h, http.MethodGet, "/lattice?lines=8"); rec.Code != http.StatusOK {
			b.Fatal(rec.Code)
		}
	}
}

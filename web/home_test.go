package web

import (
	"encoding/json"
	"log/slog"
	"net/http"
	"net/url"
	"slices"
	"strings"
	"testing"

	"golang.org/x/net/html"

	"ringbox/internal/scenario"
)

// formValue returns the value the form would submit for the control named
// key: an input's value or a select's selected option.
func formValue(n *html.Node) string {
	if n.Data == "input" {
		return attr(n, "value")
	}
	for _, o := range findAll(n, byTag("option")) {
		for _, a := range o.Attr {
			if a.Key == "selected" {
				return attr(o, "value")
			}
		}
	}
	return ""
}

// controls maps each named form control of doc to its element.
func controls(doc *html.Node) map[string]*html.Node {
	m := map[string]*html.Node{}
	for _, n := range findAll(doc, func(n *html.Node) bool {
		return (n.Data == "input" || n.Data == "select") && attr(n, "name") != ""
	}) {
		m[attr(n, "name")] = n
	}
	return m
}

func TestConductorForm(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	tests := []struct {
		name  string
		query string
		want  map[string]string // control → submitted value
	}{
		{"defaults", "", map[string]string{"material": "gaas", "dims": "3", "lx": "10nm", "ly": "10nm",
			"lz": "100nm", "bx": "box", "by": "box", "bz": "open", "along": "", "emin": "0", "points": "400",
			"temp": "300", "gs": "2", "shape": "gaussian", "alpha": "", "ef": "", "emax": "", "density": ""}},
		{"query values", "material=si&lx=12nm&bz=box&along=x&temp=77&ef=0.1&eta=0.002&shape=lorentzian&at=0.05,0.1&mfp=50nm",
			map[string]string{"material": "si", "lx": "12nm", "bz": "box", "along": "x", "temp": "77", "ef": "0.1",
				"eta": "0.002", "shape": "lorentzian", "at": "0.05,0.1", "mfp": "50nm"}},
		{"custom masses", "material=custom&m=0.2&mz=0.9&gv=2&dims=2",
			map[string]string{"material": "custom", "m": "0.2", "mz": "0.9", "gv": "2", "dims": "2", "mx": ""}},
		{"density instead of ef", "density=1e6", map[string]string{"density": "1e6", "ef": ""}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			rec := do(a.Handler(), http.MethodGet, "/?"+tt.query)
			if rec.Code != http.StatusOK {
				t.Fatalf("status %d", rec.Code)
			}
			doc := parseHTML(t, rec.Body)
			forms := findAll(doc, byTag("form"))
			if len(forms) != 1 || attr(forms[0], "method") != "get" || attr(forms[0], "action") != "/" {
				t.Fatalf("want one GET form to /, got %d", len(forms))
			}
			c := controls(doc)
			// Every key a user sets has a control, and a label for it.
			for _, k := range scenario.Keys {
				if k == "budget" {
					continue // an expert key: carried when given, never shown
				}
				n, ok := c[k]
				if !ok {
					t.Errorf("no form control for key %q", k)
					continue
				}
				if len(findAll(doc, func(l *html.Node) bool { return l.Data == "label" && attr(l, "for") == attr(n, "id") })) != 1 {
					t.Errorf("control %q has no label", k)
				}
			}
			for k, want := range tt.want {
				if n, ok := c[k]; ok && formValue(n) != want {
					t.Errorf("%s = %q, want %q", k, formValue(n), want)
				}
			}
			// The custom masses sit in a fieldset labelled for them.
			for _, fs := range findAll(doc, byTag("fieldset")) {
				if attr(fs, "id") != "set-custom" {
					continue
				}
				if !strings.Contains(text(findAll(fs, byTag("legend"))[0]), "custom") {
					t.Error("the custom-mass fieldset's legend does not say custom")
				}
				got := controls(fs)
				for _, k := range []string{"m", "mx", "my", "mz", "gv"} {
					if got[k] == nil {
						t.Errorf("custom key %s outside the custom fieldset", k)
					}
				}
			}
			// No result without a query; a result with one.
			if hasResult := len(findAll(doc, func(n *html.Node) bool { return attr(n, "id") == "result" })) > 0; hasResult != (tt.query != "") {
				t.Errorf("result shown = %v for query %q", hasResult, tt.query)
			}
		})
	}
}

// fieldOf returns the .field element holding the control named key.
func fieldOf(doc *html.Node, key string) *html.Node {
	c := controls(doc)[key]
	for n := c; n != nil; n = n.Parent {
		if byClass("field")(n) {
			return n
		}
	}
	return nil
}

func TestConductorBadInput(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	tests := []struct {
		name, query, key string
		status           int
		inMsg            string
	}{
		{"negative length", "lx=-3nm", "lx", 400, ""},
		{"unknown unit", "lx=3parsec", "lx", 400, "unit"},
		{"huge length", "ly=5m", "ly", 400, "range"},
		{"bad boundary", "bz=wall", "bz", 400, ""},
		{"ef and density", "ef=0.1&density=1e18", "density", 400, "either"},
		{"emax below emin", "emin=0.2&emax=0.1", "emax", 400, "above"},
		{"transport axis outside dims", "dims=1&along=z", "along", 400, "axis"},
		{"custom mass", "material=custom&m=0", "m", 400, "range"},
		{"too many points", "points=100000", "points", 400, ""},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			rec := do(a.Handler(), http.MethodGet, "/?"+tt.query)
			if rec.Code != tt.status {
				t.Fatalf("status %d, want %d", rec.Code, tt.status)
			}
			doc := parseHTML(t, rec.Body)
			f := fieldOf(doc, tt.key)
			if f == nil {
				t.Fatalf("no field for %s", tt.key)
			}
			if attr(controls(f)[tt.key], "aria-invalid") != "true" {
				t.Errorf("%s not marked aria-invalid", tt.key)
			}
			errs := findAll(f, byClass("field-error"))
			if len(errs) != 1 || text(errs[0]) == "" || !strings.Contains(text(errs[0]), tt.inMsg) {
				t.Errorf("field error beside %s = %v, want one containing %q", tt.key, errs, tt.inMsg)
			}
			// Exactly one field is marked, and the page still has the form
			// with the user's input in it to correct.
			if n := len(findAll(doc, byClass("field-error"))); n != 1 {
				t.Errorf("%d field errors, want 1", n)
			}
			if len(findAll(doc, func(n *html.Node) bool { return attr(n, "id") == "result" })) != 0 {
				t.Error("a result is shown for bad input")
			}
			q, _ := url.ParseQuery(tt.query)
			if got, want := formValue(controls(doc)[tt.key]), q.Get(tt.key); got != want {
				t.Errorf("%s field = %q, want the user's %q", tt.key, got, want)
			}
		})
	}

	t.Run("unknown key", func(t *testing.T) {
		rec := do(a.Handler(), http.MethodGet, "/?colour=red")
		if rec.Code != 400 {
			t.Fatalf("status %d", rec.Code)
		}
		doc := parseHTML(t, rec.Body)
		alert := findAll(doc, func(n *html.Node) bool { return attr(n, "id") == "form-error" })
		if len(alert) != 1 || !strings.Contains(text(alert[0]), "colour") {
			t.Errorf("no message naming the unknown key: %v", alert)
		}
	})
}

func TestConductorResult(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	q := "material=gaas&dims=3&lx=10nm&ly=12nm&lz=100nm&bx=box&by=box&bz=open"
	rec := do(a.Handler(), http.MethodGet, "/?"+q)
	if rec.Code != 200 {
		t.Fatalf("status %d", rec.Code)
	}
	doc := parseHTML(t, rec.Body)
	v, _ := url.ParseQuery(q)
	s, err := scenario.Parse(v)
	if err != nil {
		t.Fatal(err)
	}
	canon := s.Canonical()

	byID := func(id string) *html.Node {
		n := findAll(doc, func(n *html.Node) bool { return attr(n, "id") == id })
		if len(n) != 1 {
			t.Fatalf("%d elements with id %s", len(n), id)
		}
		return n[0]
	}
	t.Run("summary table", func(t *testing.T) {
		tab := byID("summary")
		var variants []string
		for _, tr := range findAll(findAll(tab, byTag("tbody"))[0], byTag("tr")) {
			variants = append(variants, text(tr.FirstChild))
		}
		if !slices.Equal(variants, scenario.Variants) {
			t.Errorf("rows %q, want %q", variants, scenario.Variants)
		}
		head := text(findAll(tab, byTag("thead"))[0])
		for _, col := range []string{"states N(E_F)", "modes M(E_F)", "electrons at T"} {
			if !strings.Contains(head, col) {
				t.Errorf("no column %q in %q", col, head)
			}
		}
		if foot := text(findAll(tab, byTag("tfoot"))[0]); !strings.Contains(foot, "box vs ring") || !strings.Contains(foot, "%") {
			t.Errorf("no box–ring difference row: %q", foot)
		}
		// A 10 nm × 12 nm GaAs wire at E_F = 0.05 eV is below its first
		// subband (≈ 0.09 eV: 1D hard-wall levels ħ²π²/2m*L², any
		// quantum-mechanics text), so box counts 0 states and 0 modes.
		row := findAll(findAll(tab, byTag("tbody"))[0], byTag("tr"))[1]
		cells := findAll(row, byTag("td"))
		if text(cells[2]) != "0" || text(cells[3]) != "0" {
			t.Errorf("box row %q: want 0 states and 0 modes at E_F", text(row))
		}
	})
	t.Run("levels and method", func(t *testing.T) {
		if rows := findAll(byID("levels"), byTag("tr")); len(rows) != pageLevels+1 {
			t.Errorf("levels table has %d rows, want %d and a header", len(rows)-1, pageLevels)
		}
		m := text(byID("method"))
		for _, w := range []string{"exact", "mean level spacing", "states with E ≤ E max"} {
			if !strings.Contains(m, w) {
				t.Errorf("method table lacks %q: %s", w, m)
			}
		}
	})
	t.Run("observables", func(t *testing.T) {
		cards := text(byID("observables"))
		for _, w := range []string{"cm⁻¹", "µS", "2e²/h", "kΩ", "aF", "E_F", "300 K"} {
			if !strings.Contains(cards, w) {
				t.Errorf("cards lack %q: %s", w, cards)
			}
		}
	})
	t.Run("figures", func(t *testing.T) {
		figs := findAll(doc, byClass("plot"))
		if len(figs) != 3 {
			t.Fatalf("%d figures", len(figs))
		}
		for i, k := range []string{"states", "dos", "modes"} {
			img := findAll(figs[i], byTag("img"))
			if len(img) != 1 || attr(img[0], "src") != "/plot/"+k+".svg?"+canon || attr(img[0], "alt") == "" {
				t.Errorf("figure %d img = %v", i, img)
			}
			var fr map[string]any
			if err := json.Unmarshal([]byte(attr(figs[i], "data-frame")), &fr); err != nil {
				t.Fatalf("data-frame: %v", err)
			}
			// The keys static/readout.js reads.
			for _, key := range []string{"left", "top", "right", "bottom", "xmin", "xmax", "ymin", "ymax", "width", "height"} {
				if _, ok := fr[key].(float64); !ok {
					t.Errorf("figure %s frame lacks %s: %v", k, key, fr)
				}
			}
			if fr["right"].(float64) <= fr["left"].(float64) || fr["xmax"].(float64) != 0.3 {
				t.Errorf("figure %s frame %v", k, fr)
			}
		}
	})
	t.Run("link and notes", func(t *testing.T) {
		if href := attr(byID("share-link"), "href"); href != "/?"+canon {
			t.Errorf("share link %q, want /?%s", href, canon)
		}
		if !strings.Contains(text(byID("share-link")), canon) {
			t.Error("the link does not show the canonical URL")
		}
		notes := strings.ToLower(text(byID("notes")))
		if !strings.Contains(notes, "idealised") || !strings.Contains(notes, "measurement") {
			t.Errorf("notes lack the model's limits: %s", notes)
		}
	})
	t.Run("hand-set alpha is pointed out", func(t *testing.T) {
		rec := do(a.Handler(), http.MethodGet, "/?material=si&alpha=0.5")
		notes := findAll(parseHTML(t, rec.Body), func(n *html.Node) bool { return attr(n, "id") == "notes" })
		if len(notes) != 1 || !strings.Contains(text(notes[0]), "set by hand") {
			t.Error("no note that α differs from the material's")
		}
	})
	t.Run("point values at given energies", func(t *testing.T) {
		rec := do(a.Handler(), http.MethodGet, "/?at=0.1,0.2")
		rows := findAll(parseHTML(t, rec.Body), func(n *html.Node) bool { return attr(n, "id") == "point-values" })
		if len(rows) != 1 || len(findAll(rows[0], byTag("tr"))) != 3 {
			t.Error("no point-value table with two rows")
		}
	})
}

// nastyQueries are inputs a user or a script may send; none may give a 5xx.
var nastyQueries = []string{
	"lx=", "lx=%00", "lx=1e309nm", "lx=NaN", "lx=-0", "lx=0.1nm&ly=0.1nm&lz=0.1nm&bz=box",
	"lx=1m&ly=1m&lz=1m&bz=box", "dims=0", "dims=4", "dims=3.5", "dims=1&lx=1um", "dims=2&along=y&by=box",
	"material=", "material=unobtainium", "material=CUSTOM&m=1e-9", "material=custom&gv=999",
	"gs=3", "alpha=-1", "alpha=Inf", "emin=-11", "emax=1001", "emin=5&emax=5", "points=1", "points=-5",
	"points=4000", "temp=-1", "temp=1e9", "temp=0", "ef=abc", "ef=-10", "density=0", "density=-1",
	"density=1e30", "density=1e25", "eta=0", "eta=1e-9", "eta=100", "shape=square", "mfp=0", "mfp=1e99m",
	"at=" + strings.Repeat("0.1,", 70) + "0.1", "at=,,,", "at=0.1,abc", "budget=0", "budget=1e13",
	"lx=1nm&lx=2nm", "%zz", "lx=%zz", ";", "along=w", "bx=ring&by=ring&bz=ring&lx=1nm&ly=1nm&lz=1nm",
	"material=cu&lx=20nm&ly=20nm&lz=20nm&bz=box&temp=0", "material=si&dims=1&lx=0.1nm",
	"material=free&emin=-10&emax=1000&points=4000&dims=1",
}

func TestNoServerErrorFromInput(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	for _, q := range nastyQueries {
		for _, path := range []string{"/", "/plot/states.svg", "/plot/dos.svg", "/plot/modes.svg", "/api/v1/count", "/export/curves.csv"} {
			rec := do(a.Handler(), http.MethodGet, path+"?"+q)
			if rec.Code >= 500 {
				t.Errorf("%s?%s: status %d: %.200s", path, q, rec.Code, rec.Body.String())
			}
		}
	}
}

// discard is a logger that drops everything, for benchmarks and fuzzing.
func discard() *slog.Logger { return slog.New(slog.DiscardHandler) }

// FuzzConductorQuery sends arbitrary query strings to the page and the
// API: nothing a user types may give a 5xx (a deadline is not a user
// error but also no crash, so 503/504 are allowed).
func FuzzConductorQuery(f *testing.F) {
	for _, q := range nastyQueries[:20] {
		f.Add(q)
	}
	a, err := New(Config{Logger: discard()})
	if err != nil {
		f.Fatal(err)
	}
	f.Fuzz(func(t *testing.T, q string) {
		for _, path := range []string{"/", "/api/v1/count"} {
			req, err := http.NewRequest(http.MethodGet, path, nil)
			if err != nil {
				t.Fatal(err)
			}
			req.URL.RawQuery = q
			rec := recorderFor(a.Handler(), req)
			if rec.Code >= 500 && rec.Code != 503 && rec.Code != 504 {
				t.Errorf("%s%s: status %d", path, q, rec.Code)
			}
		}
	})
}

package web

import (
	"net/http"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"golang.org/x/net/html"

	"ringbox/web/views"
)

// The method page has every anchor other pages link to, its formulas are
// MathML (no script), and its own table of contents points at them.
func TestMethodPage(t *testing.T) {
	a, _ := newTestApp(t, Config{DBPath: filepath.Join(t.TempDir(), "r.db")})
	rec := do(a.Handler(), http.MethodGet, "/method")
	if rec.Code != http.StatusOK {
		t.Fatalf("status %d", rec.Code)
	}
	doc := parseHTML(t, rec.Body)
	ids := map[string]*html.Node{}
	for _, n := range findAll(doc, func(n *html.Node) bool { return n.Type == html.ElementNode && attr(n, "id") != "" }) {
		ids[attr(n, "id")] = n
	}
	for _, anchor := range views.MethodAnchors {
		n, ok := ids[anchor]
		if !ok {
			t.Errorf("no section #%s", anchor)
			continue
		}
		if n.Data != "section" || len(findAll(n, byTag("h2"))) == 0 {
			t.Errorf("#%s is a <%s> without a heading", anchor, n.Data)
		}
	}
	for _, want := range []string{"counting", "boundary", "dispersion", "smooth", "observables", "lattice", "limits"} {
		if !slices.Contains(views.MethodAnchors, want) {
			t.Errorf("anchor %s missing from MethodAnchors", want)
		}
	}
	maths := findAll(doc, byTag("math"))
	if len(maths) < 15 {
		t.Errorf("%d <math> elements, want the formulas in MathML", len(maths))
	}
	for _, s := range findAll(doc, byTag("script")) {
		if attr(s, "src") == "" {
			t.Errorf("inline script on the method page")
		}
	}
	for _, l := range findAll(doc, byTag("a")) {
		if h := attr(l, "href"); len(h) > 1 && h[0] == '#' {
			if _, ok := ids[h[1:]]; !ok {
				t.Errorf("link %s has no target", h)
			}
		}
	}
	// The sections name what the model leaves out.
	limits := text(ids["limits"])
	for _, w := range []string{"self-consistent", "disorder", "spin–orbit", "Nearest-neighbour"} {
		if !strings.Contains(limits, w) {
			t.Errorf("limits section does not mention %q", w)
		}
	}
}

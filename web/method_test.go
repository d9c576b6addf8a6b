package web

import (
	"context"
	"net/http"
	"net/http/httptest"
	"path/filepath"
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
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

// In a real browser the MathML formulas lay out (each <math> has a size,
// a fraction is taller than a line of text), the page raises no console
// error under the site's CSP, and a screenshot is kept for a person.
func TestBrowserMethodPage(t *testing.T) {
	a, _ := newTestApp(t, Config{DBPath: filepath.Join(t.TempDir(), "r.db")})
	srv := httptest.NewServer(a.Handler())
	defer srv.Close()
	ctx := newBrowser(t)
	messages := consoleLog(ctx)
	var sizes [][2]float64
	var png []byte
	timeout(t, ctx,
		chromedp.EmulateViewport(1280, 900),
		chromedp.Navigate(srv.URL+"/method"),
		chromedp.WaitVisible(chromedp.CSS("#limits")),
		chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
			var err error
			sizes, err = chromedp.Evaluate[[][2]float64](
				`Array.from(document.querySelectorAll("math")).map(m => { const r = m.getBoundingClientRect(); return [r.width, r.height]; })`)(ctx, tg)
			return err
		}),
		chromedp.Sleep(200*time.Millisecond),
		chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
			var err error
			png, err = chromedp.FullScreenshot(90)(ctx, tg)
			return err
		}),
	)
	if len(sizes) < 15 {
		t.Fatalf("%d formulas laid out", len(sizes))
	}
	tallest := 0.0
	for i, s := range sizes {
		if s[0] <= 0 || s[1] <= 0 {
			t.Errorf("formula %d has size %v", i, s)
		}
		tallest = max(tallest, s[1])
	}
	// A block formula with a fraction or sum stands taller than a 16 px line:
	// the browser laid out MathML rather than showing its text in a row.
	if tallest < 30 {
		t.Errorf("tallest formula %.0f px: MathML not laid out", tallest)
	}
	if errs := consoleErrors(messages()); len(errs) > 0 {
		t.Errorf("console errors on /method:\n%s", strings.Join(errs, "\n"))
	}
	saveScreenshot(t, "method.png", png)
}

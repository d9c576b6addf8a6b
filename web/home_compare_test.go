package web

import (
	"net/http"
	"net/url"
	"strings"
	"testing"

	"golang.org/x/net/html"
)

// TestConductorComparisonLinks: the conductor page adds its scenario to a
// comparison and keeps the others in hidden cmp fields, without JavaScript.
func TestConductorComparisonLinks(t *testing.T) {
	a, _ := newTestApp(t, Config{DBPath: t.TempDir() + "/r.db"})
	other := "material=inas&dims=3&lx=9nm"
	rec := do(a.Handler(), http.MethodGet, "/?lx=8nm&points=20&cmp="+url.QueryEscape(other))
	if rec.Code != http.StatusOK {
		t.Fatalf("status %d: %s", rec.Code, rec.Body.String())
	}
	doc := parseHTML(t, rec.Body)
	add := findAll(doc, func(n *html.Node) bool { return attr(n, "id") == "add-to-compare" })
	if len(add) != 1 {
		t.Fatalf("%d add-to-compare links", len(add))
	}
	u, err := url.Parse(attr(add[0], "href"))
	if err != nil || u.Path != "/compare" {
		t.Fatalf("add link %q", attr(add[0], "href"))
	}
	s := u.Query()["s"]
	if len(s) != 2 || s[0] != other || !strings.Contains(s[1], "lx=8nm") {
		t.Errorf("add link carries %q", s)
	}
	var hidden []string
	for _, in := range findAll(doc, byTag("input")) {
		if attr(in, "type") == "hidden" && attr(in, "name") == "cmp" {
			hidden = append(hidden, attr(in, "value"))
		}
	}
	if len(hidden) != 1 || hidden[0] != other {
		t.Errorf("hidden cmp fields %q", hidden)
	}
	if back := findAll(doc, func(n *html.Node) bool { return attr(n, "id") == "back-to-compare" }); len(back) != 1 {
		t.Errorf("no link back to the comparison")
	}
}

package web

import (
	"encoding/json"
	"net/http"
	"path/filepath"
	"strings"
	"testing"

	"golang.org/x/net/html"

	"ringbox/internal/validation"
)

// /validation shows every row of the reference table, computed live, and
// all pass (the rows and their sources: testdata/validation/checks.tsv).
func TestValidationPage(t *testing.T) {
	a, _ := newTestApp(t, Config{DBPath: filepath.Join(t.TempDir(), "r.db")})
	rec := do(a.Handler(), http.MethodGet, "/validation")
	if rec.Code != http.StatusOK {
		t.Fatalf("status %d: %s", rec.Code, rec.Body.String())
	}
	doc := parseHTML(t, rec.Body)
	checks := validation.Default()
	rows := findAll(doc, func(n *html.Node) bool { return n.Data == "tr" && strings.HasPrefix(attr(n, "id"), "check-") })
	if len(rows) != len(checks) {
		t.Fatalf("%d rows, want %d", len(rows), len(checks))
	}
	for i, r := range rows {
		c := checks[i]
		txt := text(r)
		if attr(r, "id") != "check-"+c.ID || !strings.Contains(txt, "pass") || !strings.Contains(txt, c.Source) {
			t.Errorf("row %d (%s): %q", i, c.ID, txt)
		}
	}
	if s := findAll(doc, func(n *html.Node) bool { return attr(n, "id") == "check-summary" }); len(s) != 1 || !strings.Contains(text(s[0]), "All") {
		t.Errorf("summary missing or not all passing")
	}
	// Rows computed by a page link to it, filled in.
	links := findAll(rows[0], byTag("a"))
	if len(links) != 1 || !strings.HasPrefix(attr(links[0], "href"), "/?") {
		t.Errorf("first row links %v", links)
	}
}

func TestValidationAPI(t *testing.T) {
	a, _ := newTestApp(t, Config{DBPath: filepath.Join(t.TempDir(), "r.db")})
	rec := do(a.Handler(), http.MethodGet, "/api/v1/validation")
	if rec.Code != http.StatusOK {
		t.Fatalf("status %d", rec.Code)
	}
	var rep struct {
		Checks []struct {
			ID       string
			Computed *float64
			Pass     bool
		}
		Passed, Failed int
	}
	if err := json.Unmarshal(rec.Body.Bytes(), &rep); err != nil {
		t.Fatal(err)
	}
	if rep.Failed != 0 || rep.Passed != len(validation.Default()) {
		t.Errorf("passed %d, failed %d", rep.Passed, rep.Failed)
	}
	// The report is kept after the first run: a second request is the
	// same report without running the engines again.
	if checkReport.rep == nil {
		t.Error("report not cached")
	}
	rec2 := do(a.Handler(), http.MethodGet, "/api/v1/validation")
	if rec2.Body.String() != rec.Body.String() {
		t.Error("second answer differs")
	}
}

func TestDisplayUnit(t *testing.T) {
	tests := []struct{ in, want string }{
		{"cm^-3", "cm⁻³"},
		{"cm^-2 meV^-1", "cm⁻² meV⁻¹"},
		{"1", ""},
		{"S", "S"},
		{"2e²/h", "2e²/h"},
		{"m^2", "m²"},
	}
	for _, tt := range tests {
		t.Run(tt.in, func(t *testing.T) {
			if got := displayUnit(tt.in); got != tt.want {
				t.Errorf("got %q, want %q", got, tt.want)
			}
		})
	}
}

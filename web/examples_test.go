package web

import (
	"context"
	"net/http"
	"net/url"
	"path/filepath"
	"testing"
	"time"

	"ringbox/internal/scenario"
)

// Every worked example is a valid scenario or lattice request that the
// engines compute within a page's time, and the page lists each as a link.
func TestExamplesRun(t *testing.T) {
	ex := Examples()
	if len(ex) < 6 {
		t.Fatalf("%d examples, want at least six", len(ex))
	}
	seen := map[string]bool{}
	for _, e := range ex {
		t.Run(e.ID, func(t *testing.T) {
			if seen[e.ID] {
				t.Fatalf("id used twice")
			}
			seen[e.ID] = true
			if e.Title == "" || e.Shows == "" {
				t.Error("title or sentence missing")
			}
			ctx, cancel := context.WithTimeout(context.Background(), 10*time.Second)
			defer cancel()
			switch e.Page {
			case "/":
				s, err := scenario.Parse(e.Values())
				if err != nil {
					t.Fatal(err)
				}
				res, err := scenario.Run(ctx, s)
				if err != nil {
					t.Fatal(err)
				}
				t.Logf("%s: E_F %.4g eV, G %.4g S, density %.4g %s, method %s", e.ID, res.EFEV,
					res.Observables["scenario"].ConductanceS, res.Observables["scenario"].Density, res.Observables["scenario"].DensityUnit, res.Method)
			case "/lattice":
				r, err := scenario.ParseLattice(e.Values())
				if err != nil {
					t.Fatal(err)
				}
				res, err := scenario.RunLattice(ctx, r)
				if err != nil {
					t.Fatal(err)
				}
				t.Logf("%s: gap %.4g eV, metallic %v, G %.4g S", e.ID, res.GapEV, res.Metallic, res.Observables.ConductanceS)
			default:
				t.Fatalf("page %q", e.Page)
			}
		})
	}
}

// Claims the sentences make about the numbers, checked against the engines.
func TestExamplesClaims(t *testing.T) {
	ctx := context.Background()
	byID := map[string]Example{}
	for _, e := range Examples() {
		byID[e.ID] = e
	}
	lat := func(id string) (gap float64, metallic bool, g float64) {
		r, err := scenario.ParseLattice(byID[id].Values())
		if err != nil {
			t.Fatal(err)
		}
		res, err := scenario.RunLattice(ctx, r)
		if err != nil {
			t.Fatal(err)
		}
		return res.GapEV, res.Metallic, res.Observables.ConductanceS
	}
	if gap, metallic, _ := lat("tube-10-0"); metallic || gap < 0.94 || gap > 0.96 {
		t.Errorf("(10,0): gap %g, metallic %v; the example says about 0.95 eV", gap, metallic)
	}
	if _, metallic, g := lat("tube-6-6"); !metallic || g < 150e-6 || g > 160e-6 {
		t.Errorf("(6,6): metallic %v, G %g S; the example says 4e²/h ≈ 155 µS", metallic, g)
	}
	if gap, _, _ := lat("armchair-7"); gap < 1.26 || gap > 1.28 {
		t.Errorf("N = 7 armchair: gap %g; the example says about 1.27 eV", gap)
	}
	run := func(id string) *scenario.Result {
		s, err := scenario.Parse(byID[id].Values())
		if err != nil {
			t.Fatal(err)
		}
		res, err := scenario.Run(ctx, s)
		if err != nil {
			t.Fatal(err)
		}
		return res
	}
	// Cu line: λ/(λ + L) = 40/1040 of the ballistic conductance.
	cu := run("cu-line").Observables["scenario"]
	if d := cu.Transmission - 40.0/1040; d > 1e-12 || d < -1e-12 {
		t.Errorf("Cu transmission %g", cu.Transmission)
	}
	// InAs wire: about 2.4 × 2e²/h with hard walls, nearly twice with rings.
	inas := run("inas-nanowire").Observables
	box, ring := inas["box"].ConductanceG0, inas["ring"].ConductanceG0
	if box < 2.2 || box > 2.6 || ring/box < 1.7 || ring/box > 2.1 {
		t.Errorf("InAs wire: box %g, ring %g × 2e²/h", box, ring)
	}
}

func TestExamplesPage(t *testing.T) {
	a, _ := newTestApp(t, Config{DBPath: filepath.Join(t.TempDir(), "r.db")})
	rec := do(a.Handler(), http.MethodGet, "/examples")
	if rec.Code != http.StatusOK {
		t.Fatalf("status %d", rec.Code)
	}
	doc := parseHTML(t, rec.Body)
	hrefs := map[string]bool{}
	for _, l := range findAll(doc, byTag("a")) {
		hrefs[attr(l, "href")] = true
	}
	for _, e := range Examples() {
		if !hrefs[e.Href()] {
			t.Errorf("no link to %s", e.Href())
		}
		u, err := url.Parse(e.Href())
		if err != nil || u.Path != e.Page {
			t.Errorf("href %s", e.Href())
		}
		// The link opens the page and it answers.
		if rec := do(a.Handler(), http.MethodGet, e.Href()); rec.Code != http.StatusOK && !(e.Page == "/lattice" && rec.Code == http.StatusNotFound) {
			t.Errorf("%s: status %d", e.Href(), rec.Code)
		}
	}
}

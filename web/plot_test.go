package web

import (
	"bytes"
	"context"
	"encoding/xml"
	"flag"
	"net/http"
	"net/url"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"ringbox/internal/figure"
	"ringbox/internal/scenario"
)

var regen = flag.Bool("regen", false, "rewrite the golden files in testdata/web")

const goldenDir = "../testdata/web"

// goldenQuery is a small fixed scenario: a 6 nm × 8 nm GaAs box, fully
// confined, on a 120-point grid, so every exact curve is a staircase.
const goldenQuery = "material=gaas&dims=2&lx=6nm&ly=8nm&bx=box&by=ring&emax=0.4&points=120&temp=4"

func mustResult(t testing.TB, q string) *scenario.Result {
	t.Helper()
	v, err := url.ParseQuery(q)
	if err != nil {
		t.Fatal(err)
	}
	s, err := scenario.Parse(v)
	if err != nil {
		t.Fatal(err)
	}
	res, err := scenario.Run(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

// TestGoldenStatesSVG compares the figure route's N(E) of a fixed
// scenario byte for byte with testdata/web/states.svg; after an intended
// change run `go test ./web -run Golden -regen` and look at the new file.
func TestGoldenStatesSVG(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	rec := do(a.Handler(), http.MethodGet, "/plot/states.svg?"+goldenQuery)
	if rec.Code != 200 {
		t.Fatalf("status %d: %s", rec.Code, rec.Body)
	}
	path := filepath.Join(goldenDir, "states.svg")
	if *regen {
		if err := os.MkdirAll(goldenDir, 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, rec.Body.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test -regen to create it)", err)
	}
	if !bytes.Equal(rec.Body.Bytes(), want) {
		t.Errorf("states.svg differs from %s (%d vs %d bytes); run go test -regen and inspect", path, rec.Body.Len(), len(want))
	}
}

func TestPlotRoutes(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	// A 1 µm GaAs cube holds about 1.6×10⁷ states below 0.3 eV: the
	// largest figure a typical request draws.
	big := "lx=1um&ly=1um&lz=1um&bz=box"
	for _, k := range []string{"states", "dos", "modes"} {
		t.Run(k+".svg", func(t *testing.T) {
			rec := do(a.Handler(), http.MethodGet, "/plot/"+k+".svg?"+big)
			if rec.Code != 200 || rec.Header().Get("Content-Type") != "image/svg+xml" {
				t.Fatalf("status %d, type %q", rec.Code, rec.Header().Get("Content-Type"))
			}
			if n := rec.Body.Len(); n >= 300_000 {
				t.Errorf("SVG is %d bytes, want < 300 kB", n)
			}
			if err := xml.Unmarshal(rec.Body.Bytes(), new(struct{})); err != nil {
				t.Errorf("not well-formed XML: %v", err)
			}
			for _, w := range []string{"energy E (eV)", "scenario (= box)", "ring"} {
				if !bytes.Contains(rec.Body.Bytes(), []byte(w)) {
					t.Errorf("no %q in the figure", w)
				}
			}
			if csp := rec.Header().Get("Content-Security-Policy"); !strings.Contains(csp, "style-src 'unsafe-inline'") {
				t.Errorf("figure CSP %q refuses its own style attributes", csp)
			}
		})
		t.Run(k+".png", func(t *testing.T) {
			rec := do(a.Handler(), http.MethodGet, "/plot/"+k+".png?"+big)
			if rec.Code != 200 || rec.Header().Get("Content-Type") != "image/png" ||
				!bytes.HasPrefix(rec.Body.Bytes(), []byte("\x89PNG\r\n\x1a\n")) {
				t.Fatalf("status %d, type %q", rec.Code, rec.Header().Get("Content-Type"))
			}
		})
	}
	t.Run("bad input", func(t *testing.T) {
		rec := do(a.Handler(), http.MethodGet, "/plot/dos.svg?lz=zero")
		if rec.Code != 400 || !strings.HasPrefix(rec.Header().Get("Content-Type"), "text/html") {
			t.Errorf("status %d, type %q", rec.Code, rec.Header().Get("Content-Type"))
		}
	})
}

// seriesByName indexes a figure's series by legend text.
func seriesByName(f figure.Figure) map[string]figure.Series {
	m := map[string]figure.Series{}
	for _, s := range f.Series {
		m[s.Name] = s
	}
	return m
}

func TestBuildFigure(t *testing.T) {
	tests := []struct {
		name   string
		query  string
		kind   plotKind
		series []string // legend entries in order
		kinds  map[string]figure.Kind
		logY   bool
		ylabel string
	}{
		{"box wire N(E): scenario is box, lines with an open axis", "lx=10nm&ly=10nm&lz=100nm", plotStates,
			[]string{"scenario (= box)", "ring", "continuum", "smooth", "E_F"},
			map[string]figure.Kind{"scenario (= box)": figure.Line, "continuum": figure.Line}, false, "states N(E)"},
		{"box wire M(E): transverse box is confined, so staircases", "lx=10nm&ly=10nm&lz=100nm", plotModes,
			[]string{"scenario (= box)", "ring", "continuum", "E_F"},
			map[string]figure.Kind{"scenario (= box)": figure.Staircase, "ring": figure.Staircase, "continuum": figure.Line}, false, "modes M(E)"},
		{"ring box N(E): scenario is ring", "lx=8nm&ly=8nm&lz=8nm&bx=ring&by=ring&bz=ring", plotStates,
			[]string{"scenario (= ring)", "box", "continuum", "smooth", "E_F"},
			map[string]figure.Kind{"scenario (= ring)": figure.Staircase, "box": figure.Staircase}, false, "states N(E)"},
		{"mixed box D(E): four curves, all lines", "lx=8nm&ly=9nm&lz=10nm&bz=ring", plotDOS,
			[]string{"scenario", "box", "ring", "continuum", "smooth", "E_F"},
			map[string]figure.Kind{"scenario": figure.Line, "box": figure.Line}, false, "D(E) (states/eV)"},
		// N of a 1 µm cube runs from 2 to ~1.6×10⁷: seven decades.
		{"1 µm cube N(E): log y", "lx=1um&ly=1um&lz=1um&bz=box", plotStates,
			[]string{"scenario (= box)", "ring", "continuum", "smooth", "E_F"}, nil, true, "states N(E)"},
		{"open slab: every variant the same", "dims=1&lx=1um&bx=open", plotStates,
			[]string{"scenario (= box = ring = continuum)", "smooth", "E_F"}, nil, false, "states N(E)"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			res := mustResult(t, tt.query)
			before := slices.Clone(res.Curves.States["continuum"])
			f := buildFigure(tt.kind, res)
			var names []string
			for _, s := range f.Series {
				names = append(names, s.Name)
			}
			if strings.Join(names, "|") != strings.Join(tt.series, "|") {
				t.Errorf("series %q, want %q", names, tt.series)
			}
			by := seriesByName(f)
			for n, k := range tt.kinds {
				if by[n].Kind != k {
					t.Errorf("%s drawn as %v, want %v", n, by[n].Kind, k)
				}
			}
			if f.LogY != tt.logY || f.YLabel != tt.ylabel || f.XLabel != "energy E (eV)" {
				t.Errorf("LogY %v, labels %q %q", f.LogY, f.XLabel, f.YLabel)
			}
			// The result's curves are shared with the cache: untouched.
			if !slices.Equal(before, res.Curves.States["continuum"]) {
				t.Error("building the figure changed the result's curves")
			}
			var buf bytes.Buffer
			if _, err := f.SVG(&buf); err != nil {
				t.Fatal(err)
			}
		})
	}
}

package web

import (
	"bytes"
	"image/png"
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// TestPNGFigures: every .png route answers a PNG (signature per ISO/IEC
// 15948 §5.2) of the stated size at 200 dpi: 7 × 4.2 in for the conductor and
// comparison figures, 5.6 × 4.2 in for the lattice and sweep ones (four or
// two to a row).
func TestPNGFigures(t *testing.T) {
	a, _ := newTestApp(t, Config{DBPath: t.TempDir() + "/r.db"})
	s := url.QueryEscape("material=gaas&lx=8nm&ly=9nm&points=40")
	sweep := "material=gaas&sweep=all&from=5nm&to=20nm&steps=4"
	routes := []string{
		"/plot/states.png?points=40", "/plot/dos.png?points=40", "/plot/modes.png?points=40",
		"/compare/plot/states.png?s=" + s, "/compare/plot/dos.png?s=" + s, "/compare/plot/modes.png?s=" + s,
		"/lattice/plot/bands.png?structure=armchair&lines=7", "/lattice/plot/dos.png?structure=armchair&lines=7",
		"/lattice/plot/modes.png?structure=armchair&lines=7", "/lattice/plot/family.png?structure=armchair&lines=7",
		"/sweep/plot/values.png?" + sweep, "/sweep/plot/deviation.png?" + sweep,
	}
	for _, route := range routes {
		t.Run(route, func(t *testing.T) {
			rec := do(a.Handler(), http.MethodGet, route)
			if rec.Code != http.StatusOK || rec.Header().Get("Content-Type") != "image/png" {
				t.Fatalf("status %d, type %q: %.200s", rec.Code, rec.Header().Get("Content-Type"), rec.Body.String())
			}
			b := rec.Body.Bytes()
			if !bytes.HasPrefix(b, []byte("\x89PNG\r\n\x1a\n")) {
				t.Fatalf("no PNG signature")
			}
			cfg, err := png.DecodeConfig(bytes.NewReader(b))
			if err != nil {
				t.Fatal(err)
			}
			wantW := 1400
			if strings.HasPrefix(route, "/lattice/") || strings.HasPrefix(route, "/sweep/") {
				wantW = 1120
			}
			if cfg.Width != wantW || cfg.Height != 840 {
				t.Errorf("%d × %d px, want %d × 840", cfg.Width, cfg.Height, wantW)
			}
		})
	}
}

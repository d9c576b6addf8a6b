package web

import (
	"bytes"
	"image/png"
	"math"
	"net/http"
	"net/url"
	"testing"
)

// TestPNGFigures: every .png route answers a PNG (signature per ISO/IEC
// 15948 §5.2) of the stated size: plotWidthIn × plotHeightIn (5.6 × 4.2 in)
// at plotPNGDPI (200 dpi), 1120 × 840 px.
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
			wantW, wantH := int(math.Round(plotWidthIn*plotPNGDPI)), int(math.Round(plotHeightIn*plotPNGDPI))
			if wantW != 1120 || wantH != 840 {
				t.Fatalf("stated size changed: %d × %d", wantW, wantH)
			}
			if cfg.Width != wantW || cfg.Height != wantH {
				t.Errorf("%d × %d px, want %d × %d", cfg.Width, cfg.Height, wantW, wantH)
			}
		})
	}
}

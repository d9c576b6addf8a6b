package web

import (
	"bytes"
	"encoding/json"
	"net/http"

	"ringbox/internal/figure"
)

// Serving figures: every figure route (the conductor's, the lattice's, the
// sweep's and the comparison's) draws through renderFigure, which keeps the
// SVG or PNG in the render cache and the SVG's Frame beside it, and answers
// through writeFigure, which sets the headers a figure needs.

// plotPNGDPI suits slides: a 5.6 × 4.2 in figure is a 1120 × 840 px image.
const plotPNGDPI = 200

// plotCacheControl lets a browser keep a figure for an hour: the same
// query always draws the same figure, but a new release may draw it better.
const plotCacheControl = "public, max-age=3600"

// svgSecurityPolicy replaces the page policy on a figure: gonum's SVG
// styles its elements with style attributes, which the page policy
// (style-src 'self') would refuse when the figure is opened on its own. The
// figure has no script and loads nothing.
const svgSecurityPolicy = "default-src 'none'; style-src 'unsafe-inline'; img-src data:"

// svgPlot is a rendered figure, its content type and, for an SVG, where
// its data area landed.
type svgPlot struct {
	body        []byte
	contentType string
	frame       figure.Frame
}

// frames keeps the Frame of each SVG in the render cache, under the same
// key, so a page can hand it to readout.js without drawing the figure
// again. It holds a few hundred bytes per figure, so it can be larger than
// the render cache and rarely loses a frame whose SVG is still cached; when
// it does, renderFigure draws the figure again.
var frames = newLRU[figure.Frame](1024)

// renderFigure returns the figure that build makes, as format ("svg" or
// "png"), from the render cache under key or drawn now. key must name the
// route and the format, as the render cache requires. An SVG comes with
// its Frame; a PNG with the zero Frame. Errors of build or of drawing are
// returned as they are and not cached.
func (a *App) renderFigure(key, format string, build func() (figure.Figure, error)) (svgPlot, error) {
	if format != "svg" {
		body, ct, err := a.cached(key, func() ([]byte, string, error) {
			f, err := build()
			if err != nil {
				return nil, "", err
			}
			var buf bytes.Buffer
			if _, err := f.PNG(&buf, plotPNGDPI); err != nil {
				return nil, "", err
			}
			return buf.Bytes(), "image/png", nil
		})
		return svgPlot{body: body, contentType: ct}, err
	}
	draw := func() ([]byte, string, error) {
		f, err := build()
		if err != nil {
			return nil, "", err
		}
		var buf bytes.Buffer
		fr, err := f.SVG(&buf)
		if err != nil {
			return nil, "", err
		}
		frames.Add(key, fr)
		return buf.Bytes(), "image/svg+xml", nil
	}
	body, ct, err := a.cached(key, draw)
	if err != nil {
		return svgPlot{}, err
	}
	fr, ok := frames.Get(key)
	if !ok {
		// The frame was evicted while the SVG stayed: draw again, which is
		// deterministic, for the frame alone.
		if _, _, err := draw(); err != nil {
			return svgPlot{}, err
		}
		fr, _ = frames.Get(key)
	}
	return svgPlot{body: body, contentType: ct, frame: fr}, nil
}

// writeFigure answers a figure request with p: a 200 a browser may keep
// for an hour, under the figure's own content security policy.
func writeFigure(w http.ResponseWriter, r *http.Request, p svgPlot) {
	h := w.Header()
	h.Set("Cache-Control", plotCacheControl)
	h.Set("Content-Security-Policy", svgSecurityPolicy)
	writeBody(w, r, http.StatusOK, p.contentType, p.body)
}

// readoutFrame is figure.Frame in the keys static/readout.js reads.
type readoutFrame struct {
	Left   float64 `json:"left"`
	Top    float64 `json:"top"`
	Right  float64 `json:"right"`
	Bottom float64 `json:"bottom"`
	XMin   float64 `json:"xmin"`
	XMax   float64 `json:"xmax"`
	YMin   float64 `json:"ymin"`
	YMax   float64 `json:"ymax"`
	LogX   bool    `json:"logx"`
	LogY   bool    `json:"logy"`
	Width  float64 `json:"width"`
	Height float64 `json:"height"`
}

// frameAttr is the data-frame attribute of a figure.plot element.
func frameAttr(f figure.Frame) string {
	b, err := json.Marshal(readoutFrame{f.Left, f.Top, f.Right, f.Bottom,
		f.XMin, f.XMax, f.YMin, f.YMax, f.LogX, f.LogY, f.Width, f.Height})
	if err != nil {
		// Frames from the figure package are finite; anything else is a bug.
		panic("web: frame does not encode: " + err.Error())
	}
	return string(b)
}

package web

import (
	"context"
	"fmt"
	"math"
	"net/http"
	"slices"
	"strings"

	"github.com/go-chi/chi/v5"

	"ringbox/internal/figure"
	"ringbox/internal/phys"
	"ringbox/internal/scenario"
	"ringbox/internal/spectrum"
)

// The conductor's three figures: N(E), D(E) and M(E), each as SVG (for the
// page) and PNG (for slides), from the same scenario keys as the page.

// plotKind names one of the three figures; it is also the file name in
// the route, /plot/{kind}.svg.
type plotKind string

const (
	plotStates plotKind = "states"
	plotDOS    plotKind = "dos"
	plotModes  plotKind = "modes"
)

// plotKinds are the figures in the order the page shows them.
var plotKinds = []plotKind{plotStates, plotDOS, plotModes}

// Figure size: 5.6 × 4.2 in is 403 × 302 pt, about the width one of three
// columns gets on a laptop screen, so the 12 pt tick labels show at close to
// their own size instead of being scaled down.
const (
	plotWidthIn  = 5.6
	plotHeightIn = 4.2
)

func init() {
	addRoutes(func(a *App, r chi.Router) {
		for _, k := range plotKinds {
			r.Get("/plot/"+string(k)+".svg", a.handle(a.plotHandler(k, "svg")))
			r.Get("/plot/"+string(k)+".png", a.handle(a.plotHandler(k, "png")))
		}
	})
}

// plotHandler answers /plot/{kind}.{format}.
func (a *App) plotHandler(kind plotKind, format string) handler {
	return func(w http.ResponseWriter, r *http.Request) error {
		s, err := scenario.Parse(r.URL.Query())
		if err != nil {
			return err
		}
		p, err := a.plotFigure(r.Context(), kind, format, s)
		if err != nil {
			return err
		}
		writeFigure(w, r, p)
		return nil
	}
}

// plotKey is the render-cache key of one figure of s.
func plotKey(kind plotKind, format string, s scenario.Scenario) string {
	return "plot/" + string(kind) + "." + format + "?" + s.Canonical()
}

// plotPath is the figure's URL for s, as the page links it.
func plotPath(kind plotKind, format string, s scenario.Scenario) string {
	return "/" + plotKey(kind, format, s)
}

// plotFigure returns the figure kind of s as format, counting s and
// drawing on a miss of the caches.
func (a *App) plotFigure(ctx context.Context, kind plotKind, format string, s scenario.Scenario) (svgPlot, error) {
	return a.renderFigure(plotKey(kind, format, s), format, func() (figure.Figure, error) {
		res, err := a.count(ctx, s)
		if err != nil {
			return figure.Figure{}, err
		}
		return buildFigure(kind, res), nil
	})
}

// plotSVG returns the SVG of kind for s with its frame.
func (a *App) plotSVG(ctx context.Context, kind plotKind, s scenario.Scenario) (svgPlot, error) {
	return a.plotFigure(ctx, kind, "svg", s)
}

// variantNames are the curves drawn, in the legend's order; "smooth" (the
// Weyl mean count) exists for N(E) and D(E) only.
var variantNames = []string{"scenario", "box", "ring", "continuum", "smooth"}

var variantRole = map[string]figure.Role{
	"scenario":  figure.RoleScenario,
	"box":       figure.RoleBox,
	"ring":      figure.RoleRing,
	"continuum": figure.RoleContinuum,
	"smooth":    figure.RoleSmooth,
}

// logSpan is the ratio of the largest to the smallest drawn count above
// which N(E) and M(E) get a log y axis: beyond three decades the low steps,
// where box and ring differ most, would be flattened into the axis.
const logSpan = 1e3

// countFloor is the smallest count a log axis shows: the first state of a
// conductor with g_s = 1 is 1, and less than half a state is not a count
// anyone reads off a log plot (the continuum and Weyl curves start from 0
// or below).
const countFloor = 0.5

// buildFigure turns a result into one of its figures.
//
// Curves of exact counts are staircases only where they are: N(E) of a
// conductor with every axis confined and M(E) of one whose transverse axes
// are all confined. With an open axis the exact N(E) is continuous (the
// open axis is integrated analytically) and is drawn as a line, like the
// continuum and Weyl curves and every D(E).
//
// Variants that coincide (box when every confined axis is already a box,
// all four when every axis is open) are drawn once with a legend entry
// that names them all, "scenario (= box)", rather than hiding one under
// the other.
func buildFigure(kind plotKind, res *scenario.Result) figure.Figure {
	s := res.Input()
	c := res.Curves
	var data map[string][]float64
	f := figure.Figure{XLabel: "energy E (eV)", WidthIn: plotWidthIn, HeightIn: plotHeightIn}
	along := string("xyz"[s.Along])
	switch kind {
	case plotStates:
		data = c.States
		f.Title = "N(E): states at or below E"
		f.YLabel = "states N(E)"
	case plotDOS:
		data = c.DOS
		f.Title = "D(E): density of states"
		f.YLabel = "D(E) (states/eV)"
	case plotModes:
		data = c.Modes
		f.Title = "M(E): modes along " + along
		f.YLabel = "modes M(E)"
	default:
		panic("web: unknown plot kind " + string(kind))
	}

	cond := s.Conductor()
	staircase := func(name string) bool {
		if name == "continuum" || name == "smooth" || kind == plotDOS {
			return false
		}
		if res.Method == "asymptotic" && kind == plotStates {
			return false // smooth (Weyl) counts stand in for the exact ones
		}
		v := cond
		switch name {
		case "box":
			v = cond.WithBC(spectrum.Box)
		case "ring":
			v = cond.WithBC(spectrum.Ring)
		}
		if kind == plotModes {
			if res.ModesMethod != "exact" {
				return false
			}
			v = v.Transverse(s.Along)
		}
		return v.Confined()
	}

	// Merge coinciding variants, keeping the first name's style.
	type curve struct {
		names []string
		y     []float64
	}
	var curves []curve
	for _, name := range variantNames {
		y, ok := data[name]
		if !ok || len(y) != len(c.EnergyEV) {
			continue
		}
		merged := false
		for i := range curves {
			if slices.Equal(curves[i].y, y) {
				curves[i].names = append(curves[i].names, name)
				merged = true
				break
			}
		}
		if !merged {
			curves = append(curves, curve{names: []string{name}, y: y})
		}
	}

	// A log y axis for counts that span decades; D(E) stays linear, the
	// usual way to read van Hove peaks and broadened levels.
	if kind != plotDOS {
		hi, lo := 0.0, math.Inf(1)
		for _, cv := range curves {
			if cv.names[0] == "continuum" || cv.names[0] == "smooth" {
				continue
			}
			for _, v := range cv.y {
				if v >= countFloor {
					hi, lo = math.Max(hi, v), math.Min(lo, v)
				}
			}
		}
		f.LogY = hi > 0 && hi/lo > logSpan
	}

	for _, cv := range curves {
		y := cv.y
		if f.LogY {
			// Values under the floor are dropped (the figure skips
			// non-positive points on a log axis); the result's curves are
			// shared, so copy before changing them.
			y = slices.Clone(y)
			for i, v := range y {
				if v < countFloor {
					y[i] = 0
				}
			}
		}
		name := cv.names[0]
		if len(cv.names) > 1 {
			name += " (= " + strings.Join(cv.names[1:], " = ") + ")"
		}
		look := figure.Line
		if staircase(cv.names[0]) {
			look = figure.Staircase
		}
		f.Series = append(f.Series, figure.Series{Name: name, X: c.EnergyEV, Y: y, Kind: look, Role: variantRole[cv.names[0]]})
	}

	// E_F as one marker on the lower edge of the data: a full-height rule
	// would cut through the corners where the legend goes.
	if ef := res.EFEV; len(c.EnergyEV) > 1 && ef >= c.EnergyEV[0] && ef <= c.EnergyEV[len(c.EnergyEV)-1] {
		if lo, hi := yExtent(f); hi >= lo {
			f.Series = append(f.Series, figure.Series{Name: "E_F", X: []float64{ef}, Y: []float64{lo},
				Kind: figure.Markers, Role: figure.RoleOther, Index: 7})
		}
	}
	f.Caption = caption(kind, res)
	return f
}

// yExtent is the range of the drawable y values of f's series.
func yExtent(f figure.Figure) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, sr := range f.Series {
		for _, v := range sr.Y {
			if f.LogY && v <= 0 {
				continue
			}
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
	}
	if !f.LogY && lo > 0 && lo < 0.25*hi {
		lo = 0 // the figure starts such an axis at zero too
	}
	return lo, hi
}

// caption states what the figure shows and how it was counted, short
// enough for one line under the plot: a PNG on a slide travels without
// the page.
func caption(kind plotKind, res *scenario.Result) string {
	parts := []string{res.Input().String()}
	s := res.Input()
	switch {
	case kind == plotDOS && s.Conductor().Confined():
		shape := "Gaussian"
		if s.Shape == spectrum.Lorentzian {
			shape = "Lorentzian"
		}
		parts = append(parts, fmt.Sprintf("%s broadening η = %s", shape, phys.FormatSI(res.Curves.BroadeningEV, "eV", 3)))
	case kind == plotModes && res.ModesMethod != "exact":
		parts = append(parts, "modes asymptotic")
	case kind != plotModes && res.Method != "exact":
		parts = append(parts, "asymptotic (Weyl) counts")
	}
	if n := len(strings.Join(parts, "; ")); n < 55 {
		parts = append(parts, "idealised model")
	}
	return strings.Join(parts, "; ")
}

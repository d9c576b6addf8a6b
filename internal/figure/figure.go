package figure

import (
	"bytes"
	"fmt"
	"image/color"
	"io"
	"math"
	"slices"

	stdfnt "golang.org/x/image/font"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Figure describes one plot. Labels carry their units, e.g. "energy E (eV)".
type Figure struct {
	Title, XLabel, YLabel string
	// LogX and LogY use logarithmic axes; points with a non-positive
	// coordinate on a log axis are dropped from their series, not drawn.
	LogX, LogY bool
	Series     []Series
	// WidthIn and HeightIn are the size in inches; zero means 7 × 4.2 in.
	// Valid sizes are 2…40 in.
	WidthIn, HeightIn float64
	// XMin and XMax fix the x range when set; the y range then follows the
	// data inside it.
	XMin, XMax *float64
	// Caption is an optional small note under the plot, e.g. "idealised model".
	Caption string
}

// Frame tells where the data area landed in the output so that a page
// script can turn a mouse position into data values. Lengths are in output
// units (Unit: "pt" for SVG, whose viewBox is in points; "px" for PNG),
// measured from the top-left corner and rounded to 0.01. A data value x maps to
// Left + (Right−Left)·t with t = (x−XMin)/(XMax−XMin), or the same in
// log10 x when LogX is set; likewise y from Bottom (YMin) to Top (YMax).
type Frame struct {
	Left   float64 `json:"left"`
	Top    float64 `json:"top"`
	Right  float64 `json:"right"`
	Bottom float64 `json:"bottom"`
	XMin   float64 `json:"x_min"`
	XMax   float64 `json:"x_max"`
	YMin   float64 `json:"y_min"`
	YMax   float64 `json:"y_max"`
	LogX   bool    `json:"log_x"`
	LogY   bool    `json:"log_y"`
	Width  float64 `json:"width"`
	Height float64 `json:"height"`
	Unit   string  `json:"unit"`
}

const (
	defaultWidthIn  = 7
	defaultHeightIn = 4.2
)

// Text sizes in points, at least 10 pt so that a 7 in figure reads on a
// laptop screen and in print.
const (
	titleSize   = 14
	labelSize   = 12.5
	tickSize    = 12
	legendSize  = 11
	captionSize = 10
)

func sans(size vg.Length, bold, italic bool) font.Font {
	f := font.From(font.Font{Typeface: "Liberation", Variant: "Sans"}, size)
	if bold {
		f.Weight = stdfnt.WeightBold
	}
	if italic {
		f.Style = stdfnt.StyleItalic
	}
	return f
}

// SVG writes the figure as an SVG document (sizes in points).
func (f Figure) SVG(w io.Writer) (Frame, error) {
	r, err := f.prepare()
	if err != nil {
		return Frame{}, err
	}
	c := vgsvg.New(r.width, r.height)
	fr := r.draw(draw.New(c), 1)
	fr.Unit = "pt"
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return Frame{}, fmt.Errorf("figure: writing SVG: %w", err)
	}
	// Arial and Helvetica share Liberation Sans's metrics, so text keeps
	// its measured width where Liberation Sans is not installed.
	out := bytes.ReplaceAll(buf.Bytes(), []byte("font-family:Liberation Sans;"),
		[]byte("font-family:'Liberation Sans',Arial,Helvetica,sans-serif;"))
	if _, err := w.Write(out); err != nil {
		return Frame{}, fmt.Errorf("figure: writing SVG: %w", err)
	}
	return fr, nil
}

// PNG writes the figure as a PNG image at dpi dots per inch (36…600,
// rounded to a whole number); 200 suits slides. The image is
// round(WidthIn·dpi) × round(HeightIn·dpi) pixels.
func (f Figure) PNG(w io.Writer, dpi float64) (Frame, error) {
	if !finite(dpi) || dpi < 36 || dpi > 600 {
		return Frame{}, fmt.Errorf("dpi %g outside 36…600: %w", dpi, ErrBadSize)
	}
	r, err := f.prepare()
	if err != nil {
		return Frame{}, err
	}
	d := int(math.Round(dpi))
	c := vgimg.NewWith(vgimg.UseWH(r.width, r.height), vgimg.UseDPI(d))
	fr := r.draw(draw.New(c), float64(d)/72)
	fr.Unit = "px"
	if _, err := (vgimg.PngCanvas{Canvas: c}).WriteTo(w); err != nil {
		return Frame{}, fmt.Errorf("figure: writing PNG: %w", err)
	}
	return fr, nil
}

// prepared is a checked, decimated figure with its axis ranges.
type prepared struct {
	fig           Figure
	width, height vg.Length
	series        []clean
	ax, ay        axisMap
}

func (f Figure) prepare() (*prepared, error) {
	r := &prepared{fig: f}
	wIn, hIn := f.WidthIn, f.HeightIn
	if wIn == 0 {
		wIn = defaultWidthIn
	}
	if hIn == 0 {
		hIn = defaultHeightIn
	}
	if !finite(wIn) || !finite(hIn) || wIn < 2 || wIn > 40 || hIn < 2 || hIn > 40 {
		return nil, fmt.Errorf("size %g × %g in outside 2…40 in: %w", wIn, hIn, ErrBadSize)
	}
	r.width, r.height = vg.Length(wIn)*vg.Inch, vg.Length(hIn)*vg.Inch
	if len(f.Series) == 0 {
		return nil, fmt.Errorf("figure %q has no series: %w", f.Title, ErrNoData)
	}
	total := 0
	for _, s := range f.Series {
		c, err := check(s, f.LogX, f.LogY)
		if err != nil {
			return nil, err
		}
		total += c.points()
		r.series = append(r.series, c)
	}
	if total == 0 {
		return nil, fmt.Errorf("figure %q has no drawable point: %w", f.Title, ErrNoData)
	}
	var err error
	if r.ax, err = r.xRange(); err != nil {
		return nil, err
	}
	r.ay = r.yRange()
	cols, rows := int(wIn*72), int(hIn*72)
	for i := range r.series {
		decimate(&r.series[i], r.ax, r.ay, cols, rows)
	}
	return r, nil
}

// xRange is the fixed range if given, else the data's, padded if empty.
func (r *prepared) xRange() (axisMap, error) {
	a := axisMap{min: math.Inf(1), max: math.Inf(-1), log: r.fig.LogX}
	// Points dropped for a log y axis still set the x range, so that a
	// log-y figure shares its x axis with its linear twin.
	for _, c := range r.series {
		for _, x := range c.X { // finite: checked; plain compares are faster than math.Min
			if a.log && x <= 0 {
				continue
			}
			if x < a.min {
				a.min = x
			}
			if x > a.max {
				a.max = x
			}
		}
	}
	if p := r.fig.XMin; p != nil {
		if !finite(*p) {
			return a, fmt.Errorf("XMin %g: %w", *p, ErrNonFinite)
		}
		a.min = *p
	}
	if p := r.fig.XMax; p != nil {
		if !finite(*p) {
			return a, fmt.Errorf("XMax %g: %w", *p, ErrNonFinite)
		}
		a.max = *p
	}
	if (r.fig.XMin != nil || r.fig.XMax != nil) && !(a.max > a.min) {
		return a, fmt.Errorf("x range [%g, %g] is empty: %w", a.min, a.max, ErrBadRange)
	}
	if a.log && a.min <= 0 {
		return a, fmt.Errorf("x range [%g, %g] on a log axis: %w", a.min, a.max, ErrBadRange)
	}
	return pad(a), nil
}

// yRange spans the values visible inside the x range. Counts that start
// near zero get an axis from zero (common practice for N, D and M).
func (r *prepared) yRange() axisMap {
	a := axisMap{min: math.Inf(1), max: math.Inf(-1), log: r.fig.LogY}
	for _, c := range r.series {
		for _, run := range c.runs {
			for i, x := range run.x {
				in := x >= r.ax.min && x <= r.ax.max
				if c.Kind == Staircase && i+1 < len(run.x) && x < r.ax.min && run.x[i+1] > r.ax.min {
					in = true // the step in force at the left edge
				}
				if in && run.y[i] < a.min {
					a.min = run.y[i]
				}
				if in && run.y[i] > a.max {
					a.max = run.y[i]
				}
			}
		}
	}
	if math.IsInf(a.min, 0) { // nothing inside the window
		a.min, a.max = 0, 1
		if a.log {
			a.min = 0.1
		}
	}
	if !a.log && a.min > 0 && a.min < 0.25*a.max {
		a.min = 0
	}
	return pad(a)
}

// pad widens an empty range so that a single value still has an axis.
func pad(a axisMap) axisMap {
	if a.max > a.min {
		return a
	}
	if a.log {
		a.min, a.max = a.min/math.Sqrt(10), a.max*math.Sqrt(10)
		return a
	}
	d := math.Max(math.Abs(a.min)*0.1, 0.5)
	a.min, a.max = a.min-d, a.max+d
	return a
}

// newPlot builds the gonum plot with ringbox's text, axes and series.
func (r *prepared) newPlot() *plot.Plot {
	hdlr := supText{text.Plain{Fonts: font.DefaultCache}}
	p := plot.New()
	p.BackgroundColor = nil // the whole canvas is filled once in draw
	p.TextHandler = hdlr
	p.Title.Text = r.fig.Title
	p.Title.TextStyle.Font = sans(titleSize, true, false)
	p.Title.TextStyle.Handler = hdlr
	p.Title.Padding = 6
	for _, ax := range []*plot.Axis{&p.X, &p.Y} {
		ax.Label.TextStyle.Font = sans(labelSize, false, false)
		ax.Label.TextStyle.Handler = hdlr
		ax.Label.Padding = 4
		ax.Tick.Label.Font = sans(tickSize, false, false)
		ax.Tick.Label.Handler = hdlr
		ax.Tick.Length = 6
		ax.Padding = 0
		ax.Tick.Marker = linearTicks{}
	}
	p.X.Label.Text, p.Y.Label.Text = r.fig.XLabel, r.fig.YLabel
	p.X.Min, p.X.Max = r.ax.min, r.ax.max
	p.Y.Min, p.Y.Max = r.ay.min, r.ay.max
	if r.ax.log {
		p.X.Scale, p.X.Tick.Marker = plot.LogScale{}, logTicks{}
	}
	if r.ay.log {
		p.Y.Scale, p.Y.Tick.Marker = plot.LogScale{}, logTicks{}
	}
	p.Add(grid{})
	order := make([]int, len(r.series))
	for i := range order {
		order[i] = i
	}
	slices.SortStableFunc(order, func(a, b int) int { return r.series[a].look.layer - r.series[b].look.layer })
	for _, i := range order {
		p.Add(drawer{&r.series[i]})
	}
	return p
}

// legend returns the legend with one entry per distinct series name, in
// the order given (several bands of one structure share one entry).
func (r *prepared) legend() *plot.Legend {
	l := plot.NewLegend()
	l.TextStyle.Font = sans(legendSize, false, false)
	l.TextStyle.Handler = supText{text.Plain{Fonts: font.DefaultCache}}
	l.ThumbnailWidth = 30
	l.Padding = 2
	seen := map[string]bool{}
	for i := range r.series {
		c := &r.series[i]
		if c.Name == "" || seen[c.Name] || c.points() == 0 {
			continue
		}
		seen[c.Name] = true
		l.Add(c.Name, drawer{c})
	}
	return &l
}

// draw lays out title, plot, legend and caption on dc and returns the
// frame; scale converts points to output units.
func (r *prepared) draw(dc draw.Canvas, scale float64) Frame {
	const margin, gap = 8, 10
	dc.SetColor(color.White)
	dc.Fill(dc.Rectangle.Path())
	full := draw.Crop(dc, margin, -margin-4, margin, -margin)
	if r.fig.Caption != "" {
		sty := text.Style{Color: color.Gray{Y: 60}, Font: sans(captionSize, false, true),
			Handler: text.Plain{Fonts: font.DefaultCache}, XAlign: draw.XLeft, YAlign: draw.YBottom}
		full.FillText(sty, vg.Point{X: full.Min.X, Y: full.Min.Y}, r.fig.Caption)
		full = draw.Crop(full, 0, 0, sty.Height(r.fig.Caption)+6, 0)
	}
	p := r.newPlot()
	l := r.legend()
	plotC := full
	data := p.DataCanvas(plotC)
	legC, ok := r.placeLegend(p, l, data)
	if size := l.Rectangle(full).Size(); !ok && size.X <= 0.3*(full.Max.X-full.Min.X) {
		// A narrow legend goes beside the plot, on the right.
		plotC = draw.Crop(full, 0, -(size.X + gap), 0, 0)
		data = p.DataCanvas(plotC)
		legC = draw.Canvas{Canvas: dc.Canvas, Rectangle: vg.Rectangle{
			Min: vg.Point{X: data.Max.X + gap, Y: data.Min.Y},
			Max: vg.Point{X: full.Max.X, Y: data.Max.Y}}}
		l.Top, l.Left = true, true
	} else if !ok {
		// A wide one (long scenario names) would squeeze the data into a
		// sliver there: it goes below the plot, across its width.
		plotC = draw.Crop(full, 0, 0, size.Y+2*gap, 0)
		data = p.DataCanvas(plotC)
		legC = draw.Canvas{Canvas: dc.Canvas, Rectangle: vg.Rectangle{
			Min: vg.Point{X: data.Min.X, Y: full.Min.Y},
			Max: vg.Point{X: full.Max.X, Y: full.Min.Y + size.Y + gap}}}
		l.Top, l.Left = true, true
	}
	p.Draw(plotC)
	if hasEntries(l) {
		rect := legendRect(l, legC)
		legC.SetColor(color.White)
		legC.Fill(grow(rect, 3).Path())
		l.Draw(legC)
	}
	h := dc.Max.Y - dc.Min.Y
	px := func(v vg.Length) float64 { return math.Round(float64(v)*scale*100) / 100 }
	return Frame{
		Left: px(data.Min.X), Right: px(data.Max.X),
		Top: px(h - data.Max.Y), Bottom: px(h - data.Min.Y),
		XMin: p.X.Min, XMax: p.X.Max, YMin: p.Y.Min, YMax: p.Y.Max,
		LogX: r.ax.log, LogY: r.ay.log,
		Width: px(dc.Max.X - dc.Min.X), Height: px(h),
	}
}

func grow(r vg.Rectangle, d vg.Length) vg.Rectangle {
	return vg.Rectangle{Min: vg.Point{X: r.Min.X - d, Y: r.Min.Y - d}, Max: vg.Point{X: r.Max.X + d, Y: r.Max.Y + d}}
}

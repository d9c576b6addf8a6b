package figure

import (
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// drawer is the gonum/plot Plotter and legend Thumbnailer of one series.
type drawer struct{ c *clean }

func (d drawer) lineStyle() draw.LineStyle {
	return draw.LineStyle{Color: d.c.look.color, Width: d.c.look.width, Dashes: d.c.look.dashes}
}

func (d drawer) glyphStyle() draw.GlyphStyle {
	return draw.GlyphStyle{Color: d.c.look.color, Radius: vg.Length(1.2 + d.c.look.width), Shape: d.c.look.glyph}
}

// path returns the output points of one run: for a staircase a horizontal
// segment to each new X followed by a vertical riser to its value.
func (d drawer) path(r run, p *plot.Plot, c *draw.Canvas) []vg.Point {
	tx, ty := p.Transforms(c)
	pts := make([]vg.Point, 0, 2*len(r.x))
	add := func(x, y float64) {
		pt := vg.Point{X: tx(x), Y: ty(y)}
		if n := len(pts); n > 0 && pts[n-1] == pt {
			return
		}
		pts = append(pts, pt)
	}
	for i := range r.x {
		if d.c.Kind == Staircase && i > 0 {
			add(r.x[i], r.y[i-1])
		}
		add(r.x[i], r.y[i])
	}
	return pts
}

// Plot implements plot.Plotter.
func (d drawer) Plot(c draw.Canvas, p *plot.Plot) {
	for _, r := range d.c.runs {
		pts := d.path(r, p, &c)
		if d.c.Kind == Markers {
			gs := d.glyphStyle()
			for _, pt := range pts {
				if c.Contains(pt) {
					c.DrawGlyph(gs, pt)
				}
			}
			continue
		}
		if len(pts) == 1 {
			// A lone point is drawn as a short dash so it does not vanish.
			w := d.c.look.width * 2
			pts = []vg.Point{{X: pts[0].X - w, Y: pts[0].Y}, {X: pts[0].X + w, Y: pts[0].Y}}
		}
		c.StrokeLines(d.lineStyle(), c.ClipLinesXY(pts)...)
	}
}

// Thumbnail implements plot.Thumbnailer.
func (d drawer) Thumbnail(c *draw.Canvas) {
	y := c.Center().Y
	if d.c.Kind == Markers {
		c.DrawGlyph(d.glyphStyle(), c.Center())
		return
	}
	if d.c.Kind == Staircase {
		x0, x1 := c.Min.X, c.Max.X
		xm := (x0 + x1) / 2
		h := (c.Max.Y - c.Min.Y) / 3
		c.StrokeLines(d.lineStyle(), []vg.Point{{X: x0, Y: y - h}, {X: xm, Y: y - h}, {X: xm, Y: y + h}, {X: x1, Y: y + h}})
		return
	}
	c.StrokeLine2(d.lineStyle(), c.Min.X, y, c.Max.X, y)
}

package figure

import (
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// The legend goes in the first corner of the data area where it covers no
// drawn line or marker; if every corner is taken it goes beside the plot,
// on the right, where it can hide nothing, or below the plot when it is too
// wide for that.

func hasEntries(l *plot.Legend) bool {
	return l.Rectangle(draw.Canvas{}).Size().Y > 0
}

// legendRect is where l.Draw puts the legend in c. (plot.Legend.Rectangle
// mirrors Left, so only its size is used.)
func legendRect(l *plot.Legend, c draw.Canvas) vg.Rectangle {
	size := l.Rectangle(c).Size()
	var r vg.Rectangle
	if l.Left {
		r.Min.X = c.Min.X
	} else {
		r.Min.X = c.Max.X - size.X
	}
	if l.Top {
		r.Min.Y = c.Max.Y - size.Y - l.TextStyle.FontExtents().Descent
	} else {
		r.Min.Y = c.Min.Y
	}
	r.Max = vg.Point{X: r.Min.X + size.X, Y: r.Min.Y + size.Y + l.TextStyle.FontExtents().Descent}
	return r
}

// occupancy marks the cells of a coarse grid over the data area that a
// series passes through.
type occupancy struct {
	data   vg.Rectangle
	nx, ny int
	cells  []bool
}

func newOccupancy(data vg.Rectangle) *occupancy {
	const nx, ny = 96, 60
	return &occupancy{data: data, nx: nx, ny: ny, cells: make([]bool, nx*ny)}
}

func (o *occupancy) cell(pt vg.Point) (int, int, bool) {
	s := o.data.Size()
	if s.X <= 0 || s.Y <= 0 {
		return 0, 0, false
	}
	i := int(math.Floor(float64((pt.X - o.data.Min.X) / s.X * vg.Length(o.nx))))
	j := int(math.Floor(float64((pt.Y - o.data.Min.Y) / s.Y * vg.Length(o.ny))))
	if i < 0 || j < 0 || i >= o.nx || j >= o.ny {
		return 0, 0, false
	}
	return i, j, true
}

func (o *occupancy) mark(pt vg.Point) {
	if i, j, ok := o.cell(pt); ok {
		o.cells[j*o.nx+i] = true
	}
}

// segment marks every cell along a→b, sampled at a quarter cell.
func (o *occupancy) segment(a, b vg.Point) {
	s := o.data.Size()
	step := math.Min(float64(s.X)/float64(o.nx), float64(s.Y)/float64(o.ny)) / 4
	d := math.Hypot(float64(b.X-a.X), float64(b.Y-a.Y))
	n := int(math.Min(d/step, 1e5)) + 1
	for k := 0; k <= n; k++ {
		t := vg.Length(float64(k) / float64(n))
		o.mark(vg.Point{X: a.X + (b.X-a.X)*t, Y: a.Y + (b.Y-a.Y)*t})
	}
}

// covered counts marked cells that meet r.
func (o *occupancy) covered(r vg.Rectangle) int {
	n := 0
	for j := 0; j < o.ny; j++ {
		for i := 0; i < o.nx; i++ {
			if !o.cells[j*o.nx+i] {
				continue
			}
			s := o.data.Size()
			cx0 := o.data.Min.X + s.X*vg.Length(i)/vg.Length(o.nx)
			cy0 := o.data.Min.Y + s.Y*vg.Length(j)/vg.Length(o.ny)
			cx1, cy1 := cx0+s.X/vg.Length(o.nx), cy0+s.Y/vg.Length(o.ny)
			if cx1 > r.Min.X && cx0 < r.Max.X && cy1 > r.Min.Y && cy0 < r.Max.Y {
				n++
			}
		}
	}
	return n
}

// placeLegend sets l's corner and returns the canvas to draw it in, or
// false when every corner inside data would cover a series.
func (r *prepared) placeLegend(p *plot.Plot, l *plot.Legend, data draw.Canvas) (draw.Canvas, bool) {
	if !hasEntries(l) {
		return data, true
	}
	occ := newOccupancy(data.Rectangle)
	for i := range r.series {
		d := drawer{&r.series[i]}
		for _, run := range r.series[i].runs {
			pts := d.path(run, p, &data)
			for k, pt := range pts {
				occ.mark(pt)
				if k > 0 && d.c.Kind != Markers {
					occ.segment(pts[k-1], pt)
				}
			}
		}
	}
	inset := draw.Crop(data, 6, -6, 6, -6)
	for _, corner := range [4][2]bool{{true, true}, {true, false}, {false, false}, {false, true}} {
		l.Top, l.Left = corner[0], corner[1]
		if occ.covered(grow(legendRect(l, inset), 4)) == 0 {
			return inset, true
		}
	}
	return data, false
}

// grid draws light lines at the labelled ticks, under the data.
type grid struct{}

func (grid) Plot(c draw.Canvas, p *plot.Plot) {
	sty := draw.LineStyle{Color: color.Gray{Y: 226}, Width: 0.6}
	tx, ty := p.Transforms(&c)
	for _, t := range p.X.Tick.Marker.Ticks(p.X.Min, p.X.Max) {
		if x := tx(t.Value); !t.IsMinor() && x >= c.Min.X && x <= c.Max.X {
			c.StrokeLine2(sty, x, c.Min.Y, x, c.Max.Y)
		}
	}
	for _, t := range p.Y.Tick.Marker.Ticks(p.Y.Min, p.Y.Max) {
		if y := ty(t.Value); !t.IsMinor() && y >= c.Min.Y && y <= c.Max.Y {
			c.StrokeLine2(sty, c.Min.X, y, c.Max.X, y)
		}
	}
}

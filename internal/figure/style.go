package figure

import (
	"image/color"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Kind says how a series is drawn.
type Kind int

const (
	// Staircase is a true step function: Y[i] holds from X[i] to X[i+1],
	// drawn as horizontal runs joined by vertical risers, never diagonals.
	// X must be non-decreasing.
	Staircase Kind = iota
	// Line is a curve through the points in the order given.
	Line
	// Markers draws the points only (a sweep's samples, band points).
	Markers
)

// Role fixes colour and dash so that the same quantity looks the same on
// every figure.
type Role int

const (
	RoleScenario  Role = iota // the user's own boundary conditions (boldest)
	RoleBox                   // every confined axis hard-wall
	RoleRing                  // every confined axis periodic
	RoleContinuum             // bulk formula (thin)
	RoleSmooth                // Weyl mean count (thin)
	RoleOther                 // comparisons: colour and dash by Series.Index
)

// look is the drawing style of one series.
type look struct {
	color  color.NRGBA
	width  vg.Length
	dashes []vg.Length
	glyph  draw.GlyphDrawer
	layer  int // drawing order: lower first, so bold lines sit on top
}

func rgb(hex uint32) color.NRGBA {
	return color.NRGBA{R: uint8(hex >> 16), G: uint8(hex >> 8), B: uint8(hex), A: 255}
}

// roleLooks are ringbox's own choices. Colours sit far apart in lightness as
// well as hue, so that they survive the common colour-vision deficiencies
// (checked in style_test.go) and, with the dash patterns, greyscale print.
var roleLooks = map[Role]look{
	RoleScenario:  {color: rgb(0x2A2374), width: 2.6, glyph: draw.CircleGlyph{}, layer: 5},
	RoleBox:       {color: rgb(0xC75B12), width: 1.8, dashes: []vg.Length{7, 3}, glyph: draw.SquareGlyph{}, layer: 4},
	RoleRing:      {color: rgb(0x3A9AD9), width: 1.8, dashes: []vg.Length{8, 2.5, 1.5, 2.5}, glyph: draw.TriangleGlyph{}, layer: 3},
	RoleContinuum: {color: rgb(0x333333), width: 1.1, glyph: draw.CrossGlyph{}, layer: 1},
	RoleSmooth:    {color: rgb(0xA23B8F), width: 1.1, dashes: []vg.Length{3, 2}, glyph: draw.PlusGlyph{}, layer: 2},
}

// comparePalette colours overlays of up to eight scenarios (RoleOther,
// by Series.Index modulo 8). Each colour has its own dash pattern too.
var comparePalette = [8]look{
	{color: rgb(0x1D3F8F), width: 2.0, glyph: draw.CircleGlyph{}},
	{color: rgb(0xE38A14), width: 2.0, dashes: []vg.Length{7, 3}, glyph: draw.SquareGlyph{}},
	{color: rgb(0x159A7E), width: 2.0, dashes: []vg.Length{1.5, 2.5}, glyph: draw.TriangleGlyph{}},
	{color: rgb(0xB5305C), width: 2.0, dashes: []vg.Length{8, 2.5, 1.5, 2.5}, glyph: draw.PyramidGlyph{}},
	{color: rgb(0x8E6BD6), width: 2.0, dashes: []vg.Length{12, 3}, glyph: draw.RingGlyph{}},
	{color: rgb(0x6B5A10), width: 2.0, dashes: []vg.Length{4, 2, 1.5, 2, 1.5, 2}, glyph: draw.BoxGlyph{}},
	{color: rgb(0x72C3F0), width: 2.0, dashes: []vg.Length{3, 2}, glyph: draw.PlusGlyph{}},
	{color: rgb(0x222222), width: 2.0, dashes: []vg.Length{10, 2, 3, 2}, glyph: draw.CrossGlyph{}},
}

// lookFor returns the style of s; it panics on a Role or Kind outside the
// constants above, which is a programmer's mistake.
func lookFor(s Series) look {
	if s.Kind < Staircase || s.Kind > Markers {
		panic("figure: unknown Kind")
	}
	if s.Role == RoleOther {
		i := s.Index % len(comparePalette)
		if i < 0 {
			i += len(comparePalette)
		}
		l := comparePalette[i]
		l.layer = 2
		return l
	}
	l, ok := roleLooks[s.Role]
	if !ok {
		panic("figure: unknown Role")
	}
	return l
}

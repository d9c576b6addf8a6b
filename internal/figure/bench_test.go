package figure

import (
	"bytes"
	"io"
	"math"
	"math/rand/v2"
	"testing"
)

// Eight noisy 10⁵-point lines (the worst case for per-column reduction)
// still make an SVG under 300 kB.
func TestEightNoisyLinesStaySmall(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	x := energies(100_000, 1)
	f := Figure{Title: "noise", XLabel: "energy E (eV)", YLabel: "D(E) (1/eV)"}
	for i := range 8 {
		y := mapY(x, func(e float64) float64 { return float64(i) + rng.Float64() })
		f.Series = append(f.Series, Series{Name: "option", X: x, Y: y, Kind: Line, Role: RoleOther, Index: i})
	}
	var buf bytes.Buffer
	if _, err := f.SVG(&buf); err != nil {
		t.Fatal(err)
	}
	if buf.Len() >= 300_000 {
		t.Errorf("SVG is %d bytes, want < 300 kB", buf.Len())
	}
}

// countingWriter counts bytes so benchmarks can report output size.
type countingWriter struct{ n int64 }

func (w *countingWriter) Write(p []byte) (int, error) { w.n += int64(len(p)); return len(p), nil }

func benchSVG(b *testing.B, f Figure) {
	b.ReportAllocs()
	var w countingWriter
	for b.Loop() {
		w.n = 0
		if _, err := f.SVG(&w); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(w.n), "svg-bytes")
}

// BenchmarkSVG3x400 draws a 3-series, 400-point N(E) figure.
func BenchmarkSVG3x400(b *testing.B) {
	f := statesFigure()
	f.Series = f.Series[:3]
	benchSVG(b, f)
}

// BenchmarkSVGStaircase1e6 draws a 10⁶-sample staircase (decimation).
func BenchmarkSVGStaircase1e6(b *testing.B) {
	e := energies(1_000_000, 0.5)
	benchSVG(b, Figure{Series: []Series{{Name: "box", X: e, Y: mapY(e, boxCount), Kind: Staircase, Role: RoleBox}}})
}

// BenchmarkSVGDenseStaircase1e6 draws 10⁶ samples with 10⁵ distinct steps
// (per-column collapse).
func BenchmarkSVGDenseStaircase1e6(b *testing.B) {
	x := energies(1_000_000, 1)
	y := mapY(x, func(e float64) float64 { return math.Floor(1e5 * math.Pow(e, 1.5)) })
	benchSVG(b, Figure{Series: []Series{{Name: "dense", X: x, Y: y, Kind: Staircase, Role: RoleScenario}}})
}

// BenchmarkPNG200dpi draws the N(E) figure as a 1400×840 PNG.
func BenchmarkPNG200dpi(b *testing.B) {
	f := statesFigure()
	b.ReportAllocs()
	for b.Loop() {
		if _, err := f.PNG(io.Discard, 200); err != nil {
			b.Fatal(err)
		}
	}
}

// FuzzFigure draws figures from arbitrary numbers: it must return an
// error or an SVG, never panic.
func FuzzFigure(f *testing.F) {
	f.Add(0.0, 1.0, 2.0, 0.5, 1.5, 0.0, uint8(0), false, false)
	f.Add(1.0, 1.0, 1.0, 3.0, 3.0, 3.0, uint8(1), true, true)
	f.Add(-1e300, 0.0, 1e300, math.Inf(1), 0.0, -1.0, uint8(2), false, true)
	f.Fuzz(func(t *testing.T, x0, x1, x2, y0, y1, y2 float64, kind uint8, logX, logY bool) {
		fig := Figure{LogX: logX, LogY: logY, Series: []Series{{
			Name: "fuzz", X: []float64{x0, x1, x2}, Y: []float64{y0, y1, y2}, Kind: Kind(kind % 3)}}}
		fig.SVG(io.Discard)
	})
}

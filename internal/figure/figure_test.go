package figure

import (
	"bytes"
	"encoding/json"
	"errors"
	"image"
	"image/png"
	"io"
	"math"
	"strings"
	"testing"
)

func ptr(v float64) *float64 { return &v }

func TestErrors(t *testing.T) {
	x3 := []float64{1, 2, 3}
	one := func(s Series) Figure { return Figure{Series: []Series{s}} }
	for _, tc := range []struct {
		name string
		fig  Figure
		want error
	}{
		{"no series", Figure{}, ErrNoData},
		{"empty series", one(Series{Name: "a"}), ErrNoData},
		{"NaN in Y", one(Series{X: x3, Y: []float64{1, math.NaN(), 3}}), ErrNonFinite},
		{"+Inf in X", one(Series{X: []float64{1, math.Inf(1), 3}, Y: x3}), ErrNonFinite},
		{"-Inf in Y", one(Series{X: x3, Y: []float64{1, 2, math.Inf(-1)}, Kind: Line}), ErrNonFinite},
		{"length mismatch", one(Series{X: x3, Y: x3[:2]}), ErrLength},
		{"unsorted staircase", one(Series{X: []float64{1, 3, 2}, Y: x3}), ErrUnsorted},
		{"LogY all non-positive", Figure{LogY: true, Series: []Series{{X: x3, Y: []float64{0, -1, 0}}}}, ErrNoData},
		{"LogX all non-positive", Figure{LogX: true, Series: []Series{{X: []float64{-3, -2, 0}, Y: x3, Kind: Line}}}, ErrNoData},
		{"XMin above XMax", Figure{XMin: ptr(3), XMax: ptr(1), Series: []Series{{X: x3, Y: x3}}}, ErrBadRange},
		{"XMin NaN", Figure{XMin: ptr(math.NaN()), Series: []Series{{X: x3, Y: x3}}}, ErrNonFinite},
		{"log x range from zero", Figure{LogX: true, XMin: ptr(0), Series: []Series{{X: x3, Y: x3}}}, ErrBadRange},
		{"negative width", Figure{WidthIn: -7, Series: []Series{{X: x3, Y: x3}}}, ErrBadSize},
		{"huge height", Figure{HeightIn: 1e9, Series: []Series{{X: x3, Y: x3}}}, ErrBadSize},
	} {
		t.Run(tc.name, func(t *testing.T) {
			for _, format := range []string{"svg", "png"} {
				var err error
				if format == "svg" {
					_, err = tc.fig.SVG(io.Discard)
				} else {
					_, err = tc.fig.PNG(io.Discard, 72)
				}
				if !errors.Is(err, tc.want) {
					t.Errorf("%s: err = %v, want %v", format, err, tc.want)
				}
			}
		})
	}
}

func TestPNGBadDPI(t *testing.T) {
	f := Figure{Series: []Series{{X: []float64{1, 2}, Y: []float64{1, 2}}}}
	for _, dpi := range []float64{0, -200, math.NaN(), math.Inf(1), 10, 5000} {
		if _, err := f.PNG(io.Discard, dpi); !errors.Is(err, ErrBadSize) {
			t.Errorf("dpi %g: err = %v, want ErrBadSize", dpi, err)
		}
	}
}

// Small and degenerate inputs must draw without panicking.
func TestDegenerateInputs(t *testing.T) {
	for _, tc := range []struct {
		name string
		fig  Figure
	}{
		{"one staircase point", Figure{Series: []Series{{X: []float64{1}, Y: []float64{2}}}}},
		{"one line point", Figure{Series: []Series{{X: []float64{1}, Y: []float64{2}, Kind: Line}}}},
		{"one marker", Figure{Series: []Series{{X: []float64{1}, Y: []float64{2}, Kind: Markers}}}},
		{"all-equal Y", Figure{Series: []Series{{X: []float64{0, 1, 2}, Y: []float64{5, 5, 5}, Kind: Line}}}},
		{"zero Y", Figure{Series: []Series{{X: []float64{0, 1, 2}, Y: []float64{0, 0, 0}}}}},
		{"zero x range", Figure{Series: []Series{{X: []float64{3, 3, 3}, Y: []float64{1, 2, 3}}}}},
		{"single point on log axes", Figure{LogX: true, LogY: true, Series: []Series{{X: []float64{10}, Y: []float64{1e-3}, Kind: Markers}}}},
		{"window without data", Figure{XMin: ptr(10), XMax: ptr(20), Series: []Series{{X: []float64{0, 1}, Y: []float64{0, 1}}}}},
		{"LogY drops zeros", Figure{LogY: true, Series: []Series{{X: []float64{0, 1, 2, 3}, Y: []float64{0, 2, 0, 4}}}}},
		{"tiny values", Figure{Series: []Series{{X: []float64{1e-12, 2e-12}, Y: []float64{1e-30, 3e-30}, Kind: Line}}}},
		{"huge values", Figure{Series: []Series{{X: []float64{-1e300, 1e300}, Y: []float64{-1e300, 1e300}, Kind: Line}}}},
		{"overflowing span", Figure{Series: []Series{{X: []float64{-1.7e308, 1.7e308}, Y: []float64{-1.7e308, 1.7e308}, Kind: Line}}}},
		{"span tiny next to values", Figure{Series: []Series{{X: []float64{1e17, 1e17 + 16}, Y: []float64{1e17, 1e17 + 64}, Kind: Line}}}},
		{"negative Index", Figure{Series: []Series{{X: []float64{1, 2}, Y: []float64{1, 2}, Role: RoleOther, Index: -3}}}},
		{"no names", Figure{Series: []Series{{X: []float64{1, 2}, Y: []float64{1, 2}}}}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var buf bytes.Buffer
			fr, err := tc.fig.SVG(&buf)
			if err != nil {
				t.Fatal(err)
			}
			if !(fr.XMax > fr.XMin && fr.YMax > fr.YMin) {
				t.Errorf("empty range in frame %+v", fr)
			}
			if !strings.HasSuffix(buf.String(), "</svg>\n") {
				t.Error("SVG not closed")
			}
		})
	}
}

// PNG files start with the 8-byte signature of ISO/IEC 15948 (PNG) §5.2
// and have WidthIn·dpi × HeightIn·dpi pixels.
func TestPNG(t *testing.T) {
	for _, tc := range []struct {
		name   string
		fig    Figure
		dpi    float64
		wx, hy int
	}{
		{"default size at 200 dpi", statesFigure(), 200, 1400, 840},
		{"custom size at 96 dpi", func() Figure { f := sweepFigure(); f.WidthIn, f.HeightIn = 5, 3; return f }(), 96, 480, 288},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var buf bytes.Buffer
			fr, err := tc.fig.PNG(&buf, tc.dpi)
			if err != nil {
				t.Fatal(err)
			}
			if !bytes.HasPrefix(buf.Bytes(), []byte("\x89PNG\r\n\x1a\n")) {
				t.Fatalf("no PNG signature: % x", buf.Bytes()[:8])
			}
			cfg, err := png.DecodeConfig(bytes.NewReader(buf.Bytes()))
			if err != nil {
				t.Fatal(err)
			}
			if cfg.Width != tc.wx || cfg.Height != tc.hy {
				t.Errorf("size %d×%d, want %d×%d", cfg.Width, cfg.Height, tc.wx, tc.hy)
			}
			if fr.Unit != "px" || fr.Width != float64(tc.wx) || fr.Height != float64(tc.hy) {
				t.Errorf("frame %+v does not match the image", fr)
			}
		})
	}
}

// The frame must point at the drawn data: in the PNG, the pixel where the
// frame puts a known point of a thick scenario line has the line's colour.
// The log case checks the log10 mapping the Frame documents.
func TestFrameLocatesData(t *testing.T) {
	for _, tc := range []struct {
		name       string
		logX, logY bool
		x, y, at   []float64
	}{
		{"linear", false, false, []float64{0, 10}, []float64{0, 10}, []float64{2.5, 5, 7.5}},
		{"log-log", true, true, []float64{1, 1000}, []float64{1e-3, 1}, []float64{3, 30, 300}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			f := Figure{LogX: tc.logX, LogY: tc.logY, Series: []Series{{Name: "s", X: tc.x, Y: tc.y, Kind: Line, Role: RoleScenario}}}
			var buf bytes.Buffer
			fr, err := f.PNG(&buf, 100)
			if err != nil {
				t.Fatal(err)
			}
			img, err := png.Decode(&buf)
			if err != nil {
				t.Fatal(err)
			}
			norm := func(v, lo, hi float64, log bool) float64 {
				if log {
					return (math.Log10(v) - math.Log10(lo)) / (math.Log10(hi) - math.Log10(lo))
				}
				return (v - lo) / (hi - lo)
			}
			want := roleLooks[RoleScenario].color
			for _, v := range tc.at {
				// The straight line on these axes: y = x for linear, y = x/1000 for log-log.
				y := v
				if tc.logY {
					y = v / 1000
				}
				px := fr.Left + norm(v, fr.XMin, fr.XMax, fr.LogX)*(fr.Right-fr.Left)
				py := fr.Bottom - norm(y, fr.YMin, fr.YMax, fr.LogY)*(fr.Bottom-fr.Top)
				if !near(img, int(px), int(py), want) {
					t.Errorf("no line colour at pixel (%.0f, %.0f) for (%g, %g)", px, py, v, y)
				}
			}
		})
	}
}

// near reports whether a pixel within 1 of (x, y) is close to colour c.
func near(img image.Image, x, y int, c interface{ RGBA() (r, g, b, a uint32) }) bool {
	wr, wg, wb, _ := c.RGBA()
	for dx := -1; dx <= 1; dx++ {
		for dy := -1; dy <= 1; dy++ {
			r, g, b, _ := img.At(x+dx, y+dy).RGBA()
			if absDiff(r, wr) < 0x1800 && absDiff(g, wg) < 0x1800 && absDiff(b, wb) < 0x1800 {
				return true
			}
		}
	}
	return false
}

func absDiff(a, b uint32) uint32 {
	if a > b {
		return a - b
	}
	return b - a
}

func TestFrameJSON(t *testing.T) {
	b, err := json.Marshal(Frame{Left: 1, LogX: true, Unit: "pt"})
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"left", "top", "right", "bottom", "x_min", "x_max", "y_min", "y_max", "log_x", "log_y", "width", "height", "unit"} {
		if _, ok := m[k]; !ok {
			t.Errorf("frame JSON lacks %q: %s", k, b)
		}
	}
}

// Text must be Liberation Sans (with metric-compatible fallbacks) at 10 pt
// or more.
func TestSVGText(t *testing.T) {
	var buf bytes.Buffer
	if _, err := sweepFigure().SVG(&buf); err != nil {
		t.Fatal(err)
	}
	s := buf.String()
	if strings.Contains(s, "Liberation Serif") || !strings.Contains(s, "font-family:'Liberation Sans',Arial") {
		t.Error("text is not set in Liberation Sans")
	}
	for _, m := range fontSizeRE.FindAllStringSubmatch(s, -1) {
		if size := atof(t, m[1]); size < 10 {
			t.Errorf("font size %gpt below 10 pt", size)
		}
	}
}

// The legend sits inside when a corner is free of data (N(E) leaves the
// top-left empty) and beside the plot when every corner is taken (bands
// fill the whole window), so it never hides a curve.
func TestLegendPlacement(t *testing.T) {
	for _, tc := range []struct {
		name   string
		fig    Figure
		inside bool
	}{
		{"states: inside", statesFigure(), true},
		{"bands: beside", bandsFigure(), false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			fr, err := tc.fig.SVG(io.Discard)
			if err != nil {
				t.Fatal(err)
			}
			if inside := fr.Right > 0.9*fr.Width; inside != tc.inside {
				t.Errorf("data area ends at %.0f of %.0f pt; legend inside = %v, want %v", fr.Right, fr.Width, inside, tc.inside)
			}
		})
	}
}

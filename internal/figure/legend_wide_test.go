package figure

import (
	"bytes"
	"math"
	"os"
	"testing"
)

// TestWideLegendGoesBelow: long series names in a figure whose corners are
// all taken must not squeeze the data area into a sliver (common practice:
// the data area keeps most of the width).
func TestWideLegendGoesBelow(t *testing.T) {
	var series []Series
	for k := 0; k < 3; k++ {
		x := make([]float64, 200)
		y := make([]float64, 200)
		for i := range x {
			x[i] = float64(i) / 199 * 0.3
			// Spikes everywhere so every corner holds data.
			y[i] = 1000 * math.Abs(math.Sin(float64(i*(k+3))/7))
		}
		series = append(series, Series{Name: []string{"1: GaAs 6nm×6nm×100nm box×box×open",
			"2: GaAs 10nm×10nm×100nm box×box×open", "3: InAs 10nm×10nm×100nm box×box×open"}[k],
			X: x, Y: y, Kind: Line, Role: RoleOther, Index: k})
	}
	f := Figure{Title: "D(E)", XLabel: "energy E (eV)", YLabel: "D(E) (states/eV)", Series: series}
	var buf bytes.Buffer
	fr, err := f.PNG(&buf, 100)
	if err != nil {
		t.Fatal(err)
	}
	if w := fr.Right - fr.Left; w < 0.6*fr.Width {
		t.Errorf("data area %.0f of %.0f px wide", w, fr.Width)
	}
	if os.Getenv("FIGURE_TMP") == "1" {
		_ = os.WriteFile("/tmp/figure-wide-legend.png", buf.Bytes(), 0o644)
	}
}

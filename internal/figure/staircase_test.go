package figure

import (
	"bytes"
	"math"
	"testing"
)

// longest returns the path of colour hex with the most points (the series
// itself rather than its legend thumbnail).
func longest(t *testing.T, svg string, hex string) svgPath {
	t.Helper()
	var best svgPath
	for _, p := range pathsOf(parsePaths(t, svg), hex) {
		if len(p.pts) > len(best.pts) {
			best = p
		}
	}
	if len(best.pts) == 0 {
		t.Fatalf("no path drawn in %s", hex)
	}
	return best
}

// checkAxisAligned fails on any diagonal segment and returns the x of
// every riser (vertical segment), merging risers that share an x.
func checkAxisAligned(t *testing.T, p svgPath) []float64 {
	t.Helper()
	var risers []float64
	for i := 1; i < len(p.pts); i++ {
		a, b := p.pts[i-1], p.pts[i]
		switch {
		case a[0] == b[0]:
			if len(risers) == 0 || risers[len(risers)-1] != a[0] {
				risers = append(risers, a[0])
			}
		case a[1] == b[1]:
		default:
			t.Fatalf("diagonal segment %v → %v (point %d)", a, b, i)
		}
	}
	return risers
}

// toPt maps a data x to SVG points through the returned frame.
func toPt(fr Frame, x float64) float64 {
	return fr.Left + (x-fr.XMin)/(fr.XMax-fr.XMin)*(fr.Right-fr.Left)
}

// The staircase of a 1D hard-wall count, N(E) = 2⌊√(E/E₁)⌋ (particle in a
// box; any quantum-mechanics text), must rise exactly at the first sample
// at or after each level E_n = n²E₁, and nowhere else.
func TestStaircaseRisers(t *testing.T) {
	for _, tc := range []struct {
		name    string
		samples int
	}{
		{"400 samples", 400},
		{"10^6 samples", 1_000_000},
	} {
		t.Run(tc.name, func(t *testing.T) {
			e := energies(tc.samples, 0.5)
			y := mapY(e, boxCount)
			f := Figure{XLabel: "energy E (eV)", YLabel: "states N(E)",
				Series: []Series{{Name: "box", X: e, Y: y, Kind: Staircase, Role: RoleBox}}}
			var buf bytes.Buffer
			fr, err := f.SVG(&buf)
			if err != nil {
				t.Fatal(err)
			}
			if buf.Len() >= 300_000 {
				t.Errorf("SVG is %d bytes, want < 300 kB", buf.Len())
			}
			p := longest(t, buf.String(), hexOf(roleLooks[RoleBox]))
			risers := checkAxisAligned(t, p)
			var want []float64
			for i := 1; i < len(e); i++ {
				if y[i] != y[i-1] {
					want = append(want, e[i])
				}
			}
			if len(risers) != len(want) {
				t.Fatalf("%d risers, want %d", len(risers), len(want))
			}
			for i := range want {
				// SVG coordinates carry 5 significant digits: ≤ 0.05 pt here.
				if d := math.Abs(risers[i] - toPt(fr, want[i])); d > 0.05 {
					t.Errorf("riser %d at %.3f pt, want %.3f pt (E = %g eV)", i, risers[i], toPt(fr, want[i]), want[i])
				}
			}
		})
	}
}

// A staircase with more distinct steps than pixel columns is collapsed
// to one riser per column; it must stay axis-aligned, small, monotone for
// monotone data (y from the top never grows), and end at the last sample. N(E) ∝ E^{3/2} with 10⁵
// steps stands in for a large 3D box.
func TestStaircaseDenseSteps(t *testing.T) {
	const n = 1_000_000
	x := energies(n, 1)
	y := mapY(x, func(e float64) float64 { return math.Floor(1e5 * math.Pow(e, 1.5)) })
	f := Figure{Series: []Series{{Name: "dense", X: x, Y: y, Kind: Staircase, Role: RoleScenario}}}
	var buf bytes.Buffer
	fr, err := f.SVG(&buf)
	if err != nil {
		t.Fatal(err)
	}
	if buf.Len() >= 300_000 {
		t.Errorf("SVG is %d bytes, want < 300 kB", buf.Len())
	}
	p := longest(t, buf.String(), hexOf(roleLooks[RoleScenario]))
	checkAxisAligned(t, p)
	for i := 1; i < len(p.pts); i++ {
		if p.pts[i][1] > p.pts[i-1][1]+1e-9 || p.pts[i][0] < p.pts[i-1][0] {
			t.Fatalf("path goes back at point %d: %v → %v", i, p.pts[i-1], p.pts[i])
		}
	}
	last := p.pts[len(p.pts)-1]
	if d := math.Abs(last[0] - fr.Right); d > 0.05 {
		t.Errorf("path ends at x = %.2f pt, data area ends at %.2f pt", last[0], fr.Right)
	}
}

// A 10⁶-point line with a one-sample spike (a van Hove peak, say) keeps
// the spike's height after per-column reduction.
func TestLineKeepsSpike(t *testing.T) {
	const n = 1_000_000
	x := energies(n, 1)
	y := mapY(x, func(e float64) float64 { return math.Sin(6 * e) })
	y[n/3] = 5
	f := Figure{Series: []Series{{Name: "D", X: x, Y: y, Kind: Line, Role: RoleScenario}}}
	var buf bytes.Buffer
	fr, err := f.SVG(&buf)
	if err != nil {
		t.Fatal(err)
	}
	if buf.Len() >= 300_000 {
		t.Errorf("SVG is %d bytes, want < 300 kB", buf.Len())
	}
	p := longest(t, buf.String(), hexOf(roleLooks[RoleScenario]))
	top := math.Inf(1)
	for _, pt := range p.pts {
		top = math.Min(top, pt[1])
	}
	if math.Abs(top-fr.Top) > 0.05 {
		t.Errorf("highest point at %.2f pt from top, the spike should reach the frame top %.2f", top, fr.Top)
	}
}

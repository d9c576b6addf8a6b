package figure

import (
	"bytes"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"testing"
)

var regen = flag.Bool("regen", false, "rewrite the golden files in testdata/figure")

const goldenDir = "../../testdata/figure"

// TestGolden compares each synthetic figure byte for byte with its golden
// SVG, as gonum/plot's own example tests do; run with -regen after an
// intended change and look at the new files before committing them.
func TestGolden(t *testing.T) {
	for _, tc := range []struct {
		name string
		fig  Figure
	}{
		{"states", statesFigure()},
		{"sweep", sweepFigure()},
		{"compare", compareFigure()},
		{"bands", bandsFigure()},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var got bytes.Buffer
			if _, err := tc.fig.SVG(&got); err != nil {
				t.Fatal(err)
			}
			var again bytes.Buffer
			if _, err := tc.fig.SVG(&again); err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(got.Bytes(), again.Bytes()) {
				t.Fatal("two renderings of the same figure differ")
			}
			path := filepath.Join(goldenDir, tc.name+".svg")
			if *regen {
				if err := os.WriteFile(path, got.Bytes(), 0o644); err != nil {
					t.Fatal(err)
				}
				return
			}
			want, err := os.ReadFile(path)
			if err != nil {
				t.Fatalf("%v (run go test -regen to create it)", err)
			}
			if !bytes.Equal(got.Bytes(), want) {
				t.Errorf("%s differs from the golden file (%d vs %d bytes); run go test -regen and inspect", path, got.Len(), len(want))
			}
		})
	}
}

// ExampleFigure_SVG draws a number-of-states staircase and reports where
// the data area landed, which a page script uses for a crosshair readout.
func ExampleFigure_SVG() {
	e := []float64{0, 0.01, 0.02, 0.03, 0.04, 0.05}
	f := Figure{
		Title:  "Number of states",
		XLabel: "energy E (eV)",
		YLabel: "states N(E)",
		Series: []Series{{Name: "box", X: e, Y: []float64{0, 2, 2, 4, 4, 6}, Kind: Staircase, Role: RoleBox}},
	}
	var buf bytes.Buffer
	fr, err := f.SVG(&buf)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("x %g…%g eV, y %g…%g, in a %gx%g %s canvas\n", fr.XMin, fr.XMax, fr.YMin, fr.YMax, fr.Width, fr.Height, fr.Unit)
	fmt.Println(fr.Left < fr.Right, fr.Top < fr.Bottom, fr.Right <= fr.Width, fr.Bottom <= fr.Height)
	// Output:
	// x 0…0.05 eV, y 0…6, in a 504x302.4 pt canvas
	// true true true true
}

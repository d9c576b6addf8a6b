package figure

import (
	"math"
	"os"
	"testing"
)

func TestRenderToTmp(t *testing.T) {
	if os.Getenv("FIGURE_TMP") == "" {
		t.Skip("set FIGURE_TMP=1 to write /tmp/figure-*.{svg,png}")
	}
	for name, f := range map[string]Figure{"states": statesFigure(), "sweep": sweepFigure(), "compare": compareFigure(), "bands": bandsFigure()} {
		for _, ext := range []string{"svg", "png"} {
			out, err := os.Create("/tmp/figure-" + name + "." + ext)
			if err != nil {
				t.Fatal(err)
			}
			var fr Frame
			if ext == "svg" {
				fr, err = f.SVG(out)
			} else {
				fr, err = f.PNG(out, 200)
			}
			if err != nil {
				t.Fatal(name, err)
			}
			out.Close()
			t.Logf("%s.%s %+v", name, ext, fr)
		}
	}
}

func TestRenderDenseToTmp(t *testing.T) {
	if os.Getenv("FIGURE_TMP") == "" {
		t.Skip("set FIGURE_TMP=1 to write /tmp/figure-dos.png")
	}
	e := energies(1_000_000, 0.12)
	dos := mapY(e, func(v float64) float64 {
		s := 0.0
		for n := 1; float64(n*n)*e1EV < v; n++ {
			s += 1 / math.Sqrt(v-float64(n*n)*e1EV)
		}
		return s
	})
	f := Figure{Title: "Density of states, quantum wire", XLabel: "energy E (eV)", YLabel: "D(E) (1/(eV·nm))",
		Series: []Series{
			{Name: "scenario", X: e, Y: dos, Kind: Line, Role: RoleScenario},
			{Name: "box N(E)", X: e, Y: mapY(e, boxCount), Kind: Staircase, Role: RoleBox},
		}, Caption: "10⁶ samples per curve"}
	out, _ := os.Create("/tmp/figure-dos.png")
	defer out.Close()
	if _, err := f.PNG(out, 150); err != nil {
		t.Fatal(err)
	}
	f.LogY = true
	f.Series = f.Series[1:]
	out2, _ := os.Create("/tmp/figure-logn.png")
	defer out2.Close()
	if _, err := f.PNG(out2, 150); err != nil {
		t.Fatal(err)
	}
}

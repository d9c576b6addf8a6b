package figure

import (
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

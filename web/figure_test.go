package web

import (
	"testing"

	"ringbox/internal/figure"
)

func TestFrameAttr(t *testing.T) {
	got := frameAttr(figure.Frame{Left: 1, Top: 2, Right: 3, Bottom: 4, XMin: 0, XMax: 0.3, YMin: 1, YMax: 1e3, LogY: true, Width: 403.2, Height: 302.4, Unit: "pt"})
	want := `{"left":1,"top":2,"right":3,"bottom":4,"xmin":0,"xmax":0.3,"ymin":1,"ymax":1000,"logx":false,"logy":true,"width":403.2,"height":302.4}`
	if got != want {
		t.Errorf("frameAttr = %s\nwant        %s", got, want)
	}
}

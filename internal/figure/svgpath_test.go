package figure

import (
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// svgPath is one stroked <path> of an SVG: its colour and its points in
// SVG user units (points) with y measured from the top, as a browser
// would place them.
type svgPath struct {
	stroke string
	pts    [][2]float64
}

var (
	pathRE   = regexp.MustCompile(`<path d="([^"]*)" style="([^"]*)"`)
	heightRE = regexp.MustCompile(`viewBox="0 0 [0-9.]+ ([0-9.]+)"`)
	strokeRE = regexp.MustCompile(`stroke:(#[0-9A-Fa-f]{6})`)
	cmdRE    = regexp.MustCompile(`([ML])(-?[0-9.e+-]+),(-?[0-9.e+-]+)`)
)

// parsePaths extracts the stroked paths of an SVG written by this package;
// the drawing is flipped by scale(1,−1), so y is turned back here.
func parsePaths(t *testing.T, svg string) []svgPath {
	t.Helper()
	m := heightRE.FindStringSubmatch(svg)
	if m == nil {
		t.Fatal("no viewBox in SVG")
	}
	h, _ := strconv.ParseFloat(m[1], 64)
	var out []svgPath
	for _, pm := range pathRE.FindAllStringSubmatch(svg, -1) {
		sm := strokeRE.FindStringSubmatch(pm[2])
		if sm == nil || strings.Contains(pm[1], "Z") {
			continue
		}
		p := svgPath{stroke: sm[1]}
		for _, c := range cmdRE.FindAllStringSubmatch(pm[1], -1) {
			x, err1 := strconv.ParseFloat(c[2], 64)
			y, err2 := strconv.ParseFloat(c[3], 64)
			if err1 != nil || err2 != nil {
				t.Fatalf("bad path coordinate %q", c[0])
			}
			p.pts = append(p.pts, [2]float64{x, h - y})
		}
		out = append(out, p)
	}
	return out
}

// pathsOf returns the paths drawn in colour hex (upper case, "#RRGGBB").
func pathsOf(paths []svgPath, hex string) []svgPath {
	var out []svgPath
	for _, p := range paths {
		if strings.EqualFold(p.stroke, hex) {
			out = append(out, p)
		}
	}
	return out
}

func hexOf(l look) string {
	return "#" + strings.ToUpper(strconv.FormatInt(int64(l.color.R)<<16|int64(l.color.G)<<8|int64(l.color.B)|1<<24, 16)[1:])
}

var fontSizeRE = regexp.MustCompile(`font-size:([0-9.]+)px`)

func atof(t *testing.T, s string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

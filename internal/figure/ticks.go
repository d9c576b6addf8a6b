package figure

import (
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
)

// Tick labels write powers of ten as "10^k" (and "3×10^k"); supText draws
// the exponent raised and smaller, because Liberation Sans lacks several
// Unicode superscript digits.

// linearTicks puts about six major ticks on "nice" values (1, 2, 5 ×
// 10ⁿ; common practice) with unlabelled minor ticks between them.
type linearTicks struct{}

func (linearTicks) Ticks(min, max float64) []plot.Tick {
	if !(max > min) {
		return nil
	}
	step := niceStep(max-min, 6)
	minor := step / 5
	if m := math.Round(step / math.Pow10(int(math.Floor(math.Log10(step)+1e-9)))); m == 2 {
		minor = step / 2
	}
	var ticks []plot.Tick
	big := math.Max(math.Abs(min), math.Abs(max))
	sci := big >= 1e5 || big < 1e-3
	exp := 0
	if sci {
		exp = int(math.Floor(math.Log10(big)))
	}
	k0 := math.Ceil(min / minor)
	// Bounded, because on a span tiny next to its values k+1 == k.
	for i := 0; i < 200 && (k0+float64(i))*minor <= max*(1+1e-12)+1e-300; i++ {
		v := (k0 + float64(i)) * minor
		if math.Abs(v) < minor*1e-9 {
			v = 0
		}
		t := plot.Tick{Value: v}
		if r := v / step; math.Abs(r-math.Round(r)) < 1e-6 {
			t.Label = linearLabel(v, step, sci, exp)
		}
		ticks = append(ticks, t)
	}
	return ticks
}

// niceStep is the 1, 2 or 5 × 10ⁿ step that cuts span into the number of
// intervals closest (in ratio) to target.
func niceStep(span, target float64) float64 {
	raw := span / target
	p := math.Pow10(int(math.Floor(math.Log10(raw))))
	best, bestErr := p, math.Inf(1)
	for _, m := range []float64{1, 2, 5, 10} {
		n := span / (m * p)
		if e := math.Abs(math.Log(n / target)); e < bestErr {
			best, bestErr = m*p, e
		}
	}
	return best
}

// linearLabel formats v with just enough decimals for step, or as
// "m×10^e" for very large and very small values.
func linearLabel(v, step float64, sci bool, exp int) string {
	if v == 0 {
		return "0"
	}
	if sci {
		scale := math.Pow10(exp)
		return minus(strconv.FormatFloat(v/scale, 'f', decimals(step/scale), 64)) + "×10^" + minus(strconv.Itoa(exp))
	}
	return minus(strconv.FormatFloat(v, 'f', decimals(step), 64))
}

// decimals is the number of decimals that shows every multiple of step.
func decimals(step float64) int {
	for d := 0; d < 12; d++ {
		s := step * math.Pow10(d)
		if math.Abs(s-math.Round(s)) < 1e-6*s {
			return d
		}
	}
	return 12
}

// minus uses the typographic minus sign.
func minus(s string) string { return strings.ReplaceAll(s, "-", "−") }

// logTicks labels decades (every second or third one on wide ranges) and
// marks 2…9 between them when there are at most four decades; a range shorter than two decades also labels 2
// and 5 so that at least two labels show.
type logTicks struct{}

func (logTicks) Ticks(min, max float64) []plot.Tick {
	if !(min > 0 && max > min) {
		return nil
	}
	lo := int(math.Floor(math.Log10(min) + 1e-9))
	hi := int(math.Ceil(math.Log10(max) - 1e-9))
	decades := hi - lo
	every := (decades + 7) / 8
	if every < 1 {
		every = 1
	}
	plainOK := lo >= -2 && hi <= 3
	short := math.Log10(max)-math.Log10(min) < 1.5
	var ticks []plot.Tick
	for e := lo; e <= hi; e++ {
		for m := 1; m <= 9; m++ {
			if m > 1 && (e == hi || decades > 4) {
				break
			}
			v := float64(m) * math.Pow10(e)
			if v < min*(1-1e-9) || v > max*(1+1e-9) {
				continue
			}
			t := plot.Tick{Value: v}
			switch {
			case m == 1 && e%every == 0:
				t.Label = decadeLabel(e, 1, plainOK)
			case short && (m == 2 || m == 5):
				t.Label = decadeLabel(e, m, plainOK)
			}
			ticks = append(ticks, t)
		}
	}
	return ticks
}

// decadeLabel writes m·10^e plainly ("0.05", "200") on small ranges and as
// a power of ten otherwise.
func decadeLabel(e, m int, plain bool) string {
	if plain {
		return strconv.FormatFloat(float64(m)*math.Pow10(e), 'f', max(0, -e), 64)
	}
	p := "10^" + minus(strconv.Itoa(e))
	if m != 1 {
		p = strconv.Itoa(m) + "×" + p
	}
	return p
}

// supText is a text.Handler that draws "base^exp" with the exponent raised
// by 0.42 em and at supScale of the size; other text is drawn plainly.
type supText struct{ text.Plain }

const supScale = 0.85

func splitPow(txt string) (base, exp string, ok bool) {
	i := strings.IndexByte(txt, '^')
	if i <= 0 || i == len(txt)-1 || strings.ContainsRune(txt, '\n') {
		return txt, "", false
	}
	return txt[:i], txt[i+1:], true
}

func supFont(f font.Font) font.Font {
	f.Size = vg.Length(float64(f.Size) * supScale)
	return f
}

func (h supText) Box(txt string, fnt font.Font) (width, height, depth vg.Length) {
	base, exp, ok := splitPow(txt)
	if !ok {
		return h.Plain.Box(txt, fnt)
	}
	wb, hb, db := h.Plain.Box(base, fnt)
	we, he, _ := h.Plain.Box(exp, supFont(fnt))
	return wb + we, max(hb, 0.42*fnt.Size+he*0.8), db
}

func (h supText) Draw(c vg.Canvas, txt string, sty text.Style, pt vg.Point) {
	base, exp, ok := splitPow(txt)
	if !ok || sty.Rotation != 0 {
		h.Plain.Draw(c, strings.Replace(txt, "^", "", 1), sty, pt)
		return
	}
	w, ht, d := h.Box(txt, sty.Font)
	face := h.Fonts.Lookup(sty.Font, sty.Font.Size)
	small := h.Fonts.Lookup(supFont(sty.Font), supFont(sty.Font).Size)
	// Same anchoring arithmetic as text.Plain for one line of text.
	x := pt.X + vg.Length(sty.XAlign)*w
	y := pt.Y + (ht+d)*vg.Length(sty.YAlign) - face.Extents().Ascent + sty.Font.Size
	c.SetColor(sty.Color)
	c.FillString(face, vg.Point{X: x, Y: y}, base)
	c.FillString(small, vg.Point{X: x + face.Width(base), Y: y + 0.42*sty.Font.Size}, exp)
}

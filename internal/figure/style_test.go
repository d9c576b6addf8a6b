package figure

import (
	"fmt"
	"image/color"
	"math"
	"slices"
	"testing"
)

// Colour-vision-deficiency simulation matrices for full dichromacy
// (severity 1.0), applied to linear RGB: Machado, Oliveira & Fernandes,
// IEEE TVCG 15, 1291 (2009), Table 1 (from memory).
var cvd = map[string][3][3]float64{
	"normal": {{1, 0, 0}, {0, 1, 0}, {0, 0, 1}},
	"protanopia": {
		{0.152286, 1.052583, -0.204868},
		{0.114503, 0.786281, 0.099216},
		{-0.003882, -0.048116, 1.051998}},
	"deuteranopia": {
		{0.367322, 0.860646, -0.227968},
		{0.280085, 0.672501, 0.047413},
		{-0.011820, 0.042940, 0.968881}},
	"tritanopia": {
		{1.255528, -0.076749, -0.178779},
		{-0.078411, 0.930809, 0.147602},
		{0.004733, 0.691367, 0.303900}},
}

// linear undoes the sRGB transfer curve (IEC 61966-2-1).
func linear(c uint8) float64 {
	v := float64(c) / 255
	if v <= 0.04045 {
		return v / 12.92
	}
	return math.Pow((v+0.055)/1.055, 2.4)
}

// lab converts linear RGB to CIE L*a*b* with the D65 white (CIE 15:2004).
func lab(r, g, b float64) [3]float64 {
	x := 0.4124*r + 0.3576*g + 0.1805*b
	y := 0.2126*r + 0.7152*g + 0.0722*b
	z := 0.0193*r + 0.1192*g + 0.9505*b
	f := func(t float64) float64 {
		if t > 216.0/24389 {
			return math.Cbrt(t)
		}
		return (24389.0/27*t + 16) / 116
	}
	fx, fy, fz := f(x/0.95047), f(y), f(z/1.08883)
	return [3]float64{116*fy - 16, 500 * (fx - fy), 200 * (fy - fz)}
}

func simulate(c color.NRGBA, m [3][3]float64) [3]float64 {
	in := [3]float64{linear(c.R), linear(c.G), linear(c.B)}
	var out [3]float64
	for i := range 3 {
		for j := range 3 {
			out[i] += m[i][j] * in[j]
		}
		out[i] = math.Min(1, math.Max(0, out[i]))
	}
	return lab(out[0], out[1], out[2])
}

// deltaE is the CIE 1976 colour difference; about 2.3 is just noticeable,
// and lines of different colour need far more (common practice).
func deltaE(a, b [3]float64) float64 {
	return math.Sqrt((a[0]-b[0])*(a[0]-b[0]) + (a[1]-b[1])*(a[1]-b[1]) + (a[2]-b[2])*(a[2]-b[2]))
}

func minDeltaE(looks []look, m [3][3]float64) (float64, string) {
	best, pair := math.Inf(1), ""
	for i := range looks {
		for j := i + 1; j < len(looks); j++ {
			if d := deltaE(simulate(looks[i].color, m), simulate(looks[j].color, m)); d < best {
				best, pair = d, fmt.Sprintf("%d–%d", i, j)
			}
		}
	}
	return best, pair
}

func TestPaletteColourBlindSafe(t *testing.T) {
	var roles []look
	for r := RoleScenario; r < RoleOther; r++ {
		roles = append(roles, roleLooks[r])
	}
	for _, tc := range []struct {
		name  string
		looks []look
		min   float64 // ΔE*ab every pair must exceed under every simulation
	}{
		{"roles", roles, 15},
		{"comparison palette", comparePalette[:], 10},
	} {
		for _, v := range []string{"normal", "protanopia", "deuteranopia", "tritanopia"} {
			t.Run(tc.name+"/"+v, func(t *testing.T) {
				d, pair := minDeltaE(tc.looks, cvd[v])
				t.Logf("closest pair %s: ΔE = %.1f", pair, d)
				if d < tc.min {
					t.Errorf("colours %s differ by ΔE = %.1f < %g", pair, d, tc.min)
				}
			})
		}
	}
}

// In greyscale print only width and dash tell lines apart: every style in
// a set must differ from the others in one of them, and the scenario must
// be the boldest line on the figure.
func TestStylesDistinctWithoutColour(t *testing.T) {
	key := func(l look) string { return fmt.Sprint(l.width, l.dashes) }
	for name, set := range map[string][]look{
		"roles":   {roleLooks[RoleScenario], roleLooks[RoleBox], roleLooks[RoleRing], roleLooks[RoleContinuum], roleLooks[RoleSmooth]},
		"compare": comparePalette[:],
	} {
		seen := map[string]int{}
		for i, l := range set {
			if j, dup := seen[key(l)]; dup {
				t.Errorf("%s: styles %d and %d share width and dash %s", name, j, i, key(l))
			}
			seen[key(l)] = i
		}
	}
	for r, l := range roleLooks {
		if r != RoleScenario && l.width >= roleLooks[RoleScenario].width {
			t.Errorf("role %d is as bold as the scenario", r)
		}
	}
	if slices.Equal(roleLooks[RoleBox].dashes, roleLooks[RoleRing].dashes) {
		t.Error("box and ring share a dash pattern")
	}
	for _, r := range []Role{RoleContinuum, RoleSmooth} {
		if roleLooks[r].width > 1.2 {
			t.Errorf("role %d should be a thin line", r)
		}
	}
}

func TestLookForPanicsOnMisuse(t *testing.T) {
	for _, s := range []Series{{Kind: Kind(9)}, {Role: Role(42)}} {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("%+v: no panic", s)
				}
			}()
			lookFor(s)
		}()
	}
}

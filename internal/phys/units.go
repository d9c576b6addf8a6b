package phys

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// lengthUnits maps a unit suffix to metres. Bare numbers are nanometres.
var lengthUnits = []struct {
	suffix string
	metres float64
}{
	// Longest suffixes first so "nm" is not read as "m".
	{"nm", 1e-9},
	{"um", 1e-6},
	{"µm", 1e-6},
	{"μm", 1e-6}, // Greek mu, as some keyboards type it
	{"mm", 1e-3},
	{"pm", 1e-12},
	{"cm", 1e-2},
	{"A", 1e-10},
	{"Å", 1e-10},
	{"m", 1},
}

// ParseLength reads a length such as "20nm", "0.02um", "200A", "2e-8m" or
// "20" (bare numbers are nanometres) and returns it in metres. It rejects
// empty input, unknown units, and values that are not finite; the range check
// belongs to the caller, which knows what is sensible.
func ParseLength(s string) (float64, error) {
	t := strings.TrimSpace(s)
	if t == "" {
		return 0, fmt.Errorf("empty length")
	}
	num, scale := t, 1e-9
	for _, u := range lengthUnits {
		if strings.HasSuffix(t, u.suffix) {
			num, scale = strings.TrimSpace(strings.TrimSuffix(t, u.suffix)), u.metres
			break
		}
	}
	if num == "" {
		return 0, fmt.Errorf("length %q has a unit but no number", s)
	}
	v, err := parseNumber(num)
	if err != nil {
		if strings.IndexFunc(num, isLetter) >= 0 {
			return 0, fmt.Errorf("length %q: unknown unit (use nm, um, A or m)", s)
		}
		return 0, fmt.Errorf("length %q is not a number", s)
	}
	return v * scale, nil
}

// ParseEnergy reads an energy such as "0.1", "0.1eV" or "25meV" (bare numbers
// are eV) and returns it in eV.
func ParseEnergy(s string) (float64, error) {
	t := strings.TrimSpace(s)
	if t == "" {
		return 0, fmt.Errorf("empty energy")
	}
	num, scale := t, 1.0
	switch {
	case strings.HasSuffix(t, "meV"):
		num, scale = strings.TrimSuffix(t, "meV"), 1e-3
	case strings.HasSuffix(t, "eV"):
		num = strings.TrimSuffix(t, "eV")
	}
	num = strings.TrimSpace(num)
	if num == "" {
		return 0, fmt.Errorf("energy %q has a unit but no number", s)
	}
	v, err := parseNumber(num)
	if err != nil {
		if strings.IndexFunc(num, isLetter) >= 0 {
			return 0, fmt.Errorf("energy %q: unknown unit (use eV or meV)", s)
		}
		return 0, fmt.Errorf("energy %q is not a number", s)
	}
	return v * scale, nil
}

// parseNumber is strconv.ParseFloat restricted to finite decimal numbers:
// no NaN, no infinities, no hexadecimal floats, no underscores.
func parseNumber(s string) (float64, error) {
	for _, r := range s {
		if !(r >= '0' && r <= '9' || r == '.' || r == 'e' || r == 'E' || r == '+' || r == '-') {
			return 0, fmt.Errorf("bad character %q", r)
		}
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return 0, err
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("not finite")
	}
	return v, nil
}

func isLetter(r rune) bool {
	return r != 'e' && r != 'E' && (r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r > 127)
}

var siPrefixes = []struct {
	exp    int
	prefix string
}{
	{24, "Y"}, {21, "Z"}, {18, "E"}, {15, "P"}, {12, "T"}, {9, "G"}, {6, "M"}, {3, "k"},
	{0, ""}, {-3, "m"}, {-6, "µ"}, {-9, "n"}, {-12, "p"}, {-15, "f"}, {-18, "a"}, {-21, "z"}, {-24, "y"},
}

// FormatSI formats v with an SI prefix on unit and the given number of
// significant digits: FormatSI(7.748e-5, "S", 4) = "77.48 µS". Values
// outside the prefixes (beyond 10²⁷ or below 10⁻²⁴) fall back to exponent form.
func FormatSI(v float64, unit string, digits int) string {
	if digits < 1 {
		digits = 1
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return fmt.Sprintf("%v %s", v, unit)
	}
	if v == 0 {
		return "0 " + unit
	}
	exp3 := int(math.Floor(math.Log10(math.Abs(v))/3)) * 3
	s := strconv.FormatFloat(v/math.Pow(10, float64(exp3)), 'g', digits, 64)
	if r, _ := strconv.ParseFloat(s, 64); math.Abs(r) >= 1000 { // 999.96 rounded up
		exp3 += 3
		s = strconv.FormatFloat(v/math.Pow(10, float64(exp3)), 'g', digits, 64)
	}
	for _, p := range siPrefixes {
		if p.exp == exp3 && !strings.Contains(s, "e") {
			return s + " " + p.prefix + unit
		}
	}
	return strconv.FormatFloat(v, 'e', digits-1, 64) + " " + unit
}

// FormatLength formats a length in metres in the most readable of nm, µm, mm
// or m, as a string ParseLength reads back: "20nm", "1.5um".
func FormatLength(metres float64) string {
	a := math.Abs(metres)
	switch {
	case a < 1e-6:
		return trimFloat(metres*1e9) + "nm"
	case a < 1e-3:
		return trimFloat(metres*1e6) + "um"
	case a < 1:
		return trimFloat(metres*1e3) + "mm"
	}
	return trimFloat(metres) + "m"
}

func trimFloat(v float64) string {
	return strconv.FormatFloat(v, 'g', 10, 64)
}

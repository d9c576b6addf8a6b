package phys

import (
	"math"
	"strings"
	"testing"
)

func TestParseLength(t *testing.T) {
	tests := []struct {
		in   string
		want float64
	}{
		{"20nm", 20e-9},
		{"20", 20e-9},
		{" 20 nm ", 20e-9},
		{"0.02um", 20e-9},
		{"0.02µm", 20e-9},
		{"200A", 20e-9},
		{"200Å", 20e-9},
		{"2e-8m", 20e-9},
		{"2E-8m", 20e-9},
		{"1.5e1nm", 15e-9},
		{"1mm", 1e-3},
	}
	for _, tt := range tests {
		t.Run(tt.in, func(t *testing.T) {
			got, err := ParseLength(tt.in)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(got-tt.want) > 1e-12*tt.want {
				t.Errorf("ParseLength(%q) = %g, want %g", tt.in, got, tt.want)
			}
		})
	}
}

func TestParseLengthErrors(t *testing.T) {
	for _, in := range []string{"", "nm", "20 furlongs", "20km", "NaN", "Inf", "+Inf", "1e999", "0x10", "1_0", "abc", "20 nm nm"} {
		t.Run(in, func(t *testing.T) {
			if v, err := ParseLength(in); err == nil {
				t.Errorf("ParseLength(%q) = %g, want an error", in, v)
			}
		})
	}
	_, err := ParseLength("20 furlongs")
	if err == nil || !strings.Contains(err.Error(), "unit") {
		t.Errorf("an unknown unit should say so, got %v", err)
	}
}

func TestParseEnergy(t *testing.T) {
	tests := []struct {
		in   string
		want float64
	}{
		{"0.1", 0.1}, {"0.1eV", 0.1}, {"25meV", 0.025}, {"-0.2", -0.2}, {"1e-3 eV", 1e-3},
	}
	for _, tt := range tests {
		got, err := ParseEnergy(tt.in)
		if err != nil || math.Abs(got-tt.want) > 1e-15 {
			t.Errorf("ParseEnergy(%q) = %g, %v; want %g", tt.in, got, err, tt.want)
		}
	}
	for _, in := range []string{"", "eV", "1 J", "nan", "inf", "1e400"} {
		if _, err := ParseEnergy(in); err == nil {
			t.Errorf("ParseEnergy(%q): want an error", in)
		}
	}
}

func TestFormatSI(t *testing.T) {
	tests := []struct {
		v    float64
		unit string
		want string
	}{
		{7.748091729e-5, "S", "77.48 µS"},
		{12906.4, "Ω", "12.91 kΩ"},
		{999.96, "V", "1 kV"},
		{0, "F", "0 F"},
		{-2.5e-9, "m", "-2.5 nm"},
		{1, "eV", "1 eV"},
	}
	for _, tt := range tests {
		if got := FormatSI(tt.v, tt.unit, 4); got != tt.want {
			t.Errorf("FormatSI(%g) = %q, want %q", tt.v, got, tt.want)
		}
	}
}

func TestFormatLengthRoundTrip(t *testing.T) {
	for _, m := range []float64{1e-10, 20e-9, 1.5e-6, 2e-3, 3} {
		got, err := ParseLength(FormatLength(m))
		if err != nil || math.Abs(got-m) > 1e-9*m {
			t.Errorf("round trip of %g: %q → %g, %v", m, FormatLength(m), got, err)
		}
	}
}

// TestConstants checks the derived constants against CODATA 2018 printed values.
func TestConstants(t *testing.T) {
	// 2e²/h = 7.748091729…×10⁻⁵ S (CODATA 2018).
	if d := math.Abs(ConductanceQuantum/7.748091729e-5 - 1); d > 1e-9 {
		t.Errorf("G0 = %g", ConductanceQuantum)
	}
	// ħ²/(2m₀) = 3.80998 eV·Å² (CODATA 2018 derived; common practice).
	if d := math.Abs(HbarSqOver2M0EVm2/3.80998212e-20 - 1); d > 1e-7 {
		t.Errorf("ħ²/2m₀ = %g eV·m²", HbarSqOver2M0EVm2)
	}
}

func FuzzParseLength(f *testing.F) {
	for _, s := range []string{"20nm", "0.02um", "200A", "2e-8m", "20", "µm", "1e309nm", "-0nm"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		v, err := ParseLength(s)
		if err == nil && (math.IsNaN(v) || math.IsInf(v, 0)) {
			t.Fatalf("ParseLength(%q) = %g without error", s, v)
		}
	})
}

func FuzzParseEnergy(f *testing.F) {
	for _, s := range []string{"0.1", "25meV", "1eV", "-3", "meV"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		v, err := ParseEnergy(s)
		if err == nil && (math.IsNaN(v) || math.IsInf(v, 0)) {
			t.Fatalf("ParseEnergy(%q) = %g without error", s, v)
		}
	})
}

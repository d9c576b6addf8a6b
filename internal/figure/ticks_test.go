package figure

import (
	"slices"
	"testing"

	"gonum.org/v1/plot"
)

func labels(ticks []plot.Tick) []string {
	var out []string
	for _, t := range ticks {
		if t.Label != "" {
			out = append(out, t.Label)
		}
	}
	return out
}

// Major ticks on 1, 2 or 5 × 10ⁿ (common practice for axis labelling).
func TestLinearTicks(t *testing.T) {
	for _, tc := range []struct {
		name     string
		min, max float64
		want     []string
	}{
		{"energies", 0, 0.12, []string{"0", "0.02", "0.04", "0.06", "0.08", "0.10", "0.12"}},
		{"counts", 0, 16, []string{"0", "2", "4", "6", "8", "10", "12", "14", "16"}},
		{"symmetric", -7.7, 7.7, []string{"−6", "−4", "−2", "0", "2", "4", "6"}},
		{"densities", 0, 3e19, []string{"0", "0.5×10^19", "1.0×10^19", "1.5×10^19", "2.0×10^19", "2.5×10^19", "3.0×10^19"}},
		{"small", 0, 5e-4, []string{"0", "1×10^−4", "2×10^−4", "3×10^−4", "4×10^−4", "5×10^−4"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got := labels(linearTicks{}.Ticks(tc.min, tc.max))
			if !slices.Equal(got, tc.want) {
				t.Errorf("labels %q, want %q", got, tc.want)
			}
		})
	}
}

// Log axes label the decades as powers of ten.
func TestLogTicks(t *testing.T) {
	for _, tc := range []struct {
		name     string
		min, max float64
		want     []string
	}{
		{"lengths in nm", 1, 1000, []string{"1", "10", "100", "1000"}},
		{"deviations", 1e-6, 1, []string{"10^−6", "10^−5", "10^−4", "10^−3", "10^−2", "10^−1", "10^0"}},
		{"short range", 2, 30, []string{"2", "5", "10", "20"}},
		{"wide range", 1e-12, 1e12, []string{"10^−12", "10^−9", "10^−6", "10^−3", "10^0", "10^3", "10^6", "10^9", "10^12"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got := labels(logTicks{}.Ticks(tc.min, tc.max))
			if !slices.Equal(got, tc.want) {
				t.Errorf("labels %q, want %q", got, tc.want)
			}
		})
	}
}

func TestTicksEmptyRange(t *testing.T) {
	if (linearTicks{}).Ticks(1, 1) != nil || (logTicks{}).Ticks(0, 1) != nil {
		t.Error("ticks for an empty or non-positive range")
	}
}

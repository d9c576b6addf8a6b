package lattice

import "testing"

func TestNames(t *testing.T) {
	ip := func(v int) *int { return &v }
	// Tube classes by chiral indices (Saito, Dresselhaus & Dresselhaus
	// 1998, ch. 3): m = 0 zigzag, m = n armchair, else chiral.
	tests := []struct {
		name string
		r    Result
		want string
	}{
		{"armchair ribbon", Result{Structure: Armchair, Lines: 7}, "armchair ribbon N = 7"},
		{"zigzag ribbon", Result{Structure: Zigzag, Lines: 12}, "zigzag ribbon N = 12"},
		{"zigzag tube", Result{Structure: Tube, N: ip(10), M: ip(0)}, "zigzag tube (10, 0)"},
		{"armchair tube", Result{Structure: Tube, N: ip(5), M: ip(5)}, "armchair tube (5, 5)"},
		{"chiral tube", Result{Structure: Tube, N: ip(6), M: ip(5)}, "chiral tube (6, 5)"},
		{"tube without indices", Result{Structure: Tube}, "tube"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := tt.r.Name(); got != tt.want {
				t.Errorf("Result.Name = %q, want %q", got, tt.want)
			}
			p := Partner{Structure: tt.r.Structure, Lines: tt.r.Lines, N: tt.r.N, M: tt.r.M}
			if got := p.Name(); got != tt.want {
				t.Errorf("Partner.Name = %q, want %q", got, tt.want)
			}
		})
	}
	if got := (Partner{Structure: "none"}).Name(); got != "none" {
		t.Errorf("no partner: Name = %q, want \"none\"", got)
	}
}

func TestFamilyLabel(t *testing.T) {
	tests := []struct {
		s      Structure
		family int
		want   string
	}{
		{Armchair, 2, "N mod 3 = 2"},
		{Zigzag, 0, "N mod 3 = 0"},
		{Tube, 1, "(n − m) mod 3 = 1"},
	}
	for _, tt := range tests {
		t.Run(string(tt.s), func(t *testing.T) {
			if got := tt.s.FamilyLabel(tt.family); got != tt.want {
				t.Errorf("FamilyLabel(%d) = %q, want %q", tt.family, got, tt.want)
			}
		})
	}
}

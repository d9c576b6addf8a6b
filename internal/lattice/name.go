package lattice

import "fmt"

// Names of structures in words, shared by the command line and the web
// page. The tube classes follow the usual nomenclature (Saito,
// Dresselhaus & Dresselhaus 1998, ch. 3): (n, 0) is zigzag, (n, n) is
// armchair, any other (n, m) is chiral.

// Name is the structure in words: "armchair ribbon N = 7",
// "zigzag tube (10, 0)", "chiral tube (6, 5)".
func (r Result) Name() string { return structureName(r.Structure, r.Lines, r.N, r.M) }

// Name is the partner in words, as Result.Name; "none" when there is no
// partner.
func (p Partner) Name() string { return structureName(p.Structure, p.Lines, p.N, p.M) }

// FamilyLabel names family (N mod 3 for a ribbon, (n − m) mod 3 for a
// tube): "N mod 3 = 1", "(n − m) mod 3 = 0".
func (s Structure) FamilyLabel(family int) string {
	if s == Tube {
		return fmt.Sprintf("(n − m) mod 3 = %d", family)
	}
	return fmt.Sprintf("N mod 3 = %d", family)
}

// structureName is Result.Name of its fields. A tube without both indices,
// or a structure it does not know, is named by s alone.
func structureName(s Structure, lines int, n, m *int) string {
	switch s {
	case Armchair, Zigzag:
		return fmt.Sprintf("%s ribbon N = %d", s, lines)
	case Tube:
		if n != nil && m != nil {
			kind := "chiral"
			switch {
			case *m == 0:
				kind = "zigzag"
			case *m == *n:
				kind = "armchair"
			}
			return fmt.Sprintf("%s tube (%d, %d)", kind, *n, *m)
		}
	}
	return string(s)
}

package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"math"
	"net/url"
	"strconv"
	"strings"
	"testing"

	"ringbox/internal/scenario"
)

// runLattice runs `ringbox lattice args…` and returns its status and output.
func runLattice(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(context.Background(), append([]string{"lattice"}, args...), &out, &errb)
	return code, out.String(), errb.String()
}

// tableRow returns the cells of the table row whose first cell is label.
func tableRow(t *testing.T, table, label string) []string {
	t.Helper()
	for _, line := range strings.Split(table, "\n") {
		if strings.HasPrefix(line, label+"  ") {
			var cells []string
			for _, c := range strings.Split(strings.TrimSpace(line[len(label):]), "  ") {
				if c = strings.TrimSpace(c); c != "" {
					cells = append(cells, c)
				}
			}
			return cells
		}
	}
	t.Fatalf("no row %q in:\n%s", label, table)
	return nil
}

func TestLatticeTable(t *testing.T) {
	tests := []struct {
		name      string
		args      []string
		structure string // first cell of the structure row
		gap       string // this structure's gap cell
		metallic  string
		modes     string
		g         string // conductance at E_F in S
		partner   string
	}{
		// Nakada et al., PRB 54, 17954 (1996) formula: N = 7 armchair gap
		// 1.267 eV at γ0 = 2.7 eV (DESIGN check values); the odd N has the
		// nearest tube (4, 0) as partner.
		{"armchair N=7", nil, "armchair ribbon N = 7", "1.267 eV", "no", "0", "", "zigzag tube (4, 0) (nearest)"},
		// N = 3j + 2 is metallic (Nakada et al. 1996), one channel per spin
		// at E = 0: G = 2e²/h = 77.48 µS (CODATA 2018, h and e exact).
		{"armchair N=8", []string{"--lines", "8"}, "armchair ribbon N = 8", "0 eV", "yes", "2", "77.48 µS", "zigzag tube (4, 0)"},
		// Saito, Dresselhaus & Dresselhaus (1998) zone folding: the (10, 0)
		// tube's gap is 0.948 eV at γ0 = 2.7 eV (DESIGN check values).
		{"tube (10,0)", []string{"--structure", "tube"}, "zigzag tube (10, 0)", "0.9481 eV", "no", "0", "", "armchair ribbon N = 20"},
		// A metallic tube has 2 modes per spin near E = 0: G = 4e²/h ≈
		// 155 µS (common practice; DESIGN check values).
		{"tube (9,0)", []string{"--structure", "tube", "--n", "9", "--m", "0"}, "zigzag tube (9, 0)", "0 eV", "yes", "4", "155 µS", "armchair ribbon N = 18"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			code, out, errs := runLattice(t, tc.args...)
			if code != 0 {
				t.Fatalf("status %d, stderr %s", code, errs)
			}
			if got := tableRow(t, out, "structure"); len(got) != 2 || got[0] != tc.structure || got[1] != tc.partner {
				t.Errorf("structure row = %q, want [%q %q]", got, tc.structure, tc.partner)
			}
			if got := tableRow(t, out, "gap")[0]; got != tc.gap {
				t.Errorf("gap = %q, want %q", got, tc.gap)
			}
			if got := tableRow(t, out, "metallic")[0]; got != tc.metallic {
				t.Errorf("metallic = %q, want %q", got, tc.metallic)
			}
			if got := tableRow(t, out, "modes at E_F")[0]; got != tc.modes {
				t.Errorf("modes at E_F = %q, want %q", got, tc.modes)
			}
			if tc.g != "" {
				if got := tableRow(t, out, "G at E_F")[0]; got != tc.g {
					t.Errorf("G at E_F = %q, want %q", got, tc.g)
				}
			}
			for _, want := range []string{"width or diameter", " nm ", "(2e²/h)", "no edge relaxation"} {
				if !strings.Contains(out, want) {
					t.Errorf("table lacks %q:\n%s", want, out)
				}
			}
		})
	}
}

func TestLatticeTablePointValues(t *testing.T) {
	code, out, errs := runLattice(t, "--lines", "8", "--at", "0.5,1.5")
	if code != 0 {
		t.Fatalf("status %d: %s", code, errs)
	}
	// The metallic N = 8 ribbon has only its linear band pair (p = 6) below
	// the first subband edge, the smallest γ0·|1 ± 2cos(pπ/9)| over the
	// other p: 2.7 eV × 0.532 = 1.44 eV at p = 2 and 7 (Nakada et al. 1996
	// formula, k = 0 and the zone edge). So M = 2 at 0.5 eV and more at 1.5 eV.
	if got := tableRow(t, out, "0.5"); got[0] != "2" {
		t.Errorf("point 0.5 eV: %q, want modes 2", got)
	}
	if got := tableRow(t, out, "1.5"); got[0] == "2" {
		t.Errorf("point 1.5 eV: %q, want modes above 2 past the first subband edge", got)
	}
}

func TestLatticeJSONEqualsRun(t *testing.T) {
	args := []string{"--format", "json", "--structure", "zigzag", "--lines", "12", "--ef", "0.3", "--temp", "77", "--at", "0.1,-0.2"}
	code, out, errs := runLattice(t, args...)
	if code != 0 {
		t.Fatalf("status %d: %s", code, errs)
	}
	q := url.Values{"structure": {"zigzag"}, "lines": {"12"}, "ef": {"0.3"}, "temp": {"77"}, "at": {"0.1,-0.2"}}
	req, err := scenario.ParseLattice(q)
	if err != nil {
		t.Fatal(err)
	}
	res, err := scenario.RunLattice(context.Background(), req)
	if err != nil {
		t.Fatal(err)
	}
	want, err := json.Marshal(res)
	if err != nil {
		t.Fatal(err)
	}
	if out != string(want)+"\n" {
		t.Errorf("--format json differs from json.Marshal(RunLattice): got %d bytes, want %d", len(out), len(want)+1)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("output is not JSON: %v", err)
	}
	for _, k := range []string{"gap_eV", "metallic", "family", "at", "observables", "partner", "bands", "curves", "family_view"} {
		if _, ok := doc[k]; !ok {
			t.Errorf("JSON lacks %q", k)
		}
	}
}

func TestLatticeCSV(t *testing.T) {
	code, out, errs := runLattice(t, "--format", "csv", "--emin", "-1", "--emax", "1", "--points", "200")
	if code != 0 {
		t.Fatalf("status %d: %s", code, errs)
	}
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if strings.Join(rows[0], ",") != "energy_eV,dos_per_eV_per_nm,modes" {
		t.Errorf("header %q", rows[0])
	}
	if len(rows) != 201 {
		t.Fatalf("%d rows, want header + 200", len(rows))
	}
	for i, r := range rows[1:] {
		e, err1 := strconv.ParseFloat(r[0], 64)
		d, err2 := strconv.ParseFloat(r[1], 64)
		m, err3 := strconv.Atoi(r[2])
		if err1 != nil || err2 != nil || err3 != nil {
			t.Fatalf("row %d: %q", i+1, r)
		}
		// Bin centres of 200 bins over [−1, 1] eV.
		if want := -1 + (float64(i)+0.5)*0.01; math.Abs(e-want) > 1e-9 {
			t.Fatalf("row %d energy %g, want %g", i+1, e, want)
		}
		// Inside the 1.267 eV gap of the N = 7 ribbon (Nakada et al. 1996)
		// there are neither states nor modes.
		if math.Abs(e) < 0.6 && (d != 0 || m != 0) {
			t.Errorf("row %d: D = %g, M = %d inside the gap", i+1, d, m)
		}
		if math.Abs(e) > 0.65 && m == 0 {
			t.Errorf("row %d: no modes at %g eV, above the gap edge", i+1, e)
		}
	}
}

func TestLatticeBadFlags(t *testing.T) {
	tests := []struct {
		name string
		args []string
		want string // in stderr
	}{
		{"lines not a number", []string{"--lines", "x"}, "--lines"},
		{"lines out of range", []string{"--lines", "0"}, "--lines"},
		{"unknown structure", []string{"--structure", "sheet"}, "--structure"},
		{"m above n", []string{"--structure", "tube", "--n", "5", "--m", "6"}, "--m"},
		{"bad energy", []string{"--ef", "1 parsec"}, "--ef"},
		{"emax below emin", []string{"--emin", "1", "--emax", "0"}, "--emax"},
		{"bad at list", []string{"--at", "0.1,,0.2"}, "--at"},
		{"bad format", []string{"--format", "xml"}, "--format"},
		{"unknown flag", []string{"--width", "3"}, "width"},
		{"stray argument", []string{"armchair"}, "armchair"},
		{"work over budget", []string{"--structure", "tube", "--n", "200", "--m", "199", "--kpoints", "4001"}, "--kpoints"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			code, out, errs := runLattice(t, tc.args...)
			if code != 2 {
				t.Errorf("status %d, want 2 (stderr %q)", code, errs)
			}
			if !strings.Contains(errs, tc.want) {
				t.Errorf("stderr %q does not name %q", errs, tc.want)
			}
			if out != "" {
				t.Errorf("wrote to stdout on bad input: %q", out)
			}
		})
	}
}

package main

import (
	"encoding/json"
	"strings"
	"testing"
)

// TestSweepBadInput: every bad value exits with status 2 and names its flag.
func TestSweepBadInput(t *testing.T) {
	tests := []struct {
		args []string
		flag string
	}{
		{[]string{"--sweep", "lq"}, "--sweep"},
		{[]string{"--dims", "1", "--sweep", "ly"}, "--sweep"},
		{[]string{"--from", "ten"}, "--from"},
		{[]string{"--from", "50nm", "--to", "5nm"}, "--to"},
		{[]string{"--steps", "500"}, "--steps"},
		{[]string{"--quantity", "mobility"}, "--quantity"},
		{[]string{"--tol", "0"}, "--tol"},
		{[]string{"--lx", "-2nm"}, "--lx"},
		{[]string{"--material", "unobtainium"}, "--material"},
		{[]string{"--format", "yaml"}, "--format"},
		{[]string{"--at", "0.1"}, "at"}, // a count key a sweep does not take
		{[]string{"--bogus", "1"}, "bogus"},
		{[]string{"extra"}, "extra"},
	}
	for _, tt := range tests {
		t.Run(strings.Join(tt.args, " "), func(t *testing.T) {
			code, _, stderr := runCLI(append([]string{"sweep"}, tt.args...)...)
			if code != 2 {
				t.Errorf("exit status %d, want 2 (stderr %q)", code, stderr)
			}
			if !strings.Contains(stderr, tt.flag) {
				t.Errorf("stderr %q does not name %s", stderr, tt.flag)
			}
		})
	}
}

func TestSweepOutputs(t *testing.T) {
	base := []string{"sweep", "--material", "gaas", "--lx", "10nm", "--ly", "10nm", "--bz", "open",
		"--sweep", "all", "--from", "5nm", "--to", "40nm", "--steps", "6", "--tol", "0.05"}
	t.Run("json", func(t *testing.T) {
		code, out, stderr := runCLI(append(base, "--format", "json")...)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		var doc struct {
			LengthsNM   []float64           `json:"lengths_nm"`
			Scenario    []float64           `json:"scenario"`
			Continuum   []float64           `json:"continuum"`
			CrossoverNM map[string]*float64 `json:"crossover_nm"`
			Quantity    string              `json:"quantity"`
			Unit        string              `json:"unit"`
		}
		if err := json.Unmarshal([]byte(out), &doc); err != nil {
			t.Fatal(err)
		}
		if len(doc.LengthsNM) != 6 || doc.LengthsNM[0] != 5 || doc.LengthsNM[5] != 40 || len(doc.Scenario) != 6 || len(doc.Continuum) != 6 {
			t.Errorf("document %+v", doc)
		}
		if _, ok := doc.CrossoverNM["ring"]; !ok || doc.Quantity != "density" || doc.Unit != "cm^-1" {
			t.Errorf("crossover %v quantity %q unit %q", doc.CrossoverNM, doc.Quantity, doc.Unit)
		}
	})
	t.Run("csv", func(t *testing.T) {
		code, out, stderr := runCLI(append(base, "--format", "csv")...)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		lines := strings.Split(strings.TrimSpace(out), "\n")
		if len(lines) != 7 || !strings.HasPrefix(lines[0], "all_nm,lx_nm,ly_nm,lz_nm,density_scenario_cm-1") {
			t.Errorf("CSV:\n%s", out)
		}
	})
	t.Run("table", func(t *testing.T) {
		code, out, stderr := runCLI(base...)
		if code != 0 || !strings.Contains(out, "crossover") || !strings.Contains(out, "cm^-1") {
			t.Errorf("exit %d: %s\n%s", code, out, stderr)
		}
	})
}

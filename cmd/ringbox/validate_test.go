package main

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	checktable "ringbox/testdata/validation"
)

func runValidate(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(context.Background(), append([]string{"validate"}, args...), &out, &errb)
	return code, out.String(), errb.String()
}

// The built-in table passes (the same rows internal/validation's tests run
// against their published sources), and says so in its closing line.
func TestValidatePasses(t *testing.T) {
	code, out, errs := runValidate(t)
	if code != 0 {
		t.Fatalf("exit %d\n%s%s", code, out, errs)
	}
	if !strings.Contains(out, "checks passed") || strings.Contains(out, "FAIL") {
		t.Errorf("output:\n%s", out)
	}
	if !strings.Contains(out, "CODATA 2018") {
		t.Errorf("sources missing:\n%s", out)
	}
}

func TestValidateJSON(t *testing.T) {
	code, out, errs := runValidate(t, "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var rep struct {
		Checks []struct {
			ID       string   `json:"id"`
			Computed *float64 `json:"computed"`
			Pass     bool     `json:"pass"`
			Source   string   `json:"source"`
		} `json:"checks"`
		Passed, Failed int
	}
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	if rep.Failed != 0 || rep.Passed != len(rep.Checks) || len(rep.Checks) < 13 {
		t.Errorf("passed %d failed %d of %d", rep.Passed, rep.Failed, len(rep.Checks))
	}
	for _, c := range rep.Checks {
		if c.Computed == nil || !c.Pass || c.Source == "" {
			t.Errorf("%+v", c)
		}
	}
}

// A table with one wrong reference value exits 1 and marks that row.
func TestValidateWrongTableFails(t *testing.T) {
	// Cu: 8.47e22 → 9.47e22 cm⁻³, far outside its 1 % tolerance.
	text := strings.Replace(string(checktable.Table), "\t8.47e22\t", "\t9.47e22\t", 1)
	if text == string(checktable.Table) {
		t.Fatal("the Cu row is not in the table")
	}
	path := filepath.Join(t.TempDir(), "wrong.tsv")
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, _ := runValidate(t, "--table", path)
	if code != 1 {
		t.Fatalf("exit %d, want 1\n%s", code, out)
	}
	for _, line := range strings.Split(out, "\n") {
		if strings.HasPrefix(line, "cu-density") != strings.Contains(line, "FAIL") {
			t.Errorf("line %q", line)
		}
	}
}

func TestValidateBadUsage(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.tsv")
	if err := os.WriteFile(bad, []byte("id\tquantity\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name string
		args []string
		want string
	}{
		{"format", []string{"--format", "xml"}, "--format"},
		{"missing table", []string{"--table", filepath.Join(dir, "none.tsv")}, "--table"},
		{"malformed table", []string{"--table", bad}, "--table"},
		{"argument", []string{"extra"}, "unexpected"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			code, _, errs := runValidate(t, tt.args...)
			if code != 2 || !strings.Contains(errs, tt.want) {
				t.Errorf("exit %d, stderr %q", code, errs)
			}
		})
	}
}

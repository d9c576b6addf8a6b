package main

import (
	"bytes"
	"context"
	"encoding/json"
	"net/url"
	"strings"
	"testing"

	"ringbox/internal/scenario"
)

func runCLI(args ...string) (int, string, string) {
	var out, errb bytes.Buffer
	code := run(context.Background(), args, &out, &errb)
	return code, out.String(), errb.String()
}

// TestCountBadInput: every bad value exits with status 2 and names its flag.
func TestCountBadInput(t *testing.T) {
	tests := []struct {
		args []string
		flag string
	}{
		{[]string{"--material", "kryptonite"}, "--material"},
		{[]string{"--lx", "0"}, "--lx"},
		{[]string{"--lx", "-3nm"}, "--lx"},
		{[]string{"--lx", "NaN"}, "--lx"},
		{[]string{"--ly", "1e12m"}, "--ly"},
		{[]string{"--lz", "5 parsecs"}, "--lz"},
		{[]string{"--dims", "7"}, "--dims"},
		{[]string{"--bx", "soft"}, "--bx"},
		{[]string{"--emin", "1", "--emax", "0.5"}, "--emax"},
		{[]string{"--points", "1000000"}, "--points"},
		{[]string{"--at", strings.Repeat("0.1,", 80) + "0.1"}, "--at"},
		{[]string{"--format", "xml"}, "--format"},
		{[]string{"--nonsense", "1"}, "nonsense"},
	}
	for _, tt := range tests {
		t.Run(strings.Join(tt.args, " "), func(t *testing.T) {
			code, _, stderr := runCLI(append([]string{"count"}, tt.args...)...)
			if code != 2 {
				t.Errorf("exit status %d, want 2 (stderr %q)", code, stderr)
			}
			if !strings.Contains(stderr, tt.flag) {
				t.Errorf("stderr %q does not name %s", stderr, tt.flag)
			}
		})
	}
}

// TestCountJSONMatchesEngine: the CLI's JSON is the engine's result for the
// same keys (the API serves the same struct).
func TestCountJSONMatchesEngine(t *testing.T) {
	code, out, stderr := runCLI("count", "--material", "inas", "--dims", "2", "--lx", "12nm", "--ly", "0.3um",
		"--by", "ring", "--temp", "4.2", "--at", "0.05,0.1", "--points", "30", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	q := url.Values{"material": {"inas"}, "dims": {"2"}, "lx": {"12nm"}, "ly": {"0.3um"}, "by": {"ring"},
		"temp": {"4.2"}, "at": {"0.05,0.1"}, "points": {"30"}}
	s, err := scenario.Parse(q)
	if err != nil {
		t.Fatal(err)
	}
	res, err := scenario.Run(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	want, _ := json.Marshal(res)
	if strings.TrimSpace(out) != string(want) {
		t.Errorf("CLI JSON differs from the engine's")
	}
}

func TestCountFormats(t *testing.T) {
	code, out, _ := runCLI("count", "--points", "10")
	if code != 0 || !strings.Contains(out, "lowest levels") || !strings.Contains(out, "observables") {
		t.Errorf("table: exit %d\n%s", code, out)
	}
	code, out, _ = runCLI("count", "--points", "10", "--format", "csv")
	lines := strings.Split(strings.TrimSpace(out), "\n")
	if code != 0 || len(lines) != 11 || !strings.HasPrefix(lines[0], "energy_eV,states_scenario") {
		t.Errorf("csv: exit %d, %d lines, header %q", code, len(lines), lines[0])
	}
	if code, out, _ := runCLI("materials"); code != 0 || !strings.Contains(out, "gaas") || !strings.Contains(out, "Ashcroft") {
		t.Errorf("materials: %d %s", code, out)
	}
	if code, _, _ := runCLI("frobnicate"); code != 2 {
		t.Errorf("unknown command exit %d", code)
	}
}

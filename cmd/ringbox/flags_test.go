package main

import (
	"bytes"
	"strings"
	"testing"
)

func TestOrList(t *testing.T) {
	tests := []struct {
		words []string
		want  string
	}{
		{[]string{"table"}, "table"},
		{[]string{"table", "json"}, "table or json"},
		{[]string{"table", "json", "csv"}, "table, json or csv"},
	}
	for _, tt := range tests {
		t.Run(tt.want, func(t *testing.T) {
			if got := orList(tt.words); got != tt.want {
				t.Errorf("orList(%q) = %q, want %q", tt.words, got, tt.want)
			}
		})
	}
}

// TestParseFlags checks the exit statuses every command shares: 0 after
// --help, 2 for an unknown flag, a stray argument or a --format outside
// the choices, each with its message on stderr.
func TestParseFlags(t *testing.T) {
	tests := []struct {
		name     string
		args     []string
		ok       bool
		code     int
		format   string
		inStderr string
	}{
		{"default", nil, true, 0, "table", ""},
		{"json", []string{"--format", "json"}, true, 0, "json", ""},
		{"help", []string{"--help"}, false, 0, "", "-format"},
		{"unknown flag", []string{"--colour"}, false, 2, "", "colour"},
		{"stray argument", []string{"extra"}, false, 2, "", `ringbox demo: unexpected argument "extra"`},
		{"bad format", []string{"--format", "xml"}, false, 2, "", `ringbox demo: --format: "xml" is not table or json`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var stderr bytes.Buffer
			fs := newFlagSet("demo", &stderr)
			opt := newFormatFlag(fs, "table", "json")
			code, ok := parseFlags(fs, tt.args, &stderr)
			format := ""
			if ok {
				format, ok = opt.get(&stderr)
				if !ok {
					code = 2
				}
			}
			if ok != tt.ok || code != tt.code || format != tt.format {
				t.Errorf("ok %v, code %d, format %q; want %v, %d, %q", ok, code, format, tt.ok, tt.code, tt.format)
			}
			if !strings.Contains(stderr.String(), tt.inStderr) {
				t.Errorf("stderr %q lacks %q", stderr.String(), tt.inStderr)
			}
		})
	}
}

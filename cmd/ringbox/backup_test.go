package main

import (
	"bytes"
	"context"
	"path/filepath"
	"strings"
	"testing"

	"ringbox/internal/store"
)

func TestBackup(t *testing.T) {
	ctx := context.Background()
	dir := t.TempDir()
	db := filepath.Join(dir, "live.db")
	// The source stays open read-write, as under a running server.
	live, err := store.Open(ctx, db, store.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer live.Close()
	rv, err := live.Create(ctx, store.Review{Title: "kept", Scenarios: []string{"material=gaas&lx=6nm"}})
	if err != nil {
		t.Fatal(err)
	}

	to := filepath.Join(dir, "copy.db")
	tests := []struct {
		name     string
		args     []string
		code     int
		errorHas string
	}{
		{"copy while open", []string{"--db", db, "--to", to}, 0, ""},
		{"target exists", []string{"--db", db, "--to", to}, 2, "exists"},
		{"no target", []string{"--db", db}, 2, "--to"},
		{"missing database", []string{"--db", filepath.Join(dir, "none.db"), "--to", filepath.Join(dir, "x.db")}, 1, "--db"},
		{"bad flag", []string{"--nope"}, 2, "nope"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var out, errb bytes.Buffer
			if code := run(ctx, append([]string{"backup"}, tt.args...), &out, &errb); code != tt.code {
				t.Fatalf("exit %d, want %d; stderr: %s", code, tt.code, errb.String())
			}
			if !strings.Contains(errb.String(), tt.errorHas) {
				t.Errorf("stderr %q lacks %q", errb.String(), tt.errorHas)
			}
		})
	}

	// A write after the backup is in the live file only.
	if _, err := live.Create(ctx, store.Review{Title: "later", Scenarios: []string{"material=si"}}); err != nil {
		t.Fatal(err)
	}
	cp, err := store.Open(ctx, to, store.Options{ReadOnly: true})
	if err != nil {
		t.Fatal(err)
	}
	defer cp.Close()
	got, err := cp.Get(ctx, rv.ID)
	if err != nil || got.Title != "kept" {
		t.Fatalf("copy holds %+v, %v", got, err)
	}
	if list, _ := cp.List(ctx, "", 10); len(list) != 1 {
		t.Errorf("copy holds %d reviews, want the 1 saved before the backup", len(list))
	}
}

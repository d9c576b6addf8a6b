package store

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"sync"
	"sync/atomic"
	"testing"
	"time"
)

func TestBackupWhileWriting(t *testing.T) {
	s, _ := openTemp(t)
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	// Enough rows that the copy takes a while, inserted in one transaction.
	const seeds = 3000
	tx, err := s.w.BeginTx(ctx, nil)
	if err != nil {
		t.Fatal(err)
	}
	for i := range seeds {
		r := sample(fmt.Sprintf("seed %d", i))
		var id int64
		if err := tx.QueryRow(`INSERT INTO review (title, title_fold, notes, created) VALUES (?, ?, ?, '2025-01-01T00:00:00.000000000Z') RETURNING id`,
			r.Title, r.Title, r.Notes).Scan(&id); err != nil {
			t.Fatal(err)
		}
		for p, q := range r.Scenarios {
			if _, err := tx.Exec(`INSERT INTO review_scenario VALUES (?, ?, ?)`, id, p, q); err != nil {
				t.Fatal(err)
			}
		}
	}
	if err := tx.Commit(); err != nil {
		t.Fatal(err)
	}

	// A writer that keeps creating reviews until told to stop (bounded).
	var written atomic.Int64
	written.Store(seeds)
	var wg sync.WaitGroup
	var werr error
	wg.Add(1)
	go func() {
		defer wg.Done()
		for i := 0; i < 5000 && ctx.Err() == nil; i++ {
			if _, err := s.Create(ctx, sample(fmt.Sprintf("during backup %d", i))); err != nil {
				if ctx.Err() == nil {
					werr = err
				}
				return
			}
			written.Add(1)
		}
	}()
	for written.Load() < seeds+20 {
		time.Sleep(time.Millisecond) // let the writer get going
	}

	path := filepath.Join(t.TempDir(), "backup.db")
	atLeast := written.Load()
	if err := s.Backup(context.Background(), path); err != nil {
		t.Fatalf("Backup: %v", err)
	}
	atMost := written.Load() + 1 // one Create may have committed but not yet counted
	cancel()
	wg.Wait()
	if werr != nil {
		t.Fatalf("writer failed during backup: %v", werr)
	}

	db := rawDB(t, path)
	var check string
	if err := db.QueryRow("PRAGMA integrity_check").Scan(&check); err != nil || check != "ok" {
		t.Fatalf("integrity_check = %q, %v", check, err)
	}
	var fkProblems int
	if err := db.QueryRow("SELECT count(*) FROM pragma_foreign_key_check").Scan(&fkProblems); err != nil || fkProblems != 0 {
		t.Errorf("foreign_key_check: %d problems, %v", fkProblems, err)
	}
	// A snapshot: every review comes with both its scenarios.
	var n, partial int
	if err := db.QueryRow("SELECT count(*) FROM review").Scan(&n); err != nil {
		t.Fatal(err)
	}
	if err := db.QueryRow(`SELECT count(*) FROM review r WHERE (SELECT count(*) FROM review_scenario WHERE review_id = r.id) != 2`).Scan(&partial); err != nil {
		t.Fatal(err)
	}
	if int64(n) < atLeast || int64(n) > atMost {
		t.Errorf("backup holds %d reviews, want between %d and %d", n, atLeast, atMost)
	}
	if partial != 0 {
		t.Errorf("%d reviews in the backup lack scenarios", partial)
	}
	db.Close()
	t.Logf("backup of %d reviews; %d Creates committed during the copy", n, atMost-1-atLeast)

	// The backup is a ringbox database in its own right.
	b, err := Open(context.Background(), path, Options{ReadOnly: true})
	if err != nil {
		t.Fatalf("Open backup: %v", err)
	}
	defer b.Close()
	rs, err := b.List(context.Background(), "seed 299", 100)
	if err != nil || len(rs) != 11 { // "seed 299" and "seed 2990"…"seed 2999"
		t.Errorf("backup List(seed 299) = %d reviews, %v; want 11", len(rs), err)
	}
}

func TestBackupRefusesExistingFile(t *testing.T) {
	s, _ := openTemp(t)
	ctx := context.Background()
	if _, err := s.Create(ctx, sample("to back up")); err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	for _, c := range []struct {
		name    string
		content []byte
	}{
		{"empty file", []byte{}},
		{"file with data", []byte("keep me")},
	} {
		t.Run(c.name, func(t *testing.T) {
			path := filepath.Join(dir, c.name)
			if err := os.WriteFile(path, c.content, 0o644); err != nil {
				t.Fatal(err)
			}
			if err := s.Backup(ctx, path); !errors.Is(err, ErrExists) {
				t.Fatalf("Backup over %s: %v, want ErrExists", c.name, err)
			}
			got, err := os.ReadFile(path)
			if err != nil || string(got) != string(c.content) {
				t.Errorf("existing file changed to %q, %v", got, err)
			}
		})
	}
	t.Run("second backup", func(t *testing.T) {
		path := filepath.Join(dir, "twice.db")
		if err := s.Backup(ctx, path); err != nil {
			t.Fatal(err)
		}
		if err := s.Backup(ctx, path); !errors.Is(err, ErrExists) {
			t.Fatalf("second Backup: %v, want ErrExists", err)
		}
	})
}

func TestBackupOfReadOnlyStore(t *testing.T) {
	s, path := openTemp(t)
	ctx := context.Background()
	r, err := s.Create(ctx, sample("read-only backup"))
	if err != nil {
		t.Fatal(err)
	}
	s.Close()
	ro, err := Open(ctx, path, Options{ReadOnly: true})
	if err != nil {
		t.Fatal(err)
	}
	defer ro.Close()
	out := filepath.Join(t.TempDir(), "copy.db")
	if err := ro.Backup(ctx, out); err != nil {
		t.Fatalf("Backup of read-only store: %v", err)
	}
	b, err := Open(ctx, out, Options{ReadOnly: true})
	if err != nil {
		t.Fatal(err)
	}
	defer b.Close()
	if got, err := b.Get(ctx, r.ID); err != nil || got.Title != r.Title {
		t.Errorf("Get from backup = %+v, %v", got, err)
	}
}

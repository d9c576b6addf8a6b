package store

import (
	"context"
	"database/sql"
	"errors"
	"path/filepath"
	"strings"
	"testing"
)

// openTemp opens a new store in a fresh temporary directory.
func openTemp(t testing.TB) (*Store, string) {
	t.Helper()
	path := filepath.Join(t.TempDir(), "reviews.db")
	s, err := Open(context.Background(), path, Options{})
	if err != nil {
		t.Fatalf("Open(%s): %v", path, err)
	}
	t.Cleanup(func() { s.Close() })
	return s, path
}

// rawDB opens path with the driver alone, for checks below the Store API.
func rawDB(t testing.TB, path string) *sql.DB {
	t.Helper()
	db, err := sql.Open("sqlite", path)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { db.Close() })
	return db
}

func pragmaInt(t testing.TB, db *sql.DB, name string) int {
	t.Helper()
	var v int
	if err := db.QueryRow("PRAGMA " + name).Scan(&v); err != nil {
		t.Fatalf("PRAGMA %s: %v", name, err)
	}
	return v
}

func TestOpenMigratesEmptyFile(t *testing.T) {
	s, path := openTemp(t)
	ctx := context.Background()

	var tables []string
	rows, err := s.r.QueryContext(ctx, `SELECT name FROM sqlite_schema WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name`)
	if err != nil {
		t.Fatal(err)
	}
	for rows.Next() {
		var n string
		if err := rows.Scan(&n); err != nil {
			t.Fatal(err)
		}
		tables = append(tables, n)
	}
	rows.Close()
	if got, want := strings.Join(tables, ","), "review,review_scenario"; got != want {
		t.Errorf("tables = %s, want %s", got, want)
	}

	// Connection settings the durability and concurrency arguments rest on.
	conn, err := s.w.Conn(ctx)
	if err != nil {
		t.Fatal(err)
	}
	defer conn.Close()
	for _, c := range []struct {
		pragma string
		want   string
	}{
		{"journal_mode", "wal"},
		{"synchronous", "2"}, // FULL
		{"foreign_keys", "1"},
		{"busy_timeout", "5000"},
		{"user_version", "1"},
		{"application_id", "1380077400"}, // 0x52424f58, "RBOX"
	} {
		var got string
		if err := conn.QueryRowContext(ctx, "PRAGMA "+c.pragma).Scan(&got); err != nil {
			t.Fatal(err)
		}
		if got != c.want {
			t.Errorf("PRAGMA %s = %s, want %s", c.pragma, got, c.want)
		}
	}
	if err := s.Close(); err != nil {
		t.Fatal(err)
	}
	if v := pragmaInt(t, rawDB(t, path), "user_version"); v != len(migrations) {
		t.Errorf("user_version after Close = %d, want %d", v, len(migrations))
	}
}

func TestOpenTwiceIsIdempotent(t *testing.T) {
	ctx := context.Background()
	path := filepath.Join(t.TempDir(), "reviews.db")
	s1, err := Open(ctx, path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	r, err := s1.Create(ctx, sample("kept across reopen"))
	if err != nil {
		t.Fatal(err)
	}
	// A second store on the same file while the first is open (the CLI
	// beside a running server), then a reopen after both are closed.
	s2, err := Open(ctx, path, Options{})
	if err != nil {
		t.Fatalf("second Open: %v", err)
	}
	if _, err := s2.Get(ctx, r.ID); err != nil {
		t.Errorf("second store Get: %v", err)
	}
	s2.Close()
	s1.Close()
	s3, err := Open(ctx, path, Options{})
	if err != nil {
		t.Fatalf("reopen: %v", err)
	}
	defer s3.Close()
	if _, err := s3.Get(ctx, r.ID); err != nil {
		t.Errorf("reopened Get: %v", err)
	}
	if n := countReviews(t, s3); n != 1 {
		t.Errorf("%d reviews after reopening, want 1", n)
	}
	if v := pragmaInt(t, s3.r, "user_version"); v != len(migrations) {
		t.Errorf("user_version = %d, want %d", v, len(migrations))
	}
}

func TestOpenRefusesNewerSchema(t *testing.T) {
	ctx := context.Background()
	s, path := openTemp(t)
	s.Close()
	db := rawDB(t, path)
	if _, err := db.Exec("PRAGMA user_version = 99"); err != nil {
		t.Fatal(err)
	}
	db.Close()
	for _, opts := range []Options{{}, {ReadOnly: true}} {
		_, err := Open(ctx, path, opts)
		if !errors.Is(err, ErrSchemaTooNew) {
			t.Fatalf("Open(%+v) error = %v, want ErrSchemaTooNew", opts, err)
		}
		if !strings.Contains(err.Error(), "99") {
			t.Errorf("error %q does not say which version", err)
		}
	}
	// Refusing must not have touched the file.
	if v := pragmaInt(t, rawDB(t, path), "user_version"); v != 99 {
		t.Errorf("user_version = %d after refused Open, want 99", v)
	}
}

func TestOpenRefusesForeignDatabase(t *testing.T) {
	path := filepath.Join(t.TempDir(), "other.db")
	db := rawDB(t, path)
	if _, err := db.Exec("CREATE TABLE inventory (sku TEXT)"); err != nil {
		t.Fatal(err)
	}
	db.Close()
	_, err := Open(context.Background(), path, Options{})
	if !errors.Is(err, ErrNotRingbox) {
		t.Fatalf("Open error = %v, want ErrNotRingbox", err)
	}
}

func TestOpenReadOnly(t *testing.T) {
	ctx := context.Background()
	dir := t.TempDir()

	t.Run("missing file", func(t *testing.T) {
		if _, err := Open(ctx, filepath.Join(dir, "absent.db"), Options{ReadOnly: true}); err == nil {
			t.Fatal("read-only Open of a missing file succeeded")
		}
	})

	t.Run("unmigrated file", func(t *testing.T) {
		path := filepath.Join(dir, "empty.db")
		db := rawDB(t, path)
		if _, err := db.Exec("PRAGMA user_version = 0; VACUUM"); err != nil {
			t.Fatal(err)
		}
		db.Close()
		if _, err := Open(ctx, path, Options{ReadOnly: true}); err == nil || !strings.Contains(err.Error(), "older") {
			t.Fatalf("read-only Open of an unmigrated file: %v, want an 'older' schema error", err)
		}
	})

	t.Run("writes rejected", func(t *testing.T) {
		path := filepath.Join(dir, "reviews.db")
		rw, err := Open(ctx, path, Options{})
		if err != nil {
			t.Fatal(err)
		}
		kept, err := rw.Create(ctx, sample("before read-only"))
		if err != nil {
			t.Fatal(err)
		}
		doc, err := rw.Export(ctx, kept.ID)
		if err != nil {
			t.Fatal(err)
		}
		rw.Close()

		ro, err := Open(ctx, path, Options{ReadOnly: true})
		if err != nil {
			t.Fatal(err)
		}
		defer ro.Close()
		if !ro.ReadOnly() {
			t.Error("ReadOnly() = false")
		}
		if _, err := ro.Create(ctx, sample("refused")); !errors.Is(err, ErrReadOnly) {
			t.Errorf("Create on read-only store: %v, want ErrReadOnly", err)
		}
		if _, err := ro.Import(ctx, doc); !errors.Is(err, ErrReadOnly) {
			t.Errorf("Import on read-only store: %v, want ErrReadOnly", err)
		}
		// Below the API, SQLite itself refuses to write.
		if _, err := ro.r.ExecContext(ctx, `INSERT INTO review (title, title_fold, notes, created) VALUES ('x', 'x', '', '2026-01-01T00:00:00.000000000Z')`); err == nil {
			t.Error("raw INSERT through the read-only pool succeeded")
		}
		// Reads still work.
		got, err := ro.Get(ctx, kept.ID)
		if err != nil || got.Title != kept.Title {
			t.Errorf("Get on read-only store = %+v, %v", got, err)
		}
		if n := countReviews(t, ro); n != 1 {
			t.Errorf("%d reviews, want 1", n)
		}
	})
}

func TestDSNEscapesPath(t *testing.T) {
	// A directory name with URI metacharacters must still name the file.
	dir := filepath.Join(t.TempDir(), "a?b#c%d")
	path := filepath.Join(dir, "reviews.db")
	if err := mkdirAll(dir); err != nil {
		t.Fatal(err)
	}
	s, err := Open(context.Background(), path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	if _, err := s.Create(context.Background(), sample("odd path")); err != nil {
		t.Fatal(err)
	}
	if !fileExists(path) {
		t.Errorf("database not created at %s", path)
	}
}

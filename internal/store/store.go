// Package store keeps saved design reviews in an embedded SQLite database
// (modernc.org/sqlite, pure Go, driver name "sqlite").
//
// A Store holds two connection pools on one file: a single writer
// connection, so writes from this process queue in database/sql instead of
// meeting SQLITE_BUSY, and a small pool of readers, which in WAL mode never
// block the writer nor are blocked by it. Writes from another process on the
// same file (the CLI beside the server) wait in SQLite's busy handler for up
// to busyTimeout; every write transaction starts with BEGIN IMMEDIATE so it
// takes the write lock up front and cannot fail on a read-to-write upgrade.
package store

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"net/url"
	"path/filepath"
	"strings"

	_ "modernc.org/sqlite" // registers the "sqlite" driver
)

// applicationID is stored in the database header (PRAGMA application_id) so
// that Open recognises its own files and refuses other applications' SQLite
// databases instead of adding tables to them. The value spells "RBOX".
const applicationID = 0x52424f58

// busyTimeoutMS is how long a connection waits for another process's write
// lock before giving up with SQLITE_BUSY. Writes here are single small rows,
// held for milliseconds; 5 s covers a backup or a checkpoint in progress.
const busyTimeoutMS = 5000

// readerConns bounds the read pool; the machines are small (2 cores).
const readerConns = 4

// Options configures Open.
type Options struct {
	// ReadOnly opens the file with SQLite's mode=ro, so no write is possible
	// even at the SQLite level; Create and Import return ErrReadOnly. The file
	// must exist and already carry the current schema.
	ReadOnly bool
}

// Store is a handle on one review database. It is safe for concurrent use.
type Store struct {
	path     string
	readOnly bool
	w        *sql.DB // nil when readOnly; exactly one connection
	r        *sql.DB
}

// Open opens (creating it if needed, unless opts.ReadOnly) the database at
// path and brings its schema up to date. A database whose schema version is
// newer than this program knows is refused with ErrSchemaTooNew; an SQLite
// file of another application with ErrNotRingbox.
func Open(ctx context.Context, path string, opts Options) (*Store, error) {
	if path == "" {
		return nil, errors.New("store: empty database path")
	}
	abs, err := filepath.Abs(path)
	if err != nil {
		return nil, fmt.Errorf("store: %w", err)
	}
	s := &Store{path: abs, readOnly: opts.ReadOnly}

	if !opts.ReadOnly {
		s.w, err = sql.Open("sqlite", dsn(abs, writer))
		if err != nil {
			return nil, fmt.Errorf("store: open %s: %w", abs, err)
		}
		s.w.SetMaxOpenConns(1)
		s.w.SetMaxIdleConns(1)
		s.w.SetConnMaxLifetime(0)
		s.w.SetConnMaxIdleTime(0)
		if err := migrate(ctx, s.w); err != nil {
			s.w.Close()
			return nil, fmt.Errorf("store: %s: %w", abs, err)
		}
	}

	role := reader
	if opts.ReadOnly {
		role = readOnly
	}
	s.r, err = sql.Open("sqlite", dsn(abs, role))
	if err != nil {
		s.closeWriter()
		return nil, fmt.Errorf("store: open %s: %w", abs, err)
	}
	s.r.SetMaxOpenConns(readerConns)
	s.r.SetMaxIdleConns(readerConns)
	if opts.ReadOnly {
		if err := checkCurrent(ctx, s.r); err != nil {
			s.r.Close()
			return nil, fmt.Errorf("store: %s: %w", abs, err)
		}
	} else if err := s.r.PingContext(ctx); err != nil {
		s.Close()
		return nil, fmt.Errorf("store: open %s: %w", abs, err)
	}
	return s, nil
}

// dsn builds the driver's connection string for the file at abs.
//
// Durability: synchronous=FULL with journal_mode=WAL fsyncs the WAL at every
// commit, so a review is on stable storage when Create returns. A SIGKILL of
// the process alone would already be survived by NORMAL (the committed WAL
// frames have been written to the operating system before COMMIT returns;
// only the fsync is deferred to the next checkpoint), but NORMAL can lose the
// last commits on power loss or a kernel crash. Reviews are saved at the rate
// people type them, so the extra fsync (about a millisecond, see
// BenchmarkCreate) buys power-loss durability for nothing that matters.
//
// Readers get query_only as well, so a read pool of a read-write store can
// never write by mistake; with readOnly the file is opened with mode=ro,
// which SQLite enforces on every statement.
func dsn(abs string, role connRole) string {
	// The name is an SQLite URI (https://www.sqlite.org/uri.html), where
	// '?', '#' and '%' in the path must be percent-encoded.
	path := strings.NewReplacer("%", "%25", "?", "%3f", "#", "%23").Replace(filepath.ToSlash(abs))
	q := url.Values{}
	q.Add("_pragma", fmt.Sprintf("busy_timeout(%d)", busyTimeoutMS))
	q.Add("_pragma", "foreign_keys(1)")
	q.Add("_pragma", "synchronous(FULL)")
	switch role {
	case writer:
		q.Set("_txlock", "immediate")
		// Setting WAL is a write to the file header; only the writer does it.
		// The mode is persistent, so readers opened later find it set.
		q.Add("_pragma", "journal_mode(WAL)")
	case reader:
		q.Add("_pragma", "query_only(1)")
	case readOnly:
		q.Add("_pragma", "query_only(1)")
		q.Set("mode", "ro")
	case backupSource:
		// VACUUM INTO writes the target file, which query_only forbids;
		// mode=ro still keeps the source itself unwritable.
		q.Set("mode", "ro")
	}
	return "file:" + path + "?" + q.Encode()
}

// connRole selects the connection string of one pool.
type connRole int

const (
	writer       connRole = iota // the single read-write connection
	reader                       // the read pool of a read-write store
	readOnly                     // the read pool of a store opened ReadOnly
	backupSource                 // a one-off connection that Backup reads from
)

// Close closes the database. The writer closes last, so SQLite checkpoints
// the WAL into the main file and removes it.
func (s *Store) Close() error {
	err := s.r.Close()
	if werr := s.closeWriter(); err == nil {
		err = werr
	}
	return err
}

func (s *Store) closeWriter() error {
	if s.w == nil {
		return nil
	}
	return s.w.Close()
}

// ReadOnly reports whether the store was opened with Options.ReadOnly.
func (s *Store) ReadOnly() bool { return s.readOnly }

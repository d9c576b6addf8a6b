package store

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
)

// Backup writes a consistent copy of the live database to toPath with
// VACUUM INTO (https://www.sqlite.org/lang_vacuum.html#vacuuminto), which
// reads one snapshot in a read transaction: writers carry on meanwhile, and
// the copy holds every review committed before the snapshot and none after.
// It refuses (ErrExists) to overwrite an existing file, and fsyncs the copy
// before returning. It works on read-only stores too.
func (s *Store) Backup(ctx context.Context, toPath string) error {
	if toPath == "" {
		return errors.New("store: backup: empty target path")
	}
	abs, err := filepath.Abs(toPath)
	if err != nil {
		return fmt.Errorf("store: backup: %w", err)
	}
	// VACUUM INTO also refuses a non-empty file, but would overwrite an
	// empty one; check first so nothing existing is ever touched. (A file
	// created between this check and the VACUUM is then refused by SQLite
	// unless empty.)
	if _, err := os.Lstat(abs); err == nil {
		return fmt.Errorf("store: backup to %s: %w", abs, ErrExists)
	} else if !errors.Is(err, fs.ErrNotExist) {
		return fmt.Errorf("store: backup: %w", err)
	}
	// The absolute path begins with "/", so SQLite never reads it as a
	// "file:" URI.
	// A connection of its own: the pools' readers are query_only, which
	// forbids writing even the target file.
	src, err := sql.Open("sqlite", dsn(s.path, backupSource))
	if err != nil {
		return fmt.Errorf("store: backup: %w", err)
	}
	_, err = src.ExecContext(ctx, `VACUUM INTO ?`, abs)
	if cerr := src.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		return fmt.Errorf("store: backup to %s: %w", abs, err)
	}
	// SQLite writes the copy without syncing it.
	f, err := os.Open(abs)
	if err != nil {
		return fmt.Errorf("store: backup: %w", err)
	}
	serr := f.Sync()
	if err := f.Close(); serr == nil {
		serr = err
	}
	if serr != nil {
		return fmt.Errorf("store: backup: sync %s: %w", abs, serr)
	}
	return nil
}

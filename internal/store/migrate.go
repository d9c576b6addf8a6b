package store

import (
	"context"
	"database/sql"
	"fmt"
)

// migrations are the schema's numbered steps: migrations[i] takes the
// database from version i to i+1, recorded in PRAGMA user_version. Append
// new steps; never edit one that has shipped.
var migrations = []string{
	// 1: reviews and their ordered scenarios.
	//
	// AUTOINCREMENT keeps ids from ever being reused, because review links
	// are shared with colleagues. title_fold is the title lower-cased by Go
	// (SQLite's lower() and LIKE fold ASCII only) for case-insensitive
	// search. created is UTC in a fixed-width RFC 3339 form (see timeLayout),
	// so text order is time order. The CHECKs repeat the Go limits as a last
	// line of defence; STRICT refuses values of the wrong type.
	`CREATE TABLE review (
		id         INTEGER PRIMARY KEY AUTOINCREMENT,
		title      TEXT NOT NULL CHECK (length(title) BETWEEN 1 AND 200),
		title_fold TEXT NOT NULL,
		notes      TEXT NOT NULL CHECK (length(CAST(notes AS BLOB)) <= 20000),
		created    TEXT NOT NULL CHECK (length(created) = 30)
	) STRICT;
	CREATE INDEX review_by_created ON review (created DESC, id DESC);
	CREATE TABLE review_scenario (
		review_id INTEGER NOT NULL REFERENCES review (id) ON DELETE CASCADE,
		position  INTEGER NOT NULL CHECK (position BETWEEN 0 AND 7),
		query     TEXT NOT NULL CHECK (length(CAST(query AS BLOB)) BETWEEN 1 AND 4096),
		PRIMARY KEY (review_id, position)
	) STRICT, WITHOUT ROWID;`,
}

// migrate applies the missing migrations, each in its own IMMEDIATE
// transaction that re-reads the version first, so two processes opening a
// fresh file at once apply each step exactly once.
func migrate(ctx context.Context, db *sql.DB) error {
	for {
		done, err := migrateOne(ctx, db)
		if err != nil || done {
			return err
		}
	}
}

// migrateOne applies the next migration, or reports done when the schema
// is current.
func migrateOne(ctx context.Context, db *sql.DB) (done bool, err error) {
	tx, err := db.BeginTx(ctx, nil)
	if err != nil {
		return false, fmt.Errorf("migrate: %w", err)
	}
	defer tx.Rollback()
	v, err := schemaState(ctx, tx)
	if err != nil {
		return false, err
	}
	if v == len(migrations) {
		return true, nil
	}
	if _, err := tx.ExecContext(ctx, migrations[v]); err != nil {
		return false, fmt.Errorf("migration %d: %w", v+1, err)
	}
	// PRAGMA takes no bound parameters; both values are our own integers.
	if _, err := tx.ExecContext(ctx, fmt.Sprintf("PRAGMA user_version = %d", v+1)); err != nil {
		return false, fmt.Errorf("migration %d: %w", v+1, err)
	}
	if _, err := tx.ExecContext(ctx, fmt.Sprintf("PRAGMA application_id = %d", applicationID)); err != nil {
		return false, fmt.Errorf("migration %d: %w", v+1, err)
	}
	if err := tx.Commit(); err != nil {
		return false, fmt.Errorf("migration %d: %w", v+1, err)
	}
	return false, nil
}

// checkCurrent is Open's check for a read-only store, which cannot migrate.
func checkCurrent(ctx context.Context, db *sql.DB) error {
	tx, err := db.BeginTx(ctx, &sql.TxOptions{ReadOnly: true})
	if err != nil {
		return err
	}
	defer tx.Rollback()
	v, err := schemaState(ctx, tx)
	if err != nil {
		return err
	}
	if v < len(migrations) {
		return fmt.Errorf("schema version %d is older than %d; open the database read-write once to upgrade it", v, len(migrations))
	}
	return nil
}

// querier is what schemaState needs of a transaction.
type querier interface {
	QueryRowContext(ctx context.Context, query string, args ...any) *sql.Row
}

// schemaState returns the database's schema version after checking that
// the file is ours (or empty) and not newer than this build.
func schemaState(ctx context.Context, q querier) (int, error) {
	var version, appID, objects int
	if err := q.QueryRowContext(ctx, "PRAGMA user_version").Scan(&version); err != nil {
		return 0, fmt.Errorf("read schema version: %w", err)
	}
	if err := q.QueryRowContext(ctx, "PRAGMA application_id").Scan(&appID); err != nil {
		return 0, fmt.Errorf("read application id: %w", err)
	}
	if err := q.QueryRowContext(ctx, "SELECT count(*) FROM sqlite_schema").Scan(&objects); err != nil {
		return 0, fmt.Errorf("read schema: %w", err)
	}
	switch {
	case appID == applicationID:
	case appID == 0 && version == 0 && objects == 0:
		// A new or empty file: migration 1 makes it ours.
	default:
		return 0, fmt.Errorf("%w (application_id %#x, user_version %d, %d schema objects)", ErrNotRingbox, appID, version, objects)
	}
	if version > len(migrations) {
		return 0, fmt.Errorf("%w: schema version %d, this build knows up to %d; use a newer ringbox", ErrSchemaTooNew, version, len(migrations))
	}
	return version, nil
}

package web

import (
	"context"
	"os"
	"time"

	"ringbox/internal/store"
)

// ReviewStore is what the web app needs from the saved-review store
// (internal/store): the review handlers in review.go call these methods and
// nothing else, so a test may stand in a fake.
type ReviewStore interface {
	Create(ctx context.Context, r store.Review) (store.Review, error)
	Get(ctx context.Context, id int64) (store.Review, error)
	List(ctx context.Context, titleQuery string, limit int) ([]store.Review, error)
	Export(ctx context.Context, id int64) ([]byte, error)
	Import(ctx context.Context, doc []byte) (store.Review, error)
	Close() error
}

// openTimeout bounds opening the database and migrating its schema at
// start-up: a file locked by another process waits in SQLite's busy handler,
// which should not hang `ringbox serve` silently.
const openTimeout = 15 * time.Second

// openReviews opens the store at Config.DBPath. New calls it once and fails
// with its error, so `ringbox serve --db PATH` stops at start-up when the
// file cannot be opened (a directory, another application's database, a
// schema from a newer ringbox) instead of failing at the first save.
//
// With Config.ReadOnly an existing database is opened read-only, so the
// instance works from a read-only file system and cannot write even past
// the read-only middleware; a missing file is created read-write first, so
// an empty read-only instance shows an empty list rather than an error.
var openReviews = func(dbPath string, readOnly bool) (ReviewStore, error) {
	ctx, cancel := context.WithTimeout(context.Background(), openTimeout)
	defer cancel()
	opts := store.Options{}
	if _, err := os.Stat(dbPath); err == nil && readOnly {
		opts.ReadOnly = true
	}
	s, err := store.Open(ctx, dbPath, opts)
	if err != nil {
		return nil, err
	}
	return s, nil
}

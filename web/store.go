package web

import (
	"context"
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
// The store is opened read-write even for Config.ReadOnly: the read-only
// middleware refuses every POST before it reaches a handler, and a new file
// still gets its schema, so an empty read-only instance shows an empty list
// rather than an error.
var openReviews = func(dbPath string) (ReviewStore, error) {
	ctx, cancel := context.WithTimeout(context.Background(), openTimeout)
	defer cancel()
	s, err := store.Open(ctx, dbPath, store.Options{})
	if err != nil {
		return nil, err
	}
	return s, nil
}

package web

// ReviewStore is what the web app needs from the saved-review store
// (internal/store). web never imports the store package: whoever wires it
// widens this interface with the methods the review handlers call and sets
// openReviews, in a file of their own, e.g.
//
//	func init() { openReviews = func(p string) (ReviewStore, error) { return store.Open(p) } }
type ReviewStore interface {
	Close() error
}

// openReviews opens the store at Config.DBPath. While it is nil, New leaves
// App.Reviews nil and no database file is created.
var openReviews func(dbPath string) (ReviewStore, error)

package web

import (
	"context"
	"fmt"
	"net/http"
	"time"
)

// deadlineError is the cause recorded when a request's deadline passes, so
// the error response can name the limit.
type deadlineError struct{ limit time.Duration }

func (e *deadlineError) Error() string {
	return fmt.Sprintf("the computation took longer than the %v limit", e.limit)
}

// deadline gives each request a context that ends after d. Engines check
// their context between steps, so a runaway computation stops and its
// handler returns the context's error, which writeError answers with 504.
func deadline(d time.Duration) func(http.Handler) http.Handler {
	return func(next http.Handler) http.Handler {
		return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
			ctx, cancel := context.WithTimeoutCause(r.Context(), d, &deadlineError{limit: d})
			defer cancel()
			next.ServeHTTP(w, r.WithContext(ctx))
		})
	}
}

package web

import (
	"net/http"
	"strconv"
	"time"
)

// limitWait is how long a request may wait for a free slot: long enough to
// absorb a burst of figure requests from one page (three plots at once), far
// shorter than the computation it would queue behind.
const limitWait = 100 * time.Millisecond

// retryAfterSeconds is the Retry-After hint of a refused request: about one
// typical computation.
const retryAfterSeconds = 2

// limitConcurrency lets at most n requests run at once. A request that
// finds no free slot within wait is answered 503 with Retry-After through
// fail, instead of queueing work that would outlive its deadline.
func limitConcurrency(n int, wait time.Duration, fail func(http.ResponseWriter, *http.Request, error)) func(http.Handler) http.Handler {
	if n <= 0 {
		panic("web: limitConcurrency needs n > 0")
	}
	slots := make(chan struct{}, n)
	return func(next http.Handler) http.Handler {
		return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
			select {
			case slots <- struct{}{}:
			default:
				t := time.NewTimer(wait)
				select {
				case slots <- struct{}{}:
					t.Stop()
				case <-t.C:
					w.Header().Set("Retry-After", strconv.Itoa(retryAfterSeconds))
					fail(w, r, &StatusError{Status: http.StatusServiceUnavailable,
						Msg: "the server is busy with other computations; try again in a moment"})
					return
				case <-r.Context().Done():
					t.Stop()
					return // the client left while waiting
				}
			}
			defer func() { <-slots }()
			next.ServeHTTP(w, r)
		})
	}
}

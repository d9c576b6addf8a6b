package web

import (
	"fmt"
	"log/slog"
	"net/http"
	"runtime/debug"
)

// recoverPanics turns a panic in a handler into a 500 answered through
// fail (with its generic message) and logs the panic with its stack. The
// stack never reaches the user. http.ErrAbortHandler is re-panicked, as
// net/http expects, to abort the response silently.
func recoverPanics(log *slog.Logger, fail func(http.ResponseWriter, *http.Request, error)) func(http.Handler) http.Handler {
	return func(next http.Handler) http.Handler {
		return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
			defer func() {
				v := recover()
				if v == nil {
					return
				}
				if v == http.ErrAbortHandler {
					panic(v)
				}
				log.Error("panic in handler", "method", r.Method, "path", r.URL.Path,
					"panic", fmt.Sprint(v), "stack", string(debug.Stack()))
				fail(w, r, fmt.Errorf("panic: %v", v))
			}()
			next.ServeHTTP(w, r)
		})
	}
}

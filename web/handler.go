package web

import (
	"net/http"
)

// handler is an HTTP handler that returns its error instead of writing it,
// so every failure goes through writeError and reads the same to users.
// A handler that returns an error must not have written anything yet; use
// render, writeJSON or serveCached, which write only once the body is
// complete.
type handler func(w http.ResponseWriter, r *http.Request) error

// handle adapts h to net/http.
func (a *App) handle(h handler) http.HandlerFunc {
	return func(w http.ResponseWriter, r *http.Request) {
		if err := h(w, r); err != nil {
			a.writeError(w, r, err)
		}
	}
}

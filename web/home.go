package web

import (
	"context"
	"io"
	"net/http"

	"github.com/a-h/templ"
	"github.com/go-chi/chi/v5"

	"ringbox/web/views"
)

// PLACEHOLDER: this file only holds the home route until the conductor page
// replaces it. Its author overwrites this whole file (the route "/" and its
// handler); nothing else refers to homePlaceholder.

func init() {
	addRoutes(func(a *App, r chi.Router) {
		r.Get("/", a.handle(a.homePlaceholder))
	})
}

// homePlaceholder shows the layout and navigation with a one-line note.
func (a *App) homePlaceholder(w http.ResponseWriter, r *http.Request) error {
	body := templ.ComponentFunc(func(ctx context.Context, w io.Writer) error {
		_, err := io.WriteString(w, `<h1>Conductor</h1><p class="note">The conductor page is not built yet.</p>`)
		return err
	})
	return render(w, r, http.StatusOK, views.Page("Conductor", views.NavConductor, body))
}

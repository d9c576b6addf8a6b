package web

import (
	"net/http"

	"github.com/go-chi/chi/v5"

	"ringbox/web/views"
)

// The method page, /method: the model in brief, with anchors per section
// (views.MethodAnchors) for "how this is computed" links.

func init() {
	addRoutes(func(a *App, r chi.Router) {
		r.Get("/method", a.handle(a.methodPage))
	})
}

func (a *App) methodPage(w http.ResponseWriter, r *http.Request) error {
	w.Header().Set("Cache-Control", "public, max-age=3600")
	return render(w, r, http.StatusOK, views.Page("Method", views.NavMethod, views.MethodBody()))
}

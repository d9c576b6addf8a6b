package web

import (
	"net/http"

	"github.com/go-chi/chi/v5"
	"github.com/go-chi/chi/v5/middleware"
)

// routeFunc adds one page's routes to r. Handlers close over a, so they
// reach its cache, logger and store.
type routeFunc func(a *App, r chi.Router)

// pageRoutes are registered by each page's own file, from an init func:
//
//	func init() {
//		addRoutes(func(a *App, r chi.Router) {
//			r.Get("/sweep", a.handle(a.sweepPage))
//		})
//	}
//
// The routes they add run behind the concurrency limit, the request
// deadline and the read-only guard. chi panics at start-up on a pattern
// registered twice, so a clash shows in the first test.
var pageRoutes []routeFunc

// addRoutes registers f; call it from init only.
func addRoutes(f routeFunc) { pageRoutes = append(pageRoutes, f) }

// storeRoutes are routes that run no engine (saving and importing
// reviews): they keep the deadline and the read-only guard but skip the
// concurrency limit, so a server busy counting still takes a save.
var storeRoutes []routeFunc

// addStoreRoutes registers f among storeRoutes; call it from init only.
func addStoreRoutes(f routeFunc) { storeRoutes = append(storeRoutes, f) }

// router builds the whole handler tree once, at New.
//
// Order of the outer middleware: the access log sees the final status
// (including the 500 of a recovered panic); security headers are set
// before anything can write, so error pages carry them too.
func (a *App) router() http.Handler {
	r := chi.NewRouter()
	r.Use(accessLog(a.log))
	r.Use(recoverPanics(a.log, a.writeError))
	r.Use(securityHeaders)
	r.Use(middleware.GetHead)

	r.NotFound(a.handle(func(w http.ResponseWriter, r *http.Request) error {
		return &StatusError{Status: http.StatusNotFound, Msg: "no page at " + r.URL.Path}
	}))
	r.MethodNotAllowed(a.handle(func(w http.ResponseWriter, r *http.Request) error {
		return &StatusError{Status: http.StatusMethodNotAllowed, Msg: r.Method + " is not allowed on " + r.URL.Path}
	}))

	// Cheap routes that must answer even when the engines are saturated.
	r.Get("/healthz", a.handle(a.healthz))
	r.Get("/static/{name}", a.handle(a.staticFile))

	r.Group(func(r chi.Router) {
		r.Use(deadline(a.cfg.RequestTimeout))
		if a.cfg.ReadOnly {
			r.Use(readOnly(a.writeError))
		}
		for _, f := range storeRoutes {
			f(a, r)
		}
	})
	r.Group(func(r chi.Router) {
		r.Use(limitConcurrency(a.cfg.MaxConcurrent, limitWait, a.writeError))
		r.Use(deadline(a.cfg.RequestTimeout))
		if a.cfg.ReadOnly {
			r.Use(readOnly(a.writeError))
		}
		for _, f := range pageRoutes {
			f(a, r)
		}
	})
	return r
}

package web

import (
	"bytes"
	"net/http"
	"time"

	"github.com/go-chi/chi/v5"

	"ringbox/static"
)

// staticFile serves an embedded asset. A URL carrying the asset's current
// version (as static.Path writes it) may be kept for a year; any other is
// revalidated with its ETag, so an upgrade never leaves a stale stylesheet.
func (a *App) staticFile(w http.ResponseWriter, r *http.Request) error {
	asset, ok := static.Lookup(chi.URLParam(r, "name"))
	if !ok {
		return &StatusError{Status: http.StatusNotFound, Msg: "no file at " + r.URL.Path}
	}
	h := w.Header()
	h.Set("Content-Type", asset.ContentType)
	h.Set("ETag", `"`+asset.Version+`"`)
	if r.URL.Query().Get("v") == asset.Version {
		h.Set("Cache-Control", "public, max-age=31536000, immutable")
	} else {
		h.Set("Cache-Control", "no-cache")
	}
	// ServeContent answers If-None-Match with 304 and handles ranges.
	http.ServeContent(w, r, asset.Name, time.Time{}, bytes.NewReader(asset.Content))
	return nil
}

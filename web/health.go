package web

import "net/http"

// healthz answers {"status":"ok"} while the server accepts requests; it
// bypasses the concurrency limit so a busy server still reports alive.
func (a *App) healthz(w http.ResponseWriter, r *http.Request) error {
	w.Header().Set("Cache-Control", "no-store")
	return writeJSON(w, r, http.StatusOK, map[string]string{"status": "ok"})
}

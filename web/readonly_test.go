package web

import (
	"net/http"
	"testing"

	"github.com/go-chi/chi/v5"
)

func TestReadOnly(t *testing.T) {
	addRoutesForTest(t, func(a *App, r chi.Router) {
		ok := a.handle(func(w http.ResponseWriter, r *http.Request) error { return writeJSON(w, r, http.StatusOK, "ok") })
		r.Get("/test/thing", ok)
		r.Post("/test/thing", ok)
	})
	tests := []struct {
		name     string
		readOnly bool
		method   string
		want     int
	}{
		{"writable GET", false, http.MethodGet, http.StatusOK},
		{"writable POST", false, http.MethodPost, http.StatusOK},
		{"read-only GET", true, http.MethodGet, http.StatusOK},
		{"read-only HEAD", true, http.MethodHead, http.StatusOK},
		{"read-only POST", true, http.MethodPost, http.StatusForbidden},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			a, _ := newTestApp(t, Config{ReadOnly: tt.readOnly})
			if rec := do(a.Handler(), tt.method, "/test/thing"); rec.Code != tt.want {
				t.Errorf("status = %d, want %d", rec.Code, tt.want)
			}
		})
	}
}

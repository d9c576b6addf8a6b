package web

import (
	"encoding/json"
	"net/http"
	"strings"
	"testing"

	"github.com/go-chi/chi/v5"
)

func TestRecoverPanics(t *testing.T) {
	addRoutesForTest(t, func(a *App, r chi.Router) {
		r.Get("/test/panic", func(w http.ResponseWriter, r *http.Request) { panic("secret internal state 0xdeadbeef") })
		r.Get("/api/v1/test/panic", func(w http.ResponseWriter, r *http.Request) { panic("secret internal state 0xdeadbeef") })
	})
	for _, path := range []string{"/test/panic", "/api/v1/test/panic"} {
		t.Run(path, func(t *testing.T) {
			a, logs := newTestApp(t, Config{})
			rec := do(a.Handler(), http.MethodGet, path)
			if rec.Code != http.StatusInternalServerError {
				t.Fatalf("status = %d, want 500", rec.Code)
			}
			body := rec.Body.String()
			for _, leak := range []string{"secret", "deadbeef", "goroutine", ".go:"} {
				if strings.Contains(body, leak) {
					t.Errorf("response leaks %q:\n%s", leak, body)
				}
			}
			if !strings.Contains(body, genericInternal) {
				t.Errorf("response lacks the generic message:\n%s", body)
			}
			// The panic and its stack go to the log, as an error.
			var found bool
			for line := range strings.Lines(logs.String()) {
				var rec map[string]any
				if json.Unmarshal([]byte(line), &rec) == nil && rec["msg"] == "panic in handler" {
					found = rec["level"] == "ERROR" && strings.Contains(rec["stack"].(string), "recover_test.go")
				}
			}
			if !found {
				t.Errorf("no ERROR log of the panic with its stack:\n%s", logs)
			}
		})
	}
}

// http.ErrAbortHandler is net/http's way to abort a response; it must pass.
func TestRecoverLetsAbortThrough(t *testing.T) {
	log, _ := testLogger()
	h := recoverPanics(log, func(http.ResponseWriter, *http.Request, error) {})(
		http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) { panic(http.ErrAbortHandler) }))
	defer func() {
		if v := recover(); v != http.ErrAbortHandler {
			t.Errorf("recovered %v, want http.ErrAbortHandler re-panicked", v)
		}
	}()
	do(h, http.MethodGet, "/")
}

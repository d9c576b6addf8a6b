package web

import (
	"context"
	"encoding/json"
	"errors"
	"net/http"
	"strings"
	"testing"
	"time"

	"github.com/go-chi/chi/v5"
)

func TestDeadlineCancelsSlowHandler(t *testing.T) {
	const limit = 30 * time.Millisecond
	var cause error
	stopped := make(chan time.Duration, 1)
	slow := http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		start := time.Now()
		select {
		case <-r.Context().Done():
			cause = context.Cause(r.Context())
			stopped <- time.Since(start)
		case <-time.After(10 * time.Second):
			stopped <- -1
		}
	})
	do(deadline(limit)(slow), http.MethodGet, "/")
	d := <-stopped
	if d < 0 {
		t.Fatal("handler ran to its end: the deadline never reached its context")
	}
	var de *deadlineError
	if !errors.As(cause, &de) || de.limit != limit {
		t.Errorf("cause = %v, want a deadlineError naming %v", cause, limit)
	}
}

// An engine that honours its context returns ctx.Err(); through the App the
// user sees 504 with the limit named, never a 500.
func TestDeadlineThroughApp(t *testing.T) {
	slowEngine := func(w http.ResponseWriter, r *http.Request) error {
		select {
		case <-r.Context().Done():
			return r.Context().Err()
		case <-time.After(10 * time.Second):
			return writeJSON(w, r, http.StatusOK, "finished")
		}
	}
	a, logs := newTestApp(t, Config{RequestTimeout: 40 * time.Millisecond})
	r := chi.NewRouter()
	r.Use(deadline(a.cfg.RequestTimeout))
	r.Get("/api/v1/slow", a.handle(slowEngine))

	rec := do(r, http.MethodGet, "/api/v1/slow")
	if rec.Code != http.StatusGatewayTimeout {
		t.Fatalf("status = %d, want 504", rec.Code)
	}
	var body errorBody
	if err := json.Unmarshal(rec.Body.Bytes(), &body); err != nil {
		t.Fatalf("body %q: %v", rec.Body, err)
	}
	if !strings.Contains(body.Error, "40ms") {
		t.Errorf("error %q does not name the 40ms limit", body.Error)
	}
	if strings.Contains(logs.String(), `"level":"ERROR"`) {
		t.Errorf("a timeout was logged as an error:\n%s", logs)
	}
}

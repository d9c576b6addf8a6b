package web

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"net/http"
	"strings"
	"testing"
	"time"

	"github.com/go-chi/chi/v5"

	"ringbox/internal/scenario"
)

func TestErrorResponses(t *testing.T) {
	tests := []struct {
		name    string
		err     error
		status  int
		msg     string // substring of the message the user sees
		key     string
		logsErr bool
	}{
		{"invalid names key", scenario.Errorf("lx", "must be positive, got %q", "-3nm"), 400, `must be positive, got "-3nm"`, "lx", false},
		{"wrapped invalid", fmt.Errorf("parse: %w", scenario.Errorf("dims", "must be 1, 2 or 3")), 400, "must be 1, 2 or 3", "dims", false},
		{"too large", &scenario.Error{Code: scenario.TooLarge, Key: "points", Msg: "at most 20000 points"}, 422, "at most 20000 points", "points", false},
		{"scenario canceled, client gone", &scenario.Error{Code: scenario.Canceled, Msg: "canceled"}, 503, "canceled", "", false},
		{"status 404", &StatusError{Status: 404, Msg: "no review 17"}, 404, "no review 17", "", false},
		{"status 405", &StatusError{Status: 405, Msg: "PUT is not allowed"}, 405, "PUT is not allowed", "", false},
		{"unknown code", &scenario.Error{Code: 99, Msg: "secret detail"}, 500, genericInternal, "", true},
		{"plain error", errors.New("open /var/lib/secret.db: permission denied"), 500, genericInternal, "", true},
	}
	for _, tt := range tests {
		for _, api := range []bool{true, false} {
			name := tt.name + map[bool]string{true: " (api)", false: " (page)"}[api]
			t.Run(name, func(t *testing.T) {
				path := "/test/fail"
				if api {
					path = "/api/v1/test/fail"
				}
				addRoutesForTest(t, func(a *App, r chi.Router) {
					r.Get(path, a.handle(func(w http.ResponseWriter, r *http.Request) error { return tt.err }))
				})
				a, logs := newTestApp(t, Config{})
				rec := do(a.Handler(), http.MethodGet, path)
				if rec.Code != tt.status {
					t.Fatalf("status = %d, want %d", rec.Code, tt.status)
				}
				if api {
					checkJSONError(t, rec.Header(), rec.Body.Bytes(), tt.msg, tt.key)
				} else {
					checkHTMLError(t, rec.Header(), rec.Body.String(), tt.status, tt.msg, tt.key)
				}
				if strings.Contains(rec.Body.String(), "secret") {
					t.Errorf("internal detail reached the user: %s", rec.Body)
				}
				if got := strings.Contains(logs.String(), `"level":"ERROR"`); got != tt.logsErr {
					t.Errorf("logged as error = %v, want %v:\n%s", got, tt.logsErr, logs)
				}
			})
		}
	}
}

func checkJSONError(t *testing.T, h http.Header, body []byte, msg, key string) {
	t.Helper()
	if ct := h.Get("Content-Type"); !strings.HasPrefix(ct, "application/json") {
		t.Errorf("Content-Type = %q, want JSON", ct)
	}
	var got map[string]string
	if err := json.Unmarshal(body, &got); err != nil {
		t.Fatalf("body %q is not a JSON object of strings: %v", body, err)
	}
	if !strings.Contains(got["error"], msg) || got["key"] != key {
		t.Errorf("body = %v, want error containing %q and key %q", got, msg, key)
	}
}

func checkHTMLError(t *testing.T, h http.Header, body string, status int, msg, key string) {
	t.Helper()
	if ct := h.Get("Content-Type"); !strings.HasPrefix(ct, "text/html") {
		t.Errorf("Content-Type = %q, want HTML", ct)
	}
	doc := parseHTML(t, strings.NewReader(body))
	if len(findAll(doc, byClass("site-nav"))) != 1 {
		t.Error("error page lacks the layout's navigation")
	}
	callouts := findAll(doc, byClass("callout"))
	if len(callouts) != 1 || !strings.Contains(text(callouts[0]), msg) {
		t.Fatalf("want one callout with %q, got %d", msg, len(callouts))
	}
	codes := findAll(callouts[0], byTag("code"))
	if key != "" && (len(codes) != 1 || text(codes[0]) != key) {
		t.Errorf("callout does not name key %q: %q", key, text(callouts[0]))
	}
	if key == "" && len(codes) != 0 {
		t.Errorf("callout names a key although there is none: %q", text(callouts[0]))
	}
	st := findAll(doc, byClass("error-status"))
	if len(st) != 1 || !strings.Contains(text(st[0]), fmt.Sprint(status)) {
		t.Errorf("page does not show status %d", status)
	}
}

func TestNotFoundAndMethodNotAllowed(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	tests := []struct {
		name, method, path string
		status             int
	}{
		{"unknown page", http.MethodGet, "/no/such/page", 404},
		{"unknown API", http.MethodGet, "/api/v1/none", 404},
		{"unknown static", http.MethodGet, "/static/missing.css", 404},
		{"nested static", http.MethodGet, "/static/a/b.css", 404},
		{"wrong method", http.MethodDelete, "/healthz", 405},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			rec := do(a.Handler(), tt.method, tt.path)
			if rec.Code != tt.status {
				t.Fatalf("status = %d, want %d", rec.Code, tt.status)
			}
			if isAPI(httpRequest(tt.path)) {
				checkJSONError(t, rec.Header(), rec.Body.Bytes(), tt.path, "")
			} else {
				checkHTMLError(t, rec.Header(), rec.Body.String(), tt.status, tt.path, "")
			}
		})
	}
}

func httpRequest(path string) *http.Request {
	r, _ := http.NewRequest(http.MethodGet, path, nil)
	return r
}

// The context's reason decides between 504 (our deadline) and 503 (client
// gone or shutdown).
func TestCanceledReason(t *testing.T) {
	dl, cancel := context.WithTimeoutCause(context.Background(), 0, &deadlineError{limit: 10 * time.Second})
	defer cancel()
	gone, cancel2 := context.WithCancel(context.Background())
	cancel2()
	tests := []struct {
		name   string
		ctx    context.Context
		err    error
		status int
		msg    string
	}{
		{"our deadline", dl, dl.Err(), 504, "10s limit"},
		{"scenario canceled at our deadline", dl, &scenario.Error{Code: scenario.Canceled, Msg: "stopped"}, 504, "10s limit"},
		{"client gone", gone, gone.Err(), 503, "canceled"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			r := httpRequest("/").WithContext(tt.ctx)
			status, msg, _ := classify(r, tt.err)
			if status != tt.status || !strings.Contains(msg, tt.msg) {
				t.Errorf("classify = %d %q, want %d with %q", status, msg, tt.status, tt.msg)
			}
		})
	}
}

// TestInputError checks which errors a form page shows beside its field:
// bad input (400) and work over the budget (422, RFC 9110 §15.5.21 for
// content the server understands but will not process); a canceled run
// and errors that are not scenario errors go to the error page.
func TestInputError(t *testing.T) {
	tests := []struct {
		name   string
		err    error
		ok     bool
		status int
	}{
		{"invalid", &scenario.Error{Code: scenario.Invalid, Key: "lx", Msg: "bad"}, true, http.StatusBadRequest},
		{"too large wrapped", fmt.Errorf("run: %w", &scenario.Error{Code: scenario.TooLarge, Key: "points", Msg: "big"}), true, http.StatusUnprocessableEntity},
		{"canceled", &scenario.Error{Code: scenario.Canceled, Msg: "gone"}, false, 0},
		{"unknown code", &scenario.Error{Code: 99, Msg: "?"}, false, 0},
		{"other error", errors.New("disk full"), false, 0},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			e, status, ok := inputError(tt.err)
			if ok != tt.ok || status != tt.status {
				t.Fatalf("inputError = %v, %d; want %v, %d", ok, status, tt.ok, tt.status)
			}
			if ok && (e == nil || e.Key == "") {
				t.Errorf("inputError lost the key: %+v", e)
			}
		})
	}
}

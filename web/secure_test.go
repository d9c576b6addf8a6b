package web

import (
	"net/http"
	"strings"
	"testing"
)

func TestSecurityHeaders(t *testing.T) {
	inner := http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) { w.WriteHeader(http.StatusTeapot) })
	a, _ := newTestApp(t, Config{})
	tests := []struct {
		name string
		h    http.Handler
		path string
	}{
		{"middleware alone", securityHeaders(inner), "/"},
		{"app page", a.Handler(), "/"},
		{"app 404 page", a.Handler(), "/no/such/page"},
		{"app static file", a.Handler(), "/static/ringbox.css"},
		{"app API error", a.Handler(), "/api/v1/nothing"},
	}
	// The directives the brief's policy must contain (common practice for a
	// no-inline-code policy, CSP Level 3).
	directives := []string{"default-src 'self'", "script-src 'self'", "style-src 'self'",
		"img-src 'self' data:", "object-src 'none'", "base-uri 'none'", "form-action 'self'",
		"frame-ancestors 'none'"}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			res := do(tt.h, http.MethodGet, tt.path).Result()
			csp := res.Header.Get("Content-Security-Policy")
			for _, d := range directives {
				if !strings.Contains(csp, d) {
					t.Errorf("CSP %q lacks %q", csp, d)
				}
			}
			if strings.Contains(csp, "unsafe-inline") || strings.Contains(csp, "unsafe-eval") {
				t.Errorf("CSP %q allows inline code", csp)
			}
			for k, want := range map[string]string{
				"X-Content-Type-Options": "nosniff",
				"Referrer-Policy":        "same-origin",
				"X-Frame-Options":        "DENY",
			} {
				if got := res.Header.Get(k); got != want {
					t.Errorf("%s = %q, want %q", k, got, want)
				}
			}
		})
	}
}

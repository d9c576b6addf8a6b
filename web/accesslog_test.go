package web

import (
	"encoding/json"
	"net/http"
	"strings"
	"testing"
)

func TestAccessLog(t *testing.T) {
	tests := []struct {
		name, path string
		status     int
		level      string
	}{
		{"page at info", "/things?x=1", http.StatusTeapot, "INFO"},
		{"static at debug", "/static/ringbox.css", http.StatusOK, "DEBUG"},
		{"health at debug", "/healthz", http.StatusOK, "DEBUG"},
		{"implicit 200", "/quiet", http.StatusOK, "INFO"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			log, buf := testLogger()
			h := accessLog(log)(http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
				if r.URL.Path != "/quiet" {
					w.WriteHeader(tt.status)
					_, _ = w.Write([]byte("hello"))
				}
			}))
			do(h, http.MethodGet, tt.path)
			var rec map[string]any
			if err := json.Unmarshal([]byte(strings.TrimSpace(buf.String())), &rec); err != nil {
				t.Fatalf("want one JSON log line, got %q: %v", buf, err)
			}
			if rec["level"] != tt.level || rec["uri"] != tt.path || rec["status"] != float64(tt.status) {
				t.Errorf("log = %v, want level %s uri %s status %d", rec, tt.level, tt.path, tt.status)
			}
		})
	}
}

package web

import (
	"log/slog"
	"net/http"
	"strings"
	"time"
)

// statusRecorder remembers the status and size a handler wrote.
type statusRecorder struct {
	http.ResponseWriter
	status int
	bytes  int
}

func (s *statusRecorder) WriteHeader(code int) {
	if s.status == 0 {
		s.status = code
	}
	s.ResponseWriter.WriteHeader(code)
}

func (s *statusRecorder) Write(b []byte) (int, error) {
	if s.status == 0 {
		s.status = http.StatusOK
	}
	n, err := s.ResponseWriter.Write(b)
	s.bytes += n
	return n, err
}

// Unwrap lets http.ResponseController reach the underlying writer.
func (s *statusRecorder) Unwrap() http.ResponseWriter { return s.ResponseWriter }

// maxLoggedURI keeps compare URLs with many scenarios from flooding the log.
const maxLoggedURI = 300

// accessLog logs one line per request: at info level for pages and API
// calls, at debug level for static files and health checks, which would
// otherwise drown them.
func accessLog(log *slog.Logger) func(http.Handler) http.Handler {
	return func(next http.Handler) http.Handler {
		return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
			start := time.Now()
			rec := &statusRecorder{ResponseWriter: w}
			defer func() {
				level := slog.LevelInfo
				if strings.HasPrefix(r.URL.Path, "/static/") || r.URL.Path == "/healthz" {
					level = slog.LevelDebug
				}
				uri := r.URL.RequestURI()
				if len(uri) > maxLoggedURI {
					uri = uri[:maxLoggedURI] + "…"
				}
				status := rec.status
				if status == 0 {
					status = http.StatusOK // nothing written: net/http sends 200
				}
				log.Log(r.Context(), level, "request", "method", r.Method, "uri", uri,
					"status", status, "bytes", rec.bytes, "duration", time.Since(start))
			}()
			next.ServeHTTP(rec, r)
		})
	}
}

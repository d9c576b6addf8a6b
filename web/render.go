package web

import (
	"bytes"
	"encoding/json"
	"net/http"

	"github.com/a-h/templ"
)

// render renders c completely before writing, so a failure mid-page
// becomes a clean error response rather than half a page.
func render(w http.ResponseWriter, r *http.Request, status int, c templ.Component) error {
	var buf bytes.Buffer
	if err := c.Render(r.Context(), &buf); err != nil {
		return err
	}
	writeBody(w, r, status, "text/html; charset=utf-8", buf.Bytes())
	return nil
}

// writeJSON encodes v completely, then writes it with status.
func writeJSON(w http.ResponseWriter, r *http.Request, status int, v any) error {
	b, err := json.Marshal(v)
	if err != nil {
		return err
	}
	writeBody(w, r, status, "application/json; charset=utf-8", append(b, '\n'))
	return nil
}

// writeBody writes a complete response. The error of writing the body is
// dropped: the status is already sent, so nothing better can be answered,
// and the usual cause is a client that has gone.
func writeBody(w http.ResponseWriter, r *http.Request, status int, contentType string, body []byte) {
	w.Header().Set("Content-Type", contentType)
	w.WriteHeader(status)
	if r.Method != http.MethodHead {
		_, _ = w.Write(body)
	}
}

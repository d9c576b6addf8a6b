package web

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"net/http"
	"strings"

	"ringbox/internal/scenario"
	"ringbox/web/views"
)

// StatusError is a handler-level error with the HTTP status to answer and
// a message safe to show the user (e.g. 404 for an unknown review, 405).
type StatusError struct {
	Status int
	Msg    string
}

func (e *StatusError) Error() string { return fmt.Sprintf("%d %s", e.Status, e.Msg) }

// codeStatus maps each scenario error code to its HTTP status, once for
// every handler.
//
// TooLarge is 422 Unprocessable Content, not 413 Content Too Large: the
// request itself is small and well formed (a short query string); what is
// too large is the work it asks for (points × levels), and 413 would tell
// clients to shorten the request body they never sent.
var codeStatus = map[scenario.Code]int{
	scenario.Invalid:  http.StatusBadRequest,
	scenario.TooLarge: http.StatusUnprocessableEntity,
	scenario.Canceled: http.StatusServiceUnavailable,
}

// inputError reports whether err is bad input that a form page shows beside
// its field, with that page's status: 400, or 422 for work over the budget
// (codeStatus). Anything else, a canceled run or a bug, is for the error
// page.
func inputError(err error) (e *scenario.Error, status int, ok bool) {
	e, ok = scenario.AsError(err)
	if !ok || e.Code == scenario.Canceled {
		return nil, 0, false
	}
	status, ok = codeStatus[e.Code]
	if !ok {
		return nil, 0, false
	}
	return e, status, true
}

// genericInternal is all a user learns about a 500; the details go to the log.
const genericInternal = "internal error; the server log has the details"

// errorBody is the JSON error answer of the API, shared with the CLI's
// vocabulary: the message and the key (form field / query parameter) at fault.
type errorBody struct {
	Error string `json:"error"`
	Key   string `json:"key,omitempty"`
}

// classify turns err into the status, message and key to show. Anything it
// does not recognise is a 500 with a generic message.
func classify(r *http.Request, err error) (status int, msg, key string) {
	var se *StatusError
	if errors.As(err, &se) {
		return se.Status, se.Msg, ""
	}
	if e, ok := scenario.AsError(err); ok {
		status, ok := codeStatus[e.Code]
		if !ok {
			return http.StatusInternalServerError, genericInternal, ""
		}
		if e.Code == scenario.Canceled {
			return canceled(r)
		}
		return status, e.Msg, e.Key
	}
	if errors.Is(err, context.DeadlineExceeded) || errors.Is(err, context.Canceled) {
		return canceled(r)
	}
	return http.StatusInternalServerError, genericInternal, ""
}

// canceled reports why the request's context ended: its deadline (504,
// with the limit that the deadline middleware recorded as the cause) or
// the client leaving or the server shutting down (503).
func canceled(r *http.Request) (int, string, string) {
	ctx := r.Context()
	var dl *deadlineError
	if errors.As(context.Cause(ctx), &dl) || errors.Is(ctx.Err(), context.DeadlineExceeded) {
		msg := "the computation took longer than the time limit; ask for fewer points or smaller sizes"
		if dl != nil {
			msg = dl.Error() + "; ask for fewer points or smaller sizes"
		}
		return http.StatusGatewayTimeout, msg, ""
	}
	return http.StatusServiceUnavailable, "the request was canceled before it finished", ""
}

// isAPI reports whether the request wants a JSON answer.
func isAPI(r *http.Request) bool { return strings.HasPrefix(r.URL.Path, "/api/") }

// writeError writes the one error response of a request: JSON
// {"error", "key"} under /api/, the HTML error page elsewhere. Only 500s
// are logged as errors, with the internal detail; users never see it.
func (a *App) writeError(w http.ResponseWriter, r *http.Request, err error) {
	status, msg, key := classify(r, err)
	if status >= 500 && status != http.StatusServiceUnavailable && status != http.StatusGatewayTimeout {
		a.log.Error("request failed", "method", r.Method, "path", r.URL.Path, "status", status, "err", err)
	} else {
		a.log.Debug("request refused", "method", r.Method, "path", r.URL.Path, "status", status, "err", err)
	}

	h := w.Header()
	// Whatever a handler set for its success (a cache policy, a type) does
	// not apply to the error.
	h.Del("Content-Length")
	h.Del("ETag")
	h.Set("Cache-Control", "no-store")
	h.Set("X-Content-Type-Options", "nosniff")

	var buf bytes.Buffer
	if isAPI(r) {
		_ = json.NewEncoder(&buf).Encode(errorBody{Error: msg, Key: key})
		h.Set("Content-Type", "application/json; charset=utf-8")
	} else {
		page := views.Page(http.StatusText(status), "", views.ErrorPage(status, msg, key))
		if rerr := page.Render(r.Context(), &buf); rerr != nil {
			// The error page is static apart from escaped text; failing to
			// render it is a bug, so fall back to plain text.
			a.log.Error("render error page", "err", rerr)
			buf.Reset()
			buf.WriteString(msg + "\n")
			h.Set("Content-Type", "text/plain; charset=utf-8")
		} else {
			h.Set("Content-Type", "text/html; charset=utf-8")
		}
	}
	w.WriteHeader(status)
	if r.Method != http.MethodHead {
		_, _ = w.Write(buf.Bytes())
	}
}

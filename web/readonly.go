package web

import "net/http"

// readOnly refuses, with 403 through fail, every request that could change
// state, for a copy of the app shared read-only on an intranet.
func readOnly(fail func(http.ResponseWriter, *http.Request, error)) func(http.Handler) http.Handler {
	return func(next http.Handler) http.Handler {
		return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
			switch r.Method {
			case http.MethodGet, http.MethodHead, http.MethodOptions:
				next.ServeHTTP(w, r)
			default:
				fail(w, r, &StatusError{Status: http.StatusForbidden,
					Msg: "this server is read-only; " + r.Method + " is refused"})
			}
		})
	}
}

package web

import "net/http"

// contentSecurityPolicy allows only the app's own files: no inline script or
// style (the pages use none; readout.js styles through the CSSOM, which the
// policy does not restrict), images from the app or data: URLs, no plugins,
// no framing, forms posting back to the app only.
const contentSecurityPolicy = "default-src 'self'; script-src 'self'; style-src 'self'; " +
	"img-src 'self' data:; object-src 'none'; base-uri 'none'; form-action 'self'; frame-ancestors 'none'"

// securityHeaders sets the headers that confine what a page may load and
// who may frame it, on every response including errors.
func securityHeaders(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		h := w.Header()
		h.Set("Content-Security-Policy", contentSecurityPolicy)
		h.Set("X-Content-Type-Options", "nosniff")
		// same-origin: links shared on an intranet do not leak scenario
		// queries to other sites, while the app's own navigation keeps them.
		h.Set("Referrer-Policy", "same-origin")
		h.Set("X-Frame-Options", "DENY")
		h.Set("Cross-Origin-Opener-Policy", "same-origin")
		next.ServeHTTP(w, r)
	})
}

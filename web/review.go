package web

import (
	"errors"
	"fmt"
	"io"
	"mime"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"time"

	"github.com/go-chi/chi/v5"

	"ringbox/internal/scenario"
	"ringbox/internal/store"
	"ringbox/web/views"
)

// Saved design reviews: a titled comparison with notes, kept in the
// embedded database (internal/store, through ReviewStore).
//
//	POST /reviews                  form title, notes, repeated s → 303 /reviews/{id}
//	GET  /reviews[?q=…]            the list, newest first, searched by title
//	GET  /reviews/{id}             the comparison with its title and notes
//	GET  /reviews/{id}/export.json the review as a JSON document (attachment)
//	POST /reviews/import           a document (file upload or pasted) → 303
//	GET  /api/v1/reviews/{id}      {"id","title","notes","scenarios","created"}
//
// Cross-site posts are refused (sameOrigin); a read-only instance refuses
// every POST in the read-only middleware before it gets here.

// Request body bounds. A review form holds at most 200 characters of title
// (800 bytes of UTF-8), 20 kB of notes and 8 scenarios of 4 kB; URL-encoding
// can triple each byte, so 256 KiB admits every valid review and nothing
// much larger. An import carries a document of at most store.MaxDocument,
// plus the multipart framing.
const (
	maxReviewForm = 256 << 10
	maxImportBody = store.MaxDocument + 64<<10
)

// listLimit is how many reviews the list shows.
const listLimit = 200

func init() {
	// Saving validates the scenarios but counts nothing: outside the limit.
	addStoreRoutes(func(a *App, r chi.Router) {
		r.With(sameOrigin(a.writeError)).Post("/reviews", a.handle(a.createReview))
		r.With(sameOrigin(a.writeError)).Post("/reviews/import", a.handle(a.importReview))
	})
	addRoutes(func(a *App, r chi.Router) {
		r.Get("/reviews", a.handle(a.reviewList))
		r.Get("/reviews/{id}", a.handle(a.reviewPage))
		r.Get("/reviews/{id}/export.json", a.handle(a.exportReview))
		r.Get("/api/v1/reviews/{id}", a.handle(a.reviewAPI))
	})
}

// sameOrigin refuses (403) a state-changing request sent from another
// site: the forms here are same-origin POSTs, and a cookie-less app has no
// session to hang a CSRF token on, so the browser's own statement of where
// the request came from is the check. Modern browsers send Origin on every
// POST (and Sec-Fetch-Site); older ones send Referer, unless a policy
// strips it, and this app's own policy (same-origin) keeps it for its own
// pages. A request with none of the three headers is not from a browser
// form (curl, scripts) and is let through: a cross-site attacker cannot
// make a victim's browser omit them all.
func sameOrigin(fail func(http.ResponseWriter, *http.Request, error)) func(http.Handler) http.Handler {
	return func(next http.Handler) http.Handler {
		return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
			if reason := crossSite(r); reason != "" {
				fail(w, r, &StatusError{Status: http.StatusForbidden,
					Msg: "cross-site request refused (" + reason + "); submit the form from this site's own page"})
				return
			}
			next.ServeHTTP(w, r)
		})
	}
}

// crossSite says why r looks cross-site, or "" when it does not.
func crossSite(r *http.Request) string {
	switch r.Header.Get("Sec-Fetch-Site") {
	case "", "same-origin", "none":
	default:
		return "Sec-Fetch-Site " + r.Header.Get("Sec-Fetch-Site")
	}
	if o := r.Header.Get("Origin"); o != "" {
		u, err := url.Parse(o)
		if o == "null" || err != nil || !strings.EqualFold(u.Host, r.Host) {
			return "Origin " + o
		}
		return ""
	}
	if ref := r.Header.Get("Referer"); ref != "" {
		u, err := url.Parse(ref)
		if err != nil || !strings.EqualFold(u.Host, r.Host) {
			return "Referer from another host"
		}
	}
	return ""
}

// reviews returns the store, or a 503 while none is wired.
func (a *App) reviews() (ReviewStore, error) {
	if a.Reviews == nil {
		return nil, &StatusError{Status: http.StatusServiceUnavailable, Msg: "saved reviews are not available: no review database is open"}
	}
	return a.Reviews, nil
}

// createReview answers POST /reviews. Every scenario is checked with
// scenario.Parse before anything is written; a bad one is a 400 naming it.
func (a *App) createReview(w http.ResponseWriter, r *http.Request) error {
	st, err := a.reviews()
	if err != nil {
		return err
	}
	r.Body = http.MaxBytesReader(w, r.Body, maxReviewForm)
	if err := r.ParseForm(); err != nil {
		return formError(err)
	}
	rv := store.Review{Title: r.PostForm.Get("title"), Notes: r.PostForm.Get("notes")}
	for _, s := range r.PostForm[compareParam] {
		if strings.TrimSpace(s) != "" {
			rv.Scenarios = append(rv.Scenarios, s)
		}
	}
	// The store's own checks first (title, notes, count), so the reason
	// names the field the user typed in; then the physics of each scenario.
	if err := rv.Validate(); err != nil {
		return storeError(err)
	}
	ss, err := parseComparison(rv.Scenarios)
	if err != nil {
		return err
	}
	// Keep the canonical queries: they are what the page linked, and
	// they survive a change of the form's defaults unchanged.
	rv.Scenarios = canonicals(ss)
	created, err := st.Create(r.Context(), rv)
	if err != nil {
		return storeError(err)
	}
	return seeOther(w, r, reviewPath(created.ID))
}

// importReview answers POST /reviews/import: a document from a file upload
// (field file) or pasted into the form (field document).
func (a *App) importReview(w http.ResponseWriter, r *http.Request) error {
	st, err := a.reviews()
	if err != nil {
		return err
	}
	r.Body = http.MaxBytesReader(w, r.Body, maxImportBody)
	doc, err := importDocument(r)
	if err != nil {
		return err
	}
	rv, err := store.ParseDocument(doc)
	if err != nil {
		return storeError(err)
	}
	if _, err := parseComparison(rv.Scenarios); err != nil {
		return err
	}
	created, err := st.Import(r.Context(), doc)
	if err != nil {
		return storeError(err)
	}
	return seeOther(w, r, reviewPath(created.ID))
}

// importDocument reads the document of an import request: the uploaded
// file if one was sent, else the pasted text.
func importDocument(r *http.Request) ([]byte, error) {
	ct, _, _ := mime.ParseMediaType(r.Header.Get("Content-Type"))
	if ct == "multipart/form-data" {
		mr, err := r.MultipartReader()
		if err != nil {
			return nil, formError(err)
		}
		var pasted []byte
		for {
			p, err := mr.NextPart()
			if errors.Is(err, io.EOF) {
				break
			}
			if err != nil {
				return nil, formError(err)
			}
			b, err := io.ReadAll(io.LimitReader(p, store.MaxDocument+1))
			if err != nil {
				return nil, formError(err)
			}
			switch p.FormName() {
			case "file":
				if p.FileName() != "" && len(b) > 0 {
					return b, nil
				}
			case "document":
				pasted = b
			}
		}
		if len(strings.TrimSpace(string(pasted))) > 0 {
			return pasted, nil
		}
		return nil, scenario.Errorf("document", "choose a file or paste an exported review document")
	}
	if err := r.ParseForm(); err != nil {
		return nil, formError(err)
	}
	doc := r.PostForm.Get("document")
	if strings.TrimSpace(doc) == "" {
		return nil, scenario.Errorf("document", "choose a file or paste an exported review document")
	}
	return []byte(doc), nil
}

// formError turns a failure to read a form into a user error: too large
// (413) or malformed (400).
func formError(err error) error {
	var mbe *http.MaxBytesError
	if errors.As(err, &mbe) {
		return &StatusError{Status: http.StatusRequestEntityTooLarge,
			Msg: fmt.Sprintf("the form is larger than %d bytes", mbe.Limit)}
	}
	return &StatusError{Status: http.StatusBadRequest, Msg: "the form could not be read"}
}

// storeError maps the store's errors to responses: bad input is a 400
// naming the field, an unknown id a 404, a read-only database a 403.
func storeError(err error) error {
	var fe *store.FieldError
	switch {
	case errors.As(err, &fe):
		msg := fe.Msg
		if fe.Index >= 0 {
			msg = fmt.Sprintf("scenario %d: %s", fe.Index+1, fe.Msg)
		}
		return scenario.Errorf(fe.Field, "%s", msg)
	case errors.Is(err, store.ErrNotFound):
		return &StatusError{Status: http.StatusNotFound, Msg: "no saved review with that number"}
	case errors.Is(err, store.ErrReadOnly):
		return &StatusError{Status: http.StatusForbidden, Msg: "the review database is read-only"}
	}
	return err
}

// seeOther answers 303 to path, the Post/Redirect/Get ending of a form.
func seeOther(w http.ResponseWriter, r *http.Request, path string) error {
	w.Header().Set("Location", path)
	writeBody(w, r, http.StatusSeeOther, "text/plain; charset=utf-8", []byte("see "+path+"\n"))
	return nil
}

func reviewPath(id int64) string { return "/reviews/" + strconv.FormatInt(id, 10) }

// reviewID reads the {id} of the route; anything but a positive integer
// names no review.
func reviewID(r *http.Request) (int64, error) {
	id, err := strconv.ParseInt(chi.URLParam(r, "id"), 10, 64)
	if err != nil || id <= 0 {
		return 0, &StatusError{Status: http.StatusNotFound, Msg: "no saved review " + strconv.Quote(chi.URLParam(r, "id"))}
	}
	return id, nil
}

// getReview loads the review of the route.
func (a *App) getReview(r *http.Request) (store.Review, error) {
	st, err := a.reviews()
	if err != nil {
		return store.Review{}, err
	}
	id, err := reviewID(r)
	if err != nil {
		return store.Review{}, err
	}
	rv, err := st.Get(r.Context(), id)
	if err != nil {
		return store.Review{}, storeError(err)
	}
	return rv, nil
}

// reviewList answers GET /reviews.
func (a *App) reviewList(w http.ResponseWriter, r *http.Request) error {
	st, err := a.reviews()
	if err != nil {
		return err
	}
	q := r.URL.Query().Get("q")
	if len(q) > 4*store.MaxTitle {
		return scenario.Errorf("q", "a title search is at most %d characters", store.MaxTitle)
	}
	list, err := st.List(r.Context(), q, listLimit)
	if err != nil {
		return err
	}
	v := views.ReviewList{Query: q, Limit: listLimit, ReadOnly: a.cfg.ReadOnly}
	for _, rv := range list {
		v.Reviews = append(v.Reviews, views.ReviewSummary{
			URL:       reviewPath(rv.ID),
			ID:        strconv.FormatInt(rv.ID, 10),
			Title:     rv.Title,
			Created:   rv.Created.Format(time.DateTime) + " UTC",
			CreatedAt: rv.Created.Format(time.RFC3339),
			Scenarios: len(rv.Scenarios),
		})
	}
	return render(w, r, http.StatusOK, views.Page("Reviews", views.NavReviews, views.ReviewListPage(v)))
}

// reviewPage answers GET /reviews/{id}: the saved comparison, computed
// again (results are deterministic, and the engines may have improved).
func (a *App) reviewPage(w http.ResponseWriter, r *http.Request) error {
	rv, err := a.getReview(r)
	if err != nil {
		return err
	}
	v := views.ReviewView{
		ID:         strconv.FormatInt(rv.ID, 10),
		Title:      rv.Title,
		Notes:      strings.ReplaceAll(rv.Notes, "\r\n", "\n"),
		Created:    rv.Created.Format(time.DateTime) + " UTC",
		CreatedAt:  rv.Created.Format(time.RFC3339),
		ExportURL:  reviewPath(rv.ID) + "/export.json",
		APIURL:     "/api/v1/reviews/" + strconv.FormatInt(rv.ID, 10),
		CompareURL: compareURL(rv.Scenarios),
	}
	// A stored scenario that no longer parses (an import from another
	// build) is shown as the reason, with the review's text intact.
	ss, err := parseComparison(rv.Scenarios)
	if err == nil {
		v.Comparison, err = a.comparison(r.Context(), ss)
	}
	if err != nil {
		status, msg, key := classify(r, err)
		if status >= 500 {
			return err
		}
		if key != "" {
			msg = key + ": " + msg
		}
		v.Problem = msg
	}
	return render(w, r, http.StatusOK, views.Page(rv.Title, views.NavReviews, views.ReviewPage(v)))
}

// exportReview answers GET /reviews/{id}/export.json as a download.
func (a *App) exportReview(w http.ResponseWriter, r *http.Request) error {
	st, err := a.reviews()
	if err != nil {
		return err
	}
	id, err := reviewID(r)
	if err != nil {
		return err
	}
	doc, err := st.Export(r.Context(), id)
	if err != nil {
		return storeError(err)
	}
	w.Header().Set("Content-Disposition", fmt.Sprintf(`attachment; filename="ringbox-review-%d.json"`, id))
	w.Header().Set("Cache-Control", "no-store")
	writeBody(w, r, http.StatusOK, "application/json; charset=utf-8", doc)
	return nil
}

// reviewJSON is the API's view of a review (DESIGN: interface contract).
type reviewJSON struct {
	ID        int64     `json:"id"`
	Title     string    `json:"title"`
	Notes     string    `json:"notes"`
	Scenarios []string  `json:"scenarios"`
	Created   time.Time `json:"created"`
}

// reviewAPI answers GET /api/v1/reviews/{id}.
func (a *App) reviewAPI(w http.ResponseWriter, r *http.Request) error {
	rv, err := a.getReview(r)
	if err != nil {
		return err
	}
	w.Header().Set("Cache-Control", "no-store")
	return writeJSON(w, r, http.StatusOK, reviewJSON{ID: rv.ID, Title: rv.Title, Notes: rv.Notes,
		Scenarios: rv.Scenarios, Created: rv.Created})
}

package web

import (
	"bytes"
	"context"
	"encoding/json"
	"mime/multipart"
	"net/http"
	"net/http/httptest"
	"net/url"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"golang.org/x/net/html"

	"ringbox/internal/store"
)

// Scenarios of our own, small enough to count in milliseconds.
const (
	scenWire = "material=gaas&dims=2&lx=8nm&ly=8nm&bx=box&by=box"
	scenRing = "material=gaas&dims=2&lx=8nm&ly=8nm&bx=ring&by=ring"
	scenSi   = "material=si&dims=1&lx=20nm"
)

// newReviewApp builds an App with a database of its own under t.TempDir().
func newReviewApp(t *testing.T, cfg Config) *App {
	t.Helper()
	cfg.DBPath = filepath.Join(t.TempDir(), "reviews.db")
	a, _ := newTestApp(t, cfg)
	if a.Reviews == nil {
		t.Fatal("New opened no review store")
	}
	return a
}

// newHTTPServer serves a over loopback HTTP and returns its base URL.
func newHTTPServer(t *testing.T, a *App) string {
	t.Helper()
	srv := httptest.NewServer(a.Handler())
	t.Cleanup(srv.Close)
	return srv.URL
}

// postForm sends a form POST as a same-origin browser form would.
func postForm(h http.Handler, target string, form url.Values) *httptest.ResponseRecorder {
	req := httptest.NewRequest(http.MethodPost, target, strings.NewReader(form.Encode()))
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	req.Header.Set("Origin", "http://"+req.Host)
	rec := httptest.NewRecorder()
	h.ServeHTTP(rec, req)
	return rec
}

// saveReview posts a review and returns its path from the 303's Location.
func saveReview(t *testing.T, h http.Handler, form url.Values) string {
	t.Helper()
	rec := postForm(h, "/reviews", form)
	if rec.Code != http.StatusSeeOther {
		t.Fatalf("POST /reviews = %d, want 303; body:\n%s", rec.Code, rec.Body)
	}
	loc := rec.Header().Get("Location")
	if _, err := strconv.ParseInt(strings.TrimPrefix(loc, "/reviews/"), 10, 64); err != nil || !strings.HasPrefix(loc, "/reviews/") {
		t.Fatalf("Location = %q, want /reviews/{id}", loc)
	}
	return loc
}

// stored counts the reviews in a's database.
func stored(t *testing.T, a *App) int {
	t.Helper()
	list, err := a.Reviews.List(context.Background(), "", store.MaxListLimit)
	if err != nil {
		t.Fatal(err)
	}
	return len(list)
}

func TestReviewEscapesUserText(t *testing.T) {
	a := newReviewApp(t, Config{})
	h := a.Handler()
	title := `<script>alert(1)</script>`
	notes := "First <b>bold</b> line & more\nsecond line <img src=x onerror=alert(2)>\n\nnew paragraph"
	loc := saveReview(t, h, url.Values{"title": {title}, "notes": {notes}, "s": {scenWire, scenRing}})

	for _, path := range []string{loc, "/reviews", "/reviews?q=" + url.QueryEscape("<script>")} {
		t.Run(path, func(t *testing.T) {
			rec := do(h, http.MethodGet, path)
			if rec.Code != http.StatusOK {
				t.Fatalf("GET = %d:\n%s", rec.Code, rec.Body)
			}
			doc := parseHTML(t, rec.Body)
			for _, s := range findAll(doc, byTag("script")) {
				if attr(s, "src") == "" || text(s) != "" {
					t.Errorf("an inline script element reached the page: %q", text(s))
				}
			}
			if imgs := findAll(doc, func(n *html.Node) bool { return n.Data == "img" && attr(n, "onerror") != "" }); len(imgs) > 0 {
				t.Error("the notes' img element reached the page")
			}
			if b := findAll(doc, byTag("b")); len(b) > 0 {
				t.Error("the notes' b element reached the page")
			}
			// The title is shown as the text the user typed.
			var found bool
			for _, n := range findAll(doc, func(n *html.Node) bool { return n.Data == "h1" || n.Data == "a" || n.Data == "title" }) {
				if strings.Contains(text(n), title) {
					found = true
				}
			}
			if !found {
				t.Errorf("title %q not shown as text", title)
			}
		})
	}

	doc := parseHTML(t, do(h, http.MethodGet, loc).Body)
	sect := findAll(doc, byClass("review-notes"))
	if len(sect) != 1 {
		t.Fatalf("%d notes sections, want 1", len(sect))
	}
	paras := findAll(sect[0], byTag("p"))
	if len(paras) != 2 {
		t.Fatalf("%d paragraphs of notes, want 2", len(paras))
	}
	if got, want := text(paras[0]), "First <b>bold</b> line & more second line <img src=x onerror=alert(2)>"; got != want {
		t.Errorf("notes = %q, want %q", got, want)
	}
	if br := findAll(paras[0], byTag("br")); len(br) != 1 {
		t.Errorf("%d line breaks in the first paragraph, want 1", len(br))
	}
}

func TestReviewRefusesBadInput(t *testing.T) {
	nine := slices.Repeat([]string{scenWire}, 9)
	tests := []struct {
		name    string
		form    url.Values
		key     string // the field the error names
		contain string
	}{
		{"nine scenarios", url.Values{"title": {"t"}, "s": nine}, "s", "8"},
		{"long title", url.Values{"title": {strings.Repeat("é", store.MaxTitle+1)}, "s": {scenWire}}, "title", "200"},
		{"empty title", url.Values{"title": {"  "}, "s": {scenWire}}, "title", "empty"},
		{"no scenario", url.Values{"title": {"t"}}, "s", "scenario"},
		{"bad scenario", url.Values{"title": {"t"}, "s": {scenWire, "material=gaas&lx=-3nm"}}, "s", "scenario 2, key lx"},
		{"unknown key", url.Values{"title": {"t"}, "s": {"material=gaas&colour=red"}}, "s", "scenario 1, key colour"},
		{"long notes", url.Values{"title": {"t"}, "notes": {strings.Repeat("n", store.MaxNotes+1)}, "s": {scenWire}}, "notes", "20000"},
	}
	a := newReviewApp(t, Config{})
	h := a.Handler()
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			rec := postForm(h, "/reviews", tt.form)
			if rec.Code != http.StatusBadRequest {
				t.Fatalf("status %d, want 400:\n%s", rec.Code, rec.Body)
			}
			doc := parseHTML(t, rec.Body)
			callout := findAll(doc, byClass("error"))
			if len(callout) == 0 {
				t.Fatal("no error callout")
			}
			msg := text(callout[len(callout)-1])
			if codes := findAll(callout[len(callout)-1], byTag("code")); len(codes) != 1 || text(codes[0]) != tt.key {
				t.Errorf("error %q does not name field %q", msg, tt.key)
			}
			if !strings.Contains(msg, tt.contain) {
				t.Errorf("error %q lacks %q", msg, tt.contain)
			}
			if n := stored(t, a); n != 0 {
				t.Errorf("%d reviews written by a refused POST", n)
			}
		})
	}
	t.Run("oversized body", func(t *testing.T) {
		rec := postForm(h, "/reviews", url.Values{"title": {"t"}, "notes": {strings.Repeat("x", maxReviewForm)}, "s": {scenWire}})
		if rec.Code != http.StatusRequestEntityTooLarge {
			t.Errorf("status %d, want 413", rec.Code)
		}
	})
}

func TestReviewCrossSitePost(t *testing.T) {
	a := newReviewApp(t, Config{})
	h := a.Handler()
	form := url.Values{"title": {"t"}, "s": {scenWire}}.Encode()
	tests := []struct {
		name   string
		header map[string]string
		want   int
	}{
		{"same origin", map[string]string{"Origin": "http://example.com"}, http.StatusSeeOther},
		{"other origin", map[string]string{"Origin": "http://attacker.test"}, http.StatusForbidden},
		{"null origin", map[string]string{"Origin": "null"}, http.StatusForbidden},
		{"cross-site fetch", map[string]string{"Sec-Fetch-Site": "cross-site"}, http.StatusForbidden},
		{"other referer", map[string]string{"Referer": "http://attacker.test/page"}, http.StatusForbidden},
		{"same referer", map[string]string{"Referer": "http://example.com/compare?s=x"}, http.StatusSeeOther},
		{"no browser headers", nil, http.StatusSeeOther},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			before := stored(t, a)
			req := httptest.NewRequest(http.MethodPost, "http://example.com/reviews", strings.NewReader(form))
			req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
			for k, v := range tt.header {
				req.Header.Set(k, v)
			}
			rec := httptest.NewRecorder()
			h.ServeHTTP(rec, req)
			if rec.Code != tt.want {
				t.Fatalf("status %d, want %d", rec.Code, tt.want)
			}
			if wrote := stored(t, a) - before; (tt.want == http.StatusSeeOther) != (wrote == 1) {
				t.Errorf("%d reviews written", wrote)
			}
		})
	}
}

func TestReviewReadOnly(t *testing.T) {
	// A database with one review, then served read-only.
	dir := t.TempDir()
	db := filepath.Join(dir, "r.db")
	st, err := store.Open(context.Background(), db, store.Options{})
	if err != nil {
		t.Fatal(err)
	}
	rv, err := st.Create(context.Background(), store.Review{Title: "kept", Scenarios: []string{scenWire}})
	if err != nil {
		t.Fatal(err)
	}
	st.Close()
	a, _ := newTestApp(t, Config{DBPath: db, ReadOnly: true})
	h := a.Handler()

	for _, tt := range []struct{ path, form string }{
		{"/reviews", url.Values{"title": {"t"}, "s": {scenWire}}.Encode()},
		{"/reviews/import", "document=%7B%7D"},
	} {
		t.Run("POST "+tt.path, func(t *testing.T) {
			req := httptest.NewRequest(http.MethodPost, tt.path, strings.NewReader(tt.form))
			req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
			rec := httptest.NewRecorder()
			h.ServeHTTP(rec, req)
			if rec.Code != http.StatusForbidden {
				t.Fatalf("status %d, want 403", rec.Code)
			}
			if msg := text(parseHTML(t, rec.Body)); !strings.Contains(msg, "read-only") {
				t.Errorf("403 page does not say the instance is read-only: %q", msg)
			}
		})
	}
	if n := stored(t, a); n != 1 {
		t.Errorf("%d reviews after refused POSTs, want 1", n)
	}
	for _, path := range []string{"/reviews", reviewPath(rv.ID), "/api/v1/reviews/" + strconv.FormatInt(rv.ID, 10),
		reviewPath(rv.ID) + "/export.json", "/compare?s=" + url.QueryEscape(scenWire)} {
		t.Run("GET "+path, func(t *testing.T) {
			rec := do(h, http.MethodGet, path)
			if rec.Code != http.StatusOK {
				t.Fatalf("status %d, want 200:\n%s", rec.Code, rec.Body)
			}
			if strings.HasPrefix(rec.Header().Get("Content-Type"), "text/html") {
				if forms := findAll(parseHTML(t, rec.Body), func(n *html.Node) bool {
					return n.Data == "form" && strings.EqualFold(attr(n, "method"), "post")
				}); len(forms) > 0 {
					t.Errorf("%d POST forms shown on a read-only instance", len(forms))
				}
			}
		})
	}
}

func TestReviewAPIAndNotFound(t *testing.T) {
	a := newReviewApp(t, Config{})
	h := a.Handler()
	loc := saveReview(t, h, url.Values{"title": {"Wire vs ring"}, "notes": {"a\nb"}, "s": {scenWire, scenRing}})
	id := strings.TrimPrefix(loc, "/reviews/")

	rec := do(h, http.MethodGet, "/api/v1/reviews/"+id)
	if rec.Code != http.StatusOK || !strings.HasPrefix(rec.Header().Get("Content-Type"), "application/json") {
		t.Fatalf("API = %d %s", rec.Code, rec.Header().Get("Content-Type"))
	}
	var raw map[string]json.RawMessage
	if err := json.Unmarshal(rec.Body.Bytes(), &raw); err != nil {
		t.Fatal(err)
	}
	keys := slices.Sorted(func(yield func(string) bool) {
		for k := range raw {
			if !yield(k) {
				return
			}
		}
	})
	if want := []string{"created", "id", "notes", "scenarios", "title"}; !slices.Equal(keys, want) {
		t.Errorf("API keys %q, want %q", keys, want)
	}
	var got reviewJSON
	if err := json.Unmarshal(rec.Body.Bytes(), &got); err != nil {
		t.Fatal(err)
	}
	if strconv.FormatInt(got.ID, 10) != id || got.Title != "Wire vs ring" || got.Notes != "a\nb" || len(got.Scenarios) != 2 || got.Created.IsZero() {
		t.Errorf("API review = %+v", got)
	}
	// Saved scenarios are the canonical queries, which parse back.
	for i, q := range got.Scenarios {
		if _, err := parseOne(i+1, q); err != nil {
			t.Errorf("stored scenario %q: %v", q, err)
		}
	}

	for _, tt := range []struct {
		path string
		want int
	}{
		{"/reviews/999", http.StatusNotFound},
		{"/reviews/abc", http.StatusNotFound},
		{"/reviews/-1", http.StatusNotFound},
		{"/api/v1/reviews/999", http.StatusNotFound},
		{"/reviews/999/export.json", http.StatusNotFound},
	} {
		t.Run(tt.path, func(t *testing.T) {
			rec := do(h, http.MethodGet, tt.path)
			if rec.Code != tt.want {
				t.Errorf("status %d, want %d", rec.Code, tt.want)
			}
			if strings.HasPrefix(tt.path, "/api/") {
				var body errorBody
				if err := json.Unmarshal(rec.Body.Bytes(), &body); err != nil || body.Error == "" {
					t.Errorf("API error body %q", rec.Body)
				}
			}
		})
	}
}

// multipartImport builds an import request with doc as an uploaded file.
func multipartImport(t *testing.T, doc []byte) *http.Request {
	t.Helper()
	var body bytes.Buffer
	mw := multipart.NewWriter(&body)
	fw, err := mw.CreateFormFile("file", "review.json")
	if err != nil {
		t.Fatal(err)
	}
	_, _ = fw.Write(doc)
	_ = mw.WriteField("document", "")
	if err := mw.Close(); err != nil {
		t.Fatal(err)
	}
	req := httptest.NewRequest(http.MethodPost, "/reviews/import", &body)
	req.Header.Set("Content-Type", mw.FormDataContentType())
	req.Header.Set("Origin", "http://"+req.Host)
	return req
}

func TestReviewExportImportRoundTrip(t *testing.T) {
	a := newReviewApp(t, Config{})
	h := a.Handler()
	loc := saveReview(t, h, url.Values{"title": {"Round trip ✓"}, "notes": {"line 1\r\nline 2"}, "s": {scenWire, scenSi}})

	exp := do(h, http.MethodGet, loc+"/export.json")
	if exp.Code != http.StatusOK {
		t.Fatalf("export = %d", exp.Code)
	}
	if cd := exp.Header().Get("Content-Disposition"); !strings.HasPrefix(cd, "attachment;") {
		t.Errorf("Content-Disposition %q, want an attachment", cd)
	}
	doc := exp.Body.Bytes()

	apiOf := func(path string) reviewJSON {
		t.Helper()
		rec := do(h, http.MethodGet, "/api/v1"+path)
		var r reviewJSON
		if err := json.Unmarshal(rec.Body.Bytes(), &r); err != nil {
			t.Fatalf("%s: %v", path, err)
		}
		return r
	}
	orig := apiOf(loc)

	check := func(t *testing.T, rec *httptest.ResponseRecorder) {
		t.Helper()
		if rec.Code != http.StatusSeeOther {
			t.Fatalf("import = %d:\n%s", rec.Code, rec.Body)
		}
		newLoc := rec.Header().Get("Location")
		if newLoc == loc {
			t.Fatal("import reused the original id")
		}
		got := apiOf(newLoc)
		if got.Title != orig.Title || got.Notes != orig.Notes || !slices.Equal(got.Scenarios, orig.Scenarios) || !got.Created.Equal(orig.Created) {
			t.Errorf("imported %+v, want %+v", got, orig)
		}
	}
	t.Run("file upload", func(t *testing.T) {
		rec := httptest.NewRecorder()
		h.ServeHTTP(rec, multipartImport(t, doc))
		check(t, rec)
	})
	t.Run("pasted", func(t *testing.T) {
		check(t, postForm(h, "/reviews/import", url.Values{"document": {string(doc)}}))
	})

	before := stored(t, a)
	badScenario := strings.Replace(string(doc), "material=", "colour=red&material=", 1)
	for _, tt := range []struct{ name, doc, key string }{
		{"not JSON", "{", "document"},
		{"other format", `{"format":"x","version":1}`, "format"},
		{"bad scenario", badScenario, "s"},
		{"empty", "", "document"},
	} {
		t.Run(tt.name, func(t *testing.T) {
			rec := postForm(h, "/reviews/import", url.Values{"document": {tt.doc}})
			if rec.Code != http.StatusBadRequest {
				t.Fatalf("status %d, want 400", rec.Code)
			}
			codes := findAll(parseHTML(t, rec.Body), byTag("code"))
			if len(codes) == 0 || text(codes[0]) != tt.key {
				t.Errorf("error does not name %q", tt.key)
			}
		})
	}
	if n := stored(t, a); n != before {
		t.Errorf("bad imports wrote %d reviews", n-before)
	}
}

func TestReviewListSearch(t *testing.T) {
	a := newReviewApp(t, Config{})
	h := a.Handler()
	for _, title := range []string{"Nanowire A", "Quantum well", "nanowire B"} {
		saveReview(t, h, url.Values{"title": {title}, "s": {scenSi}})
	}
	titles := func(path string) []string {
		doc := parseHTML(t, do(h, http.MethodGet, path).Body)
		var out []string
		for _, n := range findAll(doc, byClass("review-link")) {
			out = append(out, text(n))
		}
		return out
	}
	if got, want := titles("/reviews"), []string{"nanowire B", "Quantum well", "Nanowire A"}; !slices.Equal(got, want) {
		t.Errorf("list = %q, want newest first %q", got, want)
	}
	if got, want := titles("/reviews?q=WIRE"), []string{"nanowire B", "Nanowire A"}; !slices.Equal(got, want) {
		t.Errorf("search = %q, want %q", got, want)
	}
	if got := titles("/reviews?q=%25"); len(got) != 0 {
		t.Errorf("search for %% = %q, want none", got)
	}
}

// TestReviewWithoutStore: an App whose store is not wired answers 503.
func TestReviewWithoutStore(t *testing.T) {
	a := newReviewApp(t, Config{})
	st := a.Reviews
	a.Reviews = nil
	defer func() { a.Reviews = st }()
	if rec := do(a.Handler(), http.MethodGet, "/reviews"); rec.Code != http.StatusServiceUnavailable {
		t.Errorf("status %d, want 503", rec.Code)
	}
}

func TestNewFailsOnBadDB(t *testing.T) {
	dir := t.TempDir() // a directory is not a database file
	_, err := New(Config{DBPath: dir, Logger: nil})
	if err == nil || !strings.Contains(err.Error(), dir) {
		t.Errorf("New with DBPath a directory: %v, want an error naming it", err)
	}
}

// BenchmarkCreateReview is one POST /reviews through the whole stack:
// form parsing, scenario validation and a durable (fsynced) insert.
func BenchmarkCreateReview(b *testing.B) {
	log, _ := testLogger()
	a, err := New(Config{DBPath: filepath.Join(b.TempDir(), "b.db"), Logger: log})
	if err != nil {
		b.Fatal(err)
	}
	defer a.Close()
	h := a.Handler()
	form := url.Values{"title": {"bench"}, "notes": {"n"}, "s": {scenWire, scenRing, scenSi}}
	b.ReportAllocs()
	for b.Loop() {
		if rec := postForm(h, "/reviews", form); rec.Code != http.StatusSeeOther {
			b.Fatalf("status %d", rec.Code)
		}
	}
}

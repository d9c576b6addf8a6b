package web

import (
	"net/http"
	"net/http/httptest"
	"net/url"
	"strings"
	"sync"
	"testing"

	"github.com/go-chi/chi/v5"
)

// TestSaveWhileSaturated: a server whose counting slots are all taken still
// takes a review (saving counts nothing), while a page that counts gets 503.
func TestSaveWhileSaturated(t *testing.T) {
	release := make(chan struct{})
	var started sync.WaitGroup
	started.Add(1)
	addRoutesForTest(t, func(a *App, r chi.Router) {
		r.Get("/test/hold", func(w http.ResponseWriter, r *http.Request) {
			started.Done()
			<-release
		})
	})
	a, _ := newTestApp(t, Config{DBPath: t.TempDir() + "/r.db", MaxConcurrent: 1})
	srv := httptest.NewServer(a.Handler())
	defer srv.Close()
	done := make(chan struct{})
	go func() {
		defer close(done)
		if resp, err := http.Get(srv.URL + "/test/hold"); err == nil {
			resp.Body.Close()
		}
	}()
	started.Wait()
	defer func() { close(release); <-done }()

	busy, err := http.Get(srv.URL + "/?lx=9nm")
	if err != nil {
		t.Fatal(err)
	}
	busy.Body.Close()
	if busy.StatusCode != http.StatusServiceUnavailable {
		t.Fatalf("a counting page while saturated: %d, want 503", busy.StatusCode)
	}
	form := url.Values{"title": {"held"}, "s": {"material=gaas&lx=9nm"}}
	client := &http.Client{CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}
	resp, err := client.Post(srv.URL+"/reviews", "application/x-www-form-urlencoded", strings.NewReader(form.Encode()))
	if err != nil {
		t.Fatal(err)
	}
	resp.Body.Close()
	if resp.StatusCode != http.StatusSeeOther {
		t.Errorf("save while saturated: status %d, want 303", resp.StatusCode)
	}
}

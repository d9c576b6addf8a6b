package web

import (
	"net/http"
	"net/http/httptest"
	"strconv"
	"sync"
	"testing"
	"time"

	"github.com/go-chi/chi/v5"
)

func TestLimitConcurrency(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	release := make(chan struct{})
	started := make(chan struct{}, 4)
	block := http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		started <- struct{}{}
		<-release
	})
	const n = 2
	h := limitConcurrency(n, 10*time.Millisecond, a.writeError)(block)

	var wg sync.WaitGroup
	for range n {
		wg.Go(func() { do(h, http.MethodGet, "/") })
	}
	for range n {
		<-started
	}

	t.Run("full: 503 with Retry-After", func(t *testing.T) {
		for _, path := range []string{"/", "/api/v1/count"} {
			rec := do(h, http.MethodGet, path)
			if rec.Code != http.StatusServiceUnavailable {
				t.Fatalf("%s: status = %d, want 503", path, rec.Code)
			}
			if s, err := strconv.Atoi(rec.Header().Get("Retry-After")); err != nil || s <= 0 {
				t.Errorf("%s: Retry-After = %q, want a positive number of seconds", path, rec.Header().Get("Retry-After"))
			}
		}
	})

	close(release)
	wg.Wait()

	t.Run("free again: passes", func(t *testing.T) {
		ok := limitConcurrency(n, 0, a.writeError)(http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {}))
		if rec := do(ok, http.MethodGet, "/"); rec.Code != http.StatusOK {
			t.Errorf("status = %d, want 200", rec.Code)
		}
	})
}

// A request that waits a moment gets the slot another request frees.
func TestLimitShortWait(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	hold := make(chan struct{})
	var first sync.Once
	h := limitConcurrency(1, 5*time.Second, a.writeError)(http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		first.Do(func() { <-hold })
	}))
	done := make(chan int)
	go func() { done <- do(h, http.MethodGet, "/").Code }()
	time.Sleep(10 * time.Millisecond) // let the first request take the slot
	second := make(chan int)
	go func() { second <- do(h, http.MethodGet, "/").Code }()
	close(hold)
	if c := <-done; c != http.StatusOK {
		t.Errorf("first: %d", c)
	}
	if c := <-second; c != http.StatusOK {
		t.Errorf("second (waited): %d, want 200", c)
	}
}

// /healthz and /static bypass the limit: they answer while every slot is taken.
func TestLimitBypass(t *testing.T) {
	release := make(chan struct{})
	started := make(chan struct{})
	addRoutesForTest(t, func(a *App, r chi.Router) {
		r.Get("/test/block", a.handle(func(w http.ResponseWriter, r *http.Request) error {
			started <- struct{}{}
			<-release
			return nil
		}))
	})
	a, _ := newTestApp(t, Config{MaxConcurrent: 1})
	srv := httptest.NewServer(a.Handler())
	defer srv.Close()
	go func() {
		if res, err := http.Get(srv.URL + "/test/block"); err == nil {
			res.Body.Close()
		}
	}()
	<-started
	defer close(release)

	for _, tt := range []struct {
		path string
		want int
	}{
		{"/healthz", http.StatusOK},
		{"/static/ringbox.css", http.StatusOK},
		{"/", http.StatusServiceUnavailable},
	} {
		t.Run(tt.path, func(t *testing.T) {
			res, err := http.Get(srv.URL + tt.path)
			if err != nil {
				t.Fatal(err)
			}
			res.Body.Close()
			if res.StatusCode != tt.want {
				t.Errorf("status = %d, want %d", res.StatusCode, tt.want)
			}
		})
	}
}

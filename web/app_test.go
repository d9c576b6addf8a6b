package web

import (
	"context"
	"encoding/json"
	"net"
	"net/http"
	"net/http/httptest"
	"runtime"
	"strings"
	"testing"
	"time"

	"golang.org/x/net/html"
)

func TestConfigDefaults(t *testing.T) {
	c := Config{}.withDefaults()
	if c.Addr != "127.0.0.1:8080" || c.DBPath != "ringbox.db" || c.RequestTimeout != 10*time.Second ||
		c.CacheEntries != 256 || c.MaxConcurrent != 2*runtime.GOMAXPROCS(0)+2 || c.Logger == nil {
		t.Errorf("defaults = %+v", c)
	}
	set := Config{Addr: ":9", MaxConcurrent: 3, RequestTimeout: time.Second, CacheEntries: 5}.withDefaults()
	if set.Addr != ":9" || set.MaxConcurrent != 3 || set.RequestTimeout != time.Second || set.CacheEntries != 5 {
		t.Errorf("explicit values overridden: %+v", set)
	}
}

func TestServerTimeouts(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	s := a.server()
	if s.ReadHeaderTimeout <= 0 || s.ReadTimeout <= 0 || s.IdleTimeout <= 0 || s.MaxHeaderBytes <= 0 {
		t.Errorf("unset limits: %+v", s)
	}
	if s.WriteTimeout <= a.cfg.RequestTimeout {
		t.Errorf("WriteTimeout %v must exceed the request deadline %v, or the 504 is never written", s.WriteTimeout, a.cfg.RequestTimeout)
	}
}

// Run serves, and returns nil soon after its context ends.
func TestRunShutsDown(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	done := make(chan error, 1)
	go func() { done <- a.serve(ctx, ln) }()

	res, err := http.Get("http://" + ln.Addr().String() + "/healthz")
	if err != nil {
		t.Fatal(err)
	}
	res.Body.Close()
	if res.StatusCode != 200 {
		t.Errorf("healthz = %d", res.StatusCode)
	}
	cancel()
	select {
	case err := <-done:
		if err != nil {
			t.Errorf("serve returned %v, want nil", err)
		}
	case <-time.After(shutdownGrace + 2*time.Second):
		t.Fatal("serve did not return after its context ended")
	}
	if _, err := http.Get("http://" + ln.Addr().String() + "/healthz"); err == nil {
		t.Error("server still answers after shutdown")
	}
}

func TestRunReportsListenError(t *testing.T) {
	a, _ := newTestApp(t, Config{Addr: "256.0.0.1:1"})
	if err := a.Run(context.Background()); err == nil {
		t.Error("Run on a bad address returned nil")
	}
}

func TestHealthz(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	rec := do(a.Handler(), http.MethodGet, "/healthz")
	var body map[string]string
	if rec.Code != 200 || json.Unmarshal(rec.Body.Bytes(), &body) != nil || body["status"] != "ok" {
		t.Errorf("healthz = %d %q", rec.Code, rec.Body)
	}
}

func TestStaticFiles(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	// Find the versioned URLs the layout writes.
	doc := parseHTML(t, do(a.Handler(), http.MethodGet, "/").Body)
	var urls []string
	for _, n := range findAll(doc, func(n *html.Node) bool { return n.Data == "link" || n.Data == "script" }) {
		if u := attr(n, "href") + attr(n, "src"); strings.HasPrefix(u, "/static/") {
			urls = append(urls, u)
		}
	}
	if len(urls) != 3 {
		t.Fatalf("layout links %d static files (%v), want 3", len(urls), urls)
	}
	wantType := map[string]string{".css": "text/css", ".js": "text/javascript", ".svg": "image/svg+xml"}
	for _, u := range urls {
		t.Run(u, func(t *testing.T) {
			rec := do(a.Handler(), http.MethodGet, u)
			if rec.Code != 200 || rec.Body.Len() == 0 {
				t.Fatalf("status %d, %d bytes", rec.Code, rec.Body.Len())
			}
			ext := u[strings.LastIndex(u, "."):strings.Index(u, "?")]
			if ct := rec.Header().Get("Content-Type"); !strings.HasPrefix(ct, wantType[ext]) {
				t.Errorf("Content-Type = %q, want %s", ct, wantType[ext])
			}
			if cc := rec.Header().Get("Cache-Control"); !strings.Contains(cc, "immutable") {
				t.Errorf("versioned URL Cache-Control = %q, want immutable", cc)
			}
			// Unversioned: revalidate, and a matching ETag gets 304.
			bare := u[:strings.Index(u, "?")]
			rec = do(a.Handler(), http.MethodGet, bare)
			if cc := rec.Header().Get("Cache-Control"); cc != "no-cache" {
				t.Errorf("bare URL Cache-Control = %q, want no-cache", cc)
			}
			req, _ := http.NewRequest(http.MethodGet, bare, nil)
			req.Header.Set("If-None-Match", rec.Header().Get("ETag"))
			rec2 := recorderFor(a.Handler(), req)
			if rec2.Code != http.StatusNotModified {
				t.Errorf("If-None-Match: status %d, want 304", rec2.Code)
			}
		})
	}
}

func recorderFor(h http.Handler, r *http.Request) *httptest.ResponseRecorder {
	rec := httptest.NewRecorder()
	h.ServeHTTP(rec, r)
	return rec
}

func TestHomePlaceholderNav(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	rec := do(a.Handler(), http.MethodGet, "/")
	if rec.Code != 200 {
		t.Fatalf("status %d", rec.Code)
	}
	doc := parseHTML(t, rec.Body)
	var got []string
	var current []string
	for _, n := range findAll(doc, byTag("a")) {
		if p := n.Parent; p != nil && p.Data == "li" {
			got = append(got, text(n)+" "+attr(n, "href"))
			if attr(n, "aria-current") == "page" {
				current = append(current, text(n))
			}
		}
	}
	want := "Conductor / Sweep /sweep Lattice /lattice Compare /compare Reviews /reviews Examples /examples Method /method Validation /validation"
	if strings.Join(got, " ") != want {
		t.Errorf("nav = %q\nwant  %q", strings.Join(got, " "), want)
	}
	if strings.Join(current, ",") != "Conductor" {
		t.Errorf("current section = %v, want Conductor", current)
	}
	footer := findAll(doc, byTag("footer"))
	if len(footer) != 1 || !strings.Contains(text(footer[0]), "idealised") || !strings.Contains(text(footer[0]), "measurement") {
		t.Error("footer does not state the limits of the models")
	}
	// No inline script or style anywhere: the CSP would refuse them.
	for _, n := range findAll(doc, func(n *html.Node) bool { return true }) {
		if n.Data == "style" || (n.Data == "script" && attr(n, "src") == "") || attr(n, "style") != "" {
			t.Errorf("inline code in <%s>", n.Data)
		}
		for _, at := range n.Attr {
			if strings.HasPrefix(at.Key, "on") {
				t.Errorf("inline handler %s on <%s>", at.Key, n.Data)
			}
		}
	}
}

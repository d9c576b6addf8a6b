package web

import (
	"bytes"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"strings"
	"sync"
	"testing"

	"github.com/go-chi/chi/v5"
	"golang.org/x/net/html"
)

// addRoutesForTest registers f for the Apps built during this test only.
// Tests in package web are not parallel, so pageRoutes is not raced.
func addRoutesForTest(t *testing.T, f func(a *App, r chi.Router)) {
	t.Helper()
	saved := pageRoutes
	pageRoutes = append(pageRoutes[:len(pageRoutes):len(pageRoutes)], f)
	t.Cleanup(func() { pageRoutes = saved })
}

// logBuffer is a concurrency-safe sink for a test's slog output.
type logBuffer struct {
	mu  sync.Mutex
	buf bytes.Buffer
}

func (b *logBuffer) Write(p []byte) (int, error) {
	b.mu.Lock()
	defer b.mu.Unlock()
	return b.buf.Write(p)
}

func (b *logBuffer) String() string {
	b.mu.Lock()
	defer b.mu.Unlock()
	return b.buf.String()
}

// testLogger logs everything at debug level as JSON into the returned buffer.
func testLogger() (*slog.Logger, *logBuffer) {
	lb := &logBuffer{}
	return slog.New(slog.NewJSONHandler(lb, &slog.HandlerOptions{Level: slog.LevelDebug})), lb
}

// newTestApp builds an App with a captured log and cfg's other fields.
func newTestApp(t *testing.T, cfg Config) (*App, *logBuffer) {
	t.Helper()
	log, lb := testLogger()
	cfg.Logger = log
	a, err := New(cfg)
	if err != nil {
		t.Fatalf("New: %v", err)
	}
	t.Cleanup(func() { _ = a.Close() })
	return a, lb
}

// do sends a request to h and returns the recorded response.
func do(h http.Handler, method, target string) *httptest.ResponseRecorder {
	rec := httptest.NewRecorder()
	h.ServeHTTP(rec, httptest.NewRequest(method, target, nil))
	return rec
}

// parseHTML parses a response body as an HTML document.
func parseHTML(t *testing.T, r io.Reader) *html.Node {
	t.Helper()
	doc, err := html.Parse(r)
	if err != nil {
		t.Fatalf("parse HTML: %v", err)
	}
	return doc
}

// findAll returns the elements under n for which match holds, in document order.
func findAll(n *html.Node, match func(*html.Node) bool) []*html.Node {
	var out []*html.Node
	for c := range n.Descendants() {
		if c.Type == html.ElementNode && match(c) {
			out = append(out, c)
		}
	}
	return out
}

// byTag matches elements by tag name.
func byTag(tag string) func(*html.Node) bool {
	return func(n *html.Node) bool { return n.Data == tag }
}

// byClass matches elements whose class list contains class.
func byClass(class string) func(*html.Node) bool {
	return func(n *html.Node) bool {
		return strings.Contains(" "+attr(n, "class")+" ", " "+class+" ")
	}
}

// attr returns n's attribute called key, or "".
func attr(n *html.Node, key string) string {
	for _, a := range n.Attr {
		if a.Key == key {
			return a.Val
		}
	}
	return ""
}

// text returns the concatenated text under n with runs of space collapsed.
func text(n *html.Node) string {
	var b strings.Builder
	for c := range n.Descendants() {
		if c.Type == html.TextNode {
			b.WriteString(c.Data)
		}
	}
	return strings.Join(strings.Fields(b.String()), " ")
}

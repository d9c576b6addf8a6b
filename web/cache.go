package web

import (
	"bytes"
	"container/list"
	"encoding/json"
	"io"
	"net/http"
	"sync"
)

// lru is a fixed-capacity least-recently-used map from canonical string keys
// to values, safe for concurrent use. Get counts as a use.
type lru[V any] struct {
	mu    sync.Mutex
	cap   int
	order *list.List // front = most recently used; elements hold *lruEntry[V]
	items map[string]*list.Element
}

type lruEntry[V any] struct {
	key   string
	value V
}

// newLRU returns an empty cache holding at most capacity entries.
func newLRU[V any](capacity int) *lru[V] {
	if capacity <= 0 {
		panic("web: lru capacity must be positive")
	}
	return &lru[V]{cap: capacity, order: list.New(), items: make(map[string]*list.Element, capacity)}
}

// Get returns the value for key and marks it most recently used.
func (c *lru[V]) Get(key string) (V, bool) {
	c.mu.Lock()
	defer c.mu.Unlock()
	if e, ok := c.items[key]; ok {
		c.order.MoveToFront(e)
		return e.Value.(*lruEntry[V]).value, true
	}
	var zero V
	return zero, false
}

// Add stores value under key as most recently used, evicting the least
// recently used entry when full.
func (c *lru[V]) Add(key string, value V) {
	c.mu.Lock()
	defer c.mu.Unlock()
	if e, ok := c.items[key]; ok {
		e.Value.(*lruEntry[V]).value = value
		c.order.MoveToFront(e)
		return
	}
	c.items[key] = c.order.PushFront(&lruEntry[V]{key: key, value: value})
	if c.order.Len() > c.cap {
		last := c.order.Back()
		c.order.Remove(last)
		delete(c.items, last.Value.(*lruEntry[V]).key)
	}
}

// Len returns the number of entries.
func (c *lru[V]) Len() int {
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.order.Len()
}

// rendered is one cached output: the complete body and its content type.
type rendered struct {
	body        []byte
	contentType string
}

// renderCache keeps rendered outputs (figures, CSV, JSON) and makes
// concurrent misses on one key compute once: a page asks for its three
// figures at the same moment, and two colleagues open the same shared link.
type renderCache struct {
	outputs *resultCache[rendered]
}

func newRenderCache(capacity int) *renderCache {
	return &renderCache{outputs: newResultCache[rendered](capacity)}
}

// get returns the output for key, calling fill on a miss. Concurrent calls
// with one key share a single fill and its result. Errors are not cached,
// so a canceled or failed fill is retried by the next request.
func (c *renderCache) get(key string, fill func() ([]byte, string, error)) ([]byte, string, error) {
	v, err := c.outputs.get(key, func() (rendered, error) {
		body, ct, err := fill()
		return rendered{body: body, contentType: ct}, err
	})
	return v.body, v.contentType, err
}

// cached returns the rendered output for key, computing it with fill on a
// miss. key must be canonical and name the route, for example
// "plot/dos.svg?" + the scenario's canonical query, so equal requests
// share an entry and different outputs never do. The returned bytes are
// shared: do not modify them.
//
// Concurrent misses share one fill, which runs with the context of the
// first caller; if that request is canceled the others get its error too
// and may retry.
func (a *App) cached(key string, fill func() ([]byte, string, error)) ([]byte, string, error) {
	return a.cache.get(key, fill)
}

// serveCached writes the cached output for key (computed by fill on a
// miss) as a 200 response.
func (a *App) serveCached(w http.ResponseWriter, r *http.Request, key string, fill func() ([]byte, string, error)) error {
	body, ct, err := a.cached(key, fill)
	if err != nil {
		return err
	}
	writeBody(w, r, http.StatusOK, ct, body)
	return nil
}

// serveJSON answers with the JSON of the value compute returns (one line,
// as the CLI writes it), cached under key.
func (a *App) serveJSON(w http.ResponseWriter, r *http.Request, key string, compute func() (any, error)) error {
	return a.serveCached(w, r, key, func() ([]byte, string, error) {
		v, err := compute()
		if err != nil {
			return nil, "", err
		}
		b, err := json.Marshal(v)
		if err != nil {
			return nil, "", err
		}
		return append(b, '\n'), "application/json; charset=utf-8", nil
	})
}

// csvWriter is a result that writes itself as CSV.
type csvWriter interface {
	WriteCSV(w io.Writer) error
}

// serveCSV answers with the CSV of the result compute returns, cached
// under key, as a download named filename.
func (a *App) serveCSV(w http.ResponseWriter, r *http.Request, key, filename string, compute func() (csvWriter, error)) error {
	body, ct, err := a.cached(key, func() ([]byte, string, error) {
		res, err := compute()
		if err != nil {
			return nil, "", err
		}
		var buf bytes.Buffer
		if err := res.WriteCSV(&buf); err != nil {
			return nil, "", err
		}
		return buf.Bytes(), "text/csv; charset=utf-8; header=present", nil
	})
	if err != nil {
		return err
	}
	// writeError removes neither header on failure, but an error page with
	// an attachment disposition would be saved instead of shown: set it
	// only once the body is there.
	w.Header().Set("Content-Disposition", `attachment; filename="`+filename+`"`)
	writeBody(w, r, http.StatusOK, ct, body)
	return nil
}

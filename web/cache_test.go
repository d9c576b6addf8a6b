package web

import (
	"errors"
	"fmt"
	"net/http"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"github.com/go-chi/chi/v5"
)

func TestLRUEvictionOrder(t *testing.T) {
	tests := []struct {
		name    string
		ops     []string // "+k" adds k, "?k" reads k
		present []string
		absent  []string
	}{
		{"oldest goes first", []string{"+a", "+b", "+c", "+d"}, []string{"b", "c", "d"}, []string{"a"}},
		{"a read saves an entry", []string{"+a", "+b", "+c", "?a", "+d"}, []string{"a", "c", "d"}, []string{"b"}},
		{"re-adding refreshes", []string{"+a", "+b", "+c", "+a", "+d", "+e"}, []string{"a", "d", "e"}, []string{"b", "c"}},
		{"a miss changes nothing", []string{"+a", "+b", "+c", "?z", "+d"}, []string{"b", "c", "d"}, []string{"a", "z"}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			c := newLRU[int](3)
			for i, op := range tt.ops {
				switch op[0] {
				case '+':
					c.Add(op[1:], i)
				case '?':
					c.Get(op[1:])
				}
			}
			for _, k := range tt.present {
				if _, ok := c.Get(k); !ok {
					t.Errorf("%q evicted, want kept", k)
				}
			}
			for _, k := range tt.absent {
				if _, ok := c.Get(k); ok {
					t.Errorf("%q kept, want evicted", k)
				}
			}
			if c.Len() > 3 {
				t.Errorf("Len = %d > capacity 3", c.Len())
			}
		})
	}
}

// Many goroutines on overlapping keys; run with -race. Each value must be
// the one stored for its key.
func TestLRUConcurrent(t *testing.T) {
	c := newLRU[string](16)
	var wg sync.WaitGroup
	for g := range 8 {
		wg.Go(func() {
			for i := range 2000 {
				k := fmt.Sprint((g*7 + i) % 40)
				if v, ok := c.Get(k); ok && v != "v"+k {
					t.Errorf("key %s holds %q", k, v)
					return
				}
				c.Add(k, "v"+k)
			}
		})
	}
	wg.Wait()
	if c.Len() != 16 {
		t.Errorf("Len = %d, want 16", c.Len())
	}
}

// Concurrent misses on one key run fill once and all get its output.
func TestRenderCacheDedup(t *testing.T) {
	c := newRenderCache(8)
	var calls atomic.Int32
	gate := make(chan struct{})
	fill := func() ([]byte, string, error) {
		calls.Add(1)
		<-gate // hold the first fill until every caller is waiting
		return []byte("<svg/>"), "image/svg+xml", nil
	}
	const callers = 20
	var wg sync.WaitGroup
	var arrived sync.WaitGroup
	arrived.Add(callers)
	results := make([]string, callers)
	for i := range callers {
		wg.Go(func() {
			arrived.Done()
			b, ct, err := c.get("plot/dos.svg?lx=20nm", fill)
			if err != nil {
				t.Error(err)
			}
			results[i] = string(b) + " " + ct
		})
	}
	arrived.Wait()
	time.Sleep(20 * time.Millisecond) // let the callers reach the singleflight
	close(gate)
	wg.Wait()
	if n := calls.Load(); n != 1 {
		t.Errorf("fill ran %d times, want 1", n)
	}
	for i, r := range results {
		if r != "<svg/> image/svg+xml" {
			t.Errorf("caller %d got %q", i, r)
		}
	}
	// A later call is a hit.
	if _, _, err := c.get("plot/dos.svg?lx=20nm", func() ([]byte, string, error) {
		return nil, "", errors.New("fill called on a hit")
	}); err != nil {
		t.Error(err)
	}
}

func TestRenderCacheDoesNotKeepErrors(t *testing.T) {
	c := newRenderCache(8)
	boom := errors.New("engine failed")
	if _, _, err := c.get("k", func() ([]byte, string, error) { return nil, "", boom }); !errors.Is(err, boom) {
		t.Fatalf("err = %v, want %v", err, boom)
	}
	b, _, err := c.get("k", func() ([]byte, string, error) { return []byte("ok"), "text/plain", nil })
	if err != nil || string(b) != "ok" {
		t.Errorf("after an error, get = %q, %v; want a fresh fill", b, err)
	}
}

func TestServeCached(t *testing.T) {
	var fills atomic.Int32
	addRoutesForTest(t, func(a *App, r chi.Router) {
		r.Get("/test/cached", a.handle(func(w http.ResponseWriter, r *http.Request) error {
			return a.serveCached(w, r, "test/cached?"+r.URL.RawQuery, func() ([]byte, string, error) {
				fills.Add(1)
				return []byte("a,b\n1,2\n"), "text/csv; charset=utf-8", nil
			})
		}))
	})
	a, _ := newTestApp(t, Config{CacheEntries: 4})
	for i := range 3 {
		rec := do(a.Handler(), http.MethodGet, "/test/cached?x=1")
		if rec.Code != 200 || rec.Body.String() != "a,b\n1,2\n" || rec.Header().Get("Content-Type") != "text/csv; charset=utf-8" {
			t.Fatalf("request %d: %d %q %q", i, rec.Code, rec.Header().Get("Content-Type"), rec.Body)
		}
	}
	do(a.Handler(), http.MethodGet, "/test/cached?x=2")
	if n := fills.Load(); n != 2 {
		t.Errorf("fills = %d, want 2 (one per distinct key)", n)
	}
}

func BenchmarkRenderCacheHit(b *testing.B) {
	c := newRenderCache(256)
	for i := range 256 {
		c.get(fmt.Sprint("k", i), func() ([]byte, string, error) { return []byte("x"), "text/plain", nil })
	}
	b.ReportAllocs()
	b.RunParallel(func(pb *testing.PB) {
		i := 0
		for pb.Next() {
			c.get(keys256[i%256], nil)
			i++
		}
	})
}

var keys256 = func() []string {
	k := make([]string, 256)
	for i := range k {
		k[i] = fmt.Sprint("k", i)
	}
	return k
}()

package web

import (
	"bufio"
	"context"
	"fmt"
	"io"
	"net"
	"net/http"
	"net/url"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"ringbox/internal/store"
)

// childDBEnv, when set, makes the test binary a review server on that
// database instead of running tests (see TestMain).
const childDBEnv = "RINGBOX_TEST_CHILD_DB"

// testDBDir holds the databases of Apps built with the default DBPath.
var testDBDir string

func TestMain(m *testing.M) {
	if db := os.Getenv(childDBEnv); db != "" {
		os.Exit(runChildServer(db))
	}
	// Tests that build an App with Config{} would open ringbox.db in the
	// package directory; give each such App a file of its own instead.
	dir, err := os.MkdirTemp("", "ringbox-web-test-")
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	testDBDir = dir
	open := openReviews
	var mu sync.Mutex
	n := 0
	openReviews = func(p string, readOnly bool) (ReviewStore, error) {
		if p == (Config{}).withDefaults().DBPath {
			mu.Lock()
			n++
			p = filepath.Join(dir, "app"+strconv.Itoa(n)+".db")
			mu.Unlock()
		}
		return open(p, readOnly)
	}
	code := m.Run()
	os.RemoveAll(dir)
	os.Exit(code)
}

// runChildServer runs the real App on 127.0.0.1:0 with the database at db,
// prints "addr HOST:PORT" on stdout and serves until killed.
func runChildServer(db string) int {
	a, err := New(Config{DBPath: db})
	if err != nil {
		fmt.Fprintln(os.Stderr, "child:", err)
		return 1
	}
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		fmt.Fprintln(os.Stderr, "child:", err)
		return 1
	}
	fmt.Printf("addr %s\n", ln.Addr())
	// The parent kills this process; a bound keeps an orphan from living on.
	ctx, cancel := context.WithTimeout(context.Background(), 2*time.Minute)
	defer cancel()
	if err := a.serve(ctx, ln); err != nil {
		fmt.Fprintln(os.Stderr, "child:", err)
		return 1
	}
	return 0
}

// noRedirect is a client that returns 303s instead of following them.
var noRedirect = &http.Client{
	Timeout:       30 * time.Second,
	CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse },
}

// reviewForm is a valid review's form.
func reviewForm(title string) url.Values {
	return url.Values{"title": {title}, "notes": {"kept"}, "s": {"material=gaas&dims=1&lx=20nm"}}
}

// TestDurabilityKill saves a review in a server process and kills that
// process with SIGKILL the moment the 303 arrives: the review must be in
// the database when it is opened again (the store commits with
// synchronous=FULL before Create returns, and the handler answers after).
func TestDurabilityKill(t *testing.T) {
	if testing.Short() {
		t.Skip("starts a server process")
	}
	db := filepath.Join(t.TempDir(), "reviews.db")
	cmd := exec.Command(os.Args[0], "-test.run=^$")
	cmd.Env = append(os.Environ(), childDBEnv+"="+db)
	cmd.Stderr = os.Stderr
	out, err := cmd.StdoutPipe()
	if err != nil {
		t.Fatal(err)
	}
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	killed := false
	t.Cleanup(func() {
		if !killed {
			_ = cmd.Process.Kill()
		}
		_ = cmd.Wait()
	})

	addrc := make(chan string, 1)
	go func() {
		sc := bufio.NewScanner(out)
		for sc.Scan() {
			if a, ok := strings.CutPrefix(sc.Text(), "addr "); ok {
				addrc <- a
				break
			}
		}
		_, _ = io.Copy(io.Discard, out)
	}()
	var addr string
	select {
	case addr = <-addrc:
	case <-time.After(30 * time.Second):
		t.Fatal("child server printed no address")
	}

	resp, err := noRedirect.PostForm("http://"+addr+"/reviews", reviewForm("survives a kill"))
	if err != nil {
		t.Fatal(err)
	}
	resp.Body.Close()
	// Kill before anything else happens: no graceful close, no checkpoint.
	if err := cmd.Process.Signal(syscall.SIGKILL); err != nil {
		t.Fatal(err)
	}
	killed = true
	_ = cmd.Wait()
	if resp.StatusCode != http.StatusSeeOther {
		t.Fatalf("POST /reviews = %d, want 303", resp.StatusCode)
	}
	loc := resp.Header.Get("Location")
	id, err := strconv.ParseInt(strings.TrimPrefix(loc, "/reviews/"), 10, 64)
	if err != nil {
		t.Fatalf("Location %q: %v", loc, err)
	}

	st, err := store.Open(context.Background(), db, store.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	got, err := st.Get(context.Background(), id)
	if err != nil {
		t.Fatalf("review %d after SIGKILL: %v", id, err)
	}
	if got.Title != "survives a kill" || len(got.Scenarios) != 1 {
		t.Errorf("review after SIGKILL = %+v", got)
	}
}

// TestDurabilityConcurrentPosts sends 24 POSTs at once to one server: all
// must be saved, each with its own id.
func TestDurabilityConcurrentPosts(t *testing.T) {
	// Slots for every request at once: this tests the store's writer,
	// not the concurrency limit in front of it.
	a := newReviewApp(t, Config{MaxConcurrent: 32})
	srv := newHTTPServer(t, a)
	const n = 24
	ids := make([]int64, n)
	errs := make([]error, n)
	var wg sync.WaitGroup
	for i := range n {
		wg.Go(func() {
			resp, err := noRedirect.PostForm(srv+"/reviews", reviewForm("concurrent "+strconv.Itoa(i)))
			if err != nil {
				errs[i] = err
				return
			}
			resp.Body.Close()
			if resp.StatusCode != http.StatusSeeOther {
				errs[i] = fmt.Errorf("status %d", resp.StatusCode)
				return
			}
			ids[i], errs[i] = strconv.ParseInt(strings.TrimPrefix(resp.Header.Get("Location"), "/reviews/"), 10, 64)
		})
	}
	wg.Wait()
	seen := map[int64]int{}
	for i := range n {
		if errs[i] != nil {
			t.Errorf("POST %d: %v", i, errs[i])
			continue
		}
		if j, dup := seen[ids[i]]; dup {
			t.Errorf("POSTs %d and %d both got id %d", j, i, ids[i])
		}
		seen[ids[i]] = i
	}
	list, err := a.Reviews.List(context.Background(), "concurrent", 100)
	if err != nil {
		t.Fatal(err)
	}
	if len(list) != n {
		t.Errorf("%d reviews stored, want %d", len(list), n)
	}
}

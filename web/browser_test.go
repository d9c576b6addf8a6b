package web

import (
	"context"
	"errors"
	"net/http"
	"net/http/httptest"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
	"github.com/go-chi/chi/v5"
)

// requireBrowserEnv, set to 1 (CI does), turns a missing Chromium from a
// skip into a failure, so browser tests cannot pass by not running.
const requireBrowserEnv = "RINGBOX_REQUIRE_BROWSER"

// screenshotDirEnv names a directory that keeps the tests' screenshots for
// a person to look at; without it they go to the test's temporary directory.
const screenshotDirEnv = "RINGBOX_SCREENSHOT_DIR"

// findChromium returns the path of a Chromium binary, or "".
func findChromium() string {
	if _, err := os.Stat("/usr/bin/chromium"); err == nil {
		return "/usr/bin/chromium"
	}
	if p, err := exec.LookPath("chromium"); err == nil {
		return p
	}
	return ""
}

// newBrowser starts a headless Chromium with a fresh profile for this test
// and returns a chromedp context for one tab in it. The browser is closed
// when the test ends. Without Chromium the test is skipped, or fails when
// RINGBOX_REQUIRE_BROWSER=1. Derive per-action timeouts from the returned
// context with context.WithTimeout; never cancel it yourself.
func newBrowser(t *testing.T) context.Context {
	t.Helper()
	required := os.Getenv(requireBrowserEnv) == "1"
	path := findChromium()
	switch {
	case path == "" && required:
		t.Fatalf("%s=1 but no Chromium at /usr/bin/chromium or on PATH (Debian: apt-get install chromium)", requireBrowserEnv)
	case path == "":
		t.Skip("browser test skipped: no Chromium at /usr/bin/chromium or on PATH (Debian: apt-get install chromium); set " + requireBrowserEnv + "=1 to make this a failure")
	case testing.Short() && !required:
		t.Skip("browser test skipped in -short mode")
	}
	allocCtx, cancelAlloc := chromedp.NewExecAllocator(context.Background(),
		chromedp.ExecPath(path),
		chromedp.Flag("headless", true),
		chromedp.Flag("no-sandbox", true),
		chromedp.Flag("disable-gpu", true),
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.Flag("no-first-run", true),
		chromedp.Flag("disable-quic", true),
		chromedp.Flag("disable-dev-shm-usage", true),
		chromedp.UserDataDir(t.TempDir()),
		chromedp.WindowSize(1280, 900),
	)
	ctx, cancel := chromedp.NewContext(allocCtx)
	// Cleanups run last-in first-out: close the browser gracefully and wait
	// for it before the profile directory is removed.
	t.Cleanup(func() {
		cctx, ccancel := context.WithTimeout(ctx, 10*time.Second)
		defer ccancel()
		_ = chromedp.Cancel(cctx)
		cancel()
		cancelAlloc()
	})
	// Start the browser now, on a context without a deadline: the first Run
	// binds the browser's life to its context.
	if err := chromedp.Do(ctx); err != nil {
		t.Fatalf("start Chromium %s: %v", path, err)
	}
	return ctx
}

// consoleLog collects the console messages (console API calls, uncaught
// exceptions, browser log entries such as CSP refusals) of the tab of ctx
// from now on. Call the returned func for a snapshot.
func consoleLog(ctx context.Context) func() []chromedp.ConsoleMessage {
	var mu sync.Mutex
	var msgs []chromedp.ConsoleMessage
	seq := chromedp.Console(ctx) // subscribes now, before any navigation
	go func() {
		for m, err := range seq {
			if err != nil {
				return
			}
			mu.Lock()
			msgs = append(msgs, m)
			mu.Unlock()
		}
	}()
	return func() []chromedp.ConsoleMessage {
		mu.Lock()
		defer mu.Unlock()
		return append([]chromedp.ConsoleMessage(nil), msgs...)
	}
}

// consoleErrors returns the messages of error level or exceptions.
func consoleErrors(msgs []chromedp.ConsoleMessage) []string {
	var out []string
	for _, m := range msgs {
		if m.IsException() || m.Type == "error" || m.Type == "warning" {
			out = append(out, m.String())
		}
	}
	return out
}

// saveScreenshot writes png under RINGBOX_SCREENSHOT_DIR, or t.TempDir(),
// and returns the path.
func saveScreenshot(t *testing.T, name string, png []byte) string {
	t.Helper()
	dir := os.Getenv(screenshotDirEnv)
	if dir == "" {
		dir = t.TempDir()
	} else if err := os.MkdirAll(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(dir, name)
	if err := os.WriteFile(p, png, 0o644); err != nil {
		t.Fatal(err)
	}
	t.Logf("screenshot: %s", p)
	return p
}

// timeout runs one step of a browser test with a bound, on a context that
// derives from the browser's so the browser outlives it.
func timeout(t *testing.T, ctx context.Context, steps ...chromedp.Action[chromedp.Void]) {
	t.Helper()
	tctx, cancel := context.WithTimeout(ctx, 20*time.Second)
	defer cancel()
	if err := chromedp.Do(tctx, steps...); err != nil {
		t.Fatal(err)
	}
}

func TestBrowserHome(t *testing.T) {
	// A page with inline code, served under the same policy: the CSP must
	// refuse it, which shows that the console check below can fail.
	addRoutesForTest(t, func(a *App, r chi.Router) {
		r.Get("/test/inline", func(w http.ResponseWriter, r *http.Request) {
			w.Header().Set("Content-Type", "text/html; charset=utf-8")
			_, _ = w.Write([]byte(`<!DOCTYPE html><html><head><title>t</title><style>p{color:red}</style></head>` +
				`<body><p>inline</p><script>document.title = "ran"</script></body></html>`))
		})
	})
	a, _ := newTestApp(t, Config{})
	srv := httptest.NewServer(a.Handler())
	defer srv.Close()
	ctx := newBrowser(t)
	messages := consoleLog(ctx)

	var navTexts []string
	var png []byte
	timeout(t, ctx,
		chromedp.EmulateViewport(1280, 800),
		chromedp.Navigate(srv.URL+"/"),
		chromedp.WaitVisible(chromedp.CSS("nav.site-nav")),
		chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
			var err error
			navTexts, err = chromedp.Evaluate[[]string](
				`Array.from(document.querySelectorAll("nav.site-nav a")).map(a => a.textContent.trim() + " " + a.getAttribute("href"))`)(ctx, tg)
			return err
		}),
		// The stylesheet applied: the header's bottom rule is the accent colour.
		chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
			w, err := chromedp.Evaluate[string](`getComputedStyle(document.querySelector(".site-header")).borderBottomWidth`)(ctx, tg)
			if err == nil && w != "2px" {
				err = errors.New("ringbox.css not applied: header border " + w)
			}
			return err
		}),
		chromedp.Sleep(200*time.Millisecond), // let late console messages (favicon, script) arrive
		chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
			var err error
			png, err = chromedp.FullScreenshot(100)(ctx, tg)
			return err
		}),
	)
	want := []string{"Conductor /", "Sweep /sweep", "Lattice /lattice", "Compare /compare",
		"Reviews /reviews", "Examples /examples", "Method /method", "Validation /validation"}
	if strings.Join(navTexts, "|") != strings.Join(want, "|") {
		t.Errorf("navigation = %q, want %q", navTexts, want)
	}
	if errs := consoleErrors(messages()); len(errs) > 0 {
		t.Errorf("console errors on /:\n%s", strings.Join(errs, "\n"))
	}
	if len(png) < 1000 {
		t.Errorf("screenshot is %d bytes", len(png))
	}
	saveScreenshot(t, "home.png", png)

	t.Run("CSP refuses inline code", func(t *testing.T) {
		before := len(messages())
		var title string
		timeout(t, ctx,
			chromedp.Navigate(srv.URL+"/test/inline"),
			chromedp.Sleep(200*time.Millisecond),
			chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
				var err error
				title, err = chromedp.Title()(ctx, tg)
				return err
			}),
		)
		if title == "ran" {
			t.Error("inline script ran despite the CSP")
		}
		errs := consoleErrors(messages()[before:])
		if !strings.Contains(strings.Join(errs, "\n"), "Content Security Policy") {
			t.Errorf("no CSP refusal reported on the console; got %q", errs)
		}
	})
}

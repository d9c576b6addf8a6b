package web

import (
	"context"
	"net/http/httptest"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// pageState is what the browser test reads off the conductor page.
type pageState struct {
	Summary   [][]string // the summary table's body, cell texts
	StatesSrc string     // the N(E) figure's src
	LX        string     // the lx field's value
	Loaded    int        // figures whose image decoded with a size
	Frames    int        // figures with a data-frame readout.js accepted
}

const readPage = `(() => {
	const rows = Array.from(document.querySelectorAll("#summary tbody tr"));
	const imgs = Array.from(document.querySelectorAll("figure.plot img"));
	return {
		Summary: rows.map(r => Array.from(r.children).map(c => c.textContent.trim())),
		StatesSrc: document.querySelector("#plot-states img").getAttribute("src"),
		LX: document.querySelector("#lx").value,
		Loaded: imgs.filter(i => i.complete && i.naturalWidth > 0).length,
		Frames: document.querySelectorAll("figure.plot .plot-readout").length,
	};
})()`

// waitFor polls the page until the JavaScript expression cond is true.
func waitFor(t *testing.T, ctx context.Context, cond string) {
	t.Helper()
	tctx, cancel := context.WithTimeout(ctx, 20*time.Second)
	defer cancel()
	for {
		ok, err := chromedp.Run(tctx, chromedp.Evaluate[bool](cond))
		if err == nil && ok {
			return
		}
		select {
		case <-tctx.Done():
			t.Fatalf("timed out waiting for %s (last error %v)", cond, err)
		case <-time.After(50 * time.Millisecond):
		}
	}
}

// TestBrowserConductor loads a scenario, reads its summary and figure,
// changes the length of x in the form, submits, and checks that both
// changed: the page works as a plain GET form in a real browser.
func TestBrowserConductor(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	srv := httptest.NewServer(a.Handler())
	defer srv.Close()
	ctx := newBrowser(t)
	messages := consoleLog(ctx)

	read := func() pageState {
		t.Helper()
		tctx, cancel := context.WithTimeout(ctx, 20*time.Second)
		defer cancel()
		// Wait until the three figures have loaded.
		var st pageState
		for {
			var err error
			st, err = chromedp.Run(tctx, chromedp.Evaluate[pageState](readPage))
			if err != nil {
				t.Fatal(err)
			}
			if st.Loaded == 3 {
				return st
			}
			select {
			case <-tctx.Done():
				t.Fatalf("figures did not load: %+v", st)
			case <-time.After(50 * time.Millisecond):
			}
		}
	}
	shot := func(name string) {
		t.Helper()
		var png []byte
		timeout(t, ctx, chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
			var err error
			png, err = chromedp.FullScreenshot(100)(ctx, tg)
			return err
		}))
		saveScreenshot(t, name, png)
	}

	timeout(t, ctx,
		chromedp.EmulateViewport(1280, 900),
		chromedp.Navigate(srv.URL+"/?material=gaas&dims=3&lx=12nm&ly=10nm&lz=100nm&bx=box&by=box&bz=open"),
		chromedp.WaitVisible(chromedp.CSS("#summary")))
	before := read()
	shot("conductor-wide.png")
	if len(before.Summary) != 4 || before.Summary[0][0] != "scenario" {
		t.Fatalf("summary table rows = %q", before.Summary)
	}
	if before.LX != "12nm" {
		t.Errorf("lx field = %q, want 12nm", before.LX)
	}
	if before.Frames != 3 {
		t.Errorf("readout attached to %d figures, want 3 (data-frame rejected?)", before.Frames)
	}

	timeout(t, ctx,
		chromedp.SetValue(chromedp.CSS("#lx"), "7nm"),
		chromedp.Submit(chromedp.CSS("#lx")))
	waitFor(t, ctx, `location.search.includes("lx=7nm") && document.readyState === "complete" && !!document.querySelector("#summary")`)
	after := read()
	if after.StatesSrc == before.StatesSrc || !strings.Contains(after.StatesSrc, "lx=7nm") {
		t.Errorf("figure src did not follow the form: before %q, after %q", before.StatesSrc, after.StatesSrc)
	}
	if strings.Join(after.Summary[0], "|") == strings.Join(before.Summary[0], "|") {
		t.Errorf("summary row for the scenario did not change: %q", after.Summary[0])
	}
	shot("conductor-after-submit.png")

	timeout(t, ctx, chromedp.EmulateViewport(600, 900), chromedp.Reload(),
		chromedp.WaitVisible(chromedp.CSS("#summary")))
	read()
	shot("conductor-narrow.png")

	if errs := consoleErrors(messages()); len(errs) > 0 {
		t.Errorf("console errors:\n%s", strings.Join(errs, "\n"))
	}
}

package web

import (
	"context"
	"regexp"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/cdproto/emulation"
	"github.com/chromedp/chromedp"
)

// TestBrowserCompareAndSave walks the comparison as a person would, without
// any script of the app's: open two scenarios, remove one by its link,
// save what is left as a review, and land on the review's page.
func TestBrowserCompareAndSave(t *testing.T) {
	a := newReviewApp(t, Config{})
	srv := newHTTPServer(t, a)
	ctx := newBrowser(t)
	messages := consoleLog(ctx)

	eval := func(js string) any {
		t.Helper()
		tctx, cancel := context.WithTimeout(ctx, 20*time.Second)
		defer cancel()
		v, err := chromedp.Run(tctx, chromedp.Evaluate[any](js, chromedp.EvalAwaitPromise))
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	count := func(sel string) int {
		t.Helper()
		return int(eval(`document.querySelectorAll(` + jsString(sel) + `).length`).(float64))
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

	timeout(t, ctx, chromedp.EmulateViewport(1280, 900),
		chromedp.Navigate(srv+compareTarget("/compare", scenWire, scenSi)),
		chromedp.WaitVisible(chromedp.CSS("#compare-table")))
	// Every figure loaded (an SVG that failed would have no natural size).
	eval(`Promise.all(Array.from(document.images).map(i => i.complete ? 0 : new Promise(r => { i.onload = i.onerror = r; })))`)
	if n := count(`img[src^="/compare/plot/"]`); n != 3 {
		t.Errorf("%d figures, want 3", n)
	}
	if bad := eval(`Array.from(document.images).filter(i => i.naturalWidth === 0).length`).(float64); bad > 0 {
		t.Errorf("%v figures did not load", bad)
	}
	if n := count("th.compare-col"); n != 2 {
		t.Errorf("%d table columns, want 2", n)
	}
	// The legend inside the first figure, read from the SVG it shows.
	// (Matched as text: a DOMParser document would fall under the page's
	// policy, which refuses the figure's style attributes.)
	legend := eval(`fetch(document.querySelector("figure.plot img").src).then(r => r.text()).then(s =>
		s.match(/<text[^>]*>\d+: [^<]*<\/text>/g))`)
	if l, _ := legend.([]any); len(l) != 2 {
		t.Errorf("legend entries %v, want 2", legend)
	}
	// The table fits a laptop screen: no horizontal scrolling.
	if over := eval(`(() => { const w = document.querySelector(".table-wrap"); return w.scrollWidth - w.clientWidth; })()`).(float64); over > 0 {
		t.Errorf("the table overflows its box by %v px at 1280 px", over)
	}
	shot("compare-wide.png")

	timeout(t, ctx, chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
		_, err := chromedp.Call(ctx, emulation.SetEmulatedMedia, emulation.SetEmulatedMediaParams{Media: "print"})
		return err
	}))
	if n := eval(`Array.from(document.querySelectorAll("form, .compare-links")).filter(e => e.getClientRects().length > 0).length`).(float64); n > 0 {
		t.Errorf("%v forms or link cells shown in print", n)
	}
	shot("compare-print.png")
	timeout(t, ctx, chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
		_, err := chromedp.Call(ctx, emulation.SetEmulatedMedia, emulation.SetEmulatedMediaParams{Media: ""})
		return err
	}))

	// Remove the first scenario by its link.
	timeout(t, ctx, chromedp.Click(chromedp.CSS("a.compare-remove")),
		chromedp.WaitVisible(chromedp.CSS("#compare-table")))
	if n := count("th.compare-col"); n != 1 {
		t.Fatalf("%d columns after remove, want 1", n)
	}
	if got := eval(`document.querySelector(".compare-legend li").textContent`).(string); !strings.Contains(got, "Si") {
		t.Errorf("the scenario left is %q, want the silicon one", got)
	}

	// Save it as a review.
	var loc, title string
	timeout(t, ctx,
		chromedp.SendKeys(chromedp.CSS("#review-title"), "Si wire <b>review</b>"),
		chromedp.SendKeys(chromedp.CSS("#review-notes"), "Line one\nLine two"),
		chromedp.Click(chromedp.CSS(`form.review-save button[type="submit"]`)),
		chromedp.WaitVisible(chromedp.CSS("h1.review-title")),
		chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
			var err error
			if loc, err = chromedp.Location()(ctx, tg); err != nil {
				return err
			}
			title, err = chromedp.Text(chromedp.CSS("h1.review-title"))(ctx, tg)
			return err
		}))
	if !regexp.MustCompile(`/reviews/\d+$`).MatchString(loc) {
		t.Errorf("landed on %q, want /reviews/{id}", loc)
	}
	if title != "Si wire <b>review</b>" {
		t.Errorf("review title %q", title)
	}
	if n := count(".review-notes br"); n != 1 {
		t.Errorf("%d line breaks in the notes, want 1", n)
	}
	if n := count("th.compare-col"); n != 1 {
		t.Errorf("%d columns on the review page, want 1", n)
	}
	shot("review.png")

	if errs := consoleErrors(messages()); len(errs) > 0 {
		t.Errorf("console errors:\n%s", strings.Join(errs, "\n"))
	}
}

// jsString quotes s as a JavaScript string literal.
func jsString(s string) string {
	return "'" + strings.NewReplacer(`\`, `\\`, `'`, `\'`).Replace(s) + "'"
}

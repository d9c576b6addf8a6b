package web

import (
	"context"
	"net/http/httptest"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// TestBrowserLattice loads /lattice (the N = 7 armchair ribbon), edits the
// width to N = 8 and submits: the ribbon turns metallic and changes family
// (Nakada et al., PRB 54, 17954 (1996): metallic iff N = 3j + 2; the N = 7
// gap is 1.267 eV at γ0 = 2.7 eV, DESIGN check values).
func TestBrowserLattice(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	srv := httptest.NewServer(a.Handler())
	defer srv.Close()
	ctx := newBrowser(t)
	messages := consoleLog(ctx)

	cell := func(id string) chromedp.Action[string] {
		return chromedp.Text(chromedp.CSS("#" + id + " td.this"))
	}
	read := func(id string) string {
		t.Helper()
		tctx, cancel := context.WithTimeout(ctx, 20*time.Second)
		defer cancel()
		s, err := chromedp.Run(tctx, cell(id))
		if err != nil {
			t.Fatal(err)
		}
		return strings.TrimSpace(s)
	}
	// imagesLoaded is the number of figure images the browser decoded.
	imagesLoaded := chromedp.Poll[bool](`Array.from(document.querySelectorAll("figure.plot img")).length === 4 &&
		Array.from(document.querySelectorAll("figure.plot img")).every(i => i.complete && i.naturalWidth > 0)`)

	timeout(t, ctx,
		chromedp.EmulateViewport(1280, 900),
		chromedp.Navigate(srv.URL+"/lattice"),
		chromedp.WaitVisible(chromedp.CSS("#summary")),
	)
	func() {
		tctx, cancel := context.WithTimeout(ctx, 20*time.Second)
		defer cancel()
		if _, err := chromedp.Run(tctx, imagesLoaded); err != nil {
			t.Fatalf("figures did not load: %v", err)
		}
	}()
	if g := read("row-gap"); g != "1.267" {
		t.Errorf("N = 7 gap cell %q, want 1.267", g)
	}
	if m := read("row-metallic"); m != "no" {
		t.Errorf("N = 7 metallic %q, want no", m)
	}
	if f := read("row-family"); f != "N mod 3 = 1" {
		t.Errorf("N = 7 family %q", f)
	}

	timeout(t, ctx,
		chromedp.Clear(chromedp.CSS("#lines")),
		chromedp.SendKeys(chromedp.CSS("#lines"), "8"),
		chromedp.Click(chromedp.CSS("form.lattice-form button[type=submit]")),
	)
	// The click navigates; a query that runs across the navigation fails
	// with "target navigated", so ask again until the new page answers.
	newPage := chromedp.Evaluate[bool](`(() => { const c = document.querySelector("#row-gap td.this");
		return location.search.includes("lines=8") && c !== null && c.textContent.trim() === "0"; })()`)
	deadline := time.Now().Add(20 * time.Second)
	for {
		tctx, cancel := context.WithTimeout(ctx, 2*time.Second)
		ok, err := chromedp.Run(tctx, newPage)
		cancel()
		if err == nil && ok {
			break
		}
		if time.Now().After(deadline) {
			t.Fatalf("the N = 8 page did not show a zero gap (last error %v)", err)
		}
		time.Sleep(100 * time.Millisecond)
	}
	if m := read("row-metallic"); m != "yes" {
		t.Errorf("N = 8 metallic %q, want yes", m)
	}
	if f := read("row-family"); f != "N mod 3 = 2" {
		t.Errorf("N = 8 family %q, want N mod 3 = 2", f)
	}
	// One channel per spin at E_F: G = 2e²/h (Landauer; common practice).
	if g := read("row-g0"); g != "1" {
		t.Errorf("N = 8 conductance %q × 2e²/h, want 1", g)
	}
	var png []byte
	timeout(t, ctx,
		latticeDiscard(imagesLoaded),
		chromedp.Sleep(200*time.Millisecond), // late console messages
		chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
			var err error
			png, err = chromedp.FullScreenshot(100)(ctx, tg)
			return err
		}),
	)
	saveScreenshot(t, "lattice.png", png)

	// The tube side: (10, 0), 0.948 eV (Saito, Dresselhaus & Dresselhaus
	// 1998 formula), unrolls to the armchair ribbon of 20 dimer lines.
	var head string
	timeout(t, ctx,
		chromedp.Navigate(srv.URL+"/lattice?structure=tube&n=10&m=0"),
		chromedp.WaitVisible(chromedp.CSS("#summary")),
		latticeDiscard(imagesLoaded),
		chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
			var err error
			if head, err = chromedp.Text(chromedp.CSS("#partner-head"))(ctx, tg); err != nil {
				return err
			}
			png, err = chromedp.FullScreenshot(100)(ctx, tg)
			return err
		}),
	)
	if g := read("row-gap"); g != "0.9481" {
		t.Errorf("(10, 0) gap cell %q, want 0.9481", g)
	}
	if !strings.Contains(head, "armchair ribbon N = 20") {
		t.Errorf("partner column head %q", head)
	}
	saveScreenshot(t, "lattice-tube.png", png)
	if errs := consoleErrors(messages()); len(errs) > 0 {
		t.Errorf("console errors on /lattice:\n%s", strings.Join(errs, "\n"))
	}
}

// latticeDiscard runs a and drops its value, for a step list of Action[Void].
func latticeDiscard[T any](a chromedp.Action[T]) chromedp.Action[chromedp.Void] {
	return func(ctx context.Context, tg *chromedp.Target) (chromedp.Void, error) {
		_, err := a(ctx, tg)
		return chromedp.Void{}, err
	}
}

package web

import (
	"bufio"
	"context"
	"encoding/csv"
	"encoding/json"
	"net/http"
	"net/http/httptest"
	"net/url"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
	"golang.org/x/net/html"

	"ringbox/internal/scenario"
)

// sweepQuery is a small, quick sweep of a GaAs wire (two hard-wall axes
// scaled together, one open axis) at 300 K.
const sweepQuery = "material=gaas&lx=10nm&ly=10nm&lz=100nm&bz=open&sweep=all&from=5nm&to=60nm&steps=8&tol=0.05"

func TestSweepAPI(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	rec := do(a.Handler(), "GET", "/api/v1/sweep?"+sweepQuery)
	if rec.Code != http.StatusOK {
		t.Fatalf("status %d: %s", rec.Code, rec.Body)
	}
	var doc map[string]json.RawMessage
	if err := json.Unmarshal(rec.Body.Bytes(), &doc); err != nil {
		t.Fatal(err)
	}
	// DESIGN's keys, each an array of one value per size.
	for _, k := range []string{"lengths_nm", "scenario", "box", "ring", "continuum", "method", "ef_eV"} {
		var v []any
		if err := json.Unmarshal(doc[k], &v); err != nil || len(v) != 8 {
			t.Errorf("%s = %s, want 8 values", k, doc[k])
		}
	}
	var co map[string]*float64
	if err := json.Unmarshal(doc["crossover_nm"], &co); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"scenario", "box", "ring"} {
		if _, ok := co[k]; !ok {
			t.Errorf("crossover_nm has no %q: %s", k, doc["crossover_nm"])
		}
	}
	var dev map[string][]*float64
	if err := json.Unmarshal(doc["deviations"], &dev); err != nil || len(dev["ring"]) != 8 {
		t.Errorf("deviations = %s", doc["deviations"])
	}
	for k, want := range map[string]string{"quantity": `"density"`, "unit": `"cm^-1"`, "tol": `0.05`, "sweep": `"all"`} {
		if string(doc[k]) != want {
			t.Errorf("%s = %s, want %s", k, doc[k], want)
		}
	}
	// The API agrees with the engines called directly.
	sw, err := scenario.ParseSweep(mustQuery(t, sweepQuery))
	if err != nil {
		t.Fatal(err)
	}
	res, err := scenario.RunSweep(context.Background(), sw, nil)
	if err != nil {
		t.Fatal(err)
	}
	var got []float64
	_ = json.Unmarshal(doc["box"], &got)
	for i := range got {
		if got[i] != res.Box[i] {
			t.Errorf("box[%d] = %g, RunSweep gives %g", i, got[i], res.Box[i])
		}
	}
}

func mustQuery(t *testing.T, q string) url.Values {
	t.Helper()
	v, err := url.ParseQuery(q)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

func TestSweepBadKeys(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	tests := []struct {
		query, key string
		status     int
	}{
		{"sweep=lq", "sweep", 400},
		{"from=abc", "from", 400},
		{"from=50nm&to=5nm", "to", 400},
		{"steps=999", "steps", 400},
		{"quantity=mass", "quantity", 400},
		{"tol=-1", "tol", 400},
		{"lx=-1nm", "lx", 400},
		{"bogus=1", "bogus", 400},
		{"material=cu&bz=box&lx=1um&ly=1um&lz=1um&from=100nm&to=1um&steps=200&budget=1e12", "to", 422},
	}
	for _, tt := range tests {
		t.Run(tt.query, func(t *testing.T) {
			for _, path := range []string{"/api/v1/sweep", "/export/sweep.csv", "/sweep/plot/values.svg", "/sweep/plot/deviation.png"} {
				rec := do(a.Handler(), "GET", path+"?"+tt.query)
				if rec.Code != tt.status {
					t.Errorf("%s: status %d, want %d", path, rec.Code, tt.status)
				}
				if path == "/api/v1/sweep" {
					var e errorBody
					if err := json.Unmarshal(rec.Body.Bytes(), &e); err != nil || e.Key != tt.key || e.Error == "" {
						t.Errorf("body %s, want key %q", rec.Body, tt.key)
					}
				}
			}
			// The page shows the form again with the message beside the field.
			rec := do(a.Handler(), "GET", "/sweep?"+tt.query)
			if rec.Code != tt.status {
				t.Errorf("page: status %d, want %d", rec.Code, tt.status)
			}
			doc := parseHTML(t, rec.Body)
			if len(findAll(doc, func(n *html.Node) bool { return n.Data == "form" && attr(n, "action") == "/sweep" })) != 1 {
				t.Error("page: no sweep form")
			}
			errs := findAll(doc, byClass("field-error"))
			alerts := findAll(doc, byClass("form-errors"))
			if len(alerts) != 1 || !strings.Contains(text(alerts[0]), tt.key) {
				t.Errorf("page: alert %v does not name %s", alerts, tt.key)
			}
			if tt.key != "bogus" && (len(errs) != 1 || attr(errs[0], "id") != tt.key+"-error") {
				t.Errorf("page: field errors %d, want one beside %s", len(errs), tt.key)
			}
		})
	}
}

// resultParts reads what the sweep page shows of a result.
func resultParts(t *testing.T, doc *html.Node) (cards, rows int, imgs []string, progress bool) {
	t.Helper()
	for _, c := range findAll(doc, func(n *html.Node) bool { return attr(n, "id") == "crossovers" }) {
		cards = len(findAll(c, byClass("card")))
	}
	for _, tb := range findAll(doc, func(n *html.Node) bool { return attr(n, "id") == "sweep-table" }) {
		for _, body := range findAll(tb, byTag("tbody")) {
			rows = len(findAll(body, byTag("tr")))
		}
	}
	for _, f := range findAll(doc, byClass("plot")) {
		for _, img := range findAll(f, byTag("img")) {
			imgs = append(imgs, attr(img, "src"))
		}
		if attr(f, "data-frame") == "" {
			t.Errorf("figure %s has no data-frame", attr(f, "id"))
		}
	}
	progress = len(findAll(doc, func(n *html.Node) bool { return attr(n, "id") == "sweep-progress" })) == 1
	return cards, rows, imgs, progress
}

func TestSweepPage(t *testing.T) {
	sweeps.lru = newLRU[*scenario.SweepResult](sweepEntries) // a cold cache
	a, _ := newTestApp(t, Config{})
	srv := httptest.NewServer(a.Handler())
	defer srv.Close()

	t.Run("empty query: the form only", func(t *testing.T) {
		rec := do(a.Handler(), "GET", "/sweep")
		if rec.Code != 200 {
			t.Fatalf("status %d", rec.Code)
		}
		doc := parseHTML(t, rec.Body)
		for _, k := range []string{"sweep", "from", "to", "steps", "quantity", "tol", "material", "lx", "bx", "temp", "ef"} {
			if len(findAll(doc, func(n *html.Node) bool { return attr(n, "name") == k && attr(n, "id") == k })) != 1 {
				t.Errorf("no field %s", k)
			}
		}
		for _, k := range []string{"at", "points", "emin"} {
			if len(findAll(doc, func(n *html.Node) bool { return attr(n, "name") == k })) != 0 {
				t.Errorf("field %s shown; a sweep does not use it", k)
			}
		}
		if _, rows, _, _ := resultParts(t, doc); rows != 0 {
			t.Error("a result without a query")
		}
	})

	var first []string
	t.Run("streamed on a miss", func(t *testing.T) {
		resp, err := http.Get(srv.URL + "/sweep?" + sweepQuery)
		if err != nil {
			t.Fatal(err)
		}
		defer resp.Body.Close()
		if resp.StatusCode != 200 || resp.Header.Get("Content-Type") != "text/html; charset=utf-8" {
			t.Fatalf("status %d, type %q", resp.StatusCode, resp.Header.Get("Content-Type"))
		}
		doc := parseHTML(t, resp.Body)
		cards, rows, imgs, progress := resultParts(t, doc)
		if cards != 4 || rows != 8 || len(imgs) != 2 || !progress {
			t.Fatalf("cards %d rows %d figures %v progress %v", cards, rows, imgs, progress)
		}
		marks := findAll(doc, func(n *html.Node) bool {
			return n.Data == "span" && n.Parent != nil && attr(n.Parent, "id") == "sweep-progress"
		})
		if len(marks) == 0 || text(marks[len(marks)-1]) != "8/8" {
			t.Errorf("progress marks %d, last %q", len(marks), text(marks[len(marks)-1]))
		}
		first = imgs
	})
	t.Run("whole page on a hit", func(t *testing.T) {
		rec := do(a.Handler(), "GET", "/sweep?"+sweepQuery)
		if rec.Code != 200 {
			t.Fatalf("status %d", rec.Code)
		}
		doc := parseHTML(t, rec.Body)
		_, rows, imgs, progress := resultParts(t, doc)
		if rows != 8 || progress || strings.Join(imgs, " ") != strings.Join(first, " ") {
			t.Errorf("rows %d progress %v figures %v (first %v)", rows, progress, imgs, first)
		}
	})
	t.Run("figures and CSV", func(t *testing.T) {
		for _, src := range first {
			for _, p := range []struct{ path, ct string }{{src, "image/svg+xml"}, {strings.Replace(src, ".svg?", ".png?", 1), "image/png"}} {
				rec := do(a.Handler(), "GET", p.path)
				if rec.Code != 200 || rec.Header().Get("Content-Type") != p.ct || rec.Body.Len() < 1000 {
					t.Errorf("%s: status %d type %q, %d bytes", p.path, rec.Code, rec.Header().Get("Content-Type"), rec.Body.Len())
				}
			}
		}
		rec := do(a.Handler(), "GET", "/export/sweep.csv?"+sweepQuery)
		if rec.Code != 200 || !strings.Contains(rec.Header().Get("Content-Disposition"), "attachment") {
			t.Fatalf("CSV: status %d, disposition %q", rec.Code, rec.Header().Get("Content-Disposition"))
		}
		rows, err := csv.NewReader(rec.Body).ReadAll()
		if err != nil || len(rows) != 9 || rows[0][0] != "all_nm" {
			t.Errorf("CSV rows %d (%v), header %v", len(rows), err, rows[0])
		}
	})
}

// TestSweepStopsWhenClientLeaves streams a slow sweep (each step held
// 50 ms in its progress callback, so 200 steps would take 10 s), leaves
// after the first progress mark, and checks that the sweep's workers stop
// soon after with a cancellation, far from the last step.
func TestSweepStopsWhenClientLeaves(t *testing.T) {
	type outcome struct {
		err        error
		done, tot  int
		stoppedAt  time.Time
		afterCalls *atomic.Int32
	}
	ended := make(chan outcome, 1)
	saved := runSweep
	t.Cleanup(func() { runSweep = saved })
	runSweep = func(ctx context.Context, sw scenario.Sweep, progress func(done, total int)) (*scenario.SweepResult, error) {
		var o outcome
		o.afterCalls = &atomic.Int32{}
		var stopped atomic.Bool
		res, err := scenario.RunSweep(ctx, sw, func(done, total int) {
			if stopped.Load() {
				o.afterCalls.Add(1)
			}
			o.done, o.tot = done, total
			progress(done, total)
			time.Sleep(50 * time.Millisecond)
		})
		stopped.Store(true)
		o.err, o.stoppedAt = err, time.Now()
		ended <- o
		return res, err
	}
	a, _ := newTestApp(t, Config{})
	srv := httptest.NewServer(a.Handler())
	defer srv.Close()

	ctx, cancel := context.WithCancel(context.Background())
	req, _ := http.NewRequestWithContext(ctx, "GET", srv.URL+"/sweep?material=gaas&lx=4nm&ly=4nm&bz=open&sweep=all&from=2nm&to=6nm&steps=200", nil)
	resp, err := http.DefaultClient.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	br := bufio.NewReader(resp.Body)
	if _, err := br.ReadString('/'); err != nil { // up to the first "k/200" mark
		t.Fatal(err)
	}
	for {
		s, err := br.ReadString('>')
		if err != nil {
			t.Fatal(err)
		}
		if strings.Contains(s, "/200</span") {
			break
		}
	}
	left := time.Now()
	cancel()
	resp.Body.Close()

	select {
	case o := <-ended:
		e, ok := scenario.AsError(o.err)
		if !ok || e.Code != scenario.Canceled {
			t.Errorf("sweep ended with %v, want a cancellation", o.err)
		}
		if o.done >= o.tot || o.tot != 200 {
			t.Errorf("sweep ran %d of %d steps", o.done, o.tot)
		}
		if d := o.stoppedAt.Sub(left); d > 2*time.Second {
			t.Errorf("workers stopped %v after the client left", d)
		}
		time.Sleep(200 * time.Millisecond)
		if n := o.afterCalls.Load(); n > 0 {
			t.Errorf("%d steps finished after RunSweep returned", n)
		}
	case <-time.After(8 * time.Second):
		t.Fatal("the sweep did not stop after the client left")
	}
}

// TestBrowserSweep fills the sweep form in a real browser, submits it, and
// checks the result: both figures decode, the table has a row per size and
// the page raises no console error under the content security policy.
func TestBrowserSweep(t *testing.T) {
	sweeps.lru = newLRU[*scenario.SweepResult](sweepEntries)
	a, _ := newTestApp(t, Config{})
	srv := httptest.NewServer(a.Handler())
	defer srv.Close()
	ctx := newBrowser(t)
	messages := consoleLog(ctx)

	timeout(t, ctx,
		chromedp.EmulateViewport(1280, 900),
		chromedp.Navigate(srv.URL+"/sweep"),
		chromedp.WaitVisible(chromedp.CSS("#sweep-form")),
		chromedp.SetValue(chromedp.CSS("#lx"), "10nm"),
		chromedp.SetValue(chromedp.CSS("#ly"), "10nm"),
		chromedp.SetValue(chromedp.CSS("#bz"), "open"),
		chromedp.SetValue(chromedp.CSS("#from"), "4nm"),
		chromedp.SetValue(chromedp.CSS("#to"), "80nm"),
		chromedp.SetValue(chromedp.CSS("#steps"), "30"),
		chromedp.Click(chromedp.CSS("#sweep-form button[type=submit]")),
	)
	waitFor(t, ctx, `location.search.includes("steps=30") && document.readyState === "complete" && `+
		`Array.from(document.querySelectorAll("figure.plot img")).filter(i => i.complete && i.naturalWidth > 0).length === 2`)
	type state struct {
		Rows, Cards int
		Srcs        []string
		Progress    string
	}
	st, err := chromedp.Run(ctx, chromedp.Evaluate[state](`({
		Rows: document.querySelectorAll("#sweep-table tbody tr").length,
		Cards: document.querySelectorAll("#crossovers .card").length,
		Srcs: Array.from(document.querySelectorAll("figure.plot img")).map(i => i.getAttribute("src")),
		Progress: (document.querySelector("#sweep-progress") || {}).textContent || "",
	})`))
	if err != nil {
		t.Fatal(err)
	}
	if st.Rows != 30 || st.Cards != 4 || len(st.Srcs) != 2 || !strings.HasPrefix(st.Srcs[0], "/sweep/plot/values.svg?") ||
		!strings.HasPrefix(st.Srcs[1], "/sweep/plot/deviation.svg?") {
		t.Errorf("page state %+v", st)
	}
	if !strings.Contains(st.Progress, "30/30") || !strings.Contains(st.Progress, "done") {
		t.Errorf("progress line %q", st.Progress)
	}
	var png []byte
	timeout(t, ctx, chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
		var err error
		png, err = chromedp.FullScreenshot(100)(ctx, tg)
		return err
	}))
	saveScreenshot(t, "sweep.png", png)
	if errs := consoleErrors(messages()); len(errs) > 0 {
		t.Errorf("console errors:\n%s", strings.Join(errs, "\n"))
	}
}

// TestSweepStoppedMidway: a sweep that fails after the page has started
// (here a step whose density cannot be reached) ends the streamed page
// with the message and its key, not with half a table.
func TestSweepStoppedMidway(t *testing.T) {
	saved := runSweep
	t.Cleanup(func() { runSweep = saved })
	runSweep = func(ctx context.Context, sw scenario.Sweep, progress func(done, total int)) (*scenario.SweepResult, error) {
		progress(1, sw.Steps)
		return nil, scenario.Errorf("density", "at lx = 2nm: density not reached")
	}
	a, _ := newTestApp(t, Config{})
	rec := do(a.Handler(), "GET", "/sweep?sweep=lx&from=2nm&to=3nm&steps=2&density=1e6")
	if rec.Code != 200 {
		t.Fatalf("status %d", rec.Code)
	}
	doc := parseHTML(t, rec.Body)
	stopped := findAll(doc, func(n *html.Node) bool { return attr(n, "id") == "sweep-stopped" })
	if len(stopped) != 1 || !strings.Contains(text(stopped[0]), "density: at lx = 2nm: density not reached") {
		t.Fatalf("stopped notice %v", stopped)
	}
	if _, rows, _, progress := resultParts(t, doc); rows != 0 || !progress {
		t.Errorf("rows %d, progress line %v", rows, progress)
	}
	sw, err := scenario.ParseSweep(mustQuery(t, "sweep=lx&from=2nm&to=3nm&steps=2&density=1e6"))
	if err != nil {
		t.Fatal(err)
	}
	if _, ok := sweeps.lru.Get(sw.Canonical()); ok {
		t.Error("a failed sweep was cached")
	}
}

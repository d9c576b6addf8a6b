package web

import (
	"context"
	"fmt"
	"io"
	"math"
	"net/http"
	"net/http/httptest"
	"strconv"
	"testing"
	"time"

	"github.com/a-h/templ"
	"github.com/chromedp/chromedp"
	"github.com/go-chi/chi/v5"

	"ringbox/web/views"
)

// sampleFrame is the data area of the synthetic plots below, in output
// pixels of a 400 × 300 figure: x linear 0…10, y logarithmic 1…1000.
const sampleFrame = `{"left":50,"top":20,"right":380,"bottom":260,"xmin":0,"xmax":10,"ymin":1,"ymax":1000,"logx":false,"logy":true,"width":400,"height":300}`

// styleSample is a page body that uses every layout class of ringbox.css,
// to check the stylesheet in a browser and to look at it in a screenshot.
var styleSample = templ.ComponentFunc(func(ctx context.Context, w io.Writer) error {
	plot := func(i int) string {
		return fmt.Sprintf(`<figure class="plot" data-frame='%s'>`+
			`<svg xmlns="http://www.w3.org/2000/svg" width="400" height="300" viewBox="0 0 400 300">`+
			`<rect x="50" y="20" width="330" height="240" fill="none" stroke="#555"/>`+
			`<polyline fill="none" stroke="#1f4e5f" stroke-width="2" points="50,260 120,200 200,150 290,90 380,30"/>`+
			`</svg><figcaption>Figure %d. Synthetic curve. <a href="#">SVG</a><a href="#">CSV</a></figcaption></figure>`, sampleFrame, i)
	}
	_, err := io.WriteString(w, `<h1>Style sample</h1>
<form class="form-grid" method="get" action="/">
<div class="field"><label for="lx">lx</label><input id="lx" name="lx" value="20nm"/><span class="field-hint">length, nm by default</span></div>
<div class="field has-error"><label for="ly">ly</label><input id="ly" name="ly" value="-3nm" aria-invalid="true"/><span class="field-error">must be positive</span></div>
<div class="field"><label for="bx">bx</label><select id="bx" name="bx"><option>box</option><option>ring</option></select></div>
<div class="form-actions"><button type="submit">Count</button><a class="button secondary" href="/">Reset</a></div>
</form>
<div class="cards">
<div class="card"><div class="card-label">Electron density</div><div class="card-value">8.47e22<span class="card-unit">cm⁻³</span></div><div class="card-note">box, 300 K</div></div>
<div class="card warn"><div class="card-label">Crossover</div><div class="card-value">14.2<span class="card-unit">nm</span></div></div>
</div>
<div class="figures">`+plot(1)+plot(2)+plot(3)+`</div>
<div class="table-wrap"><table class="results"><caption>Counts at E</caption>
<thead><tr><th>variant</th><th class="num">E<span class="unit">eV</span></th><th class="num">N</th><th class="num">G<span class="unit">µS</span></th></tr></thead>
<tbody><tr><td>box</td><td class="num">0.100</td><td class="num">12</td><td class="num">77.48</td></tr>
<tr><td>ring</td><td class="num">0.100</td><td class="num">1 204</td><td class="num">154.97</td></tr></tbody></table></div>
<div class="callout warn"><p>Below 5 nm the continuum count is off by more than 10 %.</p></div>
<p class="note">A note in small print.</p>`)
	return err
})

// afterFrames waits two animation frames: Chromium delivers mouse moves
// aligned to frames, so a readout is current only after the next one.
var afterFrames = chromedp.Evaluate[chromedp.Void](
	`new Promise(r => requestAnimationFrame(() => requestAnimationFrame(() => r(true))))`, chromedp.EvalAwaitPromise)

func TestBrowserReadoutAndStyles(t *testing.T) {
	addRoutesForTest(t, func(a *App, r chi.Router) {
		r.Get("/test/style", a.handle(func(w http.ResponseWriter, r *http.Request) error {
			return render(w, r, http.StatusOK, views.Page("Style sample", "", styleSample))
		}))
	})
	a, _ := newTestApp(t, Config{})
	srv := httptest.NewServer(a.Handler())
	defer srv.Close()
	ctx := newBrowser(t)
	messages := consoleLog(ctx)

	type box struct{ Left, Top, Width, Height float64 }
	rectOf := func(sel string) chromedp.Action[box] {
		return chromedp.Evaluate[box](`(() => { const r = document.querySelector(` + strconv.Quote(sel) +
			`).getBoundingClientRect(); return {Left: r.left, Top: r.top, Width: r.width, Height: r.height}; })()`)
	}
	run := func(a chromedp.Action[box]) box {
		t.Helper()
		tctx, cancel := context.WithTimeout(ctx, 20*time.Second)
		defer cancel()
		b, err := chromedp.Run(tctx, a)
		if err != nil {
			t.Fatal(err)
		}
		return b
	}

	timeout(t, ctx, chromedp.EmulateViewport(1280, 900), chromedp.Navigate(srv.URL+"/test/style"),
		chromedp.WaitVisible(chromedp.CSS("figure.plot svg")))

	t.Run("wide: three figures in a row", func(t *testing.T) {
		f1, f3 := run(rectOf("figure.plot:nth-of-type(1)")), run(rectOf("figure.plot:nth-of-type(3)"))
		if math.Abs(f1.Top-f3.Top) > 1 || f3.Left <= f1.Left+f1.Width {
			t.Errorf("figures not side by side: %+v %+v", f1, f3)
		}
	})

	// Independent of readout.js: the data value at a point of the frame,
	// placed by scaling output pixels to the rendered SVG box.
	tests := []struct {
		name   string
		tx, ty float64 // fractions of the data area from its left and bottom
		x, y   float64 // expected readout
	}{
		{"centre (log y)", 0.5, 0.5, 5, math.Sqrt(1000)},
		{"lower left", 0.1, 0.1, 1, math.Pow(10, 0.3)},
		{"upper right", 0.9, 0.9, 9, math.Pow(10, 2.7)},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			svg := run(rectOf("figure.plot svg"))
			s := svg.Width / 400 // the SVG keeps its 4:3 aspect
			px, py := 50+tt.tx*330, 260-tt.ty*240
			var got map[string]string
			tctx, cancel := context.WithTimeout(ctx, 20*time.Second)
			defer cancel()
			err := chromedp.Do(tctx,
				chromedp.MouseEvent(chromedp.MouseMoved, svg.Left+px*s, svg.Top+py*s),
				afterFrames,
				chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
					var err error
					got, err = chromedp.Attributes(chromedp.CSS("figure.plot .plot-readout"))(ctx, tg)
					return err
				}))
			if err != nil {
				t.Fatal(err)
			}
			if _, hidden := got["hidden"]; hidden {
				t.Fatalf("readout hidden over the data area: %v", got)
			}
			x, _ := strconv.ParseFloat(got["data-x"], 64)
			y, _ := strconv.ParseFloat(got["data-y"], 64)
			// One output pixel is 10/330 in x and 3/240 decades in y; allow
			// one pixel of rounding in the mouse position.
			if math.Abs(x-tt.x) > 10.0/330 || math.Abs(math.Log10(y/tt.y)) > 3.0/240 {
				t.Errorf("readout (%g, %g), want (%g, %g)", x, y, tt.x, tt.y)
			}
		})
	}

	t.Run("outside the data area hides the readout", func(t *testing.T) {
		svg := run(rectOf("figure.plot svg"))
		s := svg.Width / 400
		var got map[string]string
		timeout(t, ctx,
			chromedp.MouseEvent(chromedp.MouseMoved, svg.Left+20*s, svg.Top+150*s), // left of the frame
			afterFrames,
			chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
				var err error
				got, err = chromedp.Attributes(chromedp.CSS("figure.plot .plot-readout"))(ctx, tg)
				return err
			}))
		if _, hidden := got["hidden"]; !hidden {
			t.Errorf("readout shown outside the data area: %v", got)
		}
	})

	var png []byte
	timeout(t, ctx,
		chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
			svg, err := rectOf("figure.plot svg")(ctx, tg)
			if err != nil {
				return err
			}
			s := svg.Width / 400
			_, err = chromedp.MouseEvent(chromedp.MouseMoved, svg.Left+200*s, svg.Top+150*s)(ctx, tg)
			return err
		}),
		afterFrames,
		chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
			var err error
			png, err = chromedp.FullScreenshot(100)(ctx, tg)
			return err
		}))
	saveScreenshot(t, "style-wide.png", png)

	t.Run("narrow: figures stacked", func(t *testing.T) {
		timeout(t, ctx, chromedp.EmulateViewport(600, 900), chromedp.Reload(),
			chromedp.WaitVisible(chromedp.CSS("figure.plot svg")))
		f1, f2 := run(rectOf("figure.plot:nth-of-type(1)")), run(rectOf("figure.plot:nth-of-type(2)"))
		if f2.Top < f1.Top+f1.Height || math.Abs(f1.Left-f2.Left) > 1 {
			t.Errorf("figures not stacked: %+v %+v", f1, f2)
		}
		var png []byte
		timeout(t, ctx, chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
			var err error
			png, err = chromedp.FullScreenshot(100)(ctx, tg)
			return err
		}))
		saveScreenshot(t, "style-narrow.png", png)
	})

	if errs := consoleErrors(messages()); len(errs) > 0 {
		t.Errorf("console errors:\n%v", errs)
	}
}

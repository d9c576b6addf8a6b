//go:build tools

package tools

import (
	_ "github.com/a-h/templ"
	_ "github.com/chromedp/chromedp"
	_ "github.com/go-chi/chi/v5"
	_ "golang.org/x/sync/errgroup"
	_ "gonum.org/v1/gonum/mat"
	_ "gonum.org/v1/plot"
	_ "modernc.org/sqlite"
)

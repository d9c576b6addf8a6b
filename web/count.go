package web

import (
	"context"
	"net/http"

	"github.com/go-chi/chi/v5"

	"ringbox/internal/scenario"
)

// The count API, GET /api/v1/count?KEY=VALUE&…, answers the JSON of
// scenario.Run, the same document as `ringbox count --format json`. Bad
// input is a 400 {"error", "key"} from the shared error writer.

func init() {
	addRoutes(func(a *App, r chi.Router) {
		r.Get("/api/v1/count", a.handle(a.countAPI))
	})
}

// countAPI answers /api/v1/count.
func (a *App) countAPI(w http.ResponseWriter, r *http.Request) error {
	s, err := scenario.Parse(r.URL.Query())
	if err != nil {
		return err
	}
	ctx := r.Context()
	return a.serveJSON(w, r, "api/v1/count?"+s.Canonical(), func() (any, error) {
		return a.count(ctx, s)
	})
}

// resultEntries bounds the results kept: a result of the default 400 points
// is about 50 kB, of the largest allowed grid (4000 points) about 0.5 MB.
const resultEntries = 32

// results keeps recent results by canonical query, so that a page and the
// three figures it embeds, asked for at once, count the scenario once.
// Results depend on the scenario alone, so Apps may share them.
var results = newResultCache[*scenario.Result](resultEntries)

// count returns the result of s, from the cache or by running the engines
// under ctx (the request's deadline). Concurrent callers for one scenario
// share one run, with the context of the first; errors are not kept. The
// result is shared: callers must not modify it.
func (a *App) count(ctx context.Context, s scenario.Scenario) (*scenario.Result, error) {
	return results.get(s.Canonical(), func() (*scenario.Result, error) {
		return scenario.Run(ctx, s)
	})
}

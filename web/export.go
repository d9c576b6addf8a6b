package web

import (
	"net/http"

	"github.com/go-chi/chi/v5"

	"ringbox/internal/scenario"
)

// GET /export/curves.csv?KEY=VALUE&… downloads the curves of a scenario
// (N, D and M of every variant on the energy grid, units in the header) as
// the same CSV as `ringbox count --format csv`.

func init() {
	addRoutes(func(a *App, r chi.Router) {
		r.Get("/export/curves.csv", a.handle(a.exportCurves))
	})
}

// exportCurves answers /export/curves.csv.
func (a *App) exportCurves(w http.ResponseWriter, r *http.Request) error {
	s, err := scenario.Parse(r.URL.Query())
	if err != nil {
		return err
	}
	ctx := r.Context()
	return a.serveCSV(w, r, "export/curves.csv?"+s.Canonical(), "ringbox-curves.csv", func() (csvWriter, error) {
		return a.count(ctx, s)
	})
}

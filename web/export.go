package web

import (
	"bytes"
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
	// writeError removes neither header on failure, but an error page with
	// an attachment disposition would be saved instead of shown: set it
	// only once the body is there (serveCached writes nothing on error).
	body, ct, err := a.cached("export/curves.csv?"+s.Canonical(), func() ([]byte, string, error) {
		res, err := a.count(ctx, s)
		if err != nil {
			return nil, "", err
		}
		var buf bytes.Buffer
		if err := res.WriteCSV(&buf); err != nil {
			return nil, "", err
		}
		return buf.Bytes(), "text/csv; charset=utf-8; header=present", nil
	})
	if err != nil {
		return err
	}
	w.Header().Set("Content-Disposition", `attachment; filename="ringbox-curves.csv"`)
	writeBody(w, r, http.StatusOK, ct, body)
	return nil
}

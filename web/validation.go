package web

import (
	"context"
	"net/http"
	"strconv"
	"strings"
	"sync"

	"github.com/go-chi/chi/v5"

	"ringbox/internal/validation"
	"ringbox/web/views"
)

// The validation page, /validation, and its JSON, /api/v1/validation: the
// published checks of the reference table, run live through the engines.

func init() {
	addRoutes(func(a *App, r chi.Router) {
		r.Get("/validation", a.handle(a.validationPage))
		r.Get("/api/v1/validation", a.handle(a.validationAPI))
	})
}

// checkReport keeps the report of the built-in table after its first
// successful run: the checks are deterministic, so every App may share it.
// A run cut short by its request's deadline is not kept.
var checkReport struct {
	mu  sync.Mutex
	rep *validation.Report
}

// validationReport returns the built-in table's report, running it under
// ctx on the first call. Concurrent first callers wait for one run.
func validationReport(ctx context.Context) (validation.Report, error) {
	checkReport.mu.Lock()
	defer checkReport.mu.Unlock()
	if checkReport.rep != nil {
		return *checkReport.rep, nil
	}
	rep, err := validation.Run(ctx, validation.Default(), 0)
	if err != nil {
		return validation.Report{}, err
	}
	// A check that stopped on the request's deadline is an accident of
	// this request, not a result: do not keep it.
	if ctx.Err() != nil {
		return rep, ctx.Err()
	}
	checkReport.rep = &rep
	return rep, nil
}

func (a *App) validationAPI(w http.ResponseWriter, r *http.Request) error {
	rep, err := validationReport(r.Context())
	if err != nil {
		return err
	}
	return writeJSON(w, r, http.StatusOK, rep)
}

func (a *App) validationPage(w http.ResponseWriter, r *http.Request) error {
	rep, err := validationReport(r.Context())
	if err != nil {
		return err
	}
	rows := make([]views.CheckRow, len(rep.Outcomes))
	for i, o := range rep.Outcomes {
		row := views.CheckRow{
			ID: o.ID, Quantity: o.Quantity, Unit: displayUnit(o.Unit), Source: o.Source, Pass: o.Pass,
			Reference: strconv.FormatFloat(o.Reference, 'g', -1, 64),
			Tolerance: o.ToleranceText, Err: o.Err,
			Computed: "—", Deviation: "—",
		}
		if o.Err == "" {
			row.Computed = strconv.FormatFloat(o.Computed, 'g', 7, 64)
			row.Deviation = deviationText(o)
		}
		switch o.Engine {
		case validation.EngineCount:
			row.Href = "/?" + o.Query
		case validation.EngineLattice:
			row.Href = "/lattice?" + o.Query
		}
		rows[i] = row
	}
	sum := views.CheckSummary{Passed: rep.Passed, Total: len(rep.Outcomes)}
	return render(w, r, http.StatusOK, views.Page("Validation", views.NavValidation, views.ValidationBody(sum, rows)))
}

// deviationText shows a relative deviation in per cent and an absolute
// one in the check's unit.
func deviationText(o validation.Outcome) string {
	if o.Tolerance.Relative {
		return strconv.FormatFloat(100*o.Deviation, 'g', 3, 64) + " %"
	}
	return strings.TrimSpace(strconv.FormatFloat(o.Deviation, 'g', 3, 64) + " " + displayUnit(o.Unit))
}

// superscripts spells the exponents of the table's units ("cm^-3") as a
// reader expects them (cm⁻³).
var superscripts = strings.NewReplacer("^-", "⁻", "^", "", "0", "⁰", "1", "¹", "2", "²", "3", "³", "4", "⁴", "5", "⁵", "6", "⁶", "7", "⁷", "8", "⁸", "9", "⁹")

// displayUnit shows a table unit: exponents as superscripts, and nothing
// for a pure number ("1").
func displayUnit(u string) string {
	if u == "1" {
		return ""
	}
	var b strings.Builder
	for i, part := range strings.Split(u, " ") {
		if i > 0 {
			b.WriteByte(' ')
		}
		base, exp, ok := strings.Cut(part, "^")
		b.WriteString(base)
		if ok {
			b.WriteString(superscripts.Replace("^" + exp))
		}
	}
	return b.String()
}

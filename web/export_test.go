package web

import (
	"encoding/csv"
	"net/http"
	"strconv"
	"strings"
	"testing"
)

func TestExportCurves(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	rec := do(a.Handler(), http.MethodGet, "/export/curves.csv?lx=10nm&points=50")
	if rec.Code != 200 {
		t.Fatalf("status %d", rec.Code)
	}
	if ct := rec.Header().Get("Content-Type"); !strings.HasPrefix(ct, "text/csv") {
		t.Errorf("Content-Type %q", ct)
	}
	if cd := rec.Header().Get("Content-Disposition"); !strings.HasPrefix(cd, "attachment;") || !strings.Contains(cd, ".csv") {
		t.Errorf("Content-Disposition %q", cd)
	}
	rows, err := csv.NewReader(rec.Body).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 51 {
		t.Fatalf("%d rows, want a header and 50", len(rows))
	}
	// Units are in the header: energies and densities of states per eV.
	head := strings.Join(rows[0], ",")
	for _, col := range []string{"energy_eV", "states_box", "dos_ring_per_eV", "modes_continuum"} {
		if !strings.Contains(head, col) {
			t.Errorf("header %q lacks %s", head, col)
		}
	}
	if e, err := strconv.ParseFloat(rows[50][0], 64); err != nil || e != 0.3 {
		t.Errorf("last energy %q, want the default E max 0.3 eV", rows[50][0])
	}

	t.Run("bad input is an error page, not an attachment", func(t *testing.T) {
		rec := do(a.Handler(), http.MethodGet, "/export/curves.csv?lx=-1nm")
		if rec.Code != 400 || rec.Header().Get("Content-Disposition") != "" {
			t.Errorf("status %d, disposition %q", rec.Code, rec.Header().Get("Content-Disposition"))
		}
	})
}

package web

import (
	"bytes"
	"context"
	"encoding/json"
	"net/http"
	"net/url"
	"testing"

	"ringbox/internal/phys"
	"ringbox/internal/scenario"
)

func TestCountAPI(t *testing.T) {
	a, _ := newTestApp(t, Config{})
	t.Run("equals the JSON of scenario.Run", func(t *testing.T) {
		for _, q := range []string{
			"material=gaas&lx=10nm&ly=10nm&lz=100nm",
			"material=cu&lx=5nm&ly=5nm&lz=5nm&bz=box&at=3,7",
			"material=si&dims=2&lx=5nm&by=open&density=1e6",
		} {
			rec := do(a.Handler(), http.MethodGet, "/api/v1/count?"+q)
			if rec.Code != 200 || rec.Header().Get("Content-Type") != "application/json; charset=utf-8" {
				t.Fatalf("%s: status %d, type %q: %s", q, rec.Code, rec.Header().Get("Content-Type"), rec.Body)
			}
			v, _ := url.ParseQuery(q)
			s, err := scenario.Parse(v)
			if err != nil {
				t.Fatal(err)
			}
			res, err := scenario.Run(context.Background(), s)
			if err != nil {
				t.Fatal(err)
			}
			want, _ := json.Marshal(res)
			if !bytes.Equal(bytes.TrimSpace(rec.Body.Bytes()), want) {
				t.Errorf("%s: API JSON differs from json.Marshal(scenario.Run)", q)
			}
		}
	})
	t.Run("conductance quantum", func(t *testing.T) {
		// A 1D conductor has M = g_s·g_v = 2 modes at every energy above
		// the band edge, so at T = 0 ballistically G = 2e²/h exactly
		// (DESIGN; van Wees et al., PRL 60, 848 (1988)); CODATA 2018 value.
		rec := do(a.Handler(), http.MethodGet, "/api/v1/count?dims=1&lx=1um&bx=open&temp=0&ef=0.05")
		var body struct {
			Observables map[string]struct {
				ConductanceS float64 `json:"conductance_S"`
			} `json:"observables"`
		}
		if err := json.Unmarshal(rec.Body.Bytes(), &body); err != nil {
			t.Fatal(err)
		}
		if g := body.Observables["scenario"].ConductanceS; g < 7.748091729e-5*(1-1e-9) || g > 7.748091729e-5*(1+1e-9) {
			t.Errorf("G = %g S, want 2e²/h = 7.748091729e-5 S", g)
		}
		_ = phys.ConductanceQuantum
	})
	t.Run("bad input names the key", func(t *testing.T) {
		for _, tt := range []struct{ query, key string }{
			{"lx=-3nm", "lx"}, {"bz=wall", "bz"}, {"colour=red", "colour"}, {"ef=0.1&density=1", "density"},
			{"points=1", "points"}, {"material=kryptonite", "material"},
		} {
			rec := do(a.Handler(), http.MethodGet, "/api/v1/count?"+tt.query)
			var body errorBody
			if err := json.Unmarshal(rec.Body.Bytes(), &body); err != nil {
				t.Fatalf("%s: %v: %s", tt.query, err, rec.Body)
			}
			if rec.Code != 400 || body.Key != tt.key || body.Error == "" {
				t.Errorf("%s: %d %+v, want 400 naming %s", tt.query, rec.Code, body, tt.key)
			}
		}
	})
	t.Run("one run for the page and its figures", func(t *testing.T) {
		q := "lx=10nm&ly=11nm&lz=123nm"
		v, _ := url.ParseQuery(q)
		s, _ := scenario.Parse(v)
		do(a.Handler(), http.MethodGet, "/?"+q)
		first, ok := results.lru.Get(s.Canonical())
		if !ok {
			t.Fatal("the page's result is not cached")
		}
		for _, p := range []string{"/plot/states.png", "/api/v1/count", "/export/curves.csv"} {
			do(a.Handler(), http.MethodGet, p+"?"+q)
		}
		if again, _ := results.lru.Get(s.Canonical()); again != first {
			t.Error("the scenario was counted again")
		}
	})
}

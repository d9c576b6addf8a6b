package web

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"net/http"
	"net/url"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"ringbox/internal/scenario"
	"ringbox/internal/store"
)

// documentedKeys returns the query parameter names of a path's GET.
func documentedKeys(t *testing.T, doc map[string]any, path string) []string {
	t.Helper()
	p, ok := doc["paths"].(map[string]any)[path].(map[string]any)
	if !ok {
		t.Fatalf("no path %s", path)
	}
	get, _ := p["get"].(map[string]any)
	params, _ := get["parameters"].([]any)
	var out []string
	for _, x := range params {
		m := x.(map[string]any)
		if m["in"] == "query" {
			out = append(out, m["name"].(string))
		}
	}
	return out
}

func openAPITestApp(t *testing.T) (*App, map[string]any) {
	t.Helper()
	a, _ := newTestApp(t, Config{DBPath: filepath.Join(t.TempDir(), "r.db")})
	rec := do(a.Handler(), http.MethodGet, "/api/v1/openapi.json")
	if rec.Code != http.StatusOK || !strings.HasPrefix(rec.Header().Get("Content-Type"), "application/json") {
		t.Fatalf("status %d, type %q", rec.Code, rec.Header().Get("Content-Type"))
	}
	var doc map[string]any
	if err := json.Unmarshal(rec.Body.Bytes(), &doc); err != nil {
		t.Fatalf("not JSON: %v", err)
	}
	return a, doc
}

// The document is OpenAPI 3.1 (OpenAPI Specification 3.1.0, "openapi"
// field: the major.minor of the specification) with the routes DESIGN names.
func TestOpenAPIDocument(t *testing.T) {
	_, doc := openAPITestApp(t)
	if v, _ := doc["openapi"].(string); !strings.HasPrefix(v, "3.1.") {
		t.Errorf("openapi = %q, want 3.1.x", v)
	}
	for _, k := range []string{"info", "paths", "components"} {
		if doc[k] == nil {
			t.Errorf("no %s", k)
		}
	}
	paths := doc["paths"].(map[string]any)
	for _, p := range []string{"/api/v1/count", "/api/v1/sweep", "/api/v1/lattice", "/api/v1/reviews/{id}", "/healthz", "/api/v1/validation"} {
		if paths[p] == nil {
			t.Errorf("no path %s", p)
		}
	}
	// Every $ref resolves.
	schemas := doc["components"].(map[string]any)["schemas"].(map[string]any)
	var walk func(any)
	walk = func(v any) {
		switch v := v.(type) {
		case map[string]any:
			if r, ok := v["$ref"].(string); ok {
				name := strings.TrimPrefix(r, "#/components/schemas/")
				if schemas[name] == nil {
					t.Errorf("dangling $ref %s", r)
				}
			}
			for _, x := range v {
				walk(x)
			}
		case []any:
			for _, x := range v {
				walk(x)
			}
		}
	}
	walk(doc)
	errSchema := schemas["Error"].(map[string]any)["properties"].(map[string]any)
	if errSchema["error"] == nil || errSchema["key"] == nil {
		t.Errorf("Error schema %v lacks error and key", errSchema)
	}
}

// The documented parameters are exactly the keys the parsers accept.
func TestOpenAPIParametersMatchParsers(t *testing.T) {
	_, doc := openAPITestApp(t)
	tests := []struct {
		path string
		want []string
	}{
		{"/api/v1/count", scenario.Keys},
		{"/api/v1/lattice", scenario.LatticeKeys},
		{"/api/v1/sweep", append(slices.Clone(sweepKeys), scenario.Keys...)},
	}
	for _, tt := range tests {
		t.Run(tt.path, func(t *testing.T) {
			got := documentedKeys(t, doc, tt.path)
			if !slices.Equal(got, tt.want) {
				t.Errorf("documented %v\nparser keys %v", got, tt.want)
			}
		})
	}
	for k := range scenarioParams {
		if !slices.Contains(scenario.Keys, k) {
			t.Errorf("scenario key %q is described but the parser has no such key", k)
		}
	}
	for k := range latticeParams {
		if !slices.Contains(scenario.LatticeKeys, k) {
			t.Errorf("lattice key %q is described but the parser has no such key", k)
		}
	}
}

// answers reports whether the route is served (a 404 of the router's own
// "no page" means another engineer's handler is not registered yet).
func answers(a *App, path string) bool {
	rec := do(a.Handler(), http.MethodGet, path)
	return !(rec.Code == http.StatusNotFound && strings.Contains(rec.Body.String(), "no page at"))
}

// Every documented parameter is accepted by the real handler (no
// "unknown key" 400), and an undocumented key is refused naming itself.
func TestOpenAPIParametersAcceptedByHandlers(t *testing.T) {
	a, doc := openAPITestApp(t)
	// A good value per key, chosen so each key is valid alone on top of
	// base (the custom-material keys need material=custom).
	scen := map[string]string{
		"material": "gaas", "m": "0.1", "mx": "0.1", "my": "0.1", "mz": "0.1", "gv": "1", "gs": "2", "alpha": "0",
		"dims": "2", "lx": "10nm", "ly": "200nm", "lz": "", "bx": "box", "by": "open", "bz": "", "along": "y",
		"emin": "0", "emax": "0.2", "points": "50", "temp": "300", "ef": "0.05", "density": "", "eta": "2meV",
		"shape": "lorentzian", "mfp": "100nm", "at": "0.05,0.1", "budget": "1e6",
	}
	tests := []struct {
		path, base string
		good       map[string]string
	}{
		{"/api/v1/count", "dims=2&lx=10nm&ly=200nm&by=open&points=50&material=custom", scen},
		{"/api/v1/sweep", "dims=2&lx=10nm&ly=200nm&by=open&points=50&sweep=lx&from=5nm&to=20nm&steps=3",
			map[string]string{"sweep": "lx", "from": "5nm", "to": "20nm", "steps": "3", "quantity": "modes", "tol": "0.1"}},
		{"/api/v1/lattice", "kpoints=101&points=100", map[string]string{
			"structure": "tube", "lines": "", "n": "6", "m": "6", "gamma0": "2.7", "acc": "0.142nm", "gs": "2", "ef": "0.1",
			"temp": "300", "at": "0,0.5", "emin": "-2", "emax": "2", "points": "100", "kpoints": "101"}},
	}
	for _, tt := range tests {
		t.Run(tt.path, func(t *testing.T) {
			if !answers(a, tt.path) {
				t.Skipf("%s is not served yet", tt.path)
			}
			for _, k := range documentedKeys(t, doc, tt.path) {
				v, ok := tt.good[k]
				if !ok || v == "" {
					continue // keys whose lone value needs others (density: no ef); the parser test covers them
				}
				q, _ := url.ParseQuery(tt.base)
				q.Set(k, v)
				if k == "density" {
					q.Del("ef")
				}
				rec := do(a.Handler(), http.MethodGet, tt.path+"?"+q.Encode())
				if rec.Code == http.StatusBadRequest && strings.Contains(rec.Body.String(), "unknown key") {
					t.Errorf("%s=%s refused: %s", k, v, rec.Body.String())
				}
			}
			for _, k := range []string{"bogus", "lengthx", "Material"} {
				rec := do(a.Handler(), http.MethodGet, tt.path+"?"+tt.base+"&"+k+"=1")
				var body struct{ Error, Key string }
				_ = json.Unmarshal(rec.Body.Bytes(), &body)
				if rec.Code != http.StatusBadRequest || body.Key != k {
					t.Errorf("undocumented %s: status %d, body %s", k, rec.Code, rec.Body.String())
				}
			}
		})
	}
}

// Each documented route answers: 200 for a good query, 404 for a missing
// review, 400 {"error","key"} for a bad value.
func TestOpenAPIRoutesAnswer(t *testing.T) {
	a, doc := openAPITestApp(t)
	good := map[string]string{
		"/api/v1/count":        "/api/v1/count?material=gaas&dims=2&lx=20nm&ly=200nm&by=open&points=40",
		"/api/v1/sweep":        "/api/v1/sweep?material=gaas&dims=2&lx=20nm&ly=200nm&by=open&sweep=lx&from=5nm&to=40nm&steps=4",
		"/api/v1/lattice":      "/api/v1/lattice?structure=tube&n=10&m=0&kpoints=101&points=100",
		"/api/v1/validation":   "/api/v1/validation",
		"/api/v1/openapi.json": "/api/v1/openapi.json",
		"/healthz":             "/healthz",
	}
	for p := range doc["paths"].(map[string]any) {
		t.Run(p, func(t *testing.T) {
			if p == "/api/v1/reviews/{id}" {
				rec := do(a.Handler(), http.MethodGet, "/api/v1/reviews/987654321")
				if !answers(a, "/api/v1/reviews/1") {
					t.Skip("reviews API not served yet")
				}
				var body struct{ Error string }
				if rec.Code != http.StatusNotFound || json.Unmarshal(rec.Body.Bytes(), &body) != nil || body.Error == "" {
					t.Errorf("missing review: status %d, body %s", rec.Code, rec.Body.String())
				}
				return
			}
			target, ok := good[p]
			if !ok {
				t.Fatalf("no good query for documented path %s", p)
			}
			if !answers(a, target) {
				t.Skipf("%s is not served yet", p)
			}
			rec := do(a.Handler(), http.MethodGet, target)
			if rec.Code != http.StatusOK {
				t.Fatalf("status %d: %s", rec.Code, rec.Body.String())
			}
			var v map[string]any
			if err := json.Unmarshal(rec.Body.Bytes(), &v); err != nil {
				t.Errorf("not JSON: %v", err)
			}
			if strings.HasPrefix(p, "/api/v1/") && p != "/api/v1/validation" && p != "/api/v1/openapi.json" {
				rec := do(a.Handler(), http.MethodGet, target+"&temp=hot")
				var body struct{ Error, Key string }
				if rec.Code != http.StatusBadRequest || json.Unmarshal(rec.Body.Bytes(), &body) != nil || body.Key != "temp" || body.Error == "" {
					t.Errorf("bad temp: status %d, body %s", rec.Code, rec.Body.String())
				}
			}
		})
	}
}

// conform checks value against an OpenAPI 3.1 (JSON Schema 2020-12)
// schema, for the keywords the document uses: $ref, type (one or a list),
// enum, const, properties, required, items, additionalProperties. With
// strict, an object may hold only the properties the schema names, so a
// field added to an answer without documenting it fails.
func conform(schemas map[string]any, schema map[string]any, v any, path string, strict bool) []string {
	if r, ok := schema["$ref"].(string); ok {
		return conform(schemas, schemas[strings.TrimPrefix(r, "#/components/schemas/")].(map[string]any), v, path, strict)
	}
	var errs []string
	bad := func(format string, args ...any) { errs = append(errs, path+": "+fmt.Sprintf(format, args...)) }
	if t, ok := schema["type"]; ok {
		types := []string{}
		switch t := t.(type) {
		case string:
			types = append(types, t)
		case []any:
			for _, x := range t {
				types = append(types, x.(string))
			}
		}
		if !slices.ContainsFunc(types, func(t string) bool { return jsonType(v, t) }) {
			bad("%v is not %v", v, types)
			return errs
		}
	}
	if e, ok := schema["enum"].([]any); ok && !slices.Contains(e, v) {
		bad("%v not in %v", v, e)
	}
	if c, ok := schema["const"]; ok && c != v {
		bad("%v is not %v", v, c)
	}
	switch v := v.(type) {
	case map[string]any:
		props, _ := schema["properties"].(map[string]any)
		for _, r := range asStrings(schema["required"]) {
			if _, ok := v[r]; !ok {
				bad("required %q missing", r)
			}
		}
		extra, _ := schema["additionalProperties"].(map[string]any)
		for k, x := range v {
			if ps, ok := props[k].(map[string]any); ok {
				errs = append(errs, conform(schemas, ps, x, path+"."+k, false)...)
			} else if extra != nil {
				errs = append(errs, conform(schemas, extra, x, path+"."+k, false)...)
			} else if strict {
				bad("field %q is not documented", k)
			}
		}
	case []any:
		if items, ok := schema["items"].(map[string]any); ok {
			for i, x := range v {
				if i > 3 {
					break // the shape of the first few is enough
				}
				errs = append(errs, conform(schemas, items, x, fmt.Sprintf("%s[%d]", path, i), false)...)
			}
		}
	}
	return errs
}

func jsonType(v any, t string) bool {
	switch t {
	case "null":
		return v == nil
	case "string":
		_, ok := v.(string)
		return ok
	case "boolean":
		_, ok := v.(bool)
		return ok
	case "number":
		_, ok := v.(float64)
		return ok
	case "integer":
		f, ok := v.(float64)
		return ok && f == math.Trunc(f)
	case "object":
		_, ok := v.(map[string]any)
		return ok
	case "array":
		_, ok := v.([]any)
		return ok
	}
	return false
}

func asStrings(v any) []string {
	var out []string
	xs, _ := v.([]any)
	for _, x := range xs {
		out = append(out, x.(string))
	}
	return out
}

// The real answers have the documented shapes, and every top-level field
// of each answer is documented.
func TestOpenAPIResponsesConform(t *testing.T) {
	a, doc := openAPITestApp(t)
	schemas := doc["components"].(map[string]any)["schemas"].(map[string]any)
	tests := []struct{ target, schema string }{
		{"/api/v1/count?material=gaas&dims=2&lx=20nm&ly=200nm&by=open&points=40", "CountResult"},
		{"/api/v1/count?material=si&dims=3&lx=5nm&ly=5nm&lz=5nm&bz=box&points=40", "CountResult"},
		{"/api/v1/sweep?material=gaas&dims=2&lx=20nm&ly=200nm&by=open&sweep=lx&from=5nm&to=40nm&steps=4", "SweepResult"},
		{"/api/v1/lattice?structure=tube&n=6&m=6&kpoints=101&points=100", "LatticeResult"},
		{"/api/v1/lattice?structure=armchair&lines=7&kpoints=101&points=100", "LatticeResult"},
		{"/api/v1/validation", "ValidationReport"},
		{"/healthz", "Health"},
		{"/api/v1/count?temp=hot", "Error"},
	}
	for _, tt := range tests {
		t.Run(tt.target, func(t *testing.T) {
			if !answers(a, tt.target) {
				t.Skipf("%s is not served yet", tt.target)
			}
			rec := do(a.Handler(), http.MethodGet, tt.target)
			var v any
			if err := json.Unmarshal(rec.Body.Bytes(), &v); err != nil {
				t.Fatalf("status %d, not JSON: %v", rec.Code, err)
			}
			for _, e := range conform(schemas, schemas[tt.schema].(map[string]any), v, tt.schema, true) {
				t.Error(e)
			}
		})
	}
	// The checker can fail: a wrong type and an undocumented field.
	bad := map[string]any{"status": "ok", "extra": 1.0}
	if len(conform(schemas, schemas["Health"].(map[string]any), bad, "Health", true)) == 0 {
		t.Error("undocumented field passed")
	}
	if len(conform(schemas, schemas["Error"].(map[string]any), map[string]any{"error": 3.0}, "Error", true)) == 0 {
		t.Error("wrong type passed")
	}
}

// A saved review read through the API has the documented shape.
func TestOpenAPIReviewConforms(t *testing.T) {
	a, doc := openAPITestApp(t)
	if a.Reviews == nil || !answers(a, "/api/v1/reviews/1") {
		t.Skip("reviews are not served yet")
	}
	rv, err := a.Reviews.Create(context.Background(), store.Review{Title: "InAs wire options",
		Notes: "box against ring", Scenarios: []string{"material=inas&dims=3&lx=20nm&ly=20nm&lz=1um&bz=open"}})
	if err != nil {
		t.Fatal(err)
	}
	rec := do(a.Handler(), http.MethodGet, "/api/v1/reviews/"+strconv.FormatInt(rv.ID, 10))
	if rec.Code != http.StatusOK {
		t.Fatalf("status %d: %s", rec.Code, rec.Body.String())
	}
	var v any
	if err := json.Unmarshal(rec.Body.Bytes(), &v); err != nil {
		t.Fatal(err)
	}
	schemas := doc["components"].(map[string]any)["schemas"].(map[string]any)
	for _, e := range conform(schemas, schemas["Review"].(map[string]any), v, "Review", true) {
		t.Error(e)
	}
}

package web

import (
	"encoding/json"
	"fmt"
	"net/http"
	"sync"

	"github.com/go-chi/chi/v5"

	"ringbox/internal/lattice"
	"ringbox/internal/material"
	"ringbox/internal/scenario"
)

// GET /api/v1/openapi.json: an OpenAPI 3.1 description of the JSON API.
// The query parameters are generated from scenario.Keys and
// scenario.LatticeKeys, each with the description below, so a key added to
// the parser without a description here fails the tests (openapi_test.go),
// as does a documented key the handlers refuse.

func init() {
	addRoutes(func(a *App, r chi.Router) {
		r.Get("/api/v1/openapi.json", a.handle(a.openAPI))
	})
}

// apiParam is one documented query parameter.
type apiParam struct {
	schema map[string]any
	desc   string
}

func oaStr(desc string) apiParam { return apiParam{map[string]any{"type": "string"}, desc} }

func oaEnum(desc string, values ...string) apiParam {
	return apiParam{map[string]any{"type": "string", "enum": values}, desc}
}

func oaNum(desc string, lo, hi float64) apiParam {
	return apiParam{map[string]any{"type": "number", "minimum": lo, "maximum": hi}, desc}
}

func oaInt(desc string, lo, hi int) apiParam {
	return apiParam{map[string]any{"type": "integer", "minimum": lo, "maximum": hi}, desc}
}

const (
	lengthNote = " A length with unit (`20nm`, `0.02um`, `200A`, `2e-8m`); a bare number is nm. 0.1 nm to 1 m."
	energyNote = " In eV, or with a unit (`25meV`)."
)

// scenarioParams documents every key of scenario.Keys (the count and sweep
// APIs, the conductor page and `ringbox count`).
var scenarioParams = map[string]apiParam{
	"material": oaEnum("Catalogue material (effective masses, valleys, Kane α, default E_F), or `custom` with m/mx/my/mz and gv. Default gaas.",
		append(material.IDs(), material.CustomID)...),
	"m":  oaNum("custom only: effective mass for every axis, in m₀. Default 1.", 1e-3, 100),
	"mx": oaNum("custom only: effective mass along x, in m₀ (default m).", 1e-3, 100),
	"my": oaNum("custom only: effective mass along y, in m₀ (default m).", 1e-3, 100),
	"mz": oaNum("custom only: effective mass along z, in m₀ (default m).", 1e-3, 100),
	"gv": oaInt("custom only: valley degeneracy g_v. Default 1.", 1, 64),
	"gs": oaInt("Spin degeneracy g_s. Default 2.", 1, 2),
	"alpha": oaNum("Kane nonparabolicity α in 1/eV: E(1 + αE) = Σ ħ²k²/2m. Default: the material's (0 = parabolic).",
		0, 100),
	"dims":   oaInt("Number of axes: 1 (x), 2 (x, y) or 3 (x, y, z). Default 3.", 1, 3),
	"lx":     oaStr("Length along x." + lengthNote),
	"ly":     oaStr("Length along y (dims ≥ 2)." + lengthNote),
	"lz":     oaStr("Length along z (dims = 3)." + lengthNote),
	"bx":     oaEnum("Boundary condition along x: box (hard walls, k = nπ/L), ring (periodic, k = 2πn/L) or open.", "box", "ring", "open"),
	"by":     oaEnum("Boundary condition along y.", "box", "ring", "open"),
	"bz":     oaEnum("Boundary condition along z.", "box", "ring", "open"),
	"along":  oaEnum("Transport axis for the modes M(E) and the conductance. Default: the last axis.", "x", "y", "z"),
	"emin":   oaStr(fmt.Sprintf("Lowest energy of the curves.%s %g to %g eV. Default 0.", energyNote, float64(scenario.MinEnergyEV), float64(scenario.MaxEnergyEV))),
	"emax":   oaStr(fmt.Sprintf("Highest energy of the curves, above emin and above 0.%s At most %g eV. Default 0.3 eV (metals: 1.25 E_F).", energyNote, float64(scenario.MaxEnergyEV))),
	"points": oaInt("Points of the energy grid. Default 400.", 2, scenario.MaxPoints),
	"temp":   oaNum("Temperature in K. Default 300.", 0, scenario.MaxTempK),
	"ef":     oaStr("Fermi level above the band edge." + energyNote + " Default: the material's. Not with density."),
	"density": oaNum("Carrier density instead of ef, in the scenario's density unit (cm⁻³, cm⁻² or cm⁻¹ of the open axes; "+
		"electrons per conductor when every axis is confined). E_F is solved and returned as ef_eV.", 0, 1e30),
	"eta":    oaStr("Broadening width of the delta peaks of a confined conductor." + energyNote + " 1 µeV to 10 eV. Default: k_B·T (at least two grid steps)."),
	"shape":  oaEnum("Line shape of the broadening. Default gaussian.", "gaussian", "lorentzian"),
	"mfp":    oaStr("Mean free path λ: transmission T = λ/(λ + L) along the transport axis (Landauer–Büttiker). Default: ballistic." + lengthNote),
	"at":     oaStr(fmt.Sprintf("Comma list of energies for point values (at most %d).%s Default: E_F.", scenario.MaxAt, energyNote)),
	"budget": oaNum("Work budget of an exact count, in operations (about 3×10⁹ a second on one core): the cheapest exact plan of each variant is priced, and above the budget the count is the smooth (Weyl) asymptotic one with an error estimate.", 1, scenario.MaxBudget),
}

// sweepKeys are the keys a size sweep adds to the scenario keys (DESIGN's
// interface contract).
var sweepKeys = []string{"sweep", "from", "to", "steps", "quantity", "tol"}

var sweepParams = map[string]apiParam{
	"sweep":    oaEnum("The length to sweep: one axis, or all confined lengths scaled together.", "lx", "ly", "lz", "all"),
	"from":     oaStr("First length of the sweep." + lengthNote),
	"to":       oaStr("Last length of the sweep, above from." + lengthNote),
	"steps":    oaInt("Number of lengths, spaced logarithmically. Default 24.", 2, 200),
	"quantity": oaEnum("What the crossover is judged on. Default density.", "density", "modes", "conductance", "states"),
	"tol":      oaNum("Relative tolerance of the crossover: the size above which each variant stays within tol of the continuum. Default 0.05.", 0, 10),
}

// latticeParams documents every key of scenario.LatticeKeys.
var latticeParams = map[string]apiParam{
	"structure": oaEnum("armchair or zigzag ribbon (with lines), or tube (with n, m). Default armchair.", "armchair", "zigzag", "tube"),
	"lines":     oaInt("Ribbons: dimer lines (armchair) or zigzag chains (zigzag). Default 7.", 1, lattice.MaxLines),
	"n":         oaInt("Tubes: chiral index n. Default 10.", 1, lattice.MaxTubeN),
	"m":         oaInt("Tubes: chiral index m, 0 ≤ m ≤ n. Default 0.", 0, lattice.MaxTubeN),
	"gamma0":    oaStr(fmt.Sprintf("Nearest-neighbour hopping γ0.%s 1 meV to 20 eV. Default %g eV.", energyNote, lattice.DefaultGamma0EV)),
	"acc":       oaStr(fmt.Sprintf("Carbon–carbon distance a_cc, with unit; bare numbers are nm. 0.05 to 1 nm. Default %g nm.", lattice.DefaultAccNM)),
	"gs":        oaInt("Spin degeneracy g_s. Default 2.", 1, 2),
	"ef":        oaStr(fmt.Sprintf("Fermi level from charge neutrality.%s |ef| ≤ %g eV. Default 0.", energyNote, lattice.MaxEnergyEV)),
	"temp":      oaNum("Temperature in K. Default 300.", 0, lattice.MaxTempK),
	"at":        oaStr(fmt.Sprintf("Comma list of energies for point values (at most %d).%s", lattice.MaxAt, energyNote)),
	"emin":      oaStr("Lowest energy of the curves." + energyNote + " Default −3 eV."),
	"emax":      oaStr("Highest energy of the curves, above emin." + energyNote + " Default 3 eV."),
	"points":    oaInt("Energy bins of the curves. Default 600.", 2, lattice.MaxPoints),
	"kpoints":   oaInt("k points across the zone (an even number is raised by one). Default 401.", lattice.MinKPoints, lattice.MaxKPoints),
}

// parameters turns keys into OpenAPI query parameters, in the keys' order.
// A key without a description panics: the tests build the document, so a
// new key cannot ship undocumented.
func apiParameters(keys []string, docs map[string]apiParam) []any {
	out := make([]any, 0, len(keys))
	for _, k := range keys {
		p, ok := docs[k]
		if !ok {
			panic("web: openapi: query key " + k + " has no description")
		}
		out = append(out, map[string]any{"name": k, "in": "query", "required": false, "description": p.desc, "schema": p.schema})
	}
	return out
}

func oaRef(name string) map[string]any { return map[string]any{"$ref": "#/components/schemas/" + name} }

func oaBody(desc, schema string) map[string]any {
	return map[string]any{"description": desc, "content": map[string]any{"application/json": map[string]any{"schema": oaRef(schema)}}}
}

// errorResponses are the answers every computing route shares.
func oaErrors() map[string]any {
	return map[string]any{
		"400": oaBody("Bad input; key names the query parameter at fault.", "Error"),
		"422": oaBody("The work asked for exceeds the limits (ask for fewer points or smaller sizes).", "Error"),
		"503": oaBody("Server busy (Retry-After set) or request canceled.", "Error"),
		"504": oaBody("The computation exceeded the request's time limit.", "Error"),
	}
}

func oaOK(desc, schema string, more map[string]any) map[string]any {
	m := map[string]any{"200": oaBody(desc, schema)}
	for k, v := range more {
		m[k] = v
	}
	return m
}

func oaObj(props map[string]any, required ...string) map[string]any {
	m := map[string]any{"type": "object", "properties": props}
	if len(required) > 0 {
		m["required"] = required
	}
	return m
}

func oaNumMap(desc string) map[string]any {
	return map[string]any{"type": "object", "description": desc, "additionalProperties": map[string]any{"type": "number"}}
}

func oaArr(items any) map[string]any { return map[string]any{"type": "array", "items": items} }

var (
	oaTNum  = map[string]any{"type": "number"}
	oaTStr  = map[string]any{"type": "string"}
	oaTInt  = map[string]any{"type": "integer"}
	oaTBool = map[string]any{"type": "boolean"}
)

func oaNullable(t string) map[string]any { return map[string]any{"type": []string{t, "null"}} }

// schemas are the response shapes.
func oaSchemas() map[string]any {
	variants := "Keyed by variant: scenario (its own boundary conditions), box, ring, continuum; states and dos_per_eV also smooth (Weyl)."
	observables := oaObj(map[string]any{
		"electrons":             oaTNum,
		"density":               oaTNum,
		"density_unit":          oaTStr,
		"volume_density":        oaTNum,
		"volume_density_unit":   oaTStr,
		"conductance_S":         oaTNum,
		"conductance_G0":        map[string]any{"type": "number", "description": "conductance in units of 2e²/h"},
		"resistance_ohm":        oaNullable("number"),
		"transmission":          oaTNum,
		"quantum_capacitance_F": oaTNum,
		"mean_modes":            oaTNum,
	})
	return map[string]any{
		"Error": oaObj(map[string]any{
			"error": map[string]any{"type": "string", "description": "what is wrong, for a person"},
			"key":   map[string]any{"type": "string", "description": "the query parameter at fault, when there is one"},
		}, "error"),
		"Health":      oaObj(map[string]any{"status": map[string]any{"const": "ok"}}, "status"),
		"Observables": observables,
		"CountResult": oaObj(map[string]any{
			"scenario":              map[string]any{"type": "object", "description": "canonical keys and values", "additionalProperties": oaTStr},
			"method":                map[string]any{"enum": []string{"exact", "asymptotic"}},
			"modes_method":          map[string]any{"enum": []string{"exact", "asymptotic"}},
			"states_error_estimate": oaTNum,
			"ef_eV":                 oaTNum,
			"temp_K":                oaTNum,
			"at":                    oaArr(oaObj(map[string]any{"energy_eV": oaTNum, "states": oaNumMap(variants), "modes": oaNumMap(variants), "dos_per_eV": oaNumMap(variants)})),
			"observables":           map[string]any{"type": "object", "description": variants, "additionalProperties": oaRef("Observables")},
			"curves":                oaObj(map[string]any{"energy_eV": oaArr(oaTNum), "states": map[string]any{"type": "object", "additionalProperties": oaArr(oaTNum)}, "dos_per_eV": map[string]any{"type": "object", "additionalProperties": oaArr(oaTNum)}, "modes": map[string]any{"type": "object", "additionalProperties": oaArr(oaTNum)}, "dos_broadening_eV": oaTNum}),
			"levels": oaArr(oaObj(map[string]any{"energy_eV": oaTNum, "degeneracy": oaTInt, "valleys": oaArr(oaTStr),
				"n": map[string]any{"type": "array", "description": "quantum numbers of the confined axes", "items": oaTInt}})),
			"mean_level_spacing_eV": oaTNum,
			"states_below_emax":     oaTNum,
			"notes":                 oaArr(oaTStr),
		}, "scenario", "method", "at", "observables", "curves"),
		"SweepResult": oaObj(map[string]any{
			"input":           map[string]any{"type": "object", "description": "canonical scenario and sweep keys", "additionalProperties": oaTStr},
			"sweep":           oaTStr,
			"quantity":        map[string]any{"enum": []string{"density", "modes", "conductance", "states"}},
			"unit":            map[string]any{"type": "string", "description": "unit of the quantity's values"},
			"tol":             oaTNum,
			"temp_K":          oaTNum,
			"lengths_nm":      map[string]any{"type": "array", "description": "the swept length at each step", "items": oaTNum},
			"axis_lengths_nm": map[string]any{"type": "array", "description": "every axis length at each step", "items": oaArr(oaTNum)},
			"scenario":        oaArr(oaTNum),
			"box":             oaArr(oaTNum),
			"ring":            oaArr(oaTNum),
			"continuum":       oaArr(oaTNum),
			"deviations":      map[string]any{"type": "object", "description": "relative deviation from the continuum per variant (null where undefined)", "additionalProperties": oaArr(oaNullable("number"))},
			"crossover_nm": map[string]any{"type": "object", "description": "size above which each variant stays within tol of the continuum; null if none in the range",
				"properties": map[string]any{"scenario": oaNullable("number"), "box": oaNullable("number"), "ring": oaNullable("number")}},
			"method": oaArr(map[string]any{"enum": []string{"exact", "asymptotic"}}),
			"ef_eV":  oaArr(oaTNum),
			"notes":  oaArr(oaTStr),
		}, "lengths_nm", "scenario", "box", "ring", "continuum", "crossover_nm"),
		"LatticeResult": oaObj(map[string]any{
			"structure":         map[string]any{"enum": []string{"armchair", "zigzag", "tube"}},
			"lines":             oaTInt,
			"n":                 oaTInt,
			"m":                 oaTInt,
			"gamma0_eV":         oaTNum,
			"acc_nm":            oaTNum,
			"gs":                oaTInt,
			"ef_eV":             oaTNum,
			"temp_K":            oaTNum,
			"width_nm":          oaTNum,
			"diameter_nm":       oaTNum,
			"period_nm":         oaTNum,
			"atoms_per_cell":    oaTInt,
			"hexagons_per_cell": oaTInt,
			"gap_eV":            oaTNum,
			"metallic":          oaTBool,
			"family":            map[string]any{"type": "integer", "description": "N mod 3 (ribbons) or (n − m) mod 3 (tubes)"},
			"at":                oaArr(oaObj(map[string]any{"energy_eV": oaTNum, "modes": map[string]any{"type": "integer", "description": "channels, spin included"}, "dos": map[string]any{"type": "number", "description": "states / (eV·nm)"}})),
			"observables":       oaObj(map[string]any{"conductance_S": oaTNum, "conductance_error_S": oaTNum, "conductance_e2_per_h": oaTNum, "modes_at_ef": oaTInt, "dos_at_ef": oaTNum}),
			"partner": map[string]any{"type": "object", "description": "the rolled-up or unrolled counterpart (structure none for chiral tubes)",
				"properties": map[string]any{"structure": map[string]any{"enum": []string{"armchair", "zigzag", "tube", "none"}}, "lines": oaTInt, "n": oaTInt, "m": oaTInt,
					"exact": oaTBool, "note": oaTStr, "width_nm": oaTNum, "diameter_nm": oaTNum, "gap_eV": oaTNum, "metallic": oaTBool, "family": oaTInt,
					"modes_at_ef": oaTInt, "conductance_S": oaTNum}},
			"family_view": map[string]any{"type": "object", "description": "gap against size for the structure's family"},
			"dos_method":  oaTStr,
			"notes":       oaArr(oaTStr),
			"bands":       oaObj(map[string]any{"k_per_nm": oaArr(oaTNum), "energy_eV": oaArr(oaArr(oaTNum)), "shown": oaTInt, "total": oaTInt}),
			"curves":      oaObj(map[string]any{"energy_eV": oaArr(oaTNum), "dos": oaArr(oaTNum), "modes": oaArr(oaTInt), "bin_eV": oaTNum}),
		}, "structure", "gap_eV", "metallic", "at", "observables", "partner"),
		"Review": oaObj(map[string]any{
			"id":        oaTInt,
			"title":     oaTStr,
			"notes":     oaTStr,
			"scenarios": map[string]any{"type": "array", "description": "scenario query strings", "items": oaTStr},
			"created":   map[string]any{"type": "string", "format": "date-time"},
		}, "id", "title", "scenarios", "created"),
		"ValidationReport": oaObj(map[string]any{
			"checks": oaArr(oaObj(map[string]any{
				"id": oaTStr, "quantity": oaTStr, "engine": oaTStr, "query": oaTStr, "read": oaTStr,
				"reference": oaTNum, "tolerance": oaTStr, "unit": oaTStr, "source": oaTStr,
				"computed": oaNullable("number"), "deviation": oaNullable("number"), "pass": oaTBool, "error": oaTStr,
			})),
			"passed": oaTInt,
			"failed": oaTInt,
		}, "checks", "passed", "failed"),
	}
}

// openAPIDocument builds the description once.
var openAPIDocument = sync.OnceValue(func() []byte {
	get := func(summary, desc string, params []any, responses map[string]any) map[string]any {
		op := map[string]any{"summary": summary, "description": desc, "responses": responses}
		if params != nil {
			op["parameters"] = params
		}
		return map[string]any{"get": op}
	}
	scen := apiParameters(scenario.Keys, scenarioParams)
	sweep := append(apiParameters(sweepKeys, sweepParams), scen...)
	doc := map[string]any{
		"openapi":           "3.1.0",
		"jsonSchemaDialect": "https://spec.openapis.org/oas/3.1/dialect/base",
		"info": map[string]any{
			"title":   "ringbox API",
			"version": "1",
			"description": "Exact counts of electronic states and conduction modes of small conductors (box, ring and " +
				"continuum), and graphene ribbons and nanotubes. Every parameter is optional; bad values answer 400 with " +
				"{\"error\", \"key\"}. The same keys work on the web pages and as `ringbox` command-line flags. " +
				"The model: /method; the published checks: /validation.",
		},
		"paths": map[string]any{
			"/api/v1/count": get("Count states and modes of one conductor",
				"N(E), D(E) and M(E) on an energy grid, point values and the observables at (E_F, T) for the scenario's own "+
					"boundary conditions and its box, ring and continuum variants. Same JSON as `ringbox count --format json`.",
				scen, oaOK("The count.", "CountResult", oaErrors())),
			"/api/v1/sweep": get("Sweep one length and find the crossover to the bulk",
				"The scenario keys plus the sweep keys; for each length, the chosen quantity for scenario, box, ring and continuum, "+
					"and the crossover size of each variant.",
				sweep, oaOK("The sweep.", "SweepResult", oaErrors())),
			"/api/v1/lattice": get("Graphene ribbon or nanotube in nearest-neighbour tight binding",
				"Bands, gap, D(E) per length, M(E) (spin included) and G at (E_F, T), with the rolled-up or unrolled partner.",
				apiParameters(scenario.LatticeKeys, latticeParams), oaOK("The lattice result.", "LatticeResult", oaErrors())),
			"/api/v1/reviews/{id}": map[string]any{
				"parameters": []any{map[string]any{"name": "id", "in": "path", "required": true, "schema": map[string]any{"type": "integer", "minimum": 1}}},
				"get": map[string]any{
					"summary":   "A saved design review",
					"responses": oaOK("The review: its title, notes and scenario query strings.", "Review", map[string]any{"404": oaBody("No review with this id.", "Error")}),
				},
			},
			"/api/v1/validation": get("The published checks, run through the engines",
				"Every row of the reference table with its computed value, deviation, pass or fail and source.",
				nil, oaOK("The checks.", "ValidationReport", nil)),
			"/api/v1/openapi.json": get("This description", "", nil,
				map[string]any{"200": map[string]any{"description": "OpenAPI 3.1 document.", "content": map[string]any{"application/json": map[string]any{}}}}),
			"/healthz": get("Liveness", "Answers while the server accepts requests, even when the engines are saturated.",
				nil, oaOK("Alive.", "Health", nil)),
		},
		"components": map[string]any{"schemas": oaSchemas()},
	}
	b, err := json.MarshalIndent(doc, "", " ")
	if err != nil {
		panic("web: openapi: " + err.Error())
	}
	return append(b, '\n')
})

func (a *App) openAPI(w http.ResponseWriter, r *http.Request) error {
	w.Header().Set("Cache-Control", "public, max-age=3600")
	writeBody(w, r, http.StatusOK, "application/json; charset=utf-8", openAPIDocument())
	return nil
}

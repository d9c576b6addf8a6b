package validation

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"net/url"
	"strconv"
	"strings"
	"time"

	"golang.org/x/sync/errgroup"

	"ringbox/internal/scenario"
	"ringbox/internal/thermal"
)

// DefaultTimeout bounds each check. The table's checks take well under a
// second each on one core; the bound only stops a bad table from hanging.
const DefaultTimeout = 30 * time.Second

// Outcome is the result of running one check.
type Outcome struct {
	Check
	ToleranceText string  `json:"tolerance"`
	Computed      float64 `json:"computed"`
	// Deviation is in the tolerance's own measure: relative (a fraction)
	// for "rel" tolerances, in the check's unit for "abs" ones.
	Deviation float64 `json:"deviation"`
	Pass      bool    `json:"pass"`
	// Err says why the check could not be computed (then Pass is false).
	Err string `json:"error,omitempty"`
}

// Report is the outcome of a whole table.
type Report struct {
	Outcomes []Outcome `json:"checks"`
	Passed   int       `json:"passed"`
	Failed   int       `json:"failed"`
}

// OK reports whether every check passed.
func (r Report) OK() bool { return r.Failed == 0 && len(r.Outcomes) > 0 }

// Run computes every check with the real engines, each under its own
// deadline of timeout (DefaultTimeout when ≤ 0), two at a time, and returns
// the outcomes in table order. A check that errors or times out fails; Run
// itself fails only when ctx ends.
func Run(ctx context.Context, checks []Check, timeout time.Duration) (Report, error) {
	if timeout <= 0 {
		timeout = DefaultTimeout
	}
	out := make([]Outcome, len(checks))
	g, gctx := errgroup.WithContext(ctx)
	g.SetLimit(2)
	for i, c := range checks {
		g.Go(func() error {
			cctx, cancel := context.WithTimeout(gctx, timeout)
			defer cancel()
			out[i] = runOne(cctx, c)
			return ctx.Err()
		})
	}
	if err := g.Wait(); err != nil {
		return Report{}, err
	}
	rep := Report{Outcomes: out}
	for _, o := range out {
		if o.Pass {
			rep.Passed++
		} else {
			rep.Failed++
		}
	}
	return rep, nil
}

func runOne(ctx context.Context, c Check) Outcome {
	o := Outcome{Check: c, ToleranceText: c.Tolerance.String(), Computed: math.NaN(), Deviation: math.NaN()}
	v, err := Compute(ctx, c)
	if err != nil {
		o.Err = err.Error()
		return o
	}
	o.Computed = v
	o.Deviation = c.Tolerance.Deviation(v, c.Reference)
	o.Pass = o.Deviation <= c.Tolerance.Value
	return o
}

// MarshalJSON writes NaN (a check that could not be computed) as null.
func (o Outcome) MarshalJSON() ([]byte, error) {
	type plain Outcome
	aux := struct {
		plain
		Computed  *float64 `json:"computed"`
		Deviation *float64 `json:"deviation"`
	}{plain: plain(o)}
	if !math.IsNaN(o.Computed) {
		aux.Computed = &o.Computed
	}
	if !math.IsNaN(o.Deviation) && !math.IsInf(o.Deviation, 0) {
		aux.Deviation = &o.Deviation
	}
	return json.Marshal(aux)
}

// Compute runs one check's query through its engine and reads the number
// the check names.
func Compute(ctx context.Context, c Check) (float64, error) {
	q, err := url.ParseQuery(c.Query)
	if err != nil {
		return 0, fmt.Errorf("query: %v", err)
	}
	switch c.Engine {
	case EngineCount:
		s, err := scenario.Parse(q)
		if err != nil {
			return 0, err
		}
		res, err := scenario.Run(ctx, s)
		if err != nil {
			return 0, err
		}
		name, arg, _ := strings.Cut(c.Read, ":")
		if x, ok := extractors[name]; ok {
			return x(res, arg)
		}
		return readPath(res, c.Read)
	case EngineLattice:
		r, err := scenario.ParseLattice(q)
		if err != nil {
			return 0, err
		}
		res, err := scenario.RunLattice(ctx, r)
		if err != nil {
			return 0, err
		}
		return readPath(res, c.Read)
	case EngineFermiDirac:
		return fermiDirac(q, c.Read)
	}
	return 0, fmt.Errorf("engine: unknown %q", c.Engine)
}

// fermiDirac evaluates thermal.FermiDiracIntegral for the query's j and eta.
func fermiDirac(q url.Values, read string) (float64, error) {
	if read != "value" {
		return 0, fmt.Errorf("read: the fermidirac engine has only \"value\", not %q", read)
	}
	get := func(k string) (float64, error) {
		x, err := strconv.ParseFloat(q.Get(k), 64)
		if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
			return 0, fmt.Errorf("%s: %q is not a number", k, q.Get(k))
		}
		return x, nil
	}
	j, err := get("j")
	if err != nil {
		return 0, err
	}
	if !(j > -1 && j <= 10) {
		return 0, fmt.Errorf("j: %g out of range (−1, 10]", j)
	}
	eta, err := get("eta")
	if err != nil {
		return 0, err
	}
	return thermal.FermiDiracIntegral(j, eta), nil
}

// readPath reads a number from v's JSON form by a dotted path of object
// keys and array indices: "observables.scenario.density", "at.0.modes".
// The path names the same fields the JSON API returns.
func readPath(v any, path string) (float64, error) {
	b, err := json.Marshal(v)
	if err != nil {
		return 0, err
	}
	var node any
	if err := json.Unmarshal(b, &node); err != nil {
		return 0, err
	}
	for _, part := range strings.Split(path, ".") {
		switch n := node.(type) {
		case map[string]any:
			next, ok := n[part]
			if !ok {
				return 0, fmt.Errorf("read: no field %q in %q", part, path)
			}
			node = next
		case []any:
			i, err := strconv.Atoi(part)
			if err != nil || i < 0 || i >= len(n) {
				return 0, fmt.Errorf("read: index %q out of range in %q", part, path)
			}
			node = n[i]
		default:
			return 0, fmt.Errorf("read: %q goes below a number in %q", part, path)
		}
	}
	switch n := node.(type) {
	case float64:
		return n, nil
	case bool:
		if n {
			return 1, nil
		}
		return 0, nil
	}
	return 0, errors.New("read: " + path + " is not a number")
}

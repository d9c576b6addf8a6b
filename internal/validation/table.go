// Package validation runs ringbox's published checks: each row of the
// reference table (testdata/validation/checks.tsv) names a quantity, the
// scenario or lattice query that computes it with the real engines, the
// number of the answer to read, the published value with its tolerance, and
// the source. The CLI (`ringbox validate`), the /validation page and the
// tests all run the same table through Run.
package validation

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"net/url"
	"strconv"
	"strings"

	checktable "ringbox/testdata/validation"
)

// Engines a check can run.
const (
	EngineCount      = "count"      // scenario.Parse + scenario.Run, as GET /api/v1/count
	EngineLattice    = "lattice"    // scenario.ParseLattice + scenario.RunLattice, as GET /api/v1/lattice
	EngineFermiDirac = "fermidirac" // thermal.FermiDiracIntegral(j, eta)
)

// columns of the table, in order.
var columns = []string{"id", "quantity", "engine", "query", "read", "reference", "tolerance", "unit", "source"}

// Tolerance says how far a computed value may lie from the reference.
type Tolerance struct {
	Relative bool    // true: |computed/reference − 1| ≤ Value; false: |computed − reference| ≤ Value
	Value    float64 // ≥ 0
}

// String is the table's spelling: "rel 0.01" or "abs 5e-4".
func (t Tolerance) String() string {
	kind := "abs"
	if t.Relative {
		kind = "rel"
	}
	return kind + " " + strconv.FormatFloat(t.Value, 'g', -1, 64)
}

// Deviation returns the deviation of computed from reference in the
// tolerance's own measure (relative or absolute).
func (t Tolerance) Deviation(computed, reference float64) float64 {
	if t.Relative {
		if reference == 0 {
			return math.Inf(1)
		}
		return math.Abs(computed/reference - 1)
	}
	return math.Abs(computed - reference)
}

// Check is one row of the reference table.
type Check struct {
	ID        string    `json:"id"`
	Quantity  string    `json:"quantity"`
	Engine    string    `json:"engine"`
	Query     string    `json:"query"`
	Read      string    `json:"read"`
	Reference float64   `json:"reference"`
	Tolerance Tolerance `json:"-"`
	Unit      string    `json:"unit"`
	Source    string    `json:"source"`
}

// Default returns the checks of the embedded reference table. The table is
// part of the program, so a malformed one is a programmer error: Default
// panics with "validation: …".
func Default() []Check {
	cs, err := Parse(bytes.NewReader(checktable.Table))
	if err != nil {
		panic("validation: embedded table: " + err.Error())
	}
	return cs
}

// Parse reads a reference table: tab-separated, a header line naming the
// columns id, quantity, engine, query, read, reference, tolerance, unit and
// source in that order, lines starting with # ignored. Errors name the line
// and column.
func Parse(r io.Reader) ([]Check, error) {
	cr := csv.NewReader(r)
	cr.Comma = '\t'
	cr.Comment = '#'
	cr.LazyQuotes = true
	cr.FieldsPerRecord = len(columns)
	header, err := cr.Read()
	if err != nil {
		if errors.Is(err, io.EOF) {
			return nil, errors.New("empty table")
		}
		return nil, err
	}
	for i, c := range columns {
		if strings.TrimSpace(header[i]) != c {
			return nil, fmt.Errorf("header column %d is %q, want %q", i+1, header[i], c)
		}
	}
	var out []Check
	seen := map[string]bool{}
	for {
		rec, err := cr.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return nil, err
		}
		line, _ := cr.FieldPos(0)
		c, err := parseRow(rec)
		if err != nil {
			return nil, fmt.Errorf("line %d: %w", line, err)
		}
		if seen[c.ID] {
			return nil, fmt.Errorf("line %d: id %q used twice", line, c.ID)
		}
		seen[c.ID] = true
		out = append(out, c)
	}
	if len(out) == 0 {
		return nil, errors.New("table has no checks")
	}
	return out, nil
}

func parseRow(rec []string) (Check, error) {
	for i := range rec {
		rec[i] = strings.TrimSpace(rec[i])
	}
	c := Check{ID: rec[0], Quantity: rec[1], Engine: rec[2], Query: rec[3], Read: rec[4], Unit: rec[7], Source: rec[8]}
	if c.ID == "" {
		return c, errors.New("id: empty")
	}
	switch c.Engine {
	case EngineCount, EngineLattice, EngineFermiDirac:
	default:
		return c, fmt.Errorf("engine: %q is not count, lattice or fermidirac", c.Engine)
	}
	if _, err := url.ParseQuery(c.Query); err != nil {
		return c, fmt.Errorf("query: %v", err)
	}
	if c.Read == "" {
		return c, errors.New("read: empty")
	}
	ref, err := strconv.ParseFloat(rec[5], 64)
	if err != nil || math.IsNaN(ref) || math.IsInf(ref, 0) {
		return c, fmt.Errorf("reference: %q is not a number", rec[5])
	}
	c.Reference = ref
	if c.Tolerance, err = parseTolerance(rec[6]); err != nil {
		return c, fmt.Errorf("tolerance: %v", err)
	}
	if c.Source == "" {
		return c, errors.New("source: empty (every check names its source)")
	}
	return c, nil
}

func parseTolerance(s string) (Tolerance, error) {
	kind, v, ok := strings.Cut(strings.TrimSpace(s), " ")
	if !ok || (kind != "rel" && kind != "abs") {
		return Tolerance{}, fmt.Errorf("%q is not \"rel X\" or \"abs X\"", s)
	}
	x, err := strconv.ParseFloat(strings.TrimSpace(v), 64)
	if err != nil || !(x >= 0) || math.IsInf(x, 0) {
		return Tolerance{}, fmt.Errorf("%q: tolerance must be a number ≥ 0", v)
	}
	return Tolerance{Relative: kind == "rel", Value: x}, nil
}

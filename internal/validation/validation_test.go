package validation

import (
	"bytes"
	"context"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	checktable "ringbox/testdata/validation"
)

// TestTable runs every published check of testdata/validation/checks.tsv
// through the real engines; each row names its source and tolerance.
func TestTable(t *testing.T) {
	checks := Default()
	rep, err := Run(context.Background(), checks, 0)
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Outcomes) != len(checks) || rep.Passed+rep.Failed != len(checks) {
		t.Fatalf("report has %d outcomes (%d passed, %d failed) for %d checks", len(rep.Outcomes), rep.Passed, rep.Failed, len(checks))
	}
	for _, o := range rep.Outcomes {
		t.Run(o.ID, func(t *testing.T) {
			if !o.Pass {
				t.Errorf("%s: computed %.8g %s, reference %g (%s), deviation %.3g; %s [source: %s]",
					o.Quantity, o.Computed, o.Unit, o.Reference, o.ToleranceText, o.Deviation, o.Err, o.Source)
			}
		})
	}
	if !rep.OK() {
		t.Errorf("%d of %d checks failed", rep.Failed, len(checks))
	}
}

// TestTableCoversDesign keeps the table honest about what it must hold: one
// row (or more) for each check value the design lists.
func TestTableCoversDesign(t *testing.T) {
	want := []string{"g0", "cu-density", "gaas-dos2d", "si-nc", "gaas-nc", "fd-half-direct", "fd-minus-half-direct",
		"qpc-step-1", "sharvin-bulk", "tube-10-0-gap", "armchair-7-gap", "tube-6-6-g", "weyl-residual"}
	have := map[string]bool{}
	for _, c := range Default() {
		have[c.ID] = true
	}
	for _, id := range want {
		if !have[id] {
			t.Errorf("table has no check %q", id)
		}
	}
}

// TestWrongReferenceFails is the checker's own test: the same rows with a
// reference moved just outside the tolerance must fail, and the deviation
// must be what the tolerance measures.
func TestWrongReferenceFails(t *testing.T) {
	for _, c := range Default() {
		t.Run(c.ID, func(t *testing.T) {
			wrong := c
			step := 3 * c.Tolerance.Value
			if c.Tolerance.Relative {
				wrong.Reference = c.Reference * (1 + math.Max(step, 1e-6))
			} else {
				wrong.Reference = c.Reference + math.Max(step, 1e-6)
			}
			rep, err := Run(context.Background(), []Check{wrong}, 0)
			if err != nil {
				t.Fatal(err)
			}
			o := rep.Outcomes[0]
			if o.Pass || rep.OK() || rep.Failed != 1 {
				t.Errorf("reference %g (true %g, %s) passed with computed %g", wrong.Reference, c.Reference, c.Tolerance, o.Computed)
			}
		})
	}
}

// TestTableFileWithWrongValue runs a table file, as `ringbox validate
// --table FILE` does, in which one value is wrong.
func TestTableFileWithWrongValue(t *testing.T) {
	// 2e²/h with the last digits changed: 7.748091729e-5 → 7.748e-5 fails rel 1e-9.
	text := strings.Replace(string(checktable.Table), "7.748091729e-5", "7.748e-5", 1)
	if text == string(checktable.Table) {
		t.Fatal("the conductance quantum row is not in the table")
	}
	path := filepath.Join(t.TempDir(), "wrong.tsv")
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	checks, err := Parse(f)
	if err != nil {
		t.Fatal(err)
	}
	rep, err := Run(context.Background(), checks, 0)
	if err != nil {
		t.Fatal(err)
	}
	if rep.OK() || rep.Failed != 1 {
		t.Fatalf("want exactly one failure, got %d", rep.Failed)
	}
	for _, o := range rep.Outcomes {
		if o.Pass == (o.ID == "g0") {
			t.Errorf("%s: pass = %v", o.ID, o.Pass)
		}
	}
}

// TestComputeErrors: a check that cannot be computed fails with a reason
// and never panics.
func TestComputeErrors(t *testing.T) {
	base := Check{ID: "x", Quantity: "q", Engine: EngineCount, Reference: 1, Tolerance: Tolerance{Relative: true, Value: 0.1}, Source: "s"}
	tests := []struct {
		name, engine, query, read, want string
	}{
		{"unknown key", EngineCount, "material=free&bogus=1", "observables.scenario.density", "bogus"},
		{"missing field", EngineCount, "material=free&dims=1&bx=open", "observables.scenario.nothing", "no field"},
		{"index out of range", EngineCount, "material=free&dims=1&bx=open", "at.7.energy_eV", "index"},
		{"not a number", EngineCount, "material=free&dims=1&bx=open", "observables.scenario.density_unit", "not a number"},
		{"nc not bulk", EngineCount, "material=gaas&dims=1&bx=box&ef=-0.2", "nc", "every axis open"},
		{"nc degenerate", EngineCount, "material=gaas&dims=3&bx=open&by=open&bz=open&ef=0.1", "nc", "below the band edge"},
		{"bad variant", EngineCount, "material=free&dims=3&bx=open&by=open&bz=open&ef=1&temp=0", "sharvin_ratio:sideways", "variant"},
		{"lattice key", EngineLattice, "structure=tube&lines=3&bogus=2", "gap_eV", "bogus"},
		{"fd bad j", EngineFermiDirac, "j=-2&eta=0", "value", "j:"},
		{"fd bad read", EngineFermiDirac, "j=0.5&eta=0", "gap", "only"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			c := base
			c.Engine, c.Query, c.Read = tt.engine, tt.query, tt.read
			rep, err := Run(context.Background(), []Check{c}, 0)
			if err != nil {
				t.Fatal(err)
			}
			o := rep.Outcomes[0]
			if o.Pass || !strings.Contains(o.Err, tt.want) {
				t.Errorf("pass = %v, err = %q, want an error containing %q", o.Pass, o.Err, tt.want)
			}
		})
	}
}

func TestParseErrors(t *testing.T) {
	header := strings.Join(columns, "\t") + "\n"
	row := func(fields ...string) string { return strings.Join(fields, "\t") + "\n" }
	good := row("a", "q", "count", "material=free", "observables.scenario.density", "1", "rel 0.1", "cm^-3", "src")
	tests := []struct{ name, text, want string }{
		{"empty", "", "empty"},
		{"header", "id\tquantity\n", "fields"},
		{"wrong header", strings.Replace(header, "source", "origin", 1) + good, "want \"source\""},
		{"no rows", header, "no checks"},
		{"engine", header + row("a", "q", "fly", "", "x", "1", "rel 0.1", "u", "s"), "engine"},
		{"reference", header + row("a", "q", "count", "", "x", "one", "rel 0.1", "u", "s"), "reference"},
		{"tolerance kind", header + row("a", "q", "count", "", "x", "1", "pct 1", "u", "s"), "tolerance"},
		{"tolerance value", header + row("a", "q", "count", "", "x", "1", "rel -1", "u", "s"), "tolerance"},
		{"no source", header + row("a", "q", "count", "", "x", "1", "rel 0.1", "u", ""), "source"},
		{"duplicate", header + good + good, "twice"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := Parse(strings.NewReader(tt.text))
			if err == nil || !strings.Contains(err.Error(), tt.want) {
				t.Errorf("err = %v, want one containing %q", err, tt.want)
			}
		})
	}
	cs, err := Parse(strings.NewReader("# comment\n" + header + good))
	if err != nil || len(cs) != 1 || cs[0].Tolerance != (Tolerance{Relative: true, Value: 0.1}) {
		t.Errorf("good table: %v, %+v", err, cs)
	}
}

func TestDeviation(t *testing.T) {
	tests := []struct {
		tol                 Tolerance
		computed, reference float64
		want                float64
	}{
		{Tolerance{Relative: true, Value: 0.01}, 101, 100, 0.01},
		{Tolerance{Relative: true, Value: 0.01}, 99, 100, 0.01},
		{Tolerance{Value: 0.5}, 2.25, 2, 0.25},
		{Tolerance{Relative: true}, 1, 0, math.Inf(1)},
	}
	for _, tt := range tests {
		t.Run(tt.tol.String()+"/"+strconv.FormatFloat(tt.computed, 'g', -1, 64), func(t *testing.T) {
			if got := tt.tol.Deviation(tt.computed, tt.reference); math.Abs(got-tt.want) > 1e-12 && got != tt.want {
				t.Errorf("got %g, want %g", got, tt.want)
			}
		})
	}
}

// FuzzParse: no table text makes Parse panic, and what it accepts has
// finite references and non-negative tolerances.
func FuzzParse(f *testing.F) {
	f.Add(checktable.Table)
	f.Add([]byte(strings.Join(columns, "\t") + "\na\tq\tcount\t\tx\t1\tabs 0\tu\ts\n"))
	f.Add([]byte("\t\t\n"))
	f.Fuzz(func(t *testing.T, b []byte) {
		cs, err := Parse(bytes.NewReader(b))
		if err != nil {
			return
		}
		for _, c := range cs {
			if math.IsNaN(c.Reference) || math.IsInf(c.Reference, 0) || !(c.Tolerance.Value >= 0) {
				t.Errorf("accepted %+v", c)
			}
		}
	})
}

func BenchmarkRunTable(b *testing.B) {
	checks := Default()
	for b.Loop() {
		if _, err := Run(context.Background(), checks, 0); err != nil {
			b.Fatal(err)
		}
	}
}

package scenario

import (
	"context"
	"encoding/json"
	"math"
	"net/url"
	"strings"
	"testing"
	"time"

	"ringbox/internal/spectrum"
)

func TestParseErrorsNameTheKey(t *testing.T) {
	tests := []struct {
		query, key string
	}{
		{"material=unobtainium", "material"},
		{"lx=0", "lx"},
		{"lx=-5nm", "lx"},
		{"lx=NaN", "lx"},
		{"lx=1e9m", "lx"},
		{"ly=10 furlongs", "ly"},
		{"dims=4", "dims"},
		{"dims=0", "dims"},
		{"bx=wall", "bx"},
		{"emin=1&emax=0.5", "emax"},
		{"points=100000", "points"},
		{"points=1", "points"},
		{"temp=-1", "temp"},
		{"ef=0.1&density=1e18", "density"},
		{"density=-3", "density"},
		{"eta=0", "eta"},
		{"along=z&dims=2", "along"},
		{"gs=3", "gs"},
		{"material=custom&m=0", "m"},
		{"material=custom&gv=0", "gv"},
		{"alpha=-1", "alpha"},
		{"mfp=abc", "mfp"},
		{"shape=square", "shape"},
		{"bogus=1", "bogus"},
		{"emax=1e99", "emax"},
		{"budget=0", "budget"},
	}
	many := "at="
	for i := 0; i < MaxAt+1; i++ {
		if i > 0 {
			many += ","
		}
		many += "0.1"
	}
	tests = append(tests, struct{ query, key string }{many, "at"})
	for _, tt := range tests {
		t.Run(tt.query, func(t *testing.T) {
			q, _ := url.ParseQuery(tt.query)
			_, err := Parse(q)
			e, ok := AsError(err)
			if !ok {
				t.Fatalf("want a scenario error, got %v", err)
			}
			if e.Key != tt.key || e.Code != Invalid || e.Msg == "" {
				t.Errorf("got key %q code %d msg %q, want key %q", e.Key, e.Code, e.Msg, tt.key)
			}
		})
	}
}

func TestCanonicalRoundTrip(t *testing.T) {
	for _, q := range []string{
		"", "material=si&dims=3&lx=5nm&ly=5nm&lz=0.1um&bz=ring",
		"material=custom&m=0.2&mz=0.9&gv=2&alpha=0.5&dims=2&lx=200A&ly=2e-8m&by=open&along=y",
		"material=cu&ef=7&temp=4.2&mfp=40nm&at=1,2,3&shape=lorentzian&eta=0.01",
		"density=1e6&dims=1&lx=1um&bx=open",
	} {
		v, _ := url.ParseQuery(q)
		s, err := Parse(v)
		if err != nil {
			t.Fatalf("%q: %v", q, err)
		}
		v2, _ := url.ParseQuery(s.Canonical())
		s2, err := Parse(v2)
		if err != nil {
			t.Fatalf("canonical %q: %v", s.Canonical(), err)
		}
		if s.Canonical() != s2.Canonical() {
			t.Errorf("%q: %q ≠ %q", q, s.Canonical(), s2.Canonical())
		}
	}
}

// TestJSONContract checks the keys DESIGN.md promises.
func TestJSONContract(t *testing.T) {
	q, _ := url.ParseQuery("material=gaas&dims=3&lx=8nm&ly=9nm&lz=50nm&bz=box&at=0.1,0.2&temp=77&points=50")
	s, err := Parse(q)
	if err != nil {
		t.Fatal(err)
	}
	res, err := Run(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	b, _ := json.Marshal(res)
	var doc map[string]any
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"scenario", "method", "at", "observables", "curves", "levels", "ef_eV"} {
		if _, ok := doc[k]; !ok {
			t.Errorf("missing %q", k)
		}
	}
	at := doc["at"].([]any)
	if len(at) != 2 {
		t.Fatalf("at has %d entries", len(at))
	}
	p := at[0].(map[string]any)
	for _, k := range []string{"scenario", "box", "ring", "continuum", "smooth"} {
		if _, ok := p["states"].(map[string]any)[k]; !ok {
			t.Errorf("at.states.%s missing", k)
		}
	}
	for _, k := range []string{"scenario", "box", "ring", "continuum"} {
		if _, ok := p["modes"].(map[string]any)[k]; !ok {
			t.Errorf("at.modes.%s missing", k)
		}
		o := doc["observables"].(map[string]any)[k].(map[string]any)
		for _, f := range []string{"electrons", "density", "density_unit", "conductance_S", "quantum_capacitance_F"} {
			if _, ok := o[f]; !ok {
				t.Errorf("observables.%s.%s missing", k, f)
			}
		}
	}
	if doc["method"] != "exact" {
		t.Errorf("method %v", doc["method"])
	}
	// A fully confined scenario: scenario == box, and the counts are integers.
	for _, v := range res.At {
		if v.States["scenario"] != v.States["box"] || v.States["box"] != math.Trunc(v.States["box"]) {
			t.Errorf("box counts %v", v.States)
		}
	}
}

func TestAsymptoticFallback(t *testing.T) {
	q, _ := url.ParseQuery("material=cu&dims=3&lx=50nm&ly=50nm&lz=50nm&bz=box&points=20&budget=1e6&temp=0")
	s, _ := Parse(q)
	res, err := Run(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	if res.Method != "asymptotic" || res.ErrorEstimate == nil {
		t.Fatalf("method %s", res.Method)
	}
	// Near the switch-over the exact count lies within the estimate.
	s.Budget = DefaultBudget
	exact, err := Run(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	if exact.Method != "exact" {
		t.Fatal(exact.Method)
	}
	d := math.Abs(exact.StatesBelow - res.StatesBelow)
	if d > *res.ErrorEstimate {
		t.Errorf("|exact − asymptotic| = %g beyond the estimate %g", d, *res.ErrorEstimate)
	}
}

// TestAsymptoticNoteNamesTheCause: the note gives the reason of the plan
// that is over, not of a dearer one within the budget (identity).
func TestAsymptoticNoteNamesTheCause(t *testing.T) {
	var m method
	m.consider("scenario", spectrum.Plan{Ops: 1e8, Bytes: 600 << 20}, 1e10)
	m.consider("box", spectrum.Plan{Ops: 5e9}, 1e10)
	m.consider("ring", spectrum.Plan{Ops: 2e9}, 1e10)
	if !m.asymptotic || m.variant != "scenario" {
		t.Fatalf("%+v", m)
	}
	if n := m.note(1e10); !strings.Contains(n, "629 MB, over 512 MB") || strings.Contains(n, "operations") {
		t.Errorf("note %q", n)
	}
	m = method{}
	m.consider("box", spectrum.Plan{Ops: 5e9}, 1e10)
	m.consider("ring", spectrum.Plan{Ops: 3e10}, 1e10)
	if n := m.note(1e10); !m.asymptotic || !strings.Contains(n, "exact ring count") || !strings.Contains(n, "3e+10 operations") {
		t.Errorf("%+v: note %q", m, n)
	}
	m = method{}
	m.consider("box", spectrum.Plan{Ops: 5e9}, 1e10)
	if m.asymptotic {
		t.Errorf("%+v within the budget", m)
	}
}

func FuzzParse(f *testing.F) {
	for _, s := range []string{"", "material=si&lx=5nm", "dims=2&by=ring&along=x", "at=0.1,0.2&ef=0.1", "material=custom&m=0.1&gv=2", "lx=%ZZ"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, raw string) {
		q, err := url.ParseQuery(raw)
		if err != nil {
			return
		}
		s, err := Parse(q)
		if err != nil {
			if _, ok := AsError(err); !ok {
				t.Fatalf("Parse(%q) error without a key: %v", raw, err)
			}
			return
		}
		// A valid scenario encodes and parses back to itself.
		v, _ := url.ParseQuery(s.Canonical())
		s2, err := Parse(v)
		if err != nil || s2.Canonical() != s.Canonical() {
			t.Fatalf("canonical round trip of %q: %v", raw, err)
		}
	})
}

// TestObserveMatchesRun: the lean sweep path gives the numbers of a full run.
func TestObserveMatchesRun(t *testing.T) {
	for _, raw := range []string{
		"material=gaas&lx=12nm&ly=15nm&lz=200nm&temp=77&ef=0.08",
		"material=si&dims=3&lx=5nm&ly=1um&lz=1um&by=open&bz=open&temp=300&density=1e12",
		"material=cu&dims=3&lx=6nm&ly=7nm&lz=8nm&bz=box&temp=0",
	} {
		q, _ := url.ParseQuery(raw)
		s, err := Parse(q)
		if err != nil {
			t.Fatal(err)
		}
		full, err := Run(context.Background(), s)
		if err != nil {
			t.Fatal(err)
		}
		p, err := Observe(context.Background(), s)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(p.EFEV-full.EFEV) > 1e-9 {
			t.Errorf("%s: E_F %g vs %g", raw, p.EFEV, full.EFEV)
		}
		for _, v := range Variants {
			a, b := p.Observables[v], full.Observables[v]
			if math.Abs(a.Electrons-b.Electrons) > 1e-6*math.Max(1, b.Electrons) ||
				math.Abs(a.ConductanceS-b.ConductanceS) > 1e-6*b.ConductanceS {
				t.Errorf("%s %s: %+v vs %+v", raw, v, a, b)
			}
		}
	}
}

// TestLongWireAsymptotic: a metre-long hard-wall wire is counted
// asymptotically; the smooth count's dip below zero at the band edge must
// not reach the thermal averages (a regression found by fuzzing the page).
func TestLongWireAsymptotic(t *testing.T) {
	for _, raw := range []string{"lx=1m", "lx=1m&temp=0", "lx=1m&ly=1m&dims=2&temp=4"} {
		q, _ := url.ParseQuery(raw)
		s, err := Parse(q)
		if err != nil {
			t.Fatal(err)
		}
		res, err := Run(context.Background(), s)
		if err != nil {
			t.Fatalf("%s: %v", raw, err)
		}
		for _, o := range res.Observables {
			if o.Electrons < 0 || math.IsNaN(o.ConductanceS) {
				t.Errorf("%s: %+v", raw, o)
			}
		}
	}
}

// TestObserveQuantumCapacitanceAtZeroTemperature: the lean path broadens the
// levels of a fully confined conductor as the full run does, including a
// level just above E_F that its peak reaches (GaAs 10 nm cube, levels at
// 0.289 and 0.409 eV, E_F 0.40 eV, η 5 meV): identity, and the same with
// emax raised past that level.
func TestObserveQuantumCapacitanceAtZeroTemperature(t *testing.T) {
	base := "material=gaas&lx=10nm&ly=10nm&lz=10nm&bz=box&eta=5meV&ef=0.40&temp=0"
	ref := runQ(t, base+"&emax=0.6").Observables["scenario"].QuantumCapacitance
	if ref <= 0 {
		t.Fatalf("C_Q %g at 9 meV below a level", ref)
	}
	for _, raw := range []string{"bz=box&temp=0&ef=0.2", base + "&emax=0.3"} {
		s := parseQ(t, raw)
		full, err := Run(context.Background(), s)
		if err != nil {
			t.Fatal(err)
		}
		p, err := Observe(context.Background(), s)
		if err != nil {
			t.Fatal(err)
		}
		a, b := p.Observables["scenario"].QuantumCapacitance, full.Observables["scenario"].QuantumCapacitance
		if b <= 0 || math.Abs(a/b-1) > 1e-9 {
			t.Errorf("%s: Observe C_Q %g, Run %g", raw, a, b)
		}
		if raw != "bz=box&temp=0&ef=0.2" && relErr(a, ref) > 1e-9 {
			t.Errorf("%s: C_Q %g, with emax 0.6 %g", raw, a, ref)
		}
	}
}

// FuzzRun runs whatever Parse accepts (with the grid and budget cut so each
// input stays quick): the engines must answer or fail with a keyed error,
// never panic, and every number must be finite.
func FuzzRun(f *testing.F) {
	for _, s := range []string{"", "lx=1m", "dims=1&bx=ring&temp=0", "material=si&dims=2&by=open&density=1e5",
		"material=custom&m=0.01&alpha=50&emax=3", "bz=box&eta=1e-6&shape=lorentzian", "at=-5,0,1e3&emin=-10",
		// Extreme ratios: axis spacings 10⁹ apart, a 10⁵ mass ratio, a
		// Boltzmann tail far below a 30 eV edge.
		"lx=1cm&ly=1cm&lz=0.1nm&bz=box", "lx=3cm&ly=3cm&lz=0.1nm&bz=box&bx=ring",
		"material=custom&m=0.001&mx=100&dims=2&lx=1m&ly=1nm&by=box", "material=gaas&density=1e-20&bx=open&by=open&bz=open",
		"lx=1m&ly=1m&lz=1m&bz=box&temp=0&density=1"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, raw string) {
		q, err := url.ParseQuery(raw)
		if err != nil {
			return
		}
		s, err := Parse(q)
		if err != nil {
			return
		}
		s.Points = min(s.Points, 40)
		s.Budget = min(s.Budget, 1e7)
		ctx, cancel := context.WithTimeout(context.Background(), 3*time.Second)
		defer cancel()
		res, err := Run(ctx, s)
		if err != nil {
			if _, ok := AsError(err); !ok {
				t.Fatalf("%q: error without a key: %v", raw, err)
			}
			return
		}
		if _, err := json.Marshal(res); err != nil {
			t.Fatalf("%q: %v", raw, err)
		}
	})
}

package scenario

import (
	"context"
	"encoding/json"
	"math"
	"net/url"
	"strings"
	"sync/atomic"
	"testing"
)

// wireSweep is the sweep of the benchmark target: a GaAs wire with two
// hard-wall axes scaled together and one open axis, at 300 K.
const wireSweep = "material=gaas&lx=10nm&ly=10nm&lz=100nm&bz=open&temp=300&ef=0.05&sweep=all&from=5nm&to=80nm&steps=40"

func mustSweep(t testing.TB, query string) Sweep {
	t.Helper()
	q, err := url.ParseQuery(query)
	if err != nil {
		t.Fatal(err)
	}
	sw, err := ParseSweep(q)
	if err != nil {
		t.Fatalf("ParseSweep(%s): %v", query, err)
	}
	return sw
}

func TestParseSweepErrorsNameTheKey(t *testing.T) {
	tests := []struct {
		query, key string
		code       Code
	}{
		{"sweep=lw", "sweep", Invalid},
		{"dims=2&sweep=lz", "sweep", Invalid},
		{"bx=open&by=open&bz=open&sweep=all", "sweep", Invalid},
		{"from=abc", "from", Invalid},
		{"from=0", "from", Invalid},
		{"to=2m", "to", Invalid},
		{"from=50nm&to=10nm", "to", Invalid},
		{"from=10nm&to=10nm", "to", Invalid},
		{"steps=1", "steps", Invalid},
		{"steps=201", "steps", Invalid},
		{"steps=ten", "steps", Invalid},
		{"quantity=mass", "quantity", Invalid},
		{"tol=0", "tol", Invalid},
		{"tol=-0.1", "tol", Invalid},
		{"tol=NaN", "tol", Invalid},
		{"tol=11", "tol", Invalid},
		{"steps=3&steps=4", "steps", Invalid},
		// The 1:100 ratio would put the short axis at 0.02 nm at from = 2 nm.
		{"lx=1nm&ly=100nm&sweep=all&from=2nm", "from", Invalid},
		// Scenario keys keep their own errors; an unknown key is still refused.
		{"swep=lx", "swep", Invalid},
		{"lx=-1nm&sweep=ly", "lx", Invalid},
		// Copper cubes up to 1 µm at 300 K, 200 steps: far beyond the work cap.
		{"material=cu&bz=box&lx=1um&ly=1um&lz=1um&sweep=all&from=100nm&to=1um&steps=200&budget=1e12", "to", TooLarge},
	}
	for _, tt := range tests {
		t.Run(tt.query, func(t *testing.T) {
			q, _ := url.ParseQuery(tt.query)
			_, err := ParseSweep(q)
			e, ok := AsError(err)
			if !ok {
				t.Fatalf("want a scenario error, got %v", err)
			}
			if e.Key != tt.key || e.Code != tt.code || e.Msg == "" {
				t.Errorf("got key %q code %d msg %q, want key %q code %d", e.Key, e.Code, e.Msg, tt.key, tt.code)
			}
		})
	}
}

func TestParseSweepCanonical(t *testing.T) {
	tests := []struct {
		name, a, b string // equal sweeps, written differently
	}{
		{"swept length given or not", "sweep=lx&from=2nm&to=40nm", "sweep=lx&lx=7nm&from=2nm&to=40nm"},
		{"units", "sweep=ly&from=20A&to=0.04um", "sweep=ly&from=2nm&to=40nm"},
		{"all keeps ratios", "lx=10nm&ly=20nm&sweep=all&to=40nm", "lx=5nm&ly=10nm&sweep=all&to=40nm"},
		{"defaults spelled out", "", "sweep=all&steps=24&quantity=density&tol=0.05&from=2nm&to=100nm"},
		{"points and at play no part", "points=50&at=0.1", ""},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			a, b := mustSweep(t, tt.a), mustSweep(t, tt.b)
			if a.Canonical() != b.Canonical() {
				t.Errorf("canonical forms differ:\n%s\n%s", a.Canonical(), b.Canonical())
			}
			// The canonical form parses back to itself.
			q, _ := url.ParseQuery(a.Canonical())
			c, err := ParseSweep(q)
			if err != nil || c.Canonical() != a.Canonical() {
				t.Errorf("round trip: %v\n%s\n%s", err, c.Canonical(), a.Canonical())
			}
		})
	}
	sw := mustSweep(t, "lx=10nm&ly=20nm&sweep=all&from=4nm&to=40nm&steps=3")
	// ly is the largest confined length, so it is the swept one; lx keeps
	// half of it and the open z axis stays.
	for i, l := range sw.Lengths() {
		s := sw.At(l)
		if math.Abs(s.LengthM[1]-l) > 1e-20 || math.Abs(s.LengthM[0]-l/2) > 1e-20 {
			t.Errorf("step %d: lengths %v, want ly = %g and lx = ly/2", i, s.LengthM, l)
		}
		if s.LengthM[2] != 100e-9 {
			t.Errorf("step %d: the open axis changed to %g", i, s.LengthM[2])
		}
	}
}

// TestSweepAgreesWithObserveAndRun checks that each step of a sweep is the
// value a single Observe (the sweep's path) and a full Run (the count
// page's path) give for the scenario at that size.
func TestSweepAgreesWithObserveAndRun(t *testing.T) {
	ctx := context.Background()
	for _, q := range Quantities {
		t.Run(q, func(t *testing.T) {
			sw := mustSweep(t, "material=gaas&lx=8nm&ly=12nm&lz=200nm&bz=open&temp=77&ef=0.08&sweep=all&from=6nm&to=30nm&steps=5&quantity="+q)
			r, err := RunSweep(ctx, sw, nil)
			if err != nil {
				t.Fatal(err)
			}
			for i, l := range sw.Lengths() {
				s := sw.At(l)
				p, err := Observe(ctx, s)
				if err != nil {
					t.Fatal(err)
				}
				for _, name := range Variants {
					if got, want := r.Values(name)[i], sw.value(p, name); got != want {
						t.Errorf("%s at %g nm: sweep %g, Observe %g", name, l*1e9, got, want)
					}
				}
				if i%2 == 1 {
					continue // Run is slower; every other size is enough
				}
				res, err := Run(ctx, s)
				if err != nil {
					t.Fatal(err)
				}
				for _, name := range Variants {
					var want float64
					o := res.Observables[name]
					switch q {
					case "density":
						want = o.Density
					case "conductance":
						want = o.ConductanceS
					case "modes":
						want = res.At[0].Modes[name]
					case "states":
						want = res.At[0].States[name]
					}
					// Run's counters cover a wider range, so its thermal
					// integrals take other nodes: agree to 1e-6 relative.
					if got := r.Values(name)[i]; math.Abs(got-want) > 1e-6*math.Abs(want)+1e-12 {
						t.Errorf("%s at %g nm: sweep %.10g, Run %.10g", name, l*1e9, got, want)
					}
				}
			}
		})
	}
}

func TestSweepCrossover(t *testing.T) {
	ctx := context.Background()
	base := "material=gaas&lx=10nm&ly=10nm&lz=100nm&bz=open&temp=300&ef=0.05&sweep=all&from=5nm&to=80nm&steps=24"
	var prev map[string]*float64
	for _, tol := range []string{"1", "0.3", "0.1", "0.03", "0.01", "0.001"} {
		r, err := RunSweep(ctx, mustSweep(t, base+"&tol="+tol), nil)
		if err != nil {
			t.Fatal(err)
		}
		for _, name := range Compared {
			c := r.CrossoverNM[name]
			if c != nil {
				// Every swept size from the crossover up is within tol.
				for i, l := range r.LengthsNM {
					if l >= *c && !(math.Abs(r.Deviation(name, i)) <= r.Tol) {
						t.Errorf("tol %s: %s at %g nm ≥ crossover %g nm deviates %g", tol, name, l, *c, r.Deviation(name, i))
					}
				}
			}
			// A smaller tol never moves the crossover to a smaller size.
			if prev != nil {
				if p := prev[name]; c != nil && (p == nil || *c < *p) {
					t.Errorf("tol %s: %s crossover %g nm is below the one at the larger tol (%v)", tol, name, *c, p)
				}
			}
		}
		prev = r.CrossoverNM
	}
	// The periodic wire approaches the bulk density quickly (no wall
	// depletion); the hard-wall wire keeps a surface deficit ∝ 1/L that is
	// still 15 % at 80 nm, so at 5 % it never crosses over (Weyl's boundary
	// term; Baltes & Hilf 1976).
	r, err := RunSweep(ctx, mustSweep(t, base+"&tol=0.05"), nil)
	if err != nil {
		t.Fatal(err)
	}
	if r.CrossoverNM["box"] != nil || r.CrossoverNM["scenario"] != nil {
		t.Errorf("box crossover %v, want none: the box deviation at 80 nm is %g", *r.CrossoverNM["box"], r.Deviation("box", len(r.LengthsNM)-1))
	}
	if c := r.CrossoverNM["ring"]; c == nil || *c > 40 {
		t.Errorf("ring crossover %v, want one below 40 nm", c)
	}
	b, err := json.Marshal(r)
	if err != nil {
		t.Fatal(err)
	}
	var doc map[string]any
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	co := doc["crossover_nm"].(map[string]any)
	if v, ok := co["box"]; !ok || v != nil {
		t.Errorf(`crossover_nm.box = %v (present %v), want null`, v, ok)
	}
	for _, k := range []string{"lengths_nm", "scenario", "box", "ring", "continuum"} {
		if a, ok := doc[k].([]any); !ok || len(a) != 24 {
			t.Errorf("%s: %v, want 24 values", k, doc[k])
		}
	}
}

func TestSweepDeviationNull(t *testing.T) {
	// Below the band edge at T = 0 every variant is empty (the ring's
	// lowest level, k = 0, lies at E = 0): zero against zero is a
	// deviation of 0, not undefined.
	r, err := RunSweep(context.Background(), mustSweep(t, "lx=10nm&ly=10nm&bz=open&temp=0&ef=-0.01&sweep=all&from=5nm&to=20nm&steps=3&quantity=states"), nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, name := range Compared {
		for i := range r.LengthsNM {
			if d := r.Deviations[name][i]; d == nil || *d != 0 {
				t.Errorf("%s step %d: deviation %v, want 0", name, i, d)
			}
		}
	}
	// At E_F = 1 meV the continuum has states but a 5 nm hard-wall wire
	// has none: deviation −1 exactly.
	r, err = RunSweep(context.Background(), mustSweep(t, "lx=10nm&ly=10nm&bz=open&temp=0&ef=0.001&sweep=all&from=5nm&to=20nm&steps=3&quantity=modes"), nil)
	if err != nil {
		t.Fatal(err)
	}
	if d := r.Deviation("box", 0); d != -1 {
		t.Errorf("box modes deviation at 5 nm, E_F = 1 meV: %g, want −1", d)
	}
}

func TestSweepCancel(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	sw := mustSweep(t, wireSweep)
	var calls atomic.Int32
	_, err := RunSweep(ctx, sw, func(done, total int) {
		calls.Add(1)
		if done == 3 {
			cancel()
		}
	})
	e, ok := AsError(err)
	if !ok || e.Code != Canceled {
		t.Fatalf("err = %v, want a Canceled error", err)
	}
	// The two workers may each finish the step they were inside.
	if n := calls.Load(); n > 5 {
		t.Errorf("%d steps completed after cancelling at 3", n)
	}
}

func TestSweepProgressAndOutputs(t *testing.T) {
	sw := mustSweep(t, "lx=10nm&ly=10nm&bz=open&sweep=ly&from=5nm&to=20nm&steps=4&quantity=conductance")
	var seen []int
	r, err := RunSweep(context.Background(), sw, func(done, total int) {
		if total != 4 {
			t.Errorf("total %d", total)
		}
		seen = append(seen, done)
	})
	if err != nil {
		t.Fatal(err)
	}
	if len(seen) != 4 || seen[3] != 4 {
		t.Errorf("progress %v", seen)
	}
	if r.Unit != "S" || r.Sweep != "ly" {
		t.Errorf("unit %q sweep %q", r.Unit, r.Sweep)
	}
	for i, a := range r.AxisLengthsNM {
		if a[0] != 10 || math.Abs(a[1]-r.LengthsNM[i]) > 1e-9 {
			t.Errorf("step %d: axes %v, lengths %g", i, a, r.LengthsNM[i])
		}
	}
	var csvBuf, table strings.Builder
	if err := r.WriteCSV(&csvBuf); err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(csvBuf.String()), "\n")
	if len(lines) != 5 || !strings.HasPrefix(lines[0], "ly_nm,lx_nm,ly_nm,lz_nm,conductance_scenario_S") {
		t.Errorf("CSV:\n%s", csvBuf.String())
	}
	if err := r.WriteTable(&table); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(table.String(), "crossover") {
		t.Errorf("table:\n%s", table.String())
	}
}

func FuzzParseSweep(f *testing.F) {
	for _, s := range []string{wireSweep, "sweep=lx&from=1nm&to=2nm", "sweep=all&tol=1e-9", "steps=200&to=1m", "from=0.1nm&lx=1nm&ly=1m"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, query string) {
		q, err := url.ParseQuery(query)
		if err != nil {
			return
		}
		sw, err := ParseSweep(q)
		if err != nil {
			if _, ok := AsError(err); !ok {
				t.Fatalf("error without a key: %v", err)
			}
			return
		}
		ls := sw.Lengths()
		if len(ls) != sw.Steps || ls[0] != sw.FromM || ls[len(ls)-1] != sw.ToM {
			t.Fatalf("lengths %v", ls)
		}
		for _, l := range []float64{ls[0], ls[len(ls)-1]} {
			s := sw.At(l)
			for i := 0; i < s.Dims; i++ {
				if !(s.LengthM[i] >= MinLengthM*(1-1e-12) && s.LengthM[i] <= MaxLengthM*(1+1e-12)) {
					t.Fatalf("axis %d length %g out of range at %g", i, s.LengthM[i], l)
				}
			}
		}
		q2, _ := url.ParseQuery(sw.Canonical())
		sw2, err := ParseSweep(q2)
		if err != nil || sw2.Canonical() != sw.Canonical() {
			t.Fatalf("canonical round trip: %v\n%s\n%s", err, sw.Canonical(), sw2.Canonical())
		}
	})
}

// BenchmarkSweepWire is the target: a 40-step sweep of a GaAs wire (two
// hard-wall axes scaled together from 5 to 80 nm, one open) at 300 K in
// under a second on two cores.
func BenchmarkSweepWire(b *testing.B) {
	sw := mustSweep(b, wireSweep)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := RunSweep(context.Background(), sw, nil); err != nil {
			b.Fatal(err)
		}
	}
}

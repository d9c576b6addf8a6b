package scenario

import (
	"context"
	"encoding/json"
	"math"
	"net/url"
	"testing"

	"ringbox/internal/phys"
)

func TestParseLatticeErrorsNameTheKey(t *testing.T) {
	tests := []struct {
		query string
		key   string
		code  Code
	}{
		{"structure=chiral", "structure", Invalid},
		{"bogus=1", "bogus", Invalid},
		{"lines=0", "lines", Invalid},
		{"lines=x", "lines", Invalid},
		{"lines=3&lines=4", "lines", Invalid},
		{"structure=tube&n=201", "n", Invalid},
		{"structure=tube&n=4&m=5", "m", Invalid},
		{"gamma0=-1", "gamma0", Invalid},
		{"gamma0=NaN", "gamma0", Invalid},
		{"acc=3nm", "acc", Invalid},
		{"acc=0.142furlong", "acc", Invalid},
		{"gs=3", "gs", Invalid},
		{"ef=1e9", "ef", Invalid},
		{"temp=-4", "temp", Invalid},
		{"at=0.1,,0.2", "at", Invalid},
		{"at=0.1,zz", "at", Invalid},
		{"emin=1&emax=0.5", "emax", Invalid},
		{"points=1", "points", Invalid},
		{"kpoints=1", "kpoints", Invalid},
		{"structure=zigzag&lines=2000&kpoints=401", "kpoints", TooLarge},
	}
	for _, tc := range tests {
		t.Run(tc.query, func(t *testing.T) {
			q, err := url.ParseQuery(tc.query)
			if err != nil {
				t.Fatal(err)
			}
			_, err = ParseLattice(q)
			e, ok := AsError(err)
			if !ok {
				t.Fatalf("got %v, want a *scenario.Error", err)
			}
			if e.Key != tc.key || e.Code != tc.code {
				t.Errorf("key %q code %d, want %q %d (%v)", e.Key, e.Code, tc.key, tc.code, err)
			}
		})
	}
}

func TestParseLatticeDefaultsAndUnits(t *testing.T) {
	q, _ := url.ParseQuery("structure=tube&n=10&acc=1.42A&ef=25meV&at=0,-0.1eV&kpoints=300&lines=99")
	r, err := ParseLattice(q)
	if err != nil {
		t.Fatal(err)
	}
	p := r.Params
	if p.AccNM != 0.142 || p.EFEV != 0.025 || p.KPoints != 301 || p.M != 0 || p.Gamma0EV != 2.7 || p.Gs != 2 || p.TempK != 300 {
		t.Errorf("parsed %+v", p)
	}
	want := "acc=0.142&at=0%2C-0.1&ef=0.025&emax=3&emin=-3&gamma0=2.7&gs=2&kpoints=301&m=0&n=10&points=600&structure=tube&temp=300"
	if got := r.Canonical(); got != want {
		t.Errorf("canonical\n got %s\nwant %s", got, want)
	}
}

// The DESIGN check values through the request path: (10, 0) gap 0.948 eV
// (Saito, Dresselhaus & Dresselhaus 1998) and a metallic tube's G = 4e²/h
// near E = 0 at low temperature (common practice).
func TestRunLattice(t *testing.T) {
	q, _ := url.ParseQuery("structure=tube&n=10&m=0&kpoints=201")
	r, err := ParseLattice(q)
	if err != nil {
		t.Fatal(err)
	}
	res, err := RunLattice(context.Background(), r)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(res.GapEV-0.948) > 1e-3 {
		t.Errorf("(10,0) gap %.4f eV, want 0.948", res.GapEV)
	}
	if _, err := json.Marshal(res); err != nil {
		t.Error(err)
	}
	q, _ = url.ParseQuery("structure=tube&n=9&m=0&temp=1&kpoints=201")
	r, _ = ParseLattice(q)
	res, err = RunLattice(context.Background(), r)
	if err != nil {
		t.Fatal(err)
	}
	if g, want := res.Observables.ConductanceS, 4*phys.ConductanceQuantumPerSpin; math.Abs(g-want) > 1e-6*want {
		t.Errorf("(9,0) G = %g S, want %g", g, want)
	}

	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err = RunLattice(ctx, r)
	if e, ok := AsError(err); !ok || e.Code != Canceled {
		t.Errorf("canceled run: %v", err)
	}
}

func FuzzParseLattice(f *testing.F) {
	for _, s := range []string{
		"", "structure=tube&n=10&m=0", "structure=zigzag&lines=12&at=0,0.1",
		"acc=1.42A&ef=25meV&temp=4.2", "kpoints=1000&points=20000", "gamma0=3eV&emin=-1&emax=1",
		"structure=tube&n=200&m=199&kpoints=4001", "at=" + url.QueryEscape("1,2,3,,"),
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		q, err := url.ParseQuery(s)
		if err != nil {
			return
		}
		r, err := ParseLattice(q)
		if err != nil {
			if _, ok := AsError(err); !ok {
				t.Fatalf("%q: error %v is not a *scenario.Error", s, err)
			}
			return
		}
		if err := r.Params.Validate(); err != nil {
			t.Fatalf("%q: parsed but invalid: %v", s, err)
		}
		c := r.Canonical()
		q2, err := url.ParseQuery(c)
		if err != nil {
			t.Fatalf("canonical %q does not parse: %v", c, err)
		}
		r2, err := ParseLattice(q2)
		if err != nil {
			t.Fatalf("canonical %q rejected: %v", c, err)
		}
		if c2 := r2.Canonical(); c2 != c {
			t.Fatalf("canonical not stable: %q then %q", c, c2)
		}
	})
}

package scenario

import (
	"context"
	"fmt"
	"net/url"
	"strings"
	"testing"
)

// cube returns a copper hard-wall cube of side lNM counted to 7 eV with 40
// point values: about 1.06×10⁷ states at 50 nm, 1.03×10⁹ at 230 nm.
func cube(b *testing.B, lNM float64, temp string) Scenario {
	var at []string
	for i := 1; i <= 40; i++ {
		at = append(at, fmt.Sprintf("%g", 7*float64(i)/40))
	}
	l := fmt.Sprintf("%gnm", lNM)
	q, _ := url.ParseQuery("material=cu&dims=3&lx=" + l + "&ly=" + l + "&lz=" + l +
		"&bx=box&by=box&bz=box&emax=7&points=400&temp=" + temp + "&at=" + strings.Join(at, ","))
	s, err := Parse(q)
	if err != nil {
		b.Fatal(err)
	}
	return s
}

func benchRun(b *testing.B, s Scenario) {
	b.ReportAllocs()
	var states float64
	for b.Loop() {
		res, err := Run(context.Background(), s)
		if err != nil {
			b.Fatal(err)
		}
		states = res.StatesBelow
	}
	b.ReportMetric(states, "states")
}

func BenchmarkCube1e7(b *testing.B)     { benchRun(b, cube(b, 50, "0")) }
func BenchmarkCube1e7Warm(b *testing.B) { benchRun(b, cube(b, 50, "300")) }
func BenchmarkCube1e9(b *testing.B)     { benchRun(b, cube(b, 230, "0")) }
func BenchmarkCube1e9Warm(b *testing.B) { benchRun(b, cube(b, 230, "300")) }
func BenchmarkWire10x10x100(b *testing.B) {
	q, _ := url.ParseQuery("material=gaas&lx=10nm&ly=10nm&lz=100nm")
	s, _ := Parse(q)
	benchRun(b, s)
}

// BenchmarkWireGaAs300 is a 300 nm × 300 nm GaAs wire, 1 µm long and open
// along z, counted to 2 eV (about 6×10⁷ states below emax).
func BenchmarkWireGaAs300(b *testing.B) {
	q, _ := url.ParseQuery("material=gaas&lx=300nm&ly=300nm&lz=1um&bz=open&emax=2")
	s, err := Parse(q)
	if err != nil {
		b.Fatal(err)
	}
	benchRun(b, s)
}
func BenchmarkCube1e11(b *testing.B)     { benchRun(b, cube(b, 1070, "0")) }
func BenchmarkCube1e11Warm(b *testing.B) { benchRun(b, cube(b, 1070, "300")) }

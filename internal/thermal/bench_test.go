package thermal

import (
	"context"
	"math"
	"testing"
)

// denseStaircase is 10⁴ unit steps spread evenly over [0, 1) eV.
func denseStaircase() staircase {
	levels, jumps := make([]float64, 10000), make([]float64, 10000)
	for i := range levels {
		levels[i], jumps[i] = (float64(i)+0.5)/10000, 1
	}
	return newStaircase(levels, jumps)
}

// threeSteps is a 3-level staircase around E_F = 0.05 eV: levels 1 meV
// below, 0.2 meV above and 1 meV above, spin-degenerate.
func threeSteps() staircase {
	return newStaircase([]float64{0.049, 0.0502, 0.051}, []float64{2, 2, 2})
}

func benchAverage(b *testing.B, c Curve, ef, kT float64, slope bool) {
	ctx := context.Background()
	var evals, calls int
	counting := counted(c, &evals, &calls)
	in := Integrator{}
	var last Estimate
	b.ReportAllocs()
	for b.Loop() {
		var err error
		if slope {
			last, err = in.Slope(ctx, counting, ef, kT)
		} else {
			last, err = in.Occupied(ctx, counting, ef, kT)
		}
		if err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(evals)/float64(b.N), "evals/op")
	b.ReportMetric(float64(calls)/float64(b.N), "batches/op")
	b.ReportMetric(last.ErrBound/math.Abs(last.Value), "relbound")
}

func BenchmarkOccupiedDense300K(b *testing.B) {
	benchAverage(b, denseStaircase().curve, 0.5, KT(300), false)
}

func BenchmarkSlopeDense300K(b *testing.B) {
	benchAverage(b, denseStaircase().curve, 0.5, KT(300), true)
}

func BenchmarkOccupiedThreeSteps4K(b *testing.B) {
	benchAverage(b, threeSteps().curve, 0.05, KT(4), false)
}

func BenchmarkSlopeThreeSteps4K(b *testing.B) {
	benchAverage(b, threeSteps().curve, 0.05, KT(4), true)
}

func BenchmarkOccupiedContinuum300K(b *testing.B) {
	band := smooth(func(e float64) float64 { return math.Max(e, 0) * math.Sqrt(math.Max(e, 0)) })
	benchAverage(b, band, 0.1, KT(300), false)
}

func BenchmarkFermiDiracIntegral(b *testing.B) {
	for b.Loop() {
		FermiDiracIntegral(0.5, 3)
	}
}

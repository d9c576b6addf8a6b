package lattice

import (
	"context"
	"testing"
)

// Target ≤ 300 ms/op: bands, DOS and modes of a 200-chain zigzag ribbon over
// 1001 k points (the odd grid nearest 1000).
func BenchmarkZigzag200(b *testing.B) {
	p := params(Zigzag, 200, 0, 0)
	p.KPoints = 1001
	for b.Loop() {
		if _, err := compute(context.Background(), p); err != nil {
			b.Fatal(err)
		}
	}
}

// Target ≤ 200 ms/op: bands, DOS and modes of the (40, 35) tube (1690
// hexagons per cell, 3380 bands) on the default 401-point k grid.
func BenchmarkTube40x35(b *testing.B) {
	p := DefaultParams()
	p.Structure, p.N, p.M = Tube, 40, 35
	for b.Loop() {
		if _, err := compute(context.Background(), p); err != nil {
			b.Fatal(err)
		}
	}
}

// The whole request: with the partner and the family view.
func BenchmarkComputeTube40x35(b *testing.B) {
	p := DefaultParams()
	p.Structure, p.N, p.M = Tube, 40, 35
	for b.Loop() {
		if _, err := Compute(context.Background(), p); err != nil {
			b.Fatal(err)
		}
	}
}

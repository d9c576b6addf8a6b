package figure

import (
	"math"
)

// Synthetic data for tests and golden files: a hard-wall wire counted from
// textbook formulas (particle in a box, E_n = n²E₁; ring, E_n = 4n²E₁;
// continuum N = 2√(E/E₁); Weyl mean 2(√(E/E₁) − ½)), with E₁ an arbitrary
// fixed scale. Only the shapes matter here, not the material.

const e1EV = 0.0021 // level spacing scale in eV (arbitrary)

func energies(n int, maxEV float64) []float64 {
	e := make([]float64, n)
	for i := range e {
		e[i] = maxEV * float64(i) / float64(n-1)
	}
	return e
}

func mapY(x []float64, f func(float64) float64) []float64 {
	y := make([]float64, len(x))
	for i, v := range x {
		y[i] = f(v)
	}
	return y
}

func boxCount(e float64) float64 { return 2 * math.Floor(math.Sqrt(e/e1EV)) }
func ringCount(e float64) float64 {
	return 2 * (2*math.Floor(math.Sqrt(e/(4*e1EV))) + 1)
}

// statesFigure is an N(E) figure with every role.
func statesFigure() Figure {
	e := energies(400, 0.12)
	return Figure{
		Title:  "Number of states, 1D wire",
		XLabel: "energy E (eV)",
		YLabel: "states N(E)",
		Series: []Series{
			{Name: "scenario (box)", X: e, Y: mapY(e, boxCount), Kind: Staircase, Role: RoleScenario},
			{Name: "ring", X: e, Y: mapY(e, ringCount), Kind: Staircase, Role: RoleRing},
			{Name: "continuum", X: e, Y: mapY(e, func(v float64) float64 { return 2 * math.Sqrt(v/e1EV) }), Kind: Line, Role: RoleContinuum},
			{Name: "smooth (Weyl)", X: e, Y: mapY(e, func(v float64) float64 { return 2 * (math.Sqrt(v/e1EV) - 0.5) }), Kind: Line, Role: RoleSmooth},
		},
		Caption: "idealised model: infinite walls, parabolic band",
	}
}

// sweepFigure is a relative deviation against size on log–log axes.
func sweepFigure() Figure {
	var l, box, ring []float64
	for i := 0; i <= 40; i++ {
		lengthNM := math.Pow(10, 0.5+2.5*float64(i)/40)
		l = append(l, lengthNM)
		box = append(box, 3/lengthNM*(1+0.3*math.Sin(lengthNM)))
		ring = append(ring, 0.8/(lengthNM*lengthNM)*(1+0.5*math.Cos(2*lengthNM)))
	}
	return Figure{
		Title:  "Deviation from the continuum",
		XLabel: "length L (nm)",
		YLabel: "|ΔN/N|",
		LogX:   true, LogY: true,
		Series: []Series{
			{Name: "box", X: l, Y: box, Kind: Line, Role: RoleBox},
			{Name: "box samples", X: l, Y: box, Kind: Markers, Role: RoleBox},
			{Name: "ring", X: l, Y: ring, Kind: Line, Role: RoleRing},
		},
	}
}

// compareFigure overlays eight scenarios' M(E).
func compareFigure() Figure {
	e := energies(300, 0.3)
	f := Figure{Title: "Conduction modes, eight options", XLabel: "energy E (eV)", YLabel: "modes M(E)"}
	for i := range 8 {
		w := 0.004 * float64(1+i)
		f.Series = append(f.Series, Series{
			Name: "option " + string(rune('A'+i)), X: e, Kind: Staircase, Role: RoleOther, Index: i,
			Y: mapY(e, func(v float64) float64 { return 2 * math.Floor(math.Sqrt(v/w)) }),
		})
	}
	return f
}

// bandsFigure is the armchair-ribbon band structure of the tight-binding
// formula E = ±γ₀√(1 + 4cos²θ_p + 4cosθ_p·cos(ka/2)) with θ_p = pπ/(N+1)
// (Nakada et al., PRB 54, 17954 (1996)), N = 7, γ₀ = 2.7 eV, ka in [−π, π].
func bandsFigure() Figure {
	const n, gamma0 = 7, 2.7
	ka := energies(161, 2*math.Pi)
	for i := range ka {
		ka[i] -= math.Pi
	}
	f := Figure{Title: "Armchair ribbon, N = 7", XLabel: "wave vector ka", YLabel: "energy E (eV)"}
	for p := 1; p <= n; p++ {
		th := float64(p) * math.Pi / (n + 1)
		band := func(sign float64) []float64 {
			return mapY(ka, func(k float64) float64 {
				return sign * gamma0 * math.Sqrt(math.Max(0, 1+4*math.Cos(th)*math.Cos(th)+4*math.Cos(th)*math.Cos(k/2)))
			})
		}
		f.Series = append(f.Series,
			Series{Name: "conduction bands", X: ka, Y: band(1), Kind: Line, Role: RoleScenario},
			Series{Name: "valence bands", X: ka, Y: band(-1), Kind: Line, Role: RoleBox})
	}
	return f
}

package spectrum

import "math"

// Work estimates what counting c up to emaxEV costs: ops for building the
// counter plus evals evaluations of N(E), and the bytes the counter holds.
// Callers compare it with a budget before they build anything.
func Work(c Conductor, emaxEV float64, evals int) (ops, bytes float64) {
	gmax := Gamma(math.Max(emaxEV, 0), c.AlphaPerEV)
	for _, v := range c.Valleys {
		var n []float64
		open := 0
		for i, a := range c.Axes {
			if a.BC == Open {
				open++
				continue
			}
			l := ladder{q: quantumEV(a, v.MassM0[i]), ring: a.BC == Ring}
			n = append(n, float64(l.levels(gmax))+1)
		}
		e := float64(evals)
		switch len(n) {
		case 0, 1:
			if open == 0 || open == 2 || len(n) == 0 {
				ops += e
			} else {
				ops += e * n[0]
			}
		case 2:
			if open == 0 {
				ops += e * math.Min(n[0], n[1])
			} else {
				ops += e * n[0] * n[1]
			}
		case 3:
			slices3 := []float64{n[0], n[1], n[2]}
			// sort descending: the outer axis has the most levels
			for i := 0; i < 3; i++ {
				for j := i + 1; j < 3; j++ {
					if slices3[j] > slices3[i] {
						slices3[i], slices3[j] = slices3[j], slices3[i]
					}
				}
			}
			list := slices3[1] * slices3[2] * math.Pi / 4
			lg := math.Log2(list + 2)
			ops += list*lg + e*slices3[0]*3*lg
			bytes += 8 * list * 1.5
		}
	}
	return ops, bytes
}

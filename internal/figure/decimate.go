package figure

import "math"

// Decimation keeps an SVG small without changing what the eye sees. A
// staircase first loses the samples that repeat the previous value, which
// is exact. Anything still denser than the output can show is reduced per
// pixel column: a line keeps the first, lowest, highest and last point of
// each column (the "M4" rule of Jugel et al., Proc. VLDB Endow. 7, 797
// (2014)), so narrow spikes such as van Hove peaks survive; a staircase
// keeps, per column, one vertical riser spanning every value it took there.

// axisMap maps a data value to its fraction of the axis, linear or log.
type axisMap struct {
	min, max float64
	log      bool
}

func (a axisMap) norm(v float64) float64 {
	if a.log {
		return (math.Log(v) - math.Log(a.min)) / (math.Log(a.max) - math.Log(a.min))
	}
	return (v - a.min) / (a.max - a.min)
}

// column returns the pixel column of v among n columns; values left of the
// axis share column -1 and right of it column n.
func (a axisMap) column(v float64, n int) int {
	f := a.norm(v) * float64(n)
	switch {
	case f < 0:
		return -1
	case f >= float64(n):
		return n
	}
	return int(f)
}

// mergeSteps drops the samples of a staircase whose value equals the one
// before, keeping the last sample so that the final run keeps its length.
func mergeSteps(x, y []float64) ([]float64, []float64) {
	if len(x) < 3 {
		return x, y
	}
	ox, oy := []float64{x[0]}, []float64{y[0]}
	for i := 1; i < len(x)-1; i++ {
		if y[i] != oy[len(oy)-1] {
			ox, oy = append(ox, x[i]), append(oy, y[i])
		}
	}
	n := len(x) - 1
	return append(ox, x[n]), append(oy, y[n])
}

// collapseSteps keeps at most four points per column of a merged
// staircase: all the risers in a column become one riser at the column's first
// step, running through the column's extreme values to its last value.
func collapseSteps(x, y []float64, a axisMap, cols int) ([]float64, []float64) {
	ox, oy := make([]float64, 0, 4*cols), make([]float64, 0, 4*cols)
	add := func(px, py float64) {
		if n := len(ox); n > 0 && ox[n-1] == px && oy[n-1] == py {
			return
		}
		ox, oy = append(ox, px), append(oy, py)
	}
	for i := 0; i < len(x); {
		c := a.column(x[i], cols)
		j := i + 1
		for j < len(x) && a.column(x[j], cols) == c {
			j++
		}
		if j == i+1 {
			add(x[i], y[i])
			i = j
			continue
		}
		lo, hi := i, i
		for k := i; k < j; k++ {
			if y[k] < y[lo] {
				lo = k
			}
			if y[k] > y[hi] {
				hi = k
			}
		}
		first, second := lo, hi
		if hi < lo {
			first, second = hi, lo
		}
		add(x[i], y[first])
		add(x[i], y[second])
		add(x[i], y[j-1])
		add(x[j-1], y[j-1])
		i = j
	}
	return ox, oy
}

// reduceLine applies the M4 rule to a line whose x is non-decreasing; an
// unsorted line (a closed curve, say) is returned unchanged.
func reduceLine(x, y []float64, a axisMap, cols int) ([]float64, []float64) {
	for i := 1; i < len(x); i++ {
		if x[i] < x[i-1] {
			return x, y
		}
	}
	ox, oy := make([]float64, 0, 4*cols+4), make([]float64, 0, 4*cols+4)
	for i := 0; i < len(x); {
		c := a.column(x[i], cols)
		j := i + 1
		for j < len(x) && a.column(x[j], cols) == c {
			j++
		}
		lo, hi := i, i
		for k := i; k < j; k++ {
			if y[k] < y[lo] {
				lo = k
			}
			if y[k] > y[hi] {
				hi = k
			}
		}
		last := -1
		for _, k := range sortedIdx(i, lo, hi, j-1) {
			if k != last {
				ox, oy = append(ox, x[k]), append(oy, y[k])
				last = k
			}
		}
		i = j
	}
	return ox, oy
}

// sortedIdx sorts four indices (a tiny fixed-size sort).
func sortedIdx(a, b, c, d int) [4]int {
	s := [4]int{a, b, c, d}
	for i := 1; i < 4; i++ {
		for j := i; j > 0 && s[j] < s[j-1]; j-- {
			s[j], s[j-1] = s[j-1], s[j]
		}
	}
	return s
}

// thinMarkers keeps the first marker in each output cell.
func thinMarkers(x, y []float64, ax, ay axisMap, cols, rows int) ([]float64, []float64) {
	seen := make(map[[2]int]bool)
	var ox, oy []float64
	for i := range x {
		k := [2]int{ax.column(x[i], cols), ay.column(y[i], rows)}
		if seen[k] {
			continue
		}
		seen[k] = true
		ox, oy = append(ox, x[i]), append(oy, y[i])
	}
	return ox, oy
}

// decimate reduces every run of c for an output cols columns wide and rows high.
func decimate(c *clean, ax, ay axisMap, cols, rows int) {
	for i, r := range c.runs {
		switch c.Kind {
		case Staircase:
			r.x, r.y = mergeSteps(r.x, r.y)
			if len(r.x) > 2*cols {
				r.x, r.y = collapseSteps(r.x, r.y, ax, cols)
			}
		case Line:
			if len(r.x) > 4*cols {
				r.x, r.y = reduceLine(r.x, r.y, ax, cols)
			}
		case Markers:
			if len(r.x) > 2*cols {
				r.x, r.y = thinMarkers(r.x, r.y, ax, ay, cols, rows)
			}
		}
		c.runs[i] = r
	}
}

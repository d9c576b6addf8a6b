package figure

import (
	"errors"
	"fmt"
	"math"
)

// Series is one curve or set of points. X and Y have equal length and hold
// finite values; Index picks the colour of a RoleOther series.
type Series struct {
	Name  string // legend text; a series without a name has no legend entry
	X, Y  []float64
	Kind  Kind
	Role  Role
	Index int
}

// Errors returned for bad data; they are wrapped with the series or field
// that failed, so test with errors.Is.
var (
	ErrNoData    = errors.New("figure: no data to plot")
	ErrNonFinite = errors.New("figure: value is NaN or infinite")
	ErrLength    = errors.New("figure: X and Y differ in length")
	ErrUnsorted  = errors.New("figure: staircase X is not non-decreasing")
	ErrBadRange  = errors.New("figure: invalid axis range")
	ErrBadSize   = errors.New("figure: invalid figure size or resolution")
)

// run is a stretch of a series drawn as one piece; a series breaks into
// several runs where log axes drop non-positive points.
type run struct{ x, y []float64 }

// clean is a checked series ready to draw.
type clean struct {
	Series
	runs []run
	look look
}

// check validates s and splits it into runs. On a log axis a non-positive
// coordinate cannot be drawn, so such points are dropped (and the curve is
// broken there) rather than rejected.
func check(s Series, logX, logY bool) (clean, error) {
	c := clean{Series: s, look: lookFor(s)}
	if len(s.X) != len(s.Y) {
		return c, fmt.Errorf("series %q: len(X)=%d, len(Y)=%d: %w", s.Name, len(s.X), len(s.Y), ErrLength)
	}
	for i := range s.X {
		if !finite(s.X[i]) || !finite(s.Y[i]) {
			return c, fmt.Errorf("series %q: point %d (%g, %g): %w", s.Name, i, s.X[i], s.Y[i], ErrNonFinite)
		}
		if s.Kind == Staircase && i > 0 && s.X[i] < s.X[i-1] {
			return c, fmt.Errorf("series %q: X[%d]=%g < X[%d]=%g: %w", s.Name, i, s.X[i], i-1, s.X[i-1], ErrUnsorted)
		}
	}
	// Runs are sub-slices of the caller's data, which is never modified.
	start := 0
	for i := 0; i <= len(s.X); i++ {
		if i < len(s.X) && !((logX && s.X[i] <= 0) || (logY && s.Y[i] <= 0)) {
			continue
		}
		if i > start {
			r := run{x: s.X[start:i:i], y: s.Y[start:i:i]}
			if s.Kind == Staircase && i < len(s.X) && !(logX && s.X[i] <= 0) {
				// The last drawable step runs on to where this one starts.
				r.x, r.y = append(r.x, s.X[i]), append(r.y, s.Y[i-1])
			}
			c.runs = append(c.runs, r)
		}
		start = i + 1
	}
	return c, nil
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// points counts the drawable points of c.
func (c clean) points() int {
	n := 0
	for _, r := range c.runs {
		n += len(r.x)
	}
	return n
}

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
	var cur run
	flush := func() {
		if len(cur.x) > 0 {
			c.runs = append(c.runs, cur)
		}
		cur = run{}
	}
	for i := range s.X {
		if (logX && s.X[i] <= 0) || (logY && s.Y[i] <= 0) {
			if s.Kind == Staircase && len(cur.x) > 0 && !(logX && s.X[i] <= 0) {
				// The run of the last drawable step ends where this one starts.
				cur.x = append(cur.x, s.X[i])
				cur.y = append(cur.y, cur.y[len(cur.y)-1])
			}
			flush()
			continue
		}
		cur.x = append(cur.x, s.X[i])
		cur.y = append(cur.y, s.Y[i])
	}
	flush()
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

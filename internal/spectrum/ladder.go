package spectrum

import "math"

// tieRel widens every comparison γ_level ≤ γ by this relative amount, so a
// level that lies exactly at the requested energy is counted even after the
// rounding of E → γ (DESIGN: ties count).
const tieRel = 1e-12

// ladder is one confined axis: levels ε_n = q·n² with n ≥ 1 (box) or n ∈ ℤ
// (ring, where ±n share an energy: weight 2 for n ≥ 1, 1 for n = 0).
type ladder struct {
	q    float64 // eV
	ring bool
}

// first returns the smallest n on the ladder.
func (l ladder) first() int {
	if l.ring {
		return 0
	}
	return 1
}

// weight returns how many states share level n.
func (l ladder) weight(n int) float64 {
	if l.ring && n > 0 {
		return 2
	}
	return 1
}

// top returns the largest n ≥ 0 with q·n² ≤ g, or −1 when g < 0.
func (l ladder) top(g float64) int {
	if g < 0 {
		return -1
	}
	n := int(math.Sqrt(g / l.q))
	for n > 0 && l.q*float64(n)*float64(n) > g {
		n--
	}
	for l.q*float64(n+1)*float64(n+1) <= g {
		n++
	}
	return n
}

// count returns the weighted number of levels with ε_n ≤ g.
func (l ladder) count(g float64) float64 {
	n := l.top(g)
	if n < 0 {
		return 0
	}
	if l.ring {
		return float64(2*n + 1)
	}
	return float64(n)
}

// sumSq returns Σ w_n n² over the levels with ε_n ≤ g.
func (l ladder) sumSq(g float64) float64 {
	n := float64(l.top(g))
	if n <= 0 {
		return 0
	}
	s := n * (n + 1) * (2*n + 1) / 6
	if l.ring {
		s *= 2
	}
	return s
}

// levels returns how many distinct n lie at or below g (0 if none).
func (l ladder) levels(g float64) int {
	n := l.top(g)
	if n < l.first() {
		return 0
	}
	return n - l.first() + 1
}

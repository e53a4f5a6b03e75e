package planner

import "math"

// recentMemo remembers a function at the last few arguments it was asked
// about: for hot loops that ask about the same few arguments of a dear
// function (an erfc, an Expm1) again and again. A hit returns the very
// value the function gave. One per goroutine.
type recentMemo struct {
	f    func(float64) float64
	x, v [4]float64
	next int
}

func newRecentMemo(f func(float64) float64) recentMemo {
	m := recentMemo{f: f}
	for i := range m.x {
		m.x[i] = math.NaN() // equal to no argument
	}
	return m
}

// at returns f(x).
func (m *recentMemo) at(x float64) float64 {
	for i, y := range m.x {
		if y == x {
			return m.v[i]
		}
	}
	v := m.f(x)
	m.x[m.next], m.v[m.next] = x, v
	m.next = (m.next + 1) % len(m.x)
	return v
}

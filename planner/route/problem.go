package route

import (
	"fmt"
	"math"
	"strconv"
)

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

func fmtFloat(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// Validate reports the first thing wrong with p, as an *InputError, or
// nil. Solve calls it first.
func (p Problem) Validate() error {
	if len(p.Items) > MaxItems {
		return &InputError{Field: "Items", Value: fmt.Sprintf("%d items", len(p.Items)), Err: ErrTooMany}
	}
	for i, it := range p.Items {
		for _, c := range [...]struct {
			name string
			v    float64
		}{{"A.X", it.A.X}, {"A.Y", it.A.Y}, {"B.X", it.B.X}, {"B.Y", it.B.Y}} {
			if !finite(c.v) {
				return &InputError{Field: fmt.Sprintf("Items[%d].%s", i, c.name), Value: fmtFloat(c.v), Err: ErrNotFinite}
			}
			if math.Abs(c.v) > MaxCoordinate {
				return &InputError{Field: fmt.Sprintf("Items[%d].%s", i, c.name), Value: fmtFloat(c.v), Err: ErrRange}
			}
		}
	}
	if p.Start != nil {
		for _, c := range [...]struct {
			name string
			v    float64
		}{{"Start.X", p.Start.X}, {"Start.Y", p.Start.Y}} {
			if !finite(c.v) {
				return &InputError{Field: c.name, Value: fmtFloat(c.v), Err: ErrNotFinite}
			}
			if math.Abs(c.v) > MaxCoordinate {
				return &InputError{Field: c.name, Value: fmtFloat(c.v), Err: ErrRange}
			}
		}
	}
	for _, c := range [...]struct {
		name string
		v    float64
	}{{"MoveSpeed", p.MoveSpeed}, {"SettleS", p.SettleS}} {
		if !finite(c.v) {
			return &InputError{Field: c.name, Value: fmtFloat(c.v), Err: ErrNotFinite}
		}
		if c.v < 0 {
			return &InputError{Field: c.name, Value: fmtFloat(c.v), Err: ErrNegative}
		}
	}
	if p.Group == nil {
		if len(p.Before) > 0 {
			return &InputError{Field: "Before", Value: fmt.Sprintf("%d pairs", len(p.Before)),
				Err: fmt.Errorf("%w: precedence given without Group", ErrGroup)}
		}
		return nil
	}
	if len(p.Group) != len(p.Items) {
		return &InputError{Field: "Group", Value: fmt.Sprintf("%d entries", len(p.Group)),
			Err: fmt.Errorf("%w: want one per item (%d)", ErrGroup, len(p.Items))}
	}
	present := map[int]bool{}
	for i, g := range p.Group {
		if g < 0 {
			return &InputError{Field: fmt.Sprintf("Group[%d]", i), Value: strconv.Itoa(g),
				Err: fmt.Errorf("%w: group numbers are >= 0", ErrGroup)}
		}
		present[g] = true
	}
	for i, b := range p.Before {
		for _, g := range b {
			if !present[g] {
				return &InputError{Field: fmt.Sprintf("Before[%d]", i), Value: fmt.Sprint(b),
					Err: fmt.Errorf("%w: group %d has no items", ErrGroup, g)}
			}
		}
		if b[0] == b[1] {
			return &InputError{Field: fmt.Sprintf("Before[%d]", i), Value: fmt.Sprint(b), Err: ErrCycle}
		}
	}
	if _, err := groupOrderCheck(p); err != nil {
		return err
	}
	return nil
}

package lattice

import (
	"fmt"
	"math"

	"github.com/golang/geo/r2"
)

// RowDirection says which field axis a terrace's dimer rows run along.
type RowDirection uint8

const (
	// RowsAlongX: dimer rows parallel to the field's x axis.
	RowsAlongX RowDirection = iota
	// RowsAlongY: dimer rows parallel to the field's y axis, as on the
	// terrace beyond a single-height step from a RowsAlongX terrace.
	RowsAlongY
)

// String returns "x" or "y", the spelling used in design files.
func (d RowDirection) String() string {
	if d == RowsAlongY {
		return "y"
	}
	return "x"
}

// Turned returns the other direction: the row direction across one
// single-height step.
func (d RowDirection) Turned() RowDirection { return 1 - d }

// Site is the integer address of one H site.
type Site struct {
	Terrace int // index into Surface.Terraces
	Row     int // dimer row, counted across the rows from the field edge
	Dimer   int // dimer along the row
	Side    int // 0 or 1: which Si atom of the dimer carries this H
}

// Index returns the site's position within its row, 2·Dimer+Side.
func (s Site) Index() int { return 2*s.Dimer + s.Side }

// SiteAt returns the site with the given in-row index.
func SiteAt(terrace, row, index int) Site {
	return Site{Terrace: terrace, Row: row, Dimer: index >> 1, Side: index & 1}
}

// String formats the address as T0:R12:D34:1 (terrace, row, dimer, side).
func (s Site) String() string {
	return fmt.Sprintf("T%d:R%d:D%d:%d", s.Terrace, s.Row, s.Dimer, s.Side)
}

// Terrace is one atomically flat terrace of the field: a polygon with its
// dimer-row direction and lattice offset.
type Terrace struct {
	Name string
	// Boundary is the terrace outline in field nm, counter-clockwise or
	// clockwise; empty means the whole field.
	Boundary []r2.Point
	// Rows is the direction the dimer rows run in.
	Rows RowDirection
	// Offset is the field position of the centre line of row 0 at dimer 0
	// (x along the row for RowsAlongX). NewSurface reduces it into one
	// lattice cell so that every index in the field is non-negative.
	Offset r2.Point
}

// StepDirection says which way a single-height step goes from a terrace
// to the terrace beyond it.
type StepDirection uint8

const (
	// StepDown: the terrace beyond lies one atomic layer (a/4) lower.
	StepDown StepDirection = iota
	// StepUp: the terrace beyond lies one atomic layer higher.
	StepUp
)

// String returns "down" or "up", the spelling used in design files.
func (s StepDirection) String() string {
	if s == StepUp {
		return "up"
	}
	return "down"
}

// AcrossStep returns the lattice of the terrace one single-height step
// away from t, up or down: its dimer rows turn by 90° and its dimer
// centres move by StepShift (a/(2√2)). In the diamond structure (FCC with
// the basis (0,0,0) and (¼,¼,¼)a) the atomic layer above a top layer
// lies at (¼,¼,0)a from it and the layer below at (¼,−¼,0)a, and the
// dimer centres of a terrace lie above the atoms of the layer its top
// layer has lost. So a step down moves the dimer centres along the new
// rows and a step up moves them across the new rows (by RowSpacing/4).
// The name and boundary are t's; set them for the new terrace.
//
// The step fixes the new lattice only up to a whole row: dimers can pair
// either way across the new rows (the two antiphase registries), so add
// RowSpacing/2 across the new rows to the offset for the other one. The
// sign of the shift does not matter: −StepShift differs from +StepShift
// by a whole dimer pitch along the rows, or by one registry across them.
func (t Terrace) AcrossStep(dir StepDirection) Terrace {
	n := t
	n.Rows = t.Rows.Turned()
	along, across := n.Rows.Split(t.Offset)
	if dir == StepUp {
		across += StepShift
	} else {
		along += StepShift
	}
	n.Offset = n.Rows.Join(along, across)
	return n
}

// Contains reports whether p lies inside the terrace boundary (always
// true for a terrace without one).
func (t *Terrace) Contains(p r2.Point) bool {
	if len(t.Boundary) < 3 {
		return true
	}
	return PolygonContains(t.Boundary, p)
}

// Surface is the lattice over a rectangular scan field: the field and its
// terraces. It is read-only once made.
type Surface struct {
	Field    r2.Rect
	Terraces []Terrace
	bounded  []int // indices of terraces with a boundary, tried first
	fallback int   // index of the terrace without a boundary, or -1
}

// NewSurface returns the surface of a field width x height nm with the
// given terraces; with none, the field is one RowsAlongX terrace with
// zero offset. Offsets are reduced into one lattice cell. It returns an
// error for a non-positive or non-finite size.
func NewSurface(width, height float64, terraces ...Terrace) (*Surface, error) {
	if !(width > 0) || !(height > 0) || math.IsInf(width, 0) || math.IsInf(height, 0) {
		return nil, fmt.Errorf("lattice: field size %g x %g nm must be positive and finite", width, height)
	}
	if width/DimerPitch >= MaxRowIndex/2 || height/DimerPitch >= MaxRowIndex/2 {
		return nil, fmt.Errorf("lattice: field size %g x %g nm is beyond the largest field, %g nm a side", width, height, float64(MaxRowIndex/2-1)*DimerPitch)
	}
	if len(terraces) == 0 {
		terraces = []Terrace{{Name: "T0", Rows: RowsAlongX}}
	}
	if len(terraces) > MaxTerraces {
		return nil, fmt.Errorf("lattice: %d terraces, more than the limit of %d", len(terraces), MaxTerraces)
	}
	unbounded := 0
	for _, t := range terraces {
		if !finite(t.Offset.X) || !finite(t.Offset.Y) {
			return nil, fmt.Errorf("lattice: terrace %q: offset %v is not finite", t.Name, t.Offset)
		}
		if t.Rows > RowsAlongY {
			return nil, fmt.Errorf("lattice: terrace %q: unknown row direction %d", t.Name, t.Rows)
		}
		for _, p := range t.Boundary {
			if !finite(p.X) || !finite(p.Y) {
				return nil, fmt.Errorf("lattice: terrace %q: boundary point %v is not finite", t.Name, p)
			}
		}
		if len(t.Boundary) > 0 && len(t.Boundary) < 3 {
			return nil, fmt.Errorf("lattice: terrace %q: boundary has %d points; a polygon needs 3 or more", t.Name, len(t.Boundary))
		}
		if len(t.Boundary) == 0 {
			unbounded++
		}
	}
	if unbounded > 1 {
		return nil, fmt.Errorf("lattice: %d terraces have no boundary; at most one may take the rest of the field", unbounded)
	}
	s := &Surface{
		Field:    r2.RectFromPoints(r2.Point{}, r2.Point{X: width, Y: height}),
		Terraces: make([]Terrace, len(terraces)),
		fallback: -1,
	}
	for i, t := range terraces {
		along, across := t.Rows.Split(t.Offset)
		along = reduce(along, DimerPitch)
		across = reduce(across, RowSpacing)
		t.Offset = t.Rows.Join(along, across)
		s.Terraces[i] = t
		if len(t.Boundary) >= 3 {
			s.bounded = append(s.bounded, i)
		} else if s.fallback < 0 {
			s.fallback = i
		}
	}
	return s, nil
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// reduce maps v into [0, period).
func reduce(v, period float64) float64 {
	v = math.Mod(v, period)
	if v < 0 {
		v += period
	}
	return v
}

// Width and Height return the field size in nm.
func (s *Surface) Width() float64  { return s.Field.X.Hi }
func (s *Surface) Height() float64 { return s.Field.Y.Hi }

// Position returns the field position in nm of the H site.
func (s *Surface) Position(site Site) r2.Point {
	t := &s.Terraces[site.Terrace]
	along, across := t.Rows.Split(t.Offset)
	along += DimerAlong(site.Dimer)
	across += RowAcross(site.Row)
	if site.Side == 0 {
		across -= HOffset
	} else {
		across += HOffset
	}
	return t.Rows.Join(along, across)
}

// DimerCentre returns the centre of the dimer carrying site: the point on
// its row's centre line midway between the two H sites.
func (s *Surface) DimerCentre(terrace, row, dimer int) r2.Point {
	t := &s.Terraces[terrace]
	along, across := t.Rows.Split(t.Offset)
	return t.Rows.Join(along+DimerAlong(dimer), across+RowAcross(row))
}

// RowCount returns the number of dimer rows of the terrace whose centre
// lines lie inside the field.
func (s *Surface) RowCount(terrace int) int {
	t := &s.Terraces[terrace]
	_, across := t.Rows.Split(t.Offset)
	_, extent := t.Rows.Split(r2.Point{X: s.Width(), Y: s.Height()})
	return int(math.Floor((extent-across)/RowSpacing)) + 1
}

// DimerCount returns the number of dimers per row of the terrace whose
// centres lie inside the field.
func (s *Surface) DimerCount(terrace int) int {
	t := &s.Terraces[terrace]
	along, _ := t.Rows.Split(t.Offset)
	extent, _ := t.Rows.Split(r2.Point{X: s.Width(), Y: s.Height()})
	return int(math.Floor((extent-along)/DimerPitch)) + 1
}

// Valid reports whether site is an address on this surface: a known
// terrace, indices in range, and a position on that terrace.
func (s *Surface) Valid(site Site) bool {
	if site.Terrace < 0 || site.Terrace >= len(s.Terraces) {
		return false
	}
	return s.validIn(site, s.RowCount(site.Terrace), s.DimerCount(site.Terrace))
}

// Validator returns Valid for asking about many sites: each terrace's row
// and dimer counts are worked out once (Valid works them out on every
// call). It answers for the surface as it is when made.
func (s *Surface) Validator() func(Site) bool {
	rows, dimers := make([]int, len(s.Terraces)), make([]int, len(s.Terraces))
	for t := range s.Terraces {
		rows[t], dimers[t] = s.RowCount(t), s.DimerCount(t)
	}
	return func(site Site) bool {
		if site.Terrace < 0 || site.Terrace >= len(rows) {
			return false
		}
		return s.validIn(site, rows[site.Terrace], dimers[site.Terrace])
	}
}

// validIn is Valid for a site of a known terrace with rows rows of dimers
// dimers.
func (s *Surface) validIn(site Site, rows, dimers int) bool {
	if site.Side < 0 || site.Side > 1 || site.Row < 0 || site.Row >= rows || site.Dimer < 0 || site.Dimer >= dimers {
		return false
	}
	return s.TerraceAt(s.DimerCentre(site.Terrace, site.Row, site.Dimer)) == site.Terrace
}

// TerraceAt returns the index of the terrace holding p, or -1 when p is
// outside the field or on no terrace. Terraces with a boundary are tried
// in order; a terrace without one takes every other point of the field.
func (s *Surface) TerraceAt(p r2.Point) int {
	if !s.Field.ContainsPoint(p) {
		return -1
	}
	for _, i := range s.bounded {
		if s.Terraces[i].Contains(p) {
			return i
		}
	}
	return s.fallback
}

// Snap returns the H site nearest to p on the terrace holding p, with its
// distance from p in nm. It reports ok = false when p lies on no terrace.
func (s *Surface) Snap(p r2.Point) (site Site, distance float64, ok bool) {
	ti := s.TerraceAt(p)
	if ti < 0 {
		return Site{}, 0, false
	}
	site = s.nearestOnTerrace(ti, p)
	return site, p.Sub(s.Position(site)).Norm(), true
}

// SnapDimer returns the dimer (row, dimer) whose centre is nearest to p on
// the terrace holding p; ok is false when p lies on no terrace.
func (s *Surface) SnapDimer(p r2.Point) (terrace, row, dimer int, ok bool) {
	ti := s.TerraceAt(p)
	if ti < 0 {
		return 0, 0, 0, false
	}
	site := s.nearestOnTerrace(ti, p)
	return ti, site.Row, site.Dimer, true
}

func (s *Surface) nearestOnTerrace(ti int, p r2.Point) Site {
	along, across := s.Frame(ti).ToLocal(p)
	row := clamp(int(math.Round(across/RowSpacing)), 0, s.RowCount(ti)-1)
	dimer := clamp(int(math.Round(along/DimerPitch)), 0, s.DimerCount(ti)-1)
	side := 0
	if across >= RowAcross(row) {
		side = 1
	}
	best := Site{Terrace: ti, Row: row, Dimer: dimer, Side: side}
	if s.Valid(best) {
		return best
	}
	// Near a terrace edge the nearest lattice point may belong to the
	// neighbouring terrace: take the nearest site that exists here.
	bestD := math.Inf(1)
	found := best
	for r := row - 2; r <= row+2; r++ {
		for d := dimer - 3; d <= dimer+3; d++ {
			for side := 0; side < 2; side++ {
				c := Site{Terrace: ti, Row: r, Dimer: d, Side: side}
				if !s.Valid(c) {
					continue
				}
				if dist := p.Sub(s.Position(c)).Norm(); dist < bestD {
					bestD, found = dist, c
				}
			}
		}
	}
	return found
}

func clamp(v, lo, hi int) int { return min(max(v, lo), hi) }

// Direction of a neighbour step.
const (
	Forward  = +1 // towards higher index
	Backward = -1
)

// AlongRow returns the site on the neighbouring dimer along the row
// (same side), step = Forward or Backward; ok is false off the terrace.
func (s *Surface) AlongRow(site Site, step int) (Site, bool) {
	n := site
	n.Dimer += step
	return n, s.Valid(n)
}

// AcrossRow returns the site on the same dimer and side of the
// neighbouring row, step = Forward or Backward; ok is false off the
// terrace.
func (s *Surface) AcrossRow(site Site, step int) (Site, bool) {
	n := site
	n.Row += step
	return n, s.Valid(n)
}

// Partner returns the other H site of the same dimer.
func (s *Surface) Partner(site Site) Site {
	site.Side = 1 - site.Side
	return site
}

// PolygonContains reports whether p lies inside the polygon by the
// even-odd rule. Points on an edge may fall either way.
func PolygonContains(poly []r2.Point, p r2.Point) bool {
	inside := false
	j := len(poly) - 1
	for i := range poly {
		a, b := poly[i], poly[j]
		if (a.Y > p.Y) != (b.Y > p.Y) {
			x := a.X + (p.Y-a.Y)*(b.X-a.X)/(b.Y-a.Y)
			if p.X < x {
				inside = !inside
			}
		}
		j = i
	}
	return inside
}

package lattice

import (
	"maps"
	"math/rand/v2"
	"slices"
	"testing"
)

// The set operations are checked against a map of sites kept by the
// operations themselves (not read back from the set), on rows whose
// sites start far along the row and rows and words that grow towards
// index 0 as well as away from it: the cases a row's word offset and a
// terrace's row offset must get right.

// refSet is the map-based reference: a site is in the set when its key
// is in the map.
type refSet map[Site]bool

// opsSpace bounds the fuzzed addresses: 3 terraces, 48 rows, in-row
// indices below 3000 (47 words), so rows start at any word.
const (
	opsTerraces = 3
	opsRows     = 48
	opsIndex    = 3000
)

// applyOps runs the operations coded in data on two sets and their
// references and checks every set against its reference after each
// operation. Each operation takes 7 bytes: op, set, terrace, row, and
// two in-row index bytes pairs reduced to [0, opsIndex).
func applyOps(t *testing.T, data []byte) {
	t.Helper()
	sets := [2]*SiteSet{NewSiteSet(), NewSiteSet()}
	refs := [2]refSet{{}, {}}
	for len(data) >= 7 {
		op, which := data[0]%11, int(data[1]%2)
		ter, row := int(data[2])%opsTerraces, int(data[3])%opsRows
		from := (int(data[4])<<8 | int(data[5])) % opsIndex
		length := int(data[6]) % 200
		data = data[7:]
		s, ref, other, oref := sets[which], refs[which], sets[1-which], refs[1-which]
		to := min(from+length, opsIndex)
		switch op {
		case 0: // Add
			site := SiteAt(ter, row, from)
			s.Add(site)
			ref[site] = true
		case 1: // Remove
			site := SiteAt(ter, row, from)
			s.Remove(site)
			delete(ref, site)
		case 2: // AddRun
			s.AddRun(ter, row, from, to)
			for i := from; i < to; i++ {
				ref[SiteAt(ter, row, i)] = true
			}
		case 3: // RemoveRun
			s.RemoveRun(ter, row, from, to)
			for i := from; i < to; i++ {
				delete(ref, SiteAt(ter, row, i))
			}
		case 4, 5: // one side of dimers from/2 .. to/2 on or off
			side, on := length&1, op == 4
			d0, d1 := from/2, to/2
			s.setStrided(ter, row, d0, d1, side, on)
			for d := d0; d <= d1; d++ {
				site := Site{Terrace: ter, Row: row, Dimer: d, Side: side}
				if on {
					ref[site] = true
				} else {
					delete(ref, site)
				}
			}
		case 6: // Union
			s.Union(other)
			for site := range oref {
				ref[site] = true
			}
		case 7: // Difference
			s.Difference(other)
			for site := range oref {
				delete(ref, site)
			}
		case 8: // Intersect
			s.Intersect(other)
			for site := range ref {
				if !oref[site] {
					delete(ref, site)
				}
			}
		case 9: // UnionOf replaces s
			sets[which] = UnionOf(s, nil, other)
			for site := range oref {
				ref[site] = true
			}
		case 10: // Clone replaces s; changing the clone leaves the original
			c := s.Clone()
			c.AddRun(ter, row, from, to)
			checkAgainstRef(t, "original after its clone changed", s, ref)
			sets[which] = s.Clone()
		}
		for k := range sets {
			checkAgainstRef(t, "after an operation", sets[k], refs[k])
		}
		want := false
		for site := range refs[0] {
			if refs[1][site] {
				want = true
				break
			}
		}
		if got := sets[0].Intersects(sets[1]); got != want {
			t.Fatalf("Intersects = %v, want %v", got, want)
		}
		if got, want := sets[0].Equal(sets[1]), maps.Equal(refs[0], refs[1]); got != want {
			t.Fatalf("Equal = %v, want %v", got, want)
		}
	}
}

// checkAgainstRef compares every query of s with the reference.
func checkAgainstRef(t *testing.T, when string, s *SiteSet, ref refSet) {
	t.Helper()
	want := slices.SortedFunc(maps.Keys(ref), compareSites)
	got := slices.Collect(s.All())
	if !slices.Equal(got, want) {
		t.Fatalf("%s: All = %v, want %v", when, got, want)
	}
	if s.Count() != len(want) || s.IsEmpty() != (len(want) == 0) {
		t.Fatalf("%s: Count %d IsEmpty %v, want %d sites", when, s.Count(), s.IsEmpty(), len(want))
	}
	var fromRuns []Site
	for run := range s.Runs() {
		for i := run.Start; i < run.End(); i++ {
			fromRuns = append(fromRuns, SiteAt(run.Terrace, run.Row, i))
		}
	}
	if !slices.Equal(fromRuns, want) {
		t.Fatalf("%s: Runs hold %v, want %v", when, fromRuns, want)
	}
	// Runs are maximal: a reference site starts one when the site before
	// it is not in the reference.
	starts := 0
	for _, site := range want {
		if i := site.Index(); i == 0 || !ref[SiteAt(site.Terrace, site.Row, i-1)] {
			starts++
		}
	}
	if s.RunCount() != starts {
		t.Fatalf("%s: RunCount %d, want %d runs", when, s.RunCount(), starts)
	}
	byRow := map[[2]int][]Site{}
	for _, site := range want {
		byRow[[2]int{site.Terrace, site.Row}] = append(byRow[[2]int{site.Terrace, site.Row}], site)
	}
	for ter := range opsTerraces {
		n := 0
		for row := range opsRows {
			w := s.Row(ter, row)
			inRow := 0
			// Every 13th index, and each reference site with the
			// indices beside it and a word away.
			probe := func(i int) {
				has := i >= 0 && ref[SiteAt(ter, row, i)]
				if w.Contains(i) != has || i >= 0 && s.Contains(SiteAt(ter, row, i)) != has {
					t.Fatalf("%s: Contains(T%d R%d i%d) = %v, want %v", when, ter, row, i, !has, has)
				}
			}
			if w.End() > w.Start() || len(byRow[[2]int{ter, row}]) > 0 {
				for i := -3; i < opsIndex+64; i += 13 {
					probe(i)
				}
			}
			for _, site := range byRow[[2]int{ter, row}] {
				inRow++
				for _, d := range []int{-64, -1, 0, 1, 64} {
					probe(site.Index() + d)
				}
			}
			if w.Count(-5, opsIndex+100) != inRow || w.IsEmpty() != (inRow == 0) {
				t.Fatalf("%s: T%d R%d Count %d IsEmpty %v, want %d", when, ter, row, w.Count(-5, opsIndex+100), w.IsEmpty(), inRow)
			}
			if first, end := s.RowRange(ter); inRow > 0 && (row < first || row >= end || end != s.RowCount(ter)) {
				t.Fatalf("%s: T%d R%d holds sites outside RowRange %d..%d (RowCount %d)", when, ter, row, first, end, s.RowCount(ter))
			}
			if inRow > 0 && w.Start() < 0 {
				t.Fatalf("%s: T%d R%d's words start at dimer %d, before the row's first", when, ter, row, w.Start())
			}
			n += inRow
		}
		if s.CountTerrace(ter) != n {
			t.Fatalf("%s: CountTerrace(%d) = %d, want %d", when, ter, s.CountTerrace(ter), n)
		}
	}
}

func compareSites(a, b Site) int {
	for _, d := range [][2]int{{a.Terrace, b.Terrace}, {a.Row, b.Row}, {a.Index(), b.Index()}} {
		if d[0] != d[1] {
			if d[0] < d[1] {
				return -1
			}
			return 1
		}
	}
	return 0
}

// opsSeeds returns byte strings of random operations, biased to rows
// whose sites start far along the row and to growth towards index 0.
func opsSeeds(n int) [][]byte {
	rng := rand.New(rand.NewPCG(41, 42))
	var out [][]byte
	for range n {
		var b []byte
		for k := range 16 {
			// Descending starts on one row make it grow towards 0.
			from := opsIndex - 1 - k*250 + rng.IntN(40)
			if rng.IntN(2) == 0 {
				from = rng.IntN(opsIndex)
			}
			// Rows 0-3 are shared by many operations on both sets.
			row := rng.IntN(4)
			if rng.IntN(3) == 0 {
				row = 30 - k + rng.IntN(3)
			}
			b = append(b, byte(rng.IntN(11)), byte(rng.IntN(2)), byte(rng.IntN(2)), byte(row),
				byte(from>>8), byte(from), byte(rng.IntN(256)))
		}
		out = append(out, b)
	}
	return out
}

func TestSiteSetOpsAgainstReference(t *testing.T) {
	for _, data := range opsSeeds(60) {
		applyOps(t, data)
	}
}

// FuzzSiteSetOps: any sequence of operations leaves each set equal to
// its map-based reference.
func FuzzSiteSetOps(f *testing.F) {
	for _, data := range opsSeeds(8) {
		f.Add(data)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		if len(data) > 7*24 {
			data = data[:7*24]
		}
		applyOps(t, data)
	})
}

// A row whose sites start far along the row stores only the words from
// its first site on, and a terrace only the rows from its first: one
// site at the far end of the last row takes one word. Rows grown run by
// run keep spare words (at most as many again); a clone stores exactly
// the words its sites span.
func TestSiteSetStoresFromFirstSite(t *testing.T) {
	tests := []struct {
		name  string
		paint func(s *SiteSet)
		span  int // the words from each row's first site to its last, summed
	}{
		{"one site far along a far row", func(s *SiteSet) { s.Add(SiteAt(0, MaxRows-1, MaxRowIndex-1)) }, 1},
		{"a run from index 6400 to 6528", func(s *SiteSet) { s.AddRun(1, 500, 6400, 6528) }, 2},
		{"runs added right to left", func(s *SiteSet) {
			for i := 20; i >= 1; i-- {
				s.AddRun(0, 3, 640*i, 640*i+10)
			}
		}, 191},
		{"runs added left to right on two rows", func(s *SiteSet) {
			for i := 1; i <= 20; i++ {
				s.AddRun(2, 7, 640*i, 640*i+10)
				s.AddRun(2, 9000, 640*i, 640*i+10)
			}
		}, 2 * 191},
	}
	for _, tc := range tests {
		s := NewSiteSet()
		tc.paint(s)
		if got := s.StorageWords(); got < tc.span || got > 2*tc.span {
			t.Errorf("%s: stores %d words, want %d to %d", tc.name, got, tc.span, 2*tc.span)
		}
		if got := s.Clone().StorageWords(); got != tc.span {
			t.Errorf("%s: its clone stores %d words, want %d", tc.name, got, tc.span)
		}
		if got := UnionOf(s).StorageWords(); got != tc.span {
			t.Errorf("%s: UnionOf stores %d words, want %d", tc.name, got, tc.span)
		}
	}
}

package lattice

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// Every query on a row is compared with a per-index loop over a random
// row and random ranges, including ranges that start or end beyond the
// row's last word.
func TestRowBitsAgainstLoop(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	for trial := range 300 {
		// Rows whose sites start at index 0, a few words along and far
		// along (a row stores its words from its first site on).
		base := []int{0, 640, 6400 + 17}[trial%3]
		set := NewSiteSet()
		for range rng.IntN(6) {
			from := base + rng.IntN(300)
			set.AddRun(0, 0, from, from+1+rng.IntN(70))
		}
		for range rng.IntN(20) {
			set.Add(SiteAt(0, 0, base+rng.IntN(300)))
		}
		w := set.Row(0, 0)
		from := base + rng.IntN(400) - 100
		to := from + rng.IntN(200)
		for _, sides := range []Sides{Side0, Side1, BothSides} {
			selected := func(i int) bool { return SideOf(i&1)&sides != 0 }
			count, any, all := 0, false, true
			var in, gaps []int
			for i := from; i < to; i++ {
				if i < 0 {
					continue
				}
				has := set.Contains(SiteAt(0, 0, i))
				if has {
					count++
				}
				if !selected(i) {
					continue
				}
				if has {
					any = true
					in = append(in, i)
				} else {
					all = false
					gaps = append(gaps, i)
				}
			}
			if sides == BothSides {
				if got := w.Count(from, to); got != count {
					t.Fatalf("trial %d: Count(%d, %d) = %d, want %d", trial, from, to, got, count)
				}
				if got := set.CountRange(0, 0, from, to); got != count {
					t.Fatalf("trial %d: CountRange(%d, %d) = %d, want %d", trial, from, to, got, count)
				}
			}
			if got := w.Any(from, to, sides); got != any {
				t.Fatalf("trial %d: Any(%d, %d, %v) = %v, want %v", trial, from, to, sides, got, any)
			}
			if got := w.All(from, to, sides); got != all {
				t.Fatalf("trial %d: All(%d, %d, %v) = %v, want %v", trial, from, to, sides, got, all)
			}
			if got := slices.Collect(w.Sites(from, to, sides)); !slices.Equal(got, in) {
				t.Fatalf("trial %d: Sites(%d, %d, %v) = %v, want %v", trial, from, to, sides, got, in)
			}
			if got := slices.Collect(w.Gaps(from, to, sides)); !slices.Equal(got, gaps) {
				t.Fatalf("trial %d: Gaps(%d, %d, %v) = %v, want %v", trial, from, to, sides, got, gaps)
			}
			first, last := -1, -1
			for site := range set.All() {
				if selected(site.Side) {
					if first < 0 {
						first = site.Dimer
					}
					last = site.Dimer
				}
			}
			if f, l := w.DimerExtent(sides); f != first || l != last {
				t.Fatalf("trial %d: DimerExtent(%v) = %d, %d, want %d, %d", trial, sides, f, l, first, last)
			}
		}
		var runs []Run
		for start, end := range w.Runs() {
			runs = append(runs, Run{Start: start, Len: end - start})
		}
		if want := slices.Collect(set.Runs()); !slices.Equal(runs, want) {
			t.Fatalf("trial %d: RowBits.Runs = %v, SiteSet.Runs %v", trial, runs, want)
		}
		if w.RunCount() != len(runs) || set.RunCount() != len(runs) {
			t.Fatalf("trial %d: RunCount %d (set %d), Runs yields %d", trial, w.RunCount(), set.RunCount(), len(runs))
		}
	}
}

func TestRowBitsEmptyRow(t *testing.T) {
	var w RowBits
	if w.Count(0, 100) != 0 || w.Any(0, 100, BothSides) || w.Contains(3) {
		t.Error("an empty row holds sites")
	}
	if w.All(0, 0, BothSides) != true || w.All(0, 1, Side1) != true || w.All(0, 2, Side1) != false {
		t.Error("All on an empty row: want true only for ranges without a selected index")
	}
	if f, l := w.DimerExtent(BothSides); f != -1 || l != -1 {
		t.Errorf("DimerExtent of an empty row = %d, %d, want -1, -1", f, l)
	}
}

func TestWholeDimersAndCountTerrace(t *testing.T) {
	set := NewSiteSet()
	set.Add(Site{Terrace: 1, Row: 4, Dimer: 10, Side: 1})
	set.AddRun(1, 4, 23, 26) // dimer 11 side 1, dimer 12 both
	set.Add(Site{Terrace: 2, Row: 0, Dimer: 0, Side: 0})
	whole := set.WholeDimers()
	want := NewSiteSet()
	want.AddRun(1, 4, 20, 26)
	want.AddRun(2, 0, 0, 2)
	if !whole.Equal(want) {
		t.Errorf("WholeDimers = %v sites, want dimers 10..12 of T1 R4 and dimer 0 of T2 R0", slices.Collect(whole.All()))
	}
	tests := []struct{ t, want int }{{0, 0}, {1, 4}, {2, 1}, {3, 0}, {-1, 0}}
	for _, tc := range tests {
		if got := set.CountTerrace(tc.t); got != tc.want {
			t.Errorf("CountTerrace(%d) = %d, want %d", tc.t, got, tc.want)
		}
	}
}

package lattice

import (
	"encoding/json"
	"errors"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"
)

func randomSet(rng *rand.Rand, n int) *SiteSet {
	s := NewSiteSet()
	for range n {
		t, r := rng.IntN(3), rng.IntN(40)
		from := rng.IntN(500)
		s.AddRun(t, r, from, from+1+rng.IntN(90))
	}
	for range n / 3 {
		t, r := rng.IntN(3), rng.IntN(40)
		from := rng.IntN(500)
		s.RemoveRun(t, r, from, from+rng.IntN(20))
	}
	return s
}

// brute is a map-based reference set.
func brute(s *SiteSet) map[Site]bool {
	m := map[Site]bool{}
	for site := range s.All() {
		m[site] = true
	}
	return m
}

func TestSiteSetOperationsAgainstMap(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for range 30 {
		a, b := randomSet(rng, 30), randomSet(rng, 30)
		ma, mb := brute(a), brute(b)
		if a.Count() != len(ma) {
			t.Fatalf("Count %d, map %d", a.Count(), len(ma))
		}
		union, diff, inter := a.Clone().Union(b), a.Clone().Difference(b), a.Clone().Intersect(b)
		wantU, wantD, wantI := 0, 0, 0
		for s := range ma {
			if mb[s] {
				wantI++
			} else {
				wantD++
			}
		}
		wantU = len(mb) + wantD
		if union.Count() != wantU || diff.Count() != wantD || inter.Count() != wantI {
			t.Fatalf("union/diff/intersect = %d/%d/%d, want %d/%d/%d", union.Count(), diff.Count(), inter.Count(), wantU, wantD, wantI)
		}
		if a.Intersects(b) != (wantI > 0) {
			t.Fatalf("Intersects = %v, want %v", a.Intersects(b), wantI > 0)
		}
		// Runs cover exactly the sites, maximal and in row order.
		n, prev := 0, Run{Terrace: -1}
		for r := range a.Runs() {
			n += r.Len
			if r.Terrace == prev.Terrace && r.Row == prev.Row && r.Start <= prev.End() {
				t.Fatalf("run %v after %v is not separated", r, prev)
			}
			prev = r
		}
		if n != len(ma) {
			t.Fatalf("runs hold %d sites, want %d", n, len(ma))
		}
	}
}

// UnionOf holds exactly the sites of its sets: every site of each, and
// no other (the map of all their sites).
func TestUnionOfAgainstMap(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 14))
	for range 20 {
		sets := []*SiteSet{randomSet(rng, 20), nil, randomSet(rng, 5), NewSiteSet(), randomSet(rng, 40)}
		want := map[Site]bool{}
		for _, s := range sets {
			if s != nil {
				for site := range s.All() {
					want[site] = true
				}
			}
		}
		u := UnionOf(sets...)
		got := brute(u)
		if len(got) != len(want) {
			t.Fatalf("UnionOf holds %d sites, want %d", len(got), len(want))
		}
		for site := range want {
			if !got[site] {
				t.Fatalf("UnionOf lacks %v", site)
			}
		}
		if !u.Equal(sets[0].Clone().Union(sets[2]).Union(sets[3]).Union(sets[4])) {
			t.Fatal("UnionOf differs from Union")
		}
	}
	if !UnionOf().IsEmpty() {
		t.Error("UnionOf() is not empty")
	}
}

func TestSiteSetJSONRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for i := range 50 {
		a := randomSet(rng, i)
		data, err := json.Marshal(a)
		if err != nil {
			t.Fatal(err)
		}
		var b SiteSet
		if err := json.Unmarshal(data, &b); err != nil {
			t.Fatalf("Unmarshal(%s): %v", data, err)
		}
		if !a.Equal(&b) {
			t.Fatalf("round trip changed the set: %s", data)
		}
	}
	// The encoding is compact: a painted 1 µm x 1 µm square encodes in
	// well under 100 kB (issue 2: 10^7-site designs in under 1 MB).
	s := mustSurface(t, 1000, 1000)
	big := NewSiteSet()
	s.Paint(big, Rect{s.Field})
	data, _ := json.Marshal(big)
	if len(data) > 100_000 {
		t.Errorf("1 µm² painted encodes in %d bytes", len(data))
	}
	var back SiteSet
	if err := json.Unmarshal(data, &back); err != nil || !back.Equal(big) {
		t.Errorf("1 µm² round trip: %v", err)
	}
	if got := string(mustJSON(t, NewSiteSet())); got != `{"sites":0,"rows":[]}` {
		t.Errorf("empty set encodes as %s", got)
	}
	one := NewSiteSet()
	one.AddRun(1, 12, 100, 106)
	one.AddRun(1, 12, 110, 114)
	if got := string(mustJSON(t, one)); got != `{"sites":10,"rows":[[1,12,100,6,110,4]]}` {
		t.Errorf("encoding = %s", got)
	}
}

func mustJSON(t *testing.T, v any) []byte {
	t.Helper()
	b, err := json.Marshal(v)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

func TestSiteSetJSONRefuses(t *testing.T) {
	tests := []struct {
		name, in, path, msg string
	}{
		{"not an object", `[1,2]`, "", "want {"},
		{"no rows", `{"sites":0}`, "rows", "missing"},
		{"unknown field", `{"rows":[],"extra":1}`, "", "unknown field"},
		{"short row", `{"rows":[[0,1,2]]}`, "rows[0]", "has 3 numbers"},
		{"odd row", `{"rows":[[0,1,2,3,4]]}`, "rows[0]", "has 5 numbers"},
		{"negative start", `{"rows":[[0,1,-2,3]]}`, "rows[0][2]", "out of range"},
		{"zero length", `{"rows":[[0,1,2,0]]}`, "rows[0][3]", "out of range"},
		{"fraction", `{"rows":[[0,1.5,2,3]]}`, "rows[0][1]", "not a whole number"},
		{"string", `{"rows":[[0,"1",2,3]]}`, "rows[0][1]", "want a number, not the string"},
		{"overlap", `{"rows":[[0,1,2,5,6,1]]}`, "rows[0][4]", "inside the previous run"},
		{"unsorted rows", `{"rows":[[0,2,0,1],[0,1,0,1]]}`, "rows[1]", "does not follow"},
		{"duplicate rows", `{"rows":[[0,1,0,1],[0,1,5,1]]}`, "rows[1]", "does not follow"},
		{"bad count", `{"sites":3,"rows":[[0,1,0,1]]}`, "sites", "declares 3 sites but the runs hold 1"},
		{"10^9 declared", `{"sites":1000000000,"rows":[[0,1,0,1]]}`, "sites", "out of range"},
		{"10^9 in a run", `{"rows":[[0,1,0,1000000000]]}`, "rows[0][3]", "out of range"},
		{"huge row", `{"rows":[[0,99999999,0,1]]}`, "rows[0][1]", "out of range"},
		{"huge terrace", `{"rows":[[1000,0,0,1]]}`, "rows[0][0]", "out of range"},
		{"1e300", `{"rows":[[0,0,1e300,1]]}`, "rows[0][2]", "out of range"},
		{"storage", `{"rows":[` + storageBomb() + `]}`, "rows[", "storage"},
	}
	for _, tc := range tests {
		var s SiteSet
		err := json.Unmarshal([]byte(tc.in), &s)
		var se *SiteSetError
		if !errors.As(err, &se) {
			t.Errorf("%s: err = %v, want *SiteSetError", tc.name, err)
			continue
		}
		if !strings.HasPrefix(se.Path, tc.path) || !strings.Contains(se.Msg, tc.msg) {
			t.Errorf("%s: error %q (path %q), want path %q and %q", tc.name, err, se.Path, tc.path, tc.msg)
		}
	}
}

// storageBomb is 20000 rows of two sites each, at the start and at the
// far end of a row: few sites, but 4096 words each (a row stores its
// words from its first site to its last).
func storageBomb() string {
	var b strings.Builder
	for r := range 20000 {
		if r > 0 {
			b.WriteByte(',')
		}
		b.WriteString(`[0,`)
		b.WriteString(strconv.Itoa(r))
		b.WriteString(`,0,1,262000,1]`)
	}
	return b.String()
}

// FuzzSiteSetJSON: decoding never panics, and what decodes encodes to the
// same set.
func FuzzSiteSetJSON(f *testing.F) {
	for _, s := range []string{`{"sites":0,"rows":[]}`, `{"sites":10,"rows":[[1,12,100,6,110,4]]}`, `{"rows":[[0,1,2,5,6,1]]}`,
		`{"sites":1000000000,"rows":[[0,1,0,1]]}`, `{"rows":[[0,1,0,262143]]}`, `{"rows":[[0,0,1e3,1]]}`} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		var s SiteSet
		if err := json.Unmarshal(data, &s); err != nil {
			return
		}
		out, err := json.Marshal(&s)
		if err != nil {
			t.Fatal(err)
		}
		var back SiteSet
		if err := json.Unmarshal(out, &back); err != nil || !back.Equal(&s) {
			t.Fatalf("re-decoding %s: %v", out, err)
		}
	})
}

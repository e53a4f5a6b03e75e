package unionfind

import (
	"math/rand/v2"
	"testing"
)

// TestAgainstLabels checks the forest against a brute-force labelling:
// relabelling every member of one set on each union.
func TestAgainstLabels(t *testing.T) {
	const n = 200
	rng := rand.New(rand.NewPCG(1, 2))
	s := New(n)
	label := make([]int, n)
	for i := range label {
		label[i] = i
	}
	for step := 0; step < 300; step++ {
		a, b := rng.IntN(n), rng.IntN(n)
		apart := label[a] != label[b]
		if got := s.Union(a, b); got != apart {
			t.Fatalf("step %d: Union(%d, %d) = %v, want %v", step, a, b, got, apart)
		}
		if apart {
			old, nu := label[b], label[a]
			for i := range label {
				if label[i] == old {
					label[i] = nu
				}
			}
		}
		for k := 0; k < 20; k++ {
			i, j := rng.IntN(n), rng.IntN(n)
			if same, want := s.Find(i) == s.Find(j), label[i] == label[j]; same != want {
				t.Fatalf("step %d: Find(%d)==Find(%d) is %v, want %v", step, i, j, same, want)
			}
		}
	}
}

func TestRootIsSmallest(t *testing.T) {
	s := New(5)
	s.Union(4, 3)
	s.Union(3, 1)
	if r := s.Find(4); r != 1 {
		t.Errorf("Find(4) = %d, want 1, the smallest member", r)
	}
}

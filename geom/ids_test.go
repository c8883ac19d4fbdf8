package geom

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// TestIDIndexAgainstMap checks every layout against a Go map on seeded
// random id sets: contiguous runs per part (the common case), sparse ids,
// shuffled and sorted.
func TestIDIndexAgainstMap(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	for trial := 0; trial < 200; trial++ {
		n := 1 + rng.IntN(3000)
		seen := map[int64]bool{}
		var ids []int64
		for len(ids) < n {
			var id int64
			switch trial % 3 {
			case 0: // runs of consecutive ids per "part"
				id = int64(1+rng.IntN(20))*1_000_000 + int64(rng.IntN(n))
			case 1: // sparse
				id = 1 + rng.Int64N(1<<40)
			default: // near-dense
				id = 1 + rng.Int64N(int64(2*n))
			}
			if !seen[id] {
				seen[id] = true
				ids = append(ids, id)
			}
		}
		if trial%2 == 0 {
			slices.Sort(ids)
		}
		x, _, ok := NewIDIndex(ids)
		if !ok {
			t.Fatalf("trial %d: duplicate reported", trial)
		}
		for i, id := range ids {
			if got, ok := x.Lookup(id); !ok || int(got) != i {
				t.Fatalf("trial %d: Lookup(%d) = %d,%v want %d", trial, id, got, ok, i)
			}
		}
		for k := 0; k < 1000; k++ {
			id := ids[rng.IntN(len(ids))] + int64(rng.IntN(7)) - 3
			_, ok := x.Lookup(id)
			if ok != seen[id] {
				t.Fatalf("trial %d: Lookup(%d) found=%v, map says %v", trial, id, ok, seen[id])
			}
		}
	}
}

package geom

import (
	"math"
	"testing"
)

// Renumbering with ids near the int64 maximum must either fail with an
// input error or give positive ids: never wrap around.
func TestMergeRenumberNearMaxID(t *testing.T) {
	big := fileMesh("big.vtk", 2)
	big.NodeIDs[len(big.NodeIDs)-1] = math.MaxInt64
	small := fileMesh("small.vtk", 2)
	m, shifts, err := Merge([]*Mesh{big, small}, true)
	if err != nil {
		return // an error naming the overflow is acceptable
	}
	for _, s := range shifts {
		if s.NodeOffset < 0 || s.ElemOffset < 0 {
			t.Errorf("negative renumbering offset %+v", s)
		}
	}
	for i, id := range m.NodeIDs {
		if id <= 0 {
			t.Fatalf("merged node %d has non-positive id %d", i, id)
		}
	}
}

func TestRoundOffsetNoOverflow(t *testing.T) {
	for _, hi := range []int64{8_300_000_000_000_000_000, math.MaxInt64} {
		if got := roundOffset(hi); got < hi {
			t.Errorf("roundOffset(%d) = %d, below hi", hi, got)
		}
	}
}

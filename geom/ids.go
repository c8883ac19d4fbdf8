package geom

import (
	"slices"
)

// IDIndex maps the ids of nodes or elements to their dense indices.
//
// It picks one of three layouts from the ids it is given: contiguous ids
// (id = base + index, the common case of files without explicit ids) need
// no memory at all; ids spread over a range at most four times their count
// use a direct table of int32 (4 bytes per id in the range); anything
// sparser uses a sorted copy searched by bisection (12 bytes per id; none
// when the ids already come in increasing order, as they usually do).
// Lookups are O(1) for the first two and O(log n) for the last.
type IDIndex struct {
	n      int
	base   int64   // contiguous and table layouts: smallest id
	table  []int32 // table layout: index+1 per id-base, 0 = absent
	sorted []int64 // sorted layout: ids in increasing order
	perm   []int32 // sorted layout: index of sorted[i]; nil when ids came sorted
	// Sorted layout: ids in [base + b<<shift, base + (b+1)<<shift) lie in
	// sorted[bucket[b]:bucket[b+1]], so a lookup bisects a short run.
	bucket []int32
	shift  uint
}

// Duplicate reports two indices that carry the same id.
type Duplicate struct {
	ID     int64
	First  int // the smaller index
	Second int
}

// NewIDIndex builds an index over ids; ids[i] is the id of index i. The
// index may keep ids itself: do not change it while the index is in use. When
// two indices share an id it returns the first such pair found (lowest id
// first in the sorted layout) and ok=false.
func NewIDIndex(ids []int64) (IDIndex, Duplicate, bool) {
	x := IDIndex{n: len(ids)}
	if len(ids) == 0 {
		return x, Duplicate{}, true
	}
	lo, hi := ids[0], ids[0]
	contiguous := true
	for i, id := range ids {
		if id < lo {
			lo = id
		}
		if id > hi {
			hi = id
		}
		if contiguous && id != ids[0]+int64(i) {
			contiguous = false
		}
	}
	x.base = lo
	if contiguous {
		return x, Duplicate{}, true
	}
	span := hi - lo + 1
	if span > 0 && span <= 4*int64(len(ids))+1024 {
		x.table = MakeLarge[int32](int(span))
		for i, id := range ids {
			k := id - lo
			if prev := x.table[k]; prev != 0 {
				return IDIndex{}, Duplicate{ID: id, First: int(prev - 1), Second: i}, false
			}
			x.table[k] = int32(i + 1)
		}
		return x, Duplicate{}, true
	}
	if increasing(ids) {
		// Already sorted, as ids in files usually are: no copy, no sort.
		x.sorted = ids
		x.buildBuckets(hi)
		return x, Duplicate{}, true
	}
	x.perm = MakeLarge[int32](len(ids))
	for i := range x.perm {
		x.perm[i] = int32(i)
	}
	slices.SortFunc(x.perm, func(a, b int32) int {
		if ids[a] != ids[b] {
			if ids[a] < ids[b] {
				return -1
			}
			return 1
		}
		return int(a - b)
	})
	x.sorted = MakeLarge[int64](len(ids))
	for i, p := range x.perm {
		x.sorted[i] = ids[p]
		if i > 0 && x.sorted[i] == x.sorted[i-1] {
			return IDIndex{}, Duplicate{ID: ids[p], First: int(x.perm[i-1]), Second: int(p)}, false
		}
	}
	x.buildBuckets(hi)
	return x, Duplicate{}, true
}

// buildBuckets makes the bucket table of the sorted layout: about one
// bucket per id (4 bytes per id), each spanning a power of two of ids.
func (x *IDIndex) buildBuckets(hi int64) {
	span := uint64(hi - x.base)
	for x.shift = 0; span>>x.shift >= uint64(len(x.sorted)); x.shift++ {
	}
	nb := int(span>>x.shift) + 1
	x.bucket = MakeLarge[int32](nb + 1)
	for _, id := range x.sorted {
		x.bucket[uint64(id-x.base)>>x.shift+1]++
	}
	for b := 1; b <= nb; b++ {
		x.bucket[b] += x.bucket[b-1]
	}
}

// increasing reports whether ids are in strictly increasing order.
func increasing(ids []int64) bool {
	for i := 1; i < len(ids); i++ {
		if ids[i] <= ids[i-1] {
			return false
		}
	}
	return true
}

// Len returns the number of ids indexed.
func (x *IDIndex) Len() int { return x.n }

// Lookup returns the index of id, and false when id is absent.
func (x *IDIndex) Lookup(id int64) (int32, bool) {
	switch {
	case x.sorted != nil:
		if id < x.base {
			return -1, false
		}
		b := uint64(id-x.base) >> x.shift
		if b >= uint64(len(x.bucket)-1) {
			return -1, false
		}
		lo, hi := int(x.bucket[b]), int(x.bucket[b+1])
		if lo == hi {
			return -1, false
		}
		var i int
		if first := x.sorted[lo]; x.sorted[hi-1]-first == int64(hi-1-lo) {
			// The bucket holds a run of consecutive ids: no search.
			k := id - first
			if k < 0 || k > int64(hi-1-lo) {
				return -1, false
			}
			i = lo + int(k)
		} else {
			j, found := slices.BinarySearch(x.sorted[lo:hi], id)
			if !found {
				return -1, false
			}
			i = lo + j
		}
		if x.perm == nil {
			return int32(i), true
		}
		return x.perm[i], true
	case x.table != nil:
		k := id - x.base
		if k < 0 || k >= int64(len(x.table)) || x.table[k] == 0 {
			return -1, false
		}
		return x.table[k] - 1, true
	default:
		k := id - x.base
		if k < 0 || k >= int64(x.n) {
			return -1, false
		}
		return int32(k), true
	}
}

// Bytes returns the memory held by the index, in bytes (a sorted layout
// that shares the caller's id slice holds none of its own).
func (x *IDIndex) Bytes() int {
	b := 4*len(x.table) + 4*len(x.perm) + 4*len(x.bucket)
	if x.perm != nil {
		b += 8 * len(x.sorted)
	}
	return b
}

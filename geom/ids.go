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
// sparser uses a sorted copy searched by bisection (12 bytes per id).
// Lookups are O(1) for the first two and O(log n) for the last.
type IDIndex struct {
	n      int
	base   int64   // contiguous and table layouts: smallest id
	table  []int32 // table layout: index+1 per id-base, 0 = absent
	sorted []int64 // sorted layout: ids in increasing order
	perm   []int32 // sorted layout: index of sorted[i]
}

// Duplicate reports two indices that carry the same id.
type Duplicate struct {
	ID     int64
	First  int // the smaller index
	Second int
}

// NewIDIndex builds an index over ids; ids[i] is the id of index i. When
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
		x.table = make([]int32, span)
		for i, id := range ids {
			k := id - lo
			if prev := x.table[k]; prev != 0 {
				return IDIndex{}, Duplicate{ID: id, First: int(prev - 1), Second: i}, false
			}
			x.table[k] = int32(i + 1)
		}
		return x, Duplicate{}, true
	}
	x.perm = make([]int32, len(ids))
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
	x.sorted = make([]int64, len(ids))
	for i, p := range x.perm {
		x.sorted[i] = ids[p]
		if i > 0 && x.sorted[i] == x.sorted[i-1] {
			return IDIndex{}, Duplicate{ID: ids[p], First: int(x.perm[i-1]), Second: int(p)}, false
		}
	}
	return x, Duplicate{}, true
}

// Len returns the number of ids indexed.
func (x *IDIndex) Len() int { return x.n }

// Lookup returns the index of id, and false when id is absent.
func (x *IDIndex) Lookup(id int64) (int32, bool) {
	switch {
	case x.sorted != nil:
		i, found := slices.BinarySearch(x.sorted, id)
		if !found {
			return -1, false
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

// Bytes returns the memory held by the index, in bytes.
func (x *IDIndex) Bytes() int {
	return 4*len(x.table) + 8*len(x.sorted) + 4*len(x.perm)
}

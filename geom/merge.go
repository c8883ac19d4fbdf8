package geom

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// Renumbering says how Merge offset one file's ids to keep them unique.
type Renumbering struct {
	File       string
	NodeOffset int64
	ElemOffset int64
}

// Merge joins meshes read from several files into one. Parts with the same
// id in several files become one part. Duplicate node or element ids across
// files are an error naming both files, unless renumber is set: then every
// file whose id range overlaps the ids of the files before it has its ids
// shifted by a round offset (the smallest multiple of the leading power of
// ten of the largest id so far that is at least that id), and the shifts are
// returned. The inputs must not be used afterwards: their slices may be
// reused.
func Merge(meshes []*Mesh, renumber bool) (*Mesh, []Renumbering, error) {
	if len(meshes) == 1 && !renumber {
		return meshes[0], nil, nil
	}
	var nn, ne, nc int
	for _, m := range meshes {
		nn += m.NumNodes()
		ne += m.NumElems()
		nc += len(m.Conn)
	}
	out := &Mesh{
		NodeIDs:   MakeLargeCap[int64](0, nn),
		Coords:    MakeLargeCap[r3.Vec](0, nn),
		ElemIDs:   MakeLargeCap[int64](0, ne),
		ElemPart:  MakeLargeCap[int32](0, ne),
		ElemStart: MakeLargeCap[int32](1, ne+1),
		Conn:      MakeLargeCap[int32](0, nc),
	}
	anyThick := false
	for _, m := range meshes {
		anyThick = anyThick || m.ElemThickness != nil
	}
	if anyThick {
		out.ElemThickness = MakeLargeCap[float64](0, ne)
	}
	partIdx := map[int64]int32{}
	var (
		shifts         []Renumbering
		nodeLo, nodeHi int64 = math.MaxInt64, 0
		elemLo, elemHi int64 = math.MaxInt64, 0
	)
	for _, m := range meshes {
		src := Source{File: "input", NodeStart: len(out.Coords), ElemStart: len(out.ElemIDs)}
		if len(m.Sources) > 0 {
			src.File = m.Sources[0].File
			src.Skipped = m.Sources[0].Skipped
			src.ImplicitNodeIDs = m.Sources[0].ImplicitNodeIDs
			src.ImplicitElemIDs = m.Sources[0].ImplicitElemIDs
		}
		nlo, nhi := idRange(m.NodeIDs)
		elo, ehi := idRange(m.ElemIDs)
		if renumber {
			if len(out.Coords) > 0 && nlo <= nodeHi && nhi >= nodeLo {
				src.NodeOffset = roundOffset(nodeHi)
			}
			if len(out.ElemIDs) > 0 && elo <= elemHi && ehi >= elemLo {
				src.ElemOffset = roundOffset(elemHi)
			}
			if src.NodeOffset != 0 || src.ElemOffset != 0 {
				shifts = append(shifts, Renumbering{File: src.File, NodeOffset: src.NodeOffset, ElemOffset: src.ElemOffset})
			}
			if (len(m.Coords) > 0 && nhi > math.MaxInt64-src.NodeOffset) || (len(m.ElemIDs) > 0 && ehi > math.MaxInt64-src.ElemOffset) {
				return nil, nil, FileError(src.File, "renumbering: ids shifted above the ids of the files before it would not fit in 64 bits; renumber the files before merging")
			}
		}
		if len(m.Coords) > 0 {
			nodeLo, nodeHi = min(nodeLo, nlo+src.NodeOffset), max(nodeHi, nhi+src.NodeOffset)
		}
		if len(m.ElemIDs) > 0 {
			elemLo, elemHi = min(elemLo, elo+src.ElemOffset), max(elemHi, ehi+src.ElemOffset)
		}
		base := int32(len(out.Coords))
		for _, id := range m.NodeIDs {
			out.NodeIDs = append(out.NodeIDs, id+src.NodeOffset)
		}
		out.Coords = append(out.Coords, m.Coords...)
		for e, id := range m.ElemIDs {
			out.ElemIDs = append(out.ElemIDs, id+src.ElemOffset)
			p := m.Parts[m.ElemPart[e]]
			pi, ok := partIdx[p.ID]
			if !ok {
				pi = int32(len(out.Parts))
				partIdx[p.ID] = pi
				out.Parts = append(out.Parts, p)
			}
			out.ElemPart = append(out.ElemPart, pi)
			for _, n := range m.ElemNodes(e) {
				out.Conn = append(out.Conn, n+base)
			}
			out.ElemStart = append(out.ElemStart, int32(len(out.Conn)))
			if anyThick {
				t := math.NaN()
				if m.ElemThickness != nil {
					t = m.ElemThickness[e]
				}
				out.ElemThickness = append(out.ElemThickness, t)
			}
		}
		out.Sources = append(out.Sources, src)
	}
	if err := out.Index(); err != nil {
		return nil, nil, fmt.Errorf("merging meshes: %w", &InputError{Offset: -1, Record: -1, Err: err})
	}
	return out, shifts, nil
}

func idRange(ids []int64) (lo, hi int64) {
	lo = math.MaxInt64
	for _, id := range ids {
		lo, hi = min(lo, id), max(hi, id)
	}
	return lo, hi
}

// roundOffset returns the smallest multiple of 10^k that is >= hi, where
// 10^k is the largest power of ten not above hi (hi >= 1): 48213 -> 50000,
// 999 -> 1000, 7 -> 7.
//
// Near the top of the int64 range, where that multiple does not fit, it
// returns hi itself.
func roundOffset(hi int64) int64 {
	step := int64(1)
	for step <= hi/10 {
		step *= 10
	}
	q := hi / step
	if hi%step != 0 {
		q++
	}
	if q > math.MaxInt64/step {
		return hi
	}
	return q * step
}

package audit

import (
	"fmt"
	"math"
	"slices"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// duplicates finds the pairs of welds that are one weld made twice:
// nuggets that overlap (centre distance under the mean of the two
// nugget diameters, one diameter for equal nuggets) on a sheet both
// join, or two node-pair connectors with a link on the same node pair.
// It returns the pairs (weld indices) and one finding per pair.
func duplicates(m *geom.Mesh, ws []weld) (map[[2]int32]bool, []joints.Finding) {
	dmax := 0.0
	for i := range ws {
		dmax = math.Max(dmax, ws[i].diameter)
	}
	g := newGrid(dmax+maxOff(ws), len(ws))
	for i := range ws {
		g.add(int32(i), ws[i].point)
	}
	pairs := map[[2]int32]bool{}
	var fs []joints.Finding
	var buf []int32
	for i := range ws {
		a := &ws[i]
		buf = g.near(a.point, buf[:0])
		for _, j := range buf {
			if int(j) <= i {
				continue
			}
			b := &ws[j]
			shared := sharedParts(a, b)
			if len(shared) == 0 {
				continue
			}
			d, _ := sheetDist(a, b, shared)
			lim := (a.diameter + b.diameter) / 2
			if !(d < lim) {
				continue
			}
			pairs[pairOf(int32(i), j)] = true
			fs = append(fs, duplicateFinding(a, b, fmt.Sprintf("welds %s and %s are %s mm apart, less than their nugget diameter (%s mm): their nuggets overlap on %s: one weld defined twice, or two that merge into one",
				a.id, b.id, joints.MM(d), joints.MM(lim), partsWord(shared))))
		}
	}
	// Node-pair connectors on the same pair of nodes.
	type nodes [2]int32
	first := map[nodes]int32{}
	for i := range ws {
		c := ws[i].conn
		if c == nil || c.Attach != joints.NodePair {
			continue
		}
		for _, l := range c.Links {
			na, nb := c.Ends[l.From].NodeIndex, c.Ends[l.To].NodeIndex
			if na < 0 || nb < 0 {
				continue
			}
			key := nodes{min(na, nb), max(na, nb)}
			j, seen := first[key]
			if !seen {
				first[key] = int32(i)
				continue
			}
			if int(j) == i || pairs[pairOf(j, int32(i))] {
				continue
			}
			pairs[pairOf(j, int32(i))] = true
			a, b := &ws[j], &ws[i]
			fs = append(fs, duplicateFinding(a, b, fmt.Sprintf("welds %s and %s both link nodes %d and %d: one weld is defined twice",
				a.id, b.id, m.NodeIDs[key[0]], m.NodeIDs[key[1]])))
		}
	}
	sortFindings(fs)
	return pairs, fs
}

func duplicateFinding(a, b *weld, msg string) joints.Finding {
	return joints.Finding{Severity: DuplicateSeverity, Code: joints.CodeDuplicate, Joint: a.id, Joints: []string{a.id, b.id},
		Parts: sharedParts(a, b), Message: msg, Point: a.point, HasPoint: true}
}

// pitchShort finds consecutive welds of one part pair closer than the
// minimum spacing of the resistance welding manufacturers' table
// (joints.MinSpacing: by governing thickness, +30 % for three sheets or
// more; the larger of the two welds' values), leaving out duplicates
// and welds of one seam chain (reported as such). Two welds are
// consecutive when no third weld of the pair lies closer to both of them
// than they are to each other (the relative neighbourhood of the welds:
// along a weld line, its neighbours).
func pitchShort(ws []weld, dups map[[2]int32]bool, chain []int32) []joints.Finding {
	byPair := map[[2]int64][]int32{}
	var keys [][2]int64
	for i := range ws {
		for _, p := range ws[i].pairs {
			if _, ok := byPair[p]; !ok {
				keys = append(keys, p)
			}
			byPair[p] = append(byPair[p], int32(i))
		}
	}
	slices.SortFunc(keys, joints.ComparePairs)
	reported := map[[2]int32]bool{}
	var fs []joints.Finding
	var buf []int32
	off := maxOff(ws) // of all the welds: once, not once per pair
	for _, key := range keys {
		list := byPair[key]
		smax := 0.0
		for _, i := range list {
			smax = math.Max(smax, ws[i].spacing)
		}
		if len(list) < 2 || !(smax > 0) {
			continue
		}
		g := newGrid(smax+off, len(list))
		for _, i := range list {
			g.add(i, ws[i].point)
		}
		for _, i := range list {
			a := &ws[i]
			buf = g.near(a.point, buf[:0])
			for _, j := range buf {
				if j <= i {
					continue
				}
				b := &ws[j]
				if !slices.Contains(b.pairs, key) {
					continue // a weld of another pair in a shared cell: g holds only this pair's
				}
				d, _ := sheetDist(a, b, key[:])
				lim := math.Max(a.spacing, b.spacing)
				pj := pairOf(i, j)
				if !(d < lim-joints.LengthRoundoff) || dups[pj] || reported[pj] || chain[i] >= 0 && chain[i] == chain[j] {
					continue
				}
				if !consecutive(ws, buf, i, j, d, key[:]) {
					continue
				}
				reported[pj] = true
				three := ""
				if lim == a.spacing && len(a.parts) >= 3 || lim == b.spacing && len(b.parts) >= 3 {
					three = ", three sheets: +30 %"
				}
				gov := a.gov
				if lim == b.spacing {
					gov = b.gov
				}
				fs = append(fs, joints.Finding{Severity: PitchSeverity, Code: joints.CodePitchShort, Joint: a.id, Joints: []string{a.id, b.id},
					Parts: []int64{key[0], key[1]}, Point: a.point, HasPoint: true,
					Message: fmt.Sprintf("welds %s and %s joining parts %d and %d are %s mm apart, closer than the minimum spacing of %s mm for governing thickness %s mm (resistance welding manufacturers' table%s): the second weld shunts the current of the first",
						a.id, b.id, key[0], key[1], joints.MM(d), joints.MM(lim), joints.MM(gov), three)})
			}
		}
	}
	sortFindings(fs)
	return fs
}

// consecutive reports whether no weld among cand (the neighbours of i,
// which hold every weld within d of i on the sheets of parts) lies
// closer than d to both i and j, measured on those sheets.
func consecutive(ws []weld, cand []int32, i, j int32, d float64, parts []int64) bool {
	for _, k := range cand {
		if k == i || k == j {
			continue
		}
		if dk, _ := sheetDist(&ws[k], &ws[i], parts); !(dk < d) {
			continue
		}
		if dk, _ := sheetDist(&ws[k], &ws[j], parts); dk < d {
			return false
		}
	}
	return true
}

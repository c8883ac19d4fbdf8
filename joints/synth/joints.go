package synth

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"strconv"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/joints"
)

// station is a possible joint position on a weld segment.
type station struct {
	x       float64
	bolt    bool
	removed bool
}

// segRef is a weld segment of an assembly with its stations.
type segRef struct {
	asm *asmPlan
	seg *segPlan
	st  []station
}

// boltSize is a metric bolt with its washer and clearance hole, mm:
// washers ISO 7089, clearance holes ISO 273 medium series.
type boltSize struct{ d, washer, hole float64 }

// boltFor returns the largest bolt whose washer keeps 2 mm inside a
// flange of width f.
func boltFor(f float64) boltSize {
	switch {
	case f >= 2*10+4:
		return boltSize{10, 20, 11} // M10: washer 20 (ISO 7089), hole 11 (ISO 273 medium)
	case f >= 2*8+4:
		return boltSize{8, 16, 9} // M8: washer 16 (ISO 7089), hole 9 (ISO 273 medium)
	}
	return boltSize{6, 12, 6.6} // M6: washer 12 (ISO 7089), hole 6.6 (ISO 273 medium)
}

func stationCount(l, pitch float64) int {
	if !(l >= 0) {
		return 0
	}
	return int(math.Floor(l/pitch+1e-9)) + 1
}

// placeJoints puts cfg.Welds spot welds and cfg.Bolts bolts on the weld
// segments of asms at one pitch and fills the joints and ground truth of
// model.
func placeJoints(cfg Config, asms []*asmPlan, links []linkPlan, rng *rand.Rand, model *Model) error {
	var segs []segRef
	for _, a := range asms {
		for i := range a.segs {
			segs = append(segs, segRef{asm: a, seg: &a.segs[i]})
		}
	}
	need := cfg.Welds - linkWelds*len(links) + 3*cfg.Bolts
	if need == 0 {
		emitLinks(links, cfg.Welds, rng, model)
		return nil
	}
	capacity := func(p float64) int {
		n := 0
		for _, s := range segs {
			n += stationCount(s.seg.x1-s.seg.x0, p)
		}
		return n
	}
	if c := capacity(MinPitch); c < need {
		return fmt.Errorf("%w: %d welds and %d bolts need %d stations; %d elements leave room for %d at %g mm pitch",
			ErrTooManyJoints, cfg.Welds, cfg.Bolts, need, cfg.Elements, c, MinPitch)
	}
	pitch := MaxPitch
	if capacity(MaxPitch) < need {
		lo, hi := MinPitch, MaxPitch
		for range 60 {
			mid := (lo + hi) / 2
			if capacity(mid) >= need {
				lo = mid
			} else {
				hi = mid
			}
		}
		pitch = math.Floor(lo*10) / 10
	}
	model.Pitch = pitch
	for i := range segs {
		s := &segs[i]
		l := s.seg.x1 - s.seg.x0
		n := stationCount(l, pitch)
		start := s.seg.x0 + (l-float64(n-1)*pitch)/2
		s.st = make([]station, n)
		for k := range s.st {
			s.st[k].x = start + float64(k)*pitch
		}
	}
	if err := chooseBolts(cfg.Bolts, segs, rng); err != nil {
		return err
	}
	trim(segs, capacity(pitch)-need, rng)
	emit(segs, rng, model)
	emitLinks(links, cfg.Welds-linkWelds*len(links), rng, model)
	return nil
}

// emitLinks adds the welds of the links, after the welds of the
// flanges (numbered from after the first nw welds): per link, the three
// on the first assembly's strip, then the three on the second's.
func emitLinks(links []linkPlan, nw int, rng *rand.Rand, model *Model) {
	for _, l := range links {
		for _, side := range l.sides() {
			a := side.asm
			nugget := math.Round(5*math.Sqrt(governing(side.ts))*10) / 10
			for _, p := range side.points {
				nw++
				j := joints.Joint{ID: strconv.Itoa(nw), Kind: joints.Spot, Point: a.toGlobal(p[0], p[1], p[2]), Group: a.spec.name + "-link"}
				if rng.Float64() < 0.15 {
					j.Parts = slices.Clone(side.stack)
				}
				if rng.Float64() < 0.3 {
					j.Diameter = nugget
				}
				model.Joints = append(model.Joints, j)
				model.Stacks = append(model.Stacks, slices.Clone(side.stack))
				model.Normals = append(model.Normals, r3.Unit(a.normal()))
			}
		}
	}
}

// chooseBolts turns n stations into bolts: middle stations of disjoint
// runs of three on two-sheet segments, wide flanges first, and removes the
// stations either side of each bolt.
func chooseBolts(n int, segs []segRef, rng *rand.Rand) error {
	if n == 0 {
		return nil
	}
	type slot struct{ seg, k int }
	var wide, narrow []slot
	for i, s := range segs {
		if len(s.seg.stack) != 2 {
			continue
		}
		for k := 1; k+1 < len(s.st); k += 3 {
			if s.seg.flange >= 28 {
				wide = append(wide, slot{i, k})
			} else {
				narrow = append(narrow, slot{i, k})
			}
		}
	}
	shuffle := func(xs []slot) { rng.Shuffle(len(xs), func(i, j int) { xs[i], xs[j] = xs[j], xs[i] }) }
	shuffle(wide)
	shuffle(narrow)
	all := append(wide, narrow...)
	if len(all) < n {
		return fmt.Errorf("%w: room for %d bolts on two-sheet flanges, %d asked", ErrTooManyJoints, len(all), n)
	}
	for _, sl := range all[:n] {
		st := segs[sl.seg].st
		st[sl.k].bolt = true
		st[sl.k-1].removed = true
		st[sl.k+1].removed = true
	}
	return nil
}

// trim removes excess weld stations so that every segment keeps its
// share of the welds (largest remainders, ties in random order), taking
// them off alternate ends of each run so runs stay centred.
func trim(segs []segRef, excess int, rng *rand.Rand) {
	if excess <= 0 {
		return
	}
	avail := make([]int, len(segs))
	total := 0
	for i, s := range segs {
		for _, st := range s.st {
			if !st.removed && !st.bolt {
				avail[i]++
			}
		}
		total += avail[i]
	}
	keep := total - excess
	quota := make([]int, len(segs))
	frac := make([]float64, len(segs))
	given := 0
	for i, a := range avail {
		q := float64(a) * float64(keep) / float64(total)
		quota[i] = int(q)
		frac[i] = q - float64(quota[i])
		given += quota[i]
	}
	order := rng.Perm(len(segs))
	slices.SortStableFunc(order, func(a, b int) int {
		switch {
		case frac[a] > frac[b]:
			return -1
		case frac[a] < frac[b]:
			return 1
		}
		return 0
	})
	for _, i := range order {
		if given == keep {
			break
		}
		if quota[i] < avail[i] {
			quota[i]++
			given++
		}
	}
	for i, s := range segs {
		drop := avail[i] - quota[i]
		lo, hi := 0, len(s.st)-1
		for end := 0; drop > 0; end++ {
			k := &lo
			step := 1
			if end%2 == 1 {
				k, step = &hi, -1
			}
			for ; *k >= lo && *k <= hi; *k += step {
				if st := &s.st[*k]; !st.removed && !st.bolt {
					st.removed = true
					drop--
					break
				}
			}
		}
	}
}

// emit turns the kept stations into joints, in segment and station order.
func emit(segs []segRef, rng *rand.Rand, model *Model) {
	nw, nb := 0, 0
	for _, s := range segs {
		a, sg := s.asm, s.seg
		stack := make([]int64, len(sg.stack))
		ts := make([]float64, len(sg.stack))
		for k, pi := range sg.stack {
			stack[k] = a.parts[pi].id
			ts[k] = a.parts[pi].t
		}
		nugget := math.Round(5*math.Sqrt(governing(ts))*10) / 10
		normal := a.normal()
		for _, st := range s.st {
			if st.removed {
				continue
			}
			j := joints.Joint{Point: a.toGlobal(st.x, sg.y, sg.z), Group: sg.group}
			if st.bolt {
				nb++
				b := boltFor(sg.flange)
				j.ID, j.Kind, j.Diameter, j.Washer, j.Hole = "B"+strconv.Itoa(nb), joints.Bolt, b.d, b.washer, b.hole
				if rng.IntN(2) == 0 {
					j.Parts = slices.Clone(stack)
				}
			} else {
				nw++
				j.ID, j.Kind = strconv.Itoa(nw), joints.Spot
				if rng.Float64() < 0.15 {
					j.Parts = slices.Clone(stack)
					rng.Shuffle(len(j.Parts), func(x, y int) { j.Parts[x], j.Parts[y] = j.Parts[y], j.Parts[x] })
				}
				if rng.Float64() < 0.3 {
					j.Diameter = nugget
				}
			}
			model.Joints = append(model.Joints, j)
			model.Stacks = append(model.Stacks, slices.Clone(stack))
			model.Normals = append(model.Normals, r3.Unit(normal))
		}
	}
}

// governing returns the governing metal thickness of a stack (AWS D8.1M,
// definitions): the thinner sheet of two, the second thickest of three or
// more.
func governing(ts []float64) float64 {
	s := slices.Clone(ts)
	slices.Sort(s)
	if len(s) <= 2 {
		return s[0]
	}
	return s[len(s)-2]
}

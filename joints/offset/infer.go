package offset

import (
	"cmp"
	"context"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// UnsureConfidence: parts whose confidence is below it are reported as
// surface-unsure (our choice: below a quarter, the best other surface
// explains three quarters or more as much of the part's evidence as the
// one chosen).
const UnsureConfidence = 0.25

// Tolerance returns how far, mm, a separation measured between sheets of
// thickness t1 and t2 may lie from the one an assignment predicts and
// still agree with it: the build's gap allowance, but no more than a
// quarter of the thinner sheet. Predictions for the thinner sheet's
// surfaces lie half its thickness apart, so a separation is read as the
// surface it lies nearer to; within the build's allowance, a build with
// the surfaces found reports no gap where the vote found agreement.
func Tolerance(o *joints.BuildOptions, t1, t2 float64) float64 {
	return math.Min(o.GapAllowanceFor(t1, t2), math.Min(t1, t2)/4)
}

// MaxListedIDs caps the element ids a finding's message lists; the
// documents list them all.
const MaxListedIDs = 10

// PartSurface is what the inference found for one part.
type PartSurface struct {
	Part      int64
	Thickness float64 // mm, the part's (the first element's when the part has none)
	Elements  int
	// Declared is the surface the parts table gave.
	Declared geom.Surface
	// Surface is the surface the mesh was drawn on, relative to the
	// element normals as made consistent (Flip); Offset is its
	// geom.Surface.MidOffset for Thickness, mm.
	Surface geom.Surface
	Offset  float64
	// Confidence, 0 to 1 (see the vote); 0 without evidence.
	Confidence float64
	// Evidence is the vote weight of the part's contacts, Agreeing that
	// of those that agree with the assignment; Contacts and Disagreeing
	// count them.
	Evidence, Agreeing    float64
	Contacts, Disagreeing int
	// Flip lists, in increasing order, the ids of the elements whose
	// normals are opposite to their neighbours' (geom.OrientNormals).
	Flip []int64
	// Conflicts counts the shared edges whose elements disagree
	// whichever way the part is turned (a part that cannot be oriented).
	Conflicts int
	// Pieces counts the part's edge-connected pieces.
	Pieces int
}

// Result is the outcome of a surface inference.
type Result struct {
	Parts    []PartSurface // by part id, every part with elements
	Contacts []Contact     // by A, B, Opposed, Separation
	Findings []joints.Finding
	// Reach is the window, mm, within which facing elements were sought
	// (twice the largest thickness plus its allowance).
	Reach float64
	// Options are the options used, defaults resolved.
	Options joints.BuildOptions
}

// Infer finds, for every part of the indexed mesh, which surface it was
// meshed on, from the separations measured wherever two parts face each
// other (every overlap within the window 0 to t1+t2 plus the allowance,
// and every joint site of js), whatever the parts table declares; see the
// package documentation. o gives the allowance (GapAllowanceFor), the
// angle limit and, for joint sites, the reach (default: the window, twice
// the largest thickness plus its allowance), the lateral factor and the
// nugget rule; other zero values mean the build defaults. x must index every
// element (geom.NewIndex or geom.NewElemIndex).
func Infer(ctx context.Context, x *geom.Index, js []joints.Joint, o joints.BuildOptions, prog geom.Progress) (*Result, error) {
	return InferWith(ctx, x, geom.Adjacency{}, js, o, prog)
}

// InferWith is Infer with the node-to-element adjacency of the indexed
// mesh (geom.NodeElements) when the caller has it, for instance found
// while the index was built; an empty adj (no Start) is found here.
func InferWith(ctx context.Context, x *geom.Index, adj geom.Adjacency, js []joints.Joint, o joints.BuildOptions, prog geom.Progress) (*Result, error) {
	return InferOriented(ctx, x, adj, nil, js, o, prog)
}

// InferOriented is InferWith with the orientation of the mesh's normals
// (geom.OrientNormals with adj) given by orient, which the caller may
// have started before the index was built, so that it runs beside the
// index; orient is called once, after the facing elements are found. A
// nil orient orients the normals here, beside the facing search. adj
// must not be empty when orient is given.
func InferOriented(ctx context.Context, x *geom.Index, adj geom.Adjacency, orient func() geom.Orientation, js []joints.Joint, o joints.BuildOptions, prog geom.Progress) (*Result, error) {
	if err := o.Validate(); err != nil {
		return nil, fmt.Errorf("offset: %w", err)
	}
	m := x.Mesh()
	tmax := joints.MaxThickness(m)
	givenReach := o.Reach > 0
	o = o.Defaults(tmax)
	if prog == nil {
		prog = geom.NoProgress{}
	}
	cosTol := math.Cos(o.AngleLimit * math.Pi / 180)
	allowance := func(t1, t2 float64) float64 { return Tolerance(&o, t1, t2) }

	reach := 2*tmax + allowance(tmax, tmax)
	prog.Start("orienting normals", 0)
	if adj.Start == nil {
		adj = geom.NodeElements(m)
	}
	// Pairs are sampled from, and framed on, the part that comes first
	// in a geometric order (sampleOrder), not by id or file order.
	rank := sampleOrder(m)
	// The facing elements need the mesh as it is, not the orientation:
	// find them while the normals are oriented (each stage alone leaves
	// a core idle part of the time). Both answers are deterministic.
	var fs []geom.Facing
	facing := make(chan struct{})
	go func() {
		defer close(facing)
		fs = x.FacingElementsOrdered(m.ElemPart, rank, reach, cosTol, true)
	}()
	if orient == nil {
		orient = func() geom.Orientation { return geom.OrientNormals(m, adj) }
	}
	or := orient()
	prog.Done()
	if err := ctx.Err(); err != nil {
		<-facing
		return nil, fmt.Errorf("offset: interrupted: %w", err)
	}
	// Around joint sites the sheets that matter lie within the window
	// of each other, and the joint point among them: unless the caller
	// gives a reach, the window is reach enough.
	if !givenReach {
		o.Reach = reach
	}
	prog.Start("measuring overlaps", 0)
	<-facing
	samples := overlapSamples(m, rank, fs, &or, allowance)
	samples = append(samples, siteSamples(x, rank, &or, js, &o, cosTol))
	prog.Done()
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("offset: interrupted: %w", err)
	}
	cs := contacts(m, samples, allowance)
	declared := make([]geom.Surface, len(m.Parts))
	for i, p := range m.Parts {
		declared[i] = p.Surface
	}
	sv := newSolver(declared, cs)
	lab, conf := sv.solve(func(p int32) int64 { return int64(rank[p]) })

	res := &Result{Reach: reach, Options: o}
	for i := range cs {
		c := &cs[i]
		sa, sb := labels[lab[c.a]], labels[lab[c.b]]
		c.Side, c.Expected, _ = c.fit(sa, sb)
		c.Agrees = sv.agree[i][3*int(lab[c.a])+int(lab[c.b])]
	}
	elems := make([]int, len(m.Parts))
	for _, pi := range m.ElemPart {
		elems[pi]++
	}
	flipped := or.Flipped(m)
	for pi := range m.Parts {
		if elems[pi] == 0 {
			continue
		}
		p := &m.Parts[pi]
		ps := PartSurface{Part: p.ID, Thickness: p.Thickness, Elements: elems[pi], Declared: p.Surface,
			Surface: labels[lab[pi]], Confidence: conf[pi], Conflicts: or.Conflicts[pi], Pieces: or.Pieces[pi]}
		if !(ps.Thickness > 0) {
			ps.Thickness = m.Thickness(slices.Index(m.ElemPart, int32(pi)))
		}
		ps.Offset = ps.Surface.MidOffset(ps.Thickness)
		for _, e := range flipped[pi] {
			ps.Flip = append(ps.Flip, m.ElemIDs[e])
		}
		slices.Sort(ps.Flip)
		for _, ci := range sv.byPart[pi] {
			c := &cs[ci]
			ps.Contacts++
			ps.Evidence += c.Weight
			if c.Agrees {
				ps.Agreeing += c.Weight
			} else {
				ps.Disagreeing++
			}
		}
		res.Parts = append(res.Parts, ps)
	}
	slices.SortFunc(res.Parts, func(a, b PartSurface) int { return cmp.Compare(a.Part, b.Part) })
	// The contacts as documented: in the frame of the part of lower id,
	// by A, B, Opposed, Separation.
	for i := range cs {
		cs[i].idFrame()
	}
	slices.SortStableFunc(cs, func(x, y Contact) int {
		return cmp.Or(cmp.Compare(x.A, y.A), cmp.Compare(x.B, y.B), cmpBool(x.Opposed, y.Opposed), cmp.Compare(x.Separation, y.Separation))
	})
	res.Contacts = cs
	res.Findings = findings(res)
	return res, nil
}

// findings reports, in this order: parts whose normals disagree, parts
// whose surface differs from the table's, parts whose surface is unsure,
// contacts that disagree with the assignment.
func findings(r *Result) []joints.Finding {
	var fs []joints.Finding
	for _, p := range r.Parts {
		if len(p.Flip) == 0 && p.Conflicts == 0 {
			continue
		}
		msg := fmt.Sprintf("part %d: %d of its %d elements have normals opposite to their neighbours' across shared edges: flip %s",
			p.Part, len(p.Flip), p.Elements, listIDs(p.Flip))
		if p.Conflicts > 0 {
			msg += fmt.Sprintf("; %d shared edge(s) disagree whichever way the part is turned (it cannot be oriented)", p.Conflicts)
		}
		if p.Surface != geom.SurfaceMid && len(p.Flip) > 0 {
			msg += fmt.Sprintf("; its surface (%s) holds for the other elements: turn these in the mesh before a build reads them", p.Surface)
		}
		fs = append(fs, joints.Finding{Severity: joints.Warning, Code: joints.CodeNormalsFlipped, Parts: []int64{p.Part}, Message: msg})
	}
	for _, p := range r.Parts {
		if p.Contacts == 0 || p.Surface == p.Declared {
			continue
		}
		fs = append(fs, joints.Finding{Severity: joints.Warning, Code: joints.CodeSurfaceDiffers, Parts: []int64{p.Part},
			Message: fmt.Sprintf("part %d was meshed on its %s surface (offset %s mm to the mid-surface; confidence %s), the parts table says %s",
				p.Part, p.Surface, joints.MM(p.Offset), strconv.FormatFloat(p.Confidence, 'f', 2, 64), p.Declared)})
	}
	for _, p := range r.Parts {
		switch {
		case p.Contacts == 0:
			fs = append(fs, joints.Finding{Severity: joints.Info, Code: joints.CodeSurfaceUnsure, Parts: []int64{p.Part},
				Message: fmt.Sprintf("part %d faces no other part within %s mm and has no joint site: its surface cannot be told (left out of surfaces.yaml)", p.Part, joints.MM(r.Reach))})
		case p.Confidence < UnsureConfidence:
			fs = append(fs, joints.Finding{Severity: joints.Info, Code: joints.CodeSurfaceUnsure, Parts: []int64{p.Part},
				Message: fmt.Sprintf("part %d: %s chosen with confidence %s: another surface explains nearly as much of its evidence (%s mm² agreeing of %s); mid is preferred where the evidence cannot tell",
					p.Part, p.Surface, strconv.FormatFloat(p.Confidence, 'f', 2, 64), joints.MM(p.Agreeing), joints.MM(p.Evidence))})
		}
	}
	for _, c := range r.Contacts {
		if c.Agrees {
			continue
		}
		where := fmt.Sprintf("over %s mm²", joints.MM(c.Area))
		if c.Sites > 0 {
			where += fmt.Sprintf(" and %d joint site(s)", c.Sites)
		}
		how := "stand off"
		if dev := float64(c.Side) * (c.Separation - c.Expected); dev < 0 {
			how = "penetrate"
		}
		// Without a joint site, sheets that face each other but stand off
		// may do so by design (a clearance, the ramp of a flange): info.
		// A joint site the surfaces do not explain is a warning.
		sev := joints.Info
		if c.Sites > 0 {
			sev = joints.Warning
		}
		fs = append(fs, joints.Finding{Severity: sev, Code: joints.CodeContactDisagrees, Parts: []int64{c.A, c.B}, Point: c.Point, HasPoint: true,
			Message: fmt.Sprintf("parts %d and %d face each other %s mm apart %s (signed, along part %d's element normals); with the surfaces found they would lie %s mm apart in contact (allowance %s mm): they %s by %s mm here",
				c.A, c.B, joints.MM(c.Separation), where, c.A, joints.MM(c.Expected), joints.MM(c.Allowance), how, joints.MM(math.Abs(c.Separation-c.Expected)))})
	}
	return fs
}

// listIDs lists up to MaxListedIDs ids and says how many more there are.
func listIDs(ids []int64) string {
	n := min(len(ids), MaxListedIDs)
	s := make([]string, n)
	for i := range n {
		s[i] = strconv.FormatInt(ids[i], 10)
	}
	out := strings.Join(s, " ")
	if len(ids) > n {
		out += fmt.Sprintf(" ... (%d more; all in surfaces.json)", len(ids)-n)
	}
	return out
}

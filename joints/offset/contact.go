package offset

import (
	"cmp"
	"math"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// JointSiteWeight, mm², is the weight of one joint site in the vote, as
// if it were that much overlap: a joint asserts that its sheets touch
// (an overlap only that they lie near), and one spot weld serves some
// 400 to 800 mm² of flange (a 25 to 40 mm pitch, common practice, on a
// 15 to 20 mm flange); a quarter of that lets a few sites outweigh a
// stray overlap while one misplaced weld does not outvote a flange (our
// choice).
const JointSiteWeight = 100.0

// MinContactSamples is the fewest overlap samples (elements) that make a
// contact without a joint site: fewer are noise at a bend or an edge
// (our choice).
const MinContactSamples = 3

// Contact is what the samples say about one place where two parts face
// each other: one pair of parts, one relative orientation of their
// normals, and one cluster of separations (samples of the pair whose
// separations lie within half the allowance of each other chain
// together; a pair that touches in one place and stands off in another
// thus gives two contacts).
type Contact struct {
	A, B int64 // part ids, A < B
	// Opposed is set when B's normals point against A's (after the
	// normals of each part were made consistent).
	Opposed bool
	// Separation is the weighted median of the signed distances from
	// A's mesh to B's along A's normal, mm; Min and Max bound them.
	Separation, Min, Max float64
	// TA and TB are the thicknesses at the contact, mm.
	TA, TB float64
	// Area is the overlap area sampled, mm²; Sites the joint sites;
	// Samples the measurements (elements of either part, and sites).
	Area    float64
	Sites   int
	Samples int
	// Point is where a sample near the median was taken, mm.
	Point r3.Vec
	// Weight is the contact's vote: Area plus JointSiteWeight per site.
	Weight float64
	// Filled by the solve: Expected is the separation the assignment
	// predicts (the nearer of the two sides), Side +1 when B lies on the
	// side A's normal points to, -1 when opposite, and Agrees tells
	// whether Separation lies within Allowance of Expected.
	Expected  float64
	Side      int
	Allowance float64
	Agrees    bool

	a, b int32 // part indices
}

// tieGrain, mm, is the grain below which two separations or positions
// count as equal when the samples are ordered: far below any length the
// inference tells apart, and far above the rounding of a model read in
// another unit and scaled to mm (a few units in the sixteenth digit), so
// that the same model in mm, m or in orders its samples alike.
const tieGrain = 1e-6

// tie returns v in units of tieGrain, rounded.
func tie(v float64) float64 { return math.Round(v / tieGrain) }

// contacts clusters the samples (chunks, in order) into contacts, each in
// the frame of its part of lower rank (a, as the samples are), sorted by
// the ranks of a and b, Opposed, Separation: neither the order nor the
// values depend on the parts' ids or on the order of their records
// (idFrame turns them into the frame of the part of lower id). allowance
// gives the agreement allowance of two thicknesses.
func contacts(m *geom.Mesh, chunks [][]sample, allowance func(t1, t2 float64) float64) []Contact {
	// Sort an order, not the samples themselves (they are large).
	n := 0
	for _, c := range chunks {
		n += len(c)
	}
	order := make([]*sample, 0, n)
	for _, c := range chunks {
		for i := range c {
			order = append(order, &c[i])
		}
	}
	slices.SortFunc(order, func(x, y *sample) int {
		switch {
		case x.ra != y.ra:
			return cmp.Compare(x.ra, y.ra)
		case x.rb != y.rb:
			return cmp.Compare(x.rb, y.rb)
		case x.opposed != y.opposed:
			return cmpBool(x.opposed, y.opposed)
		case tie(x.s) != tie(y.s):
			return cmp.Compare(x.s, y.s)
		case x.site != y.site:
			return cmpBool(x.site, y.site)
		}
		return cmp.Or(cmpPoint(x.at, y.at), cmp.Compare(x.s, y.s))
	})
	samples := make([]sample, len(order))
	for i, p := range order {
		samples[i] = *p
	}
	var out []Contact
	for lo := 0; lo < len(samples); {
		hi := lo + 1
		for hi < len(samples) {
			p, q := &samples[hi-1], &samples[hi]
			if q.a != p.a || q.b != p.b || q.opposed != p.opposed || q.s-p.s > allowance(p.ta, p.tb)/2 {
				break
			}
			hi++
		}
		if c, ok := newContact(m, samples[lo:hi]); ok {
			c.Allowance = allowance(c.TA, c.TB)
			out = append(out, c)
		}
		lo = hi
	}
	return out
}

// newContact sums up one cluster of samples, sorted by separation.
func newContact(m *geom.Mesh, ss []sample) (Contact, bool) {
	c := Contact{a: ss[0].a, b: ss[0].b, A: m.Parts[ss[0].a].ID, B: m.Parts[ss[0].b].ID, Opposed: ss[0].opposed,
		Min: ss[0].s, Max: ss[len(ss)-1].s, Samples: len(ss)}
	w := func(s *sample) float64 {
		if s.site {
			return JointSiteWeight
		}
		return s.w
	}
	for i := range ss {
		if ss[i].site {
			c.Sites++
		} else {
			c.Area += ss[i].w
		}
		c.Weight += w(&ss[i])
	}
	if c.Sites == 0 && len(ss) < MinContactSamples || !(c.Weight > 0) {
		return c, false
	}
	// Weighted median (samples are sorted by separation): lo is the first
	// sample at which half the weight is reached from below, hi the last
	// at which it is reached from above; they differ where the weight
	// splits in halves, and the median is then the midpoint of their
	// separations (as for the median of an even count, common practice).
	// Halves are judged to 1e-9 of the weight, so that the rounding of
	// the sums (a model read in m or in, or summed from the other end)
	// does not move the median by a sample. The point and thicknesses
	// are those of whichever of the two lies first by position.
	half, eps := c.Weight/2, 1e-9*c.Weight
	lo, hi := len(ss)-1, 0
	acc := 0.0
	for i := range ss {
		acc += w(&ss[i])
		if acc >= half-eps {
			lo = i
			break
		}
	}
	acc = 0
	for i := len(ss) - 1; i >= 0; i-- {
		acc += w(&ss[i])
		if acc >= half-eps {
			hi = i
			break
		}
	}
	hi = max(hi, lo)
	c.Separation = ss[lo].s
	if hi != lo {
		c.Separation = (ss[lo].s + ss[hi].s) / 2
	}
	at := &ss[lo]
	if q := &ss[hi]; cmpPoint(q.at, at.at) < 0 {
		at = q
	}
	c.Point, c.TA, c.TB = at.at, at.ta, at.tb
	return c, true
}

// cmpPoint orders points by x, y, z at the grain of tie.
func cmpPoint(p, q r3.Vec) int {
	return cmp.Or(cmp.Compare(tie(p.X), tie(q.X)), cmp.Compare(tie(p.Y), tie(q.Y)), cmp.Compare(tie(p.Z), tie(q.Z)))
}

// idFrame turns c, found in the frame of its part of lower rank, into
// the frame of its part of lower id, as Contact documents it: A and B
// (and their thicknesses) swap where B's id is the lower, and the
// separations along A's normal become those along B's (flipped), exactly.
func (c *Contact) idFrame() {
	if c.A < c.B {
		return
	}
	c.A, c.B, c.a, c.b, c.TA, c.TB = c.B, c.A, c.b, c.a, c.TB, c.TA
	c.Separation, c.Expected = flipped(c.Separation, c.Opposed), flipped(c.Expected, c.Opposed)
	if !c.Opposed {
		c.Min, c.Max = -c.Max, -c.Min
		c.Side = -c.Side
	}
}

func cmpBool(a, b bool) int {
	switch {
	case a == b:
		return 0
	case a:
		return 1
	}
	return -1
}

// predict returns the separation from A's mesh to B's along A's normal
// that parts meshed on surfaces sa and sb, in contact, would show on side
// side (+1: B on the side of A's normal), mm: A's mid-surface lies at
// oA along A's normal, B's at s + c·oB, and in contact they lie
// (tA+tB)/2 apart, so s = oA - c·oB + side·(tA+tB)/2, c = -1 for opposed
// normals.
func (c *Contact) predict(sa, sb geom.Surface, side int) float64 {
	cs := 1.0
	if c.Opposed {
		cs = -1
	}
	return sa.MidOffset(c.TA) - cs*sb.MidOffset(c.TB) + float64(side)*(c.TA+c.TB)/2
}

// fit returns, for surfaces sa and sb, the side that explains the
// separation best, the separation it predicts and the residual.
func (c *Contact) fit(sa, sb geom.Surface) (side int, expected, residual float64) {
	up, down := c.predict(sa, sb, 1), c.predict(sa, sb, -1)
	ru, rd := math.Abs(c.Separation-up), math.Abs(c.Separation-down)
	if rd < ru {
		return -1, down, rd
	}
	return 1, up, ru
}

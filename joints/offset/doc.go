// Package offset infers which surface of its sheet each part was meshed
// on (mid-surface, top face or bottom face, relative to its element
// normals made consistent) from the evidence of the mesh itself: the
// separations measured wherever two parts face each other (every
// element's normal line meeting a parallel element of another part
// within t1+t2 plus the allowance: sample.go) and at every joint site.
// The separations of one pair of parts cluster into contacts
// (contact.go); one assignment of surfaces over all parts is chosen by a
// vote over the contacts that prefers the mid-surface where the evidence
// cannot tell, each part gets a confidence, and the contacts the
// assignment does not explain are reported (solve.go, infer.go).
//
// The offset links themselves, which a builder makes from these
// surfaces, are built by joints.NewOffsetLink (shared with the bolt
// builder to come).
package offset

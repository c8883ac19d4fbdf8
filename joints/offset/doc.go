// Package offset builds offset links for lap joints meshed on
// mid-surfaces and infers which surface each part was meshed on.
package offset

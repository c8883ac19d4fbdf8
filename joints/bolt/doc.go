// Package bolt builds bolted-joint connectors: the sheets a bolt axis
// crosses, the ring of nodes round each hole, a centre node per sheet
// coupled to its ring, and the shank between the centres.
package bolt

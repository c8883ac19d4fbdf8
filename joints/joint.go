package joints

import "gonum.org/v1/gonum/spatial/r3"

// Kind is the kind of a joint.
type Kind int8

const (
	// Spot is a resistance spot weld.
	Spot Kind = iota
	// Bolt is a bolted joint.
	Bolt
)

// String returns "spot" or "bolt".
func (k Kind) String() string {
	if k == Bolt {
		return "bolt"
	}
	return "spot"
}

// Joint is one entry of a joining plan.
type Joint struct {
	ID    string // as written in the joint list; unique within a run
	Kind  Kind
	Point r3.Vec // mm
	// Parts lists the part ids the joint must join, in no particular
	// order; nil means the sheets are found automatically.
	Parts []int64
	// Diameter is the nugget diameter of a spot weld or the nominal shank
	// diameter of a bolt, mm; 0 means not given.
	Diameter float64
	Washer   float64 // bolt: washer or head outer diameter, mm; 0 = not given
	Hole     float64 // bolt: hole diameter, mm; 0 = not given
	// Axis is a bolt's axis direction, unit (columns nx, ny, nz); the
	// zero vector when not given (the normal of the nearest sheet).
	Axis r3.Vec
	// Ground marks a bolt that fastens its stack to something outside
	// the model (a stiff fixture): its outermost centre is supported.
	Ground bool
	Group  string // free tag
	// Tags keeps the values of columns Joinery does not know, by column name.
	Tags map[string]string
	// File and Line locate the joint in its list, for messages.
	File string
	Line int
}

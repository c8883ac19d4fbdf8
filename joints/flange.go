package joints

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// Match says how the meshes of a flange's two sheets meet.
type Match int8

const (
	// Congruent meshes match node for node: most nodes in contact have a
	// facing node on the other sheet.
	Congruent Match = iota
	// Projected meshes do not match (other element sizes, triangles
	// against quads, shifted grids): the overlap is found by projecting
	// one sheet's nodes onto the other.
	Projected
)

// String returns "congruent" or "projected".
func (m Match) String() string {
	if m == Congruent {
		return "congruent"
	}
	return "projected"
}

// Span is the least, mean and largest value of a quantity along a
// flange.
type Span struct {
	Min, Mean, Max float64
}

// MinMeanNormal is the shortest area-weighted mean of a flange's unit
// normals that gives it a Normal (our choice: the normals of its host
// elements spread over less than about 60 degrees either way).
const MinMeanNormal = 0.5

// Flange is one connected region where the sheets of two parts lie in
// contact, traced on the mesh of one of them (the host).
type Flange struct {
	ID    string   // "<A>-<B>-<k>": the part ids, then the flange's number for the pair
	Parts [2]int64 // the two parts, the smaller id first
	// Host is the part whose mesh traces the overlap: the finer one
	// there, then the one geom.Mesh.PartOrder takes first (chosen by
	// geometry, see geom.Contacts.Host).
	Host int64
	// Thickness holds the two sheets' thicknesses, aligned with Parts
	// (the median over the overlap's elements), mm; Contact is their
	// mean, the mid-surface gap of sheets in contact.
	Thickness [2]float64
	Contact   float64
	Match     Match
	// Closed is set for a ring round an opening; an open flange is a
	// strip with two ends.
	Closed bool
	// Area is the overlap's area on the faying surface, where the
	// centreline is measured too, mm²: the host's pieces lifted to it,
	// mitred where they meet at a crease.
	Area float64
	// Length is the length of the centreline, mm; Width the overlap's
	// width across it: Mean is Area / Length, Min and Max the shortest
	// and longest cross-section square to the centreline at stations
	// away from the ends, widened to take in Mean.
	Length float64
	Width  Span
	// Centreline runs along the middle of the overlap on the faying
	// surface between the sheets; a closed flange's does not repeat its
	// first point.
	Centreline []r3.Vec
	// Normal is the host sheet's mean unit normal over the overlap
	// (area-weighted), signed so that its largest component is
	// positive: the direction a plan view of the flange looks along. It
	// is zero where the sheet turns so far that no mean stands for it
	// (the mean's length below MinMeanNormal, as on a band round a pipe).
	Normal r3.Vec
	// Nodes counts the host's nodes in contact.
	Nodes int
	// Facing lists the facing node pairs of the flange (A on Parts[0]),
	// and FacingTolerance the span of their lateral limits.
	Facing          []geom.FacingPair
	FacingTolerance Span
	// Pitch is the spacing the welds were placed at, mm (0: none placed);
	// for a closed flange the equal spacing all round.
	Pitch float64
	Welds []FlangeWeld
}

// FlangeWeld is a spot weld placed on a flange.
type FlangeWeld struct {
	Joint Joint
	// Station is the weld's number along the centreline, from 1; S its
	// distance along the centreline from the centreline's start, mm.
	Station int
	S       float64
}

// WeldID returns the id of the weld at station k of flange f.
func WeldID(flange string, k int) string { return flange + "-" + strconv.Itoa(k) }

// FlangeID returns the id of the k-th flange (from 1) of parts a < b.
func FlangeID(a, b int64, k int) string { return fmt.Sprintf("%d-%d-%d", a, b, k) }

// Pitch says how welds are placed on flanges.
type Pitch struct {
	// MM is the weld pitch, mm; 0 with Table unset places no welds.
	MM float64
	// Table takes each flange's pitch from the minimum spacing table
	// (MinSpacing for its governing thickness and stack size).
	Table bool
}

// ParsePitch reads a pitch: a length in mm, or "table".
func ParsePitch(s string) (Pitch, error) {
	s = strings.TrimSpace(s)
	if s == "table" {
		return Pitch{Table: true}, nil
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) || v <= 0 {
		return Pitch{}, fmt.Errorf("pitch %q: want a length in mm above 0, or table", s)
	}
	if v < MinPitch {
		return Pitch{}, fmt.Errorf("pitch %q: %s", s, minPitchWant())
	}
	return Pitch{MM: v}, nil
}

// String returns the pitch as ParsePitch reads it; "" for none.
func (p Pitch) String() string {
	switch {
	case p.Table:
		return "table"
	case p.MM > 0:
		return strconv.FormatFloat(p.MM, 'g', -1, 64)
	}
	return ""
}

// Set reports whether welds are to be placed.
func (p Pitch) Set() bool { return p.Table || p.MM > 0 }

// Defaults of flange finding and weld placement.
const (
	// DefaultFacingFactor times the local element size bounds the
	// lateral offset of a facing node pair (our choice: nodes of
	// congruent meshes coincide across the gap to rounding; a tenth of an
	// element accepts meshes nudged by their generators, and stays well
	// inside the half element that would make a node face its
	// neighbour's partner).
	DefaultFacingFactor = 0.1
	// CongruentShare is the share of a flange's host nodes in contact
	// that must have a facing partner for the flange to count as
	// congruent (our choice).
	CongruentShare = 0.8
)

// FlangeOptions set how flanges are found and welds placed. Zero values
// mean the documented defaults. The contact rule (gap allowance, angle
// limit), the nugget rule, the edge rule and the attachment come from
// the build options they are used with.
type FlangeOptions struct {
	// Pairs limits the search to these part pairs (ids); nil: every pair
	// of parts whose sheets come within contact of each other.
	Pairs [][2]int64
	Pitch Pitch
	// EndMargin, mm, from each end of an open flange to its first
	// station; 0: one nugget diameter (the edge rule build uses).
	EndMargin float64
	// FacingFactor (DefaultFacingFactor).
	FacingFactor float64
}

// Defaults returns o with zero fields set to their defaults.
func (o FlangeOptions) Defaults() FlangeOptions {
	if o.FacingFactor <= 0 {
		o.FacingFactor = DefaultFacingFactor
	}
	return o
}

// Validate checks the options a user gave.
func (o *FlangeOptions) Validate() error {
	switch {
	case math.IsNaN(o.EndMargin) || math.IsInf(o.EndMargin, 0) || o.EndMargin < 0:
		return fmt.Errorf("end margin %g: want a finite number, 0 or more (0 for one nugget diameter)", o.EndMargin)
	case math.IsNaN(o.Pitch.MM) || math.IsInf(o.Pitch.MM, 0) || o.Pitch.MM < 0:
		return fmt.Errorf("pitch %g: want a length in mm above 0", o.Pitch.MM)
	case o.Pitch.MM > 0 && o.Pitch.MM < MinPitch:
		return fmt.Errorf("pitch %g: %s", o.Pitch.MM, minPitchWant())
	case math.IsNaN(o.FacingFactor) || o.FacingFactor < 0 || o.FacingFactor >= 0.5:
		return fmt.Errorf("facing factor %g: want 0 (the default) up to 0.5", o.FacingFactor)
	}
	for _, p := range o.Pairs {
		if p[0] == p[1] {
			return fmt.Errorf("pair %d,%d: a part does not pair with itself", p[0], p[1])
		}
	}
	return nil
}

// ParsePair reads a part pair written "A,B" (two different part ids).
func ParsePair(s string) ([2]int64, error) {
	a, b, ok := strings.Cut(s, ",")
	var p [2]int64
	if ok {
		var err1, err2 error
		p[0], err1 = strconv.ParseInt(strings.TrimSpace(a), 10, 64)
		p[1], err2 = strconv.ParseInt(strings.TrimSpace(b), 10, 64)
		ok = err1 == nil && err2 == nil
	}
	switch {
	case !ok:
		return p, fmt.Errorf("pair %q: want two part ids separated by a comma, as 100,200", s)
	case p[0] == p[1]:
		return p, fmt.Errorf("pair %q: a part does not pair with itself", s)
	}
	return p, nil
}

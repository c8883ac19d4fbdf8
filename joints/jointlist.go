package joints

import (
	"cmp"
	"fmt"
	"io"
	"maps"
	"math"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"

	"gonum.org/v1/gonum/spatial/r3"
	"gopkg.in/yaml.v3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/meshio/tabular"
)

// InputWarning is a problem in an input that does not stop the run.
type InputWarning struct {
	File    string
	Line    int // 1-based; 0 when the warning concerns the whole file
	Message string
}

// String formats the warning as "file:line: message".
func (w InputWarning) String() string {
	if w.Line > 0 {
		return fmt.Sprintf("%s:%d: %s", w.File, w.Line, w.Message)
	}
	return fmt.Sprintf("%s: %s", w.File, w.Message)
}

// ParseKind reads "spot" or "bolt" in any case; "" is spot.
func ParseKind(s string) (Kind, error) {
	switch strings.ToLower(s) {
	case "", "spot":
		return Spot, nil
	case "bolt":
		return Bolt, nil
	}
	return Spot, fmt.Errorf("unknown joint kind %q (want spot or bolt)", geom.Excerpt(s))
}

// jointKeys returns the known CSV columns, which are also the YAML keys.
func jointKeys() []string {
	return []string{"id", "x", "y", "z", "kind", "parts", "diameter", "washer", "hole", "group", "nx", "ny", "nz", "ground"}
}

// Indices into jointKeys.
const (
	jlID = iota
	jlX
	jlY
	jlZ
	jlKind
	jlParts
	jlDiameter
	jlWasher
	jlHole
	jlGroup
	jlNX
	jlNY
	jlNZ
	jlGround
)

// ParseGround reads a ground cell: "yes" or "no" (also "true" and
// "false"), in any case; "" is no.
func ParseGround(s string) (bool, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "", "no", "false":
		return false, nil
	case "yes", "true":
		return true, nil
	}
	return false, fmt.Errorf("%q: want yes or no", geom.Excerpt(s))
}

// ReadJoints reads the joint list in the named file: CSV for .csv, YAML
// for .yaml and .yml. It returns the joints in file order and warnings
// about likely mistakes that are not errors.
//
// CSV: a header row, then one joint per row, the columns separated by
// commas, semicolons or tabs (the one the header line uses; numbers take
// a decimal point, and in a semicolon-separated file a parts cell holding
// several ids is quoted, "10;20", as spreadsheets write it). Columns may
// come in any order; header names are trimmed and compared without
// regard to case.
//
//	id        required; text, unique in the list ("W17", "1042")
//	x, y, z   required; the joint's point, in the job's unit (mm
//	          unless units says m or in; lengths below alike)
//	kind      spot (default) or bolt
//	parts     part ids the joint joins, separated by ';' ("10;20;30")
//	diameter  spot: nugget diameter; bolt: nominal shank diameter
//	washer    bolt: washer or head outer diameter
//	hole      bolt: hole diameter
//	group     free tag, e.g. to select build settings in a job file
//	nx, ny, nz bolt: the axis direction (any length but zero; all three
//	          or none); default: the normal of the nearest sheet
//	ground    bolt: yes when the bolt fastens the stack to something
//	          outside the model (a stiff fixture), else no (default);
//	          the support sits at the last sheet along the axis
//
// An empty cell of an optional column means not given. Columns with
// other names are kept in Joint.Tags, except that a name resembling a
// known column ("diamter", "Part_s"; see tabular.Suggest) is an error, as
// the same key is in YAML: a misspelt diameter must not silently become
// the rule's. Lines starting with '#' and blank lines are skipped; a
// header without rows is an empty list (with a warning), an empty file
// an error.
//
// YAML: a map with the single key "joints" holding a list of maps with the
// same keys, except that parts is a list of integers, the point is given
// either as x, y and z or as point: [x, y, z], and free keys go in a
// "tags" map of single values:
//
//	joints:
//	  - {id: W1, point: [120.5, -340, 88.25], parts: [10, 20]}
//	  - id: B1
//	    kind: bolt
//	    x: 410
//	    y: -352.5
//	    z: 91
//	    diameter: 10
//	    washer: 20
//	    hole: 11
//	    tags: {torque: 45}
//
// Other keys are errors. (The bolt is an M10 with an ISO 7089 washer in
// an ISO 273 medium clearance hole.)
//
// In both forms a bolt must give its diameter, washer and hole; its hole
// must not be smaller than its diameter and its washer must be larger
// than both. Washer, hole, axis or ground on a spot weld gives a warning.
func ReadJoints(path string) ([]Joint, []InputWarning, error) {
	l, err := readJointList(path, nil)
	if err != nil {
		return nil, nil, err
	}
	return l.joints, l.warns, nil
}

// readJointList reads the joint list in the named file (see
// ReadJoints), passing every byte to digest (when not nil) as it is read.
func readJointList(path string, digest io.Writer) (*jointList, error) {
	var read func(io.Reader, string) (*jointList, error)
	switch ext := strings.ToLower(filepath.Ext(path)); ext {
	case ".csv":
		read = readJointsCSV
	case ".yaml", ".yml":
		read = readJointsYAML
	default:
		return nil, geom.FileError(path, "unknown joint list type %q (want .csv, .yaml or .yml)", geom.Excerpt(ext))
	}
	f, err := geom.OpenRegular(path)
	if err != nil {
		return nil, fmt.Errorf("joints: reading joint list: %w", err)
	}
	defer f.Close()
	if digest == nil {
		return read(f, path)
	}
	r := io.TeeReader(f, digest)
	l, err := read(r, path)
	if err == nil {
		// The digest covers the whole file, whatever the parser left unread.
		if _, err = io.Copy(io.Discard, r); err != nil {
			err = fmt.Errorf("joints: reading joint list: %w", err)
		}
	}
	return l, err
}

// ReadJointsCSV reads a joint list in CSV from r; name is the file name
// used in errors, warnings and Joint.File.
func ReadJointsCSV(r io.Reader, name string) ([]Joint, []InputWarning, error) {
	l, err := readJointsCSV(r, name)
	if err != nil {
		return nil, nil, err
	}
	return l.joints, l.warns, nil
}

func readJointsCSV(r io.Reader, name string) (*jointList, error) {
	c, err := tabular.NewCSV(r, name)
	if err != nil {
		return nil, err
	}
	keys := jointKeys()
	at, tags := c.Columns(keys) // unknown columns are kept as tags
	l := newJointList(name)
	for _, col := range tags {
		if tabular.Suggest(c.Header[col], keys) != "" {
			return nil, fmt.Errorf("%w; a column meant as a free tag needs a name unlike the known ones", c.UnknownColumn(col, keys))
		}
		l.tags = append(l.tags, c.Header[col])
	}
	if err := c.Require(at, keys, jlID, jlX, jlY, jlZ); err != nil {
		return nil, err
	}
	for {
		rec, err := c.Read()
		if err == io.EOF {
			l.finish()
			return l, nil
		}
		if err != nil {
			return nil, err
		}
		j := Joint{File: name, Line: c.Line(0)}
		if err := csvJoint(c, rec, keys, at, &j); err != nil {
			return nil, err
		}
		for _, col := range tags {
			if rec[col] == "" {
				continue
			}
			if j.Tags == nil {
				j.Tags = make(map[string]string, len(tags))
			}
			j.Tags[c.Header[col]] = rec[col]
		}
		if err := l.add(j, c.Line(at[jlID])); err != nil {
			return nil, err
		}
	}
}

// csvJoint fills j from the known columns of one row; at[k] is the column
// of keys[k].
func csvJoint(c *tabular.CSV, rec, keys []string, at []int, j *Joint) error {
	j.ID = strings.Clone(rec[at[jlID]])
	var err error
	for _, k := range []int{jlX, jlY, jlZ} {
		col := at[k]
		if rec[col] == "" {
			return c.Errorf(col, "%s is empty", c.Header[col])
		}
		if *numField(j, keys[k]), err = c.Float(rec, col); err != nil {
			return err
		}
	}
	if col := at[jlKind]; col >= 0 {
		if j.Kind, err = ParseKind(rec[col]); err != nil {
			return c.Errorf(col, "kind: %w", err)
		}
	}
	if col := at[jlParts]; col >= 0 && rec[col] != "" {
		for s := range strings.SplitSeq(rec[col], ";") {
			id, err := strconv.ParseInt(strings.TrimSpace(s), 10, 64)
			if err != nil {
				return c.Errorf(col, "parts: %q is not a list of part ids separated by ';'", geom.Excerpt(rec[col]))
			}
			if err := addPart(j, id); err != nil {
				return c.Errorf(col, "parts: %w", err)
			}
		}
	}
	for _, k := range []int{jlDiameter, jlWasher, jlHole} {
		col := at[k]
		if col < 0 || rec[col] == "" {
			continue
		}
		size := numField(j, keys[k])
		if *size, err = c.Float(rec, col); err != nil {
			return err
		}
		if *size < 0 {
			return c.Errorf(col, "%s: %g mm is negative", c.Header[col], *size)
		}
	}
	if col := at[jlGroup]; col >= 0 {
		j.Group = strings.Clone(rec[col])
	}
	var (
		axis  [3]float64
		given [3]bool
	)
	for i, k := range []int{jlNX, jlNY, jlNZ} {
		if col := at[k]; col >= 0 && rec[col] != "" {
			if axis[i], err = c.Float(rec, col); err != nil {
				return err
			}
			given[i] = true
		}
	}
	if err := setAxis(j, axis, given); err != nil {
		col := at[jlNX]
		for _, k := range []int{jlNX, jlNY, jlNZ} {
			if col < 0 {
				col = at[k]
			}
		}
		return c.Errorf(col, "%w", err)
	}
	if col := at[jlGround]; col >= 0 {
		if j.Ground, err = ParseGround(rec[col]); err != nil {
			return c.Errorf(col, "ground: %w", err)
		}
	}
	return nil
}

// setAxis sets j.Axis from the components given (all three or none),
// made unit.
func setAxis(j *Joint, v [3]float64, given [3]bool) error {
	switch {
	case !given[0] && !given[1] && !given[2]:
		return nil
	case !given[0] || !given[1] || !given[2]:
		return fmt.Errorf("axis: give nx, ny and nz together, or none of them")
	}
	a := r3.Vec{X: v[0], Y: v[1], Z: v[2]}
	n := r3.Norm(a)
	if !(n > 0) || math.IsInf(n, 0) {
		return fmt.Errorf("axis (%g, %g, %g): want a direction of non-zero finite length", v[0], v[1], v[2])
	}
	j.Axis = r3.Scale(1/n, a)
	return nil
}

// addPart appends a part id to j.Parts, refusing non-positive ids and
// repeats.
func addPart(j *Joint, id int64) error {
	if id <= 0 {
		return fmt.Errorf("part id %d is not positive", id)
	}
	if slices.Contains(j.Parts, id) {
		return fmt.Errorf("part %d listed twice", id)
	}
	j.Parts = append(j.Parts, id)
	return nil
}

// ReadJointsYAML reads a joint list in YAML from r; name is the file name
// used in errors, warnings and Joint.File.
func ReadJointsYAML(r io.Reader, name string) ([]Joint, []InputWarning, error) {
	l, err := readJointsYAML(r, name)
	if err != nil {
		return nil, nil, err
	}
	return l.joints, l.warns, nil
}

func readJointsYAML(r io.Reader, name string) (*jointList, error) {
	y := tabular.YAML{File: name}
	root, err := y.Parse(r)
	if err != nil {
		return nil, err
	}
	if root == nil {
		// As an empty CSV file, which has no header: nothing says this
		// is a joint list (see the jointList.finish for empty lists).
		return nil, geom.FileError(name, "empty file: want a joint list (the key joints: and a list of joints)")
	}
	var (
		items   []*yaml.Node
		hasList bool
	)
	err = y.Map(root, "joint list", []string{"joints"}, func(_ string, _, v *yaml.Node) error {
		hasList = true
		items, err = y.List(v, "joints")
		return err
	})
	if err != nil {
		return nil, err
	}
	if !hasList {
		return nil, y.Errorf(root, "joint list: no key joints: (write joints: and a list of joints)")
	}
	keys := append(jointKeys(), "point", "tags")
	l := newJointList(name)
	l.joints = make([]Joint, 0, len(items))
	for _, it := range items {
		j := Joint{File: name, Line: it.Line}
		idLine, err := yamlJoint(y, it, keys, &j)
		if err != nil {
			return nil, err
		}
		if err := l.add(j, idLine); err != nil {
			return nil, err
		}
	}
	// The tag keys, in sorted order: YAML maps have none of their own.
	seen := map[string]bool{}
	for _, j := range l.joints {
		for k := range j.Tags {
			if !seen[k] {
				seen[k] = true
				l.tags = append(l.tags, k)
			}
		}
	}
	slices.Sort(l.tags)
	l.finish()
	return l, nil
}

// yamlJoint fills j from one map of the list and returns the line of its
// id.
func yamlJoint(y tabular.YAML, it *yaml.Node, keys []string, j *Joint) (int, error) {
	var (
		idLine int
		coords [3]bool // x, y, z given
		point  bool
		axis   [3]float64
		given  [3]bool // nx, ny, nz given
		axisAt *yaml.Node
	)
	err := y.Map(it, "joint", keys, func(key string, k, v *yaml.Node) (err error) {
		switch key {
		case "id":
			idLine = v.Line
			j.ID, err = y.String(v, "id")
		case "x", "y", "z":
			coords[key[0]-'x'] = true
			*numField(j, key), err = y.Float(v, key)
		case "point":
			point = true
			items, err := y.List(v, "point")
			if err != nil {
				return err
			}
			if len(items) != 3 {
				return y.Errorf(v, "point: want [x, y, z], got %d values", len(items))
			}
			for i, c := range []string{"x", "y", "z"} {
				if *numField(j, c), err = y.Float(items[i], "point"); err != nil {
					return err
				}
			}
		case "kind":
			var s string
			if s, err = y.String(v, "kind"); err == nil {
				if j.Kind, err = ParseKind(s); err != nil {
					err = y.Errorf(v, "kind: %w", err)
				}
			}
		case "parts":
			items, err := y.List(v, "parts")
			if err != nil {
				return err
			}
			for _, p := range items {
				id, err := y.Int(p, "parts")
				if err != nil {
					return err
				}
				if err := addPart(j, id); err != nil {
					return y.Errorf(p, "parts: %w", err)
				}
			}
		case "diameter", "washer", "hole":
			if tabular.IsNull(v) {
				return nil
			}
			size := numField(j, key)
			if *size, err = y.Float(v, key); err == nil && *size < 0 {
				err = y.Errorf(v, "%s: %g mm is negative", key, *size)
			}
		case "group":
			j.Group, err = y.String(v, "group")
		case "nx", "ny", "nz":
			if tabular.IsNull(v) {
				return nil
			}
			axisAt = v
			given[key[1]-'x'] = true
			axis[key[1]-'x'], err = y.Float(v, key)
		case "ground":
			if tabular.IsNull(v) {
				return nil
			}
			if b, berr := y.Bool(v, key); berr == nil {
				j.Ground = b
				return nil
			}
			var s string
			if s, err = y.String(v, key); err == nil {
				if j.Ground, err = ParseGround(s); err != nil {
					err = y.Errorf(v, "ground: %w", err)
				}
			}
		case "tags":
			err = y.Map(v, "tags", nil, func(tag string, _, tv *yaml.Node) error {
				s, err := y.String(tv, "tags: "+tag)
				if err != nil {
					return err
				}
				if j.Tags == nil {
					j.Tags = map[string]string{}
				}
				j.Tags[tag] = s
				return nil
			})
		}
		return err
	})
	if err != nil {
		return 0, err
	}
	if err := setAxis(j, axis, given); err != nil {
		return 0, y.Errorf(axisAt, "joint %q: %w", geom.Excerpt(j.ID), err)
	}
	switch {
	case idLine == 0:
		return 0, y.Errorf(it, "joint has no id")
	case point && (coords[0] || coords[1] || coords[2]):
		return 0, y.Errorf(it, "joint %q: give either point or x, y and z, not both", geom.Excerpt(j.ID))
	case !point && !(coords[0] && coords[1] && coords[2]):
		return 0, y.Errorf(it, "joint %q: no point (give point: [x, y, z] or x, y and z)", geom.Excerpt(j.ID))
	}
	return idLine, nil
}

// numField returns the number of j that a key or column names: x, y, z,
// diameter, washer or hole.
func numField(j *Joint, key string) *float64 {
	switch key {
	case "x":
		return &j.Point.X
	case "y":
		return &j.Point.Y
	case "z":
		return &j.Point.Z
	case "diameter":
		return &j.Diameter
	case "washer":
		return &j.Washer
	}
	return &j.Hole
}

// MaxJointIDLength bounds joint ids, bytes: ids are short labels a person
// reads ("W17", "RR-SW-01042"), repeated in every output and message
// (our choice: room for any naming scheme, and no megabyte ids).
const MaxJointIDLength = 256

// jointList collects the joints of one file and checks each as it comes.
type jointList struct {
	file   string
	joints []Joint
	idLine map[string]int
	warns  []InputWarning
	tags   []string // names of the columns or keys kept as free tags
}

func newJointList(file string) *jointList {
	return &jointList{file: file, idLine: map[string]int{}}
}

// add checks j and appends it; idLine is the line of its id.
func (l *jointList) add(j Joint, idLine int) error {
	switch {
	case j.ID == "":
		return geom.LineError(l.file, idLine, "joint id is empty")
	case !utf8.ValidString(j.ID):
		// Two ids that differ only in bytes that are not UTF-8 ("W\xff1",
		// "W\xfe1") would both be written as "W\ufffd1".
		return geom.LineError(l.file, idLine, "joint id %q is not valid UTF-8 text: save the list as UTF-8", geom.Excerpt(j.ID))
	case strings.ContainsFunc(j.ID, unicode.IsControl):
		return geom.LineError(l.file, idLine, "joint id %q holds a control character", geom.Excerpt(j.ID))
	case len(j.ID) > MaxJointIDLength:
		return geom.LineError(l.file, idLine, "joint id %q is %d bytes long, more than the %d a joint id may have", geom.Excerpt(j.ID), len(j.ID), MaxJointIDLength)
	case !utf8.ValidString(j.Group):
		return geom.LineError(l.file, j.Line, "joint %q: group %q is not valid UTF-8 text: save the list as UTF-8", j.ID, geom.Excerpt(j.Group))
	}
	for _, name := range slices.Sorted(maps.Keys(j.Tags)) {
		if v := j.Tags[name]; !utf8.ValidString(name) || !utf8.ValidString(v) {
			return geom.LineError(l.file, j.Line, "joint %q: tag %q = %q is not valid UTF-8 text: save the list as UTF-8", j.ID, geom.Excerpt(name), geom.Excerpt(v))
		}
	}
	if prev, dup := l.idLine[j.ID]; dup {
		return geom.LineError(l.file, idLine, "joint id %q given twice (lines %d and %d)", j.ID, prev, idLine)
	}
	l.idLine[j.ID] = idLine
	if j.Kind == Bolt {
		var missing []string
		for _, f := range []struct {
			name string
			v    float64
		}{{"diameter", j.Diameter}, {"washer", j.Washer}, {"hole", j.Hole}} {
			if !(f.v > 0) {
				missing = append(missing, f.name)
			}
		}
		switch {
		case len(missing) > 0:
			return geom.LineError(l.file, j.Line, "bolt %q: no %s given: a bolt needs its diameter, washer and hole (mm)", j.ID, strings.Join(missing, ", "))
		case j.Hole > 0 && j.Diameter > 0 && j.Hole < j.Diameter:
			return geom.LineError(l.file, j.Line, "bolt %q: hole diameter %g mm is smaller than the bolt diameter %g mm", j.ID, j.Hole, j.Diameter)
		case j.Washer > 0 && j.Washer <= max(j.Hole, j.Diameter):
			return geom.LineError(l.file, j.Line, "bolt %q: washer diameter %g mm is not larger than the hole or bolt diameter %g mm", j.ID, j.Washer, max(j.Hole, j.Diameter))
		}
	} else {
		if j.Washer > 0 || j.Hole > 0 {
			l.warns = append(l.warns, InputWarning{l.file, j.Line, fmt.Sprintf("spot weld %q: washer and hole apply to bolts and are ignored", j.ID)})
		}
		if r3.Norm2(j.Axis) > 0 || j.Ground {
			l.warns = append(l.warns, InputWarning{l.file, j.Line, fmt.Sprintf("spot weld %q: axis and ground apply to bolts and are ignored", j.ID)})
		}
	}
	l.joints = append(l.joints, j)
	return nil
}

// finish returns the list's warnings, with one for a list without joints.
//
// CSV and YAML lists agree on emptiness: a file with nothing in it (no
// CSV header, no YAML joints: key) is an input error, as nothing says it
// is a joint list at all: a failed export or the wrong file. A list that
// says it is one and holds no joints (a header without rows, joints: [])
// is read as empty, with a warning: a sub-assembly without welds yet is a
// plan like any other, but an empty one is worth a word.
func (l *jointList) finish() []InputWarning {
	if len(l.joints) == 0 {
		l.warns = append(l.warns, InputWarning{l.file, 0, "the list holds no joints"})
	}
	return l.warns
}

// CheckParts checks that every part id the joints list exists in m. It
// returns one input error, located at the first joint that names an
// unknown part, that lists every unknown id with the first joint naming
// it.
func CheckParts(js []Joint, m *geom.Mesh) error {
	type use struct {
		id int64
		j  *Joint
	}
	var unknown []use
	seen := map[int64]bool{}
	for i := range js {
		for _, id := range js[i].Parts {
			if _, ok := m.PartIndex(id); ok || seen[id] {
				continue
			}
			seen[id] = true
			unknown = append(unknown, use{id, &js[i]})
		}
	}
	if len(unknown) == 0 {
		return nil
	}
	first := unknown[0].j
	var b strings.Builder
	const show = 10
	for i, u := range unknown[:min(len(unknown), show)] {
		if i > 0 {
			b.WriteString(", ")
		}
		where := strconv.Itoa(u.j.Line)
		if u.j.File != first.File {
			where = u.j.File + ":" + where
		}
		fmt.Fprintf(&b, "%d (joint %q, line %s)", u.id, u.j.ID, where)
	}
	if len(unknown) > show {
		fmt.Fprintf(&b, " and %d more", len(unknown)-show)
	}
	return geom.LineError(first.File, first.Line, "unknown part ids in the joint list: %s", b.String())
}

// SortJoints sorts joints by id in natural order (see CompareIDs). The
// sort is stable, so joints with equal ids keep their order.
func SortJoints(js []Joint) {
	// Sorting indices and permuting once moves each (large) Joint once
	// instead of O(log n) times.
	idx := make([]int32, len(js))
	for i := range idx {
		idx[i] = int32(i)
	}
	slices.SortFunc(idx, func(a, b int32) int {
		if c := CompareIDs(js[a].ID, js[b].ID); c != 0 {
			return c
		}
		return cmp.Compare(a, b)
	})
	sorted := make([]Joint, len(js))
	for i, k := range idx {
		sorted[i] = js[k]
	}
	copy(js, sorted)
}

// CompareIDs compares joint ids in natural order and returns -1, 0 or +1.
// Runs of decimal digits compare by value ("W2" < "W10", "9" < "10"),
// everything else byte by byte; ids equal by value ("W7", "W007") fall
// back to plain string order, so the order is total and only equal
// strings compare 0.
func CompareIDs(a, b string) int {
	i, j := 0, 0
	for i < len(a) && j < len(b) {
		if idDigit(a[i]) && idDigit(b[j]) {
			ea, eb := idDigitsEnd(a, i), idDigitsEnd(b, j)
			na := strings.TrimLeft(a[i:ea], "0")
			nb := strings.TrimLeft(b[j:eb], "0")
			if len(na) != len(nb) {
				return cmp.Compare(len(na), len(nb))
			}
			if c := strings.Compare(na, nb); c != 0 {
				return c
			}
			i, j = ea, eb
			continue
		}
		if a[i] != b[j] {
			return cmp.Compare(a[i], b[j])
		}
		i++
		j++
	}
	if c := cmp.Compare(len(a)-i, len(b)-j); c != 0 {
		return c
	}
	return strings.Compare(a, b)
}

func idDigit(c byte) bool { return '0' <= c && c <= '9' }

func idDigitsEnd(s string, i int) int {
	for i < len(s) && idDigit(s[i]) {
		i++
	}
	return i
}

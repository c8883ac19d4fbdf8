package joints

import (
	"io"
	"path/filepath"

	"github.com/joinery-cae/joinery/geom"
)

// JointLists is the content of several joint lists, joined.
type JointLists struct {
	Joints   []Joint // in argument order, each list in file order
	Warnings []InputWarning
	// Tags names, for each list that has some, the columns (CSV) or tag
	// keys (YAML) kept as free tags, in argument order.
	Tags []ListTags
}

// ListTags names the free tags of one joint list: its CSV columns in
// header order, or its YAML tag keys sorted.
type ListTags struct {
	File    string
	Columns []string
}

// ReadJointLists reads several joint lists and joins them in argument
// order. A joint id used in two lists is an input error naming both.
func ReadJointLists(paths []string) (*JointLists, error) { return ReadJointListsDigest(paths, nil) }

// ReadJointListsDigest reads like ReadJointLists; when digest is not nil
// it is called with each list's path before the list is read, and the
// list's bytes go to the writer it returns (nil for none), so that the
// caller can hash its inputs as they stream in.
func ReadJointListsDigest(paths []string, digest func(path string) io.Writer) (*JointLists, error) {
	if i, j, ok := geom.SameFiles(paths); ok {
		if filepath.Clean(paths[i]) == filepath.Clean(paths[j]) {
			return nil, geom.FileError(paths[j], "joint list given twice")
		}
		return nil, geom.FileError(paths[j], "joint list given twice: the same file as %s", paths[i])
	}
	all := &JointLists{}
	first := map[string]*Joint{}
	for _, p := range paths {
		var w io.Writer
		if digest != nil {
			w = digest(p)
		}
		l, err := readJointList(p, w)
		if err != nil {
			return nil, err
		}
		js := l.joints
		all.Warnings = append(all.Warnings, l.warns...)
		if len(l.tags) > 0 {
			all.Tags = append(all.Tags, ListTags{File: p, Columns: l.tags})
		}
		for i := range js {
			if prev, dup := first[js[i].ID]; dup {
				return nil, geom.LineError(js[i].File, js[i].Line, "joint id %q already used at %s:%d", js[i].ID, prev.File, prev.Line)
			}
			first[js[i].ID] = &js[i]
		}
		all.Joints = append(all.Joints, js...)
	}
	return all, nil
}

package joints

import (
	"path/filepath"

	"github.com/joinery-cae/joinery/geom"
)

// ReadJointLists reads several joint lists and joins them in argument
// order. A joint id used in two lists is an input error naming both.
func ReadJointLists(paths []string) ([]Joint, []InputWarning, error) {
	var (
		all      []Joint
		warnings []InputWarning
	)
	first := map[string]*Joint{}
	seenPath := map[string]bool{}
	for _, p := range paths {
		if seenPath[filepath.Clean(p)] {
			return nil, nil, geom.FileError(p, "joint list given twice")
		}
		seenPath[filepath.Clean(p)] = true
		js, ws, err := ReadJoints(p)
		if err != nil {
			return nil, nil, err
		}
		warnings = append(warnings, ws...)
		for i := range js {
			if prev, dup := first[js[i].ID]; dup {
				return nil, nil, geom.LineError(js[i].File, js[i].Line, "joint id %q already used at %s:%d", js[i].ID, prev.File, prev.Line)
			}
			first[js[i].ID] = &js[i]
		}
		all = append(all, js...)
	}
	return all, warnings, nil
}

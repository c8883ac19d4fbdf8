package pipeline

import (
	"gopkg.in/yaml.v3"

	"github.com/joinery-cae/joinery/geom/meshio/tabular"
	"github.com/joinery-cae/joinery/joints"
)

// JobFlanges holds the settings of joinery flanges in a job file:
//
//	flanges:
//	  pitch: 30            # mm between welds, or table; none: no welds placed
//	  end_margin: 0        # mm from each end of a flange, 0 = one nugget diameter
//	  pairs: [[100, 200]]  # part pairs; none: every pair in contact
//
// The contact allowance, nugget rule, attachment and failure level come
// from the job's build settings.
type JobFlanges struct {
	Pitch     string     `yaml:"pitch,omitempty"`
	EndMargin *float64   `yaml:"end_margin,omitempty"`
	Pairs     [][2]int64 `yaml:"pairs,omitempty"`
}

// Apply copies the settings the job gave into o.
func (f *JobFlanges) Apply(o *joints.FlangeOptions) error {
	if f.Pitch != "" {
		p, err := joints.ParsePitch(f.Pitch)
		if err != nil {
			return err
		}
		o.Pitch = p
	}
	if f.EndMargin != nil {
		o.EndMargin = *f.EndMargin
	}
	if f.Pairs != nil {
		o.Pairs = f.Pairs
	}
	return nil
}

// readJobFlanges reads and checks the flanges map of a job.
func readJobFlanges(y tabular.YAML, n *yaml.Node, f *JobFlanges) error {
	return y.Map(n, "flanges", []string{"pitch", "end_margin", "pairs"}, func(key string, _, v *yaml.Node) (err error) {
		switch key {
		case "pitch":
			if f.Pitch, err = y.String(v, key); err != nil {
				return err
			}
			if _, err := joints.ParsePitch(f.Pitch); err != nil {
				return y.Errorf(v, "%w", err)
			}
		case "end_margin":
			var d float64
			if d, err = y.Float(v, key); err == nil && d < 0 {
				err = y.Errorf(v, "end_margin: %g mm is negative (0 means one nugget diameter)", d)
			}
			f.EndMargin = &d
		case "pairs":
			items, err := y.List(v, key)
			if err != nil {
				return err
			}
			f.Pairs = [][2]int64{}
			for _, it := range items {
				ids, err := y.List(it, "pairs")
				if err != nil {
					return err
				}
				if len(ids) != 2 {
					return y.Errorf(it, "pairs: want two part ids, as [100, 200], got %d", len(ids))
				}
				var p [2]int64
				for k := range 2 {
					if p[k], err = y.Int(ids[k], "pairs"); err != nil {
						return err
					}
				}
				if p[0] == p[1] {
					return y.Errorf(it, "pairs: a part does not pair with itself (%d, %d)", p[0], p[1])
				}
				f.Pairs = append(f.Pairs, p)
			}
		}
		return err
	})
}

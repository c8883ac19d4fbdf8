package pipeline

import (
	"fmt"
	"path/filepath"
	"slices"
	"strings"

	"gopkg.in/yaml.v3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/meshio/tabular"
	"github.com/joinery-cae/joinery/joints"
)

// DefaultMaxVariants bounds the number of variants of a sweep unless
// --max-variants or the job's max_variants says otherwise: a guard
// against an accidental explosion of the Cartesian product (our choice:
// 64 builds of a body are an afternoon's comparison, more is a mistake).
const DefaultMaxVariants = 64

// JobSweep holds the settings of joinery sweep in a job file:
//
//	sweep:
//	  vary:                       # in this order; the last varies fastest
//	    spot_dofs: [tx+ty+tz, [tx, ty, tz, rx, ry, rz]]
//	    attach: [interpolated, patch]
//	  max_variants: 64
//
// The keys of vary are the job keys of the build settings (VaryKeys);
// a degree-of-freedom set is a list or names joined by '+'.
type JobSweep struct {
	Vary        []Vary `yaml:"vary,omitempty"`
	MaxVariants *int   `yaml:"max_variants,omitempty"`
}

// Vary is one varied setting of a sweep: its key, as the flag names it
// ("spot-dofs"), and its values in order, each as the key's setter
// wrote it back (canonical: "tx+ty+tz").
type Vary struct {
	Key    string
	Values []string
}

// VaryKey is one setting a sweep can vary: its flag name, its job key,
// the builders whose connectors it changes, and set, which checks a
// value and sets it on a job's build settings the way the build flag
// does, returning the value as a variant's name writes it. Adding a key
// is adding one entry to VaryKeys.
type VaryKey struct {
	Flag, Job string
	// reads says which builders read the setting (its field of
	// joints.BuildOptions): variants that differ only in settings a
	// builder does not read share that builder's connectors (built once,
	// copied before ids are handed out). Mark a key read by every
	// builder that looks at its field, or variants would share what they
	// must not (TestSweepSharesOnlyWhatIsEqual checks it).
	reads builders
	set   func(b *JobBuild, v string) (string, error)
}

// builders names the connector builders of a build, as bits.
type builders uint8

const (
	spotBuilder builders = 1 << iota // joints/spot
	boltBuilder                      // joints/bolt
)

// VaryKeys lists the settings a sweep can vary, in the order the help
// lists them. A function, not a variable: no package-level state.
func VaryKeys() []VaryKey {
	return []VaryKey{
		{"spot-dofs", "spot_dofs", spotBuilder, setDOFs(func(b *JobBuild) *[]string { return &b.SpotDOFs })},
		{"attach", "attach", spotBuilder, setChoice(func(b *JobBuild) *string { return &b.Attach }, func(s string) error { _, err := joints.ParseAttach(s); return err })},
		{"links", "links", spotBuilder | boltBuilder, setChoice(func(b *JobBuild) *string { return &b.Links }, func(s string) error { _, err := joints.ParseLinkForm(s); return err })},
		{"nugget-rule", "nugget_rule", spotBuilder, setChoice(func(b *JobBuild) *string { return &b.NuggetRule }, func(s string) error { _, err := joints.ParseNuggetRule(s); return err })},
		{"bolt-dofs", "bolt_dofs", boltBuilder, setDOFs(func(b *JobBuild) *[]string { return &b.BoltDOFs })},
		{"bolt-coupling", "bolt_coupling", boltBuilder, setChoice(func(b *JobBuild) *string { return &b.BoltCoupling }, func(s string) error { _, err := joints.ParseBoltCoupling(s); return err })},
		{"shank", "shank", boltBuilder, setChoice(func(b *JobBuild) *string { return &b.Shank }, func(s string) error { _, err := joints.ParseShankForm(s); return err })},
		{"bolt-ring", "bolt_ring", boltBuilder, setChoice(func(b *JobBuild) *string { return &b.BoltRing }, func(s string) error { _, err := joints.ParseBoltRing(s); return err })},
	}
}

// setDOFs sets a degree-of-freedom list the way --spot-dofs does, and
// writes the value back as names joined by '+', in the order tx ty tz
// rx ry rz.
func setDOFs(field func(*JobBuild) *[]string) func(*JobBuild, string) (string, error) {
	return func(b *JobBuild, v string) (string, error) {
		d, err := joints.ParseDOFs(v)
		if err != nil {
			return "", err
		}
		*field(b) = []string{d.String()}
		return strings.Join(d.Names(), "+"), nil
	}
}

// setChoice sets a named choice checked by parse.
func setChoice(field func(*JobBuild) *string, parse func(string) error) func(*JobBuild, string) (string, error) {
	return func(b *JobBuild, v string) (string, error) {
		if err := parse(v); err != nil {
			return "", err
		}
		*field(b) = v
		return v, nil
	}
}

// lookupVaryKey finds a key by its flag name or its job key.
func lookupVaryKey(key string) (VaryKey, error) {
	keys := VaryKeys()
	for _, k := range keys {
		if key == k.Flag || key == k.Job {
			return k, nil
		}
	}
	names := make([]string, len(keys))
	for i, k := range keys {
		names[i] = k.Flag
	}
	return VaryKey{}, fmt.Errorf("unknown key %q (want one of %s)", geom.Excerpt(key), strings.Join(names, ", "))
}

// newVary checks the values of key and returns the Vary, its values in
// canonical form.
func newVary(key string, values []string) (Vary, error) {
	k, err := lookupVaryKey(key)
	if err != nil {
		return Vary{}, err
	}
	if len(values) == 0 {
		return Vary{}, fmt.Errorf("%s: no value given", k.Flag)
	}
	v := Vary{Key: k.Flag}
	for _, s := range values {
		c, err := k.set(&JobBuild{}, strings.TrimSpace(s))
		if err != nil {
			return Vary{}, fmt.Errorf("%s: %w", k.Flag, err)
		}
		if slices.Contains(v.Values, c) {
			return Vary{}, fmt.Errorf("%s: value %q given twice", k.Flag, geom.Excerpt(c))
		}
		v.Values = append(v.Values, c)
	}
	return v, nil
}

// ParseVary reads a --vary value, KEY=V1,V2[,...]: KEY a flag name or
// job key of VaryKeys, the values separated by ',', a degree-of-freedom
// set written with '+' (bolt-dofs=tx+ty+tz,tx+ty+tz+rx+ry+rz). Errors
// name the key and are usage errors.
func ParseVary(s string) (Vary, error) {
	key, vals, ok := strings.Cut(s, "=")
	if !ok || key == "" {
		return Vary{}, UsageError(fmt.Errorf("--vary %q: want KEY=VALUE,VALUE...", geom.Excerpt(s)))
	}
	var values []string
	if vals != "" {
		values = strings.Split(vals, ",")
	}
	v, err := newVary(strings.TrimSpace(key), values)
	if err != nil {
		return Vary{}, UsageError(fmt.Errorf("--vary: %w", err))
	}
	return v, nil
}

// readJobSweep reads and checks the sweep map of a job.
func readJobSweep(y tabular.YAML, n *yaml.Node, s *JobSweep) error {
	return y.Map(n, "sweep", []string{"vary", "max_variants"}, func(key string, _, v *yaml.Node) error {
		switch key {
		case "max_variants":
			m, err := y.Int(v, key)
			if err != nil {
				return err
			}
			if m < 1 || m > MaxMaxVariants {
				return y.Errorf(v, "max_variants: %d: want 1 to %d", m, MaxMaxVariants)
			}
			mi := int(m)
			s.MaxVariants = &mi
		case "vary":
			return y.Map(v, "sweep vary", nil, func(name string, k, vv *yaml.Node) error {
				items, err := y.List(vv, "vary "+name)
				if err != nil {
					return err
				}
				var values []string
				for _, it := range items {
					var val string
					if it.Kind == yaml.SequenceNode {
						var names []string
						if names, err = y.Strings(it, "vary "+name); err == nil {
							val = strings.Join(names, "+")
						}
					} else {
						val, err = y.String(it, "vary "+name)
					}
					if err != nil {
						return err
					}
					values = append(values, val)
				}
				vary, err := newVary(name, values)
				if err != nil {
					return y.Errorf(k, "sweep vary: %w", err)
				}
				if slices.ContainsFunc(s.Vary, func(o Vary) bool { return o.Key == vary.Key }) {
					return y.Errorf(k, "sweep vary: %s given twice", vary.Key)
				}
				s.Vary = append(s.Vary, vary)
				return nil
			})
		}
		return nil
	})
}

// SweepSuffix is appended to a build job's output directory to name the
// directory joinery sweep writes to when neither a flag nor a job with a
// sweep section names one: beside the build's set, not over it.
const SweepSuffix = "-sweep"

// SweepOut returns the default output directory of a sweep of job: the
// job's out when the job has a sweep section (a sweep job), else its out
// (or DefaultOut) with SweepSuffix appended.
func SweepOut(job *Job) string {
	out := job.Out
	if out == "" {
		out = DefaultOut
	}
	if len(job.Sweep.Vary) > 0 || job.Sweep.MaxVariants != nil {
		return out
	}
	return filepath.Clean(out) + SweepSuffix
}

// MaxMaxVariants is the most variants --max-variants may allow (our
// choice: beyond it the folders' numbers and the comparison stop being
// readable).
const MaxMaxVariants = 9999

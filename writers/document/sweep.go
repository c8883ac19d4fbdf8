package document

import (
	"cmp"
	"io"
	"math"
	"slices"
	"strconv"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/stiffness"
)

// The schemas and versions of a sweep's documents.
const (
	ManifestSchema  = "joinery/sweep-manifest"
	ManifestVersion = 1
	CompareSchema   = "joinery/sweep-compare"
	CompareVersion  = 1
)

// StiffnessNote says what the stiffness summary is and is not; it heads
// compare.txt and stands in compare.json.
const StiffnessNote = "Connection stiffness: a comparison aid with rigid sheets, not a model of the joints' real stiffness. " +
	"Every part is taken as rigid and every connector as a spring on the degrees of freedom it couples " +
	"(a spot weld as a Timoshenko beam of the nugget diameter and the sheets' contact length, " +
	"a bolt as its shank between the sheets' centres, a rigid shank 1000 times that beam); " +
	"in reality the sheets' bending near a weld or a bolt dominates. Only the ratios between variants mean something."

// Setting is one varied setting of a variant: its key (the flag's name)
// and value.
type Setting struct {
	Key   string `json:"key"`
	Value string `json:"value"`
}

// VaryDoc is one varied key and its values, in order.
type VaryDoc struct {
	Key    string   `json:"key"`
	Values []string `json:"values"`
}

// VariantRun is what a sweep knows of one variant, for its documents.
type VariantRun struct {
	Name     string // also its folder
	Settings []Setting
	RunID    string
	Result   *joints.Result
	Files    []SetFile
	Pairs    []stiffness.Pair
}

// ManifestDoc is a sweep's manifest.json (see
// schema/sweep-manifest.schema.json).
type ManifestDoc struct {
	Schema    string    `json:"schema"`
	Version   int       `json:"version"`
	Generator string    `json:"generator"`
	RunID     string    `json:"run_id"`
	Caution   string    `json:"caution"`
	Inputs    Inputs    `json:"inputs"`
	Vary      []VaryDoc `json:"vary"`
	// Moving counts the variants flagged for a mechanism or an
	// unrestrained freedom.
	Moving   int          `json:"moving_variants"`
	Variants []VariantDoc `json:"variants"`
}

// VariantDoc is one variant of the manifest.
type VariantDoc struct {
	Name   string `json:"name"`
	Folder string `json:"folder"`
	RunID  string `json:"run_id"`
	// Settings are the varied settings, in the order of vary.
	Settings []Setting `json:"settings"`
	Counts   Counts    `json:"counts"`
	// Moves is true when the variant's connectors leave a mechanism or an
	// unrestrained freedom (the kinematic checks' counts below).
	Moves        bool      `json:"moves"`
	Mechanisms   int       `json:"mechanism_motions"`
	Unrestrained int       `json:"unrestrained_motions"`
	Files        []SetFile `json:"files"`
}

// Counts are a variant's connectors and findings in numbers.
type Counts struct {
	Joints  int            `json:"joints"`
	ByState map[string]int `json:"by_state"`
	ByKind  map[string]int `json:"by_kind"`
	// ByDOFs counts the connectors made (built or flagged) by the degrees
	// of freedom they couple ("tx,ty,tz").
	ByDOFs     map[string]int `json:"by_dofs"`
	BySeverity map[string]int `json:"by_severity"`
	ByCode     map[string]int `json:"by_code"`
}

func countsOf(r *joints.Result) Counts {
	s := Summarize(r)
	c := Counts{Joints: s.Joints, ByState: s.ByState, ByKind: s.ByKind, ByDOFs: map[string]int{}, BySeverity: s.BySev, ByCode: s.ByCode}
	for _, cn := range r.Connectors {
		if cn.Status != joints.NotBuilt {
			c.ByDOFs[cn.DOFs.String()]++
		}
	}
	return c
}

func moves(r *joints.Result) (bool, int, int) {
	if r.Kinematics == nil {
		return false, 0, 0
	}
	k := r.Kinematics
	return k.Mechanisms > 0 || k.Unrestrained > 0, k.Mechanisms, k.Unrestrained
}

// NewManifest returns the manifest of a sweep of runs, with the sweep's
// run id and the inputs of info.
func NewManifest(runs []VariantRun, vary []VaryDoc, info RunInfo) *ManifestDoc {
	doc := &ManifestDoc{Schema: ManifestSchema, Version: ManifestVersion, Generator: info.Generator, RunID: info.RunID,
		Caution: Caution, Inputs: info.inputs(), Vary: vary, Variants: []VariantDoc{}}
	for _, r := range runs {
		m, mech, unr := moves(r.Result)
		if m {
			doc.Moving++
		}
		doc.Variants = append(doc.Variants, VariantDoc{Name: r.Name, Folder: r.Name, RunID: r.RunID, Settings: r.Settings,
			Counts: countsOf(r.Result), Moves: m, Mechanisms: mech, Unrestrained: unr, Files: r.Files})
	}
	return doc
}

// EncodeManifest writes the manifest as indented JSON.
func EncodeManifest(w io.Writer, doc *ManifestDoc) error { return EncodeJSON(w, doc) }

// DecodeManifest reads a manifest; name is the file's name, for errors.
func DecodeManifest(r io.Reader, name string) (*ManifestDoc, error) {
	var doc ManifestDoc
	if err := decode(r, name, ManifestSchema, ManifestVersion, &doc); err != nil {
		return nil, err
	}
	return &doc, nil
}

// CompareDoc is a sweep's compare.json (see
// schema/sweep-compare.schema.json): the variants side by side.
type CompareDoc struct {
	Schema    string           `json:"schema"`
	Version   int              `json:"version"`
	Generator string           `json:"generator"`
	RunID     string           `json:"run_id"`
	Caution   string           `json:"caution"`
	Stiffness string           `json:"stiffness_note"`
	Units     CompareUnits     `json:"units"`
	Variants  []CompareVariant `json:"variants"`
	// Pairs are the part pairs any variant ties, those that change most
	// between variants first (see ComparePair.Change).
	Pairs []ComparePair `json:"pairs"`
}

// CompareUnits are the units of the stiffnesses (always N and mm,
// whatever the inputs' unit) and of the centroids (the inputs').
type CompareUnits struct {
	Translational string `json:"translational"`
	Rotational    string `json:"rotational"`
	Length        string `json:"length"`
}

// CompareVariant is one variant's column of the comparison.
type CompareVariant struct {
	Name         string         `json:"name"`
	Settings     []Setting      `json:"settings"`
	ByKind       map[string]int `json:"by_kind"`
	ByState      map[string]int `json:"by_state"`
	ByDOFs       map[string]int `json:"by_dofs"`
	ByCode       map[string]int `json:"by_code"`
	Moves        bool           `json:"moves"`
	Mechanisms   int            `json:"mechanism_motions"`
	Unrestrained int            `json:"unrestrained_motions"`
}

// ComparePair is one part pair's stiffness in every variant.
type ComparePair struct {
	A, B  int64    `json:"-"`
	Parts []int64  `json:"parts"`
	Names []string `json:"names"`
	// Change is the largest |ln ratio| of any principal stiffness of any
	// variant against the first, null when a stiffness goes from zero to
	// non-zero or back (an infinite change).
	Change   *float64           `json:"change"`
	Variants []PairStiffnessDoc `json:"variants"`
}

// PairStiffnessDoc is a pair's stiffness in one variant: principal
// stiffnesses ascending, and their ratios to the first variant's (null
// where the first's is zero and this one's is not).
type PairStiffnessDoc struct {
	Variant            string      `json:"variant"`
	Springs            int         `json:"springs"`
	Material           string      `json:"material"`
	Centroid           *Vec        `json:"centroid"`
	Translational      [3]float64  `json:"translational"`
	Rotational         [3]float64  `json:"rotational"`
	RatioTranslational [3]*float64 `json:"ratio_translational"`
	RatioRotational    [3]*float64 `json:"ratio_rotational"`
}

// sig6 rounds v to 6 significant digits, so that the documents hold
// what the arithmetic can vouch for and read the same on every machine.
func sig6(v float64) float64 {
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', 6, 64), 64)
	return r
}

// ratio returns v/first rounded to 6 significant digits, 1 when both
// are zero, nil when only first is.
func ratio(v, first float64) *float64 {
	var r float64
	switch {
	case first == 0 && v == 0:
		r = 1
	case first == 0:
		return nil
	default:
		r = sig6(v / first)
	}
	return &r
}

// NewCompare returns the comparison of a sweep's runs. names gives part
// names by id; lengths of centroids go out in unit.
func NewCompare(runs []VariantRun, info RunInfo) *CompareDoc {
	doc := &CompareDoc{Schema: CompareSchema, Version: CompareVersion, Generator: info.Generator, RunID: info.RunID,
		Caution: Caution, Stiffness: StiffnessNote, Units: CompareUnits{Translational: "N/mm", Rotational: "N mm/rad", Length: info.Unit.String()},
		Variants: []CompareVariant{}, Pairs: []ComparePair{}}
	for _, r := range runs {
		c := countsOf(r.Result)
		m, mech, unr := moves(r.Result)
		doc.Variants = append(doc.Variants, CompareVariant{Name: r.Name, Settings: r.Settings, ByKind: c.ByKind, ByState: c.ByState,
			ByDOFs: c.ByDOFs, ByCode: c.ByCode, Moves: m, Mechanisms: mech, Unrestrained: unr})
	}
	// Every pair any variant ties, each variant's summary or zero.
	keys := map[[2]int64]bool{}
	for _, r := range runs {
		for _, p := range r.Pairs {
			keys[[2]int64{p.A, p.B}] = true
		}
	}
	var order [][2]int64
	for k := range keys {
		order = append(order, k)
	}
	slices.SortFunc(order, joints.ComparePairs)
	for _, k := range order {
		cp := ComparePair{A: k[0], B: k[1], Parts: []int64{k[0], k[1]}, Names: []string{info.PartNames[k[0]], info.PartNames[k[1]]}}
		change := 0.0
		var first stiffness.Pair
		for i, r := range runs {
			var p stiffness.Pair
			if j, ok := slices.BinarySearchFunc(r.Pairs, k, func(p stiffness.Pair, k [2]int64) int { return joints.ComparePairs([2]int64{p.A, p.B}, k) }); ok {
				p = r.Pairs[j]
			}
			if i == 0 {
				first = p
			}
			d := PairStiffnessDoc{Variant: r.Name, Springs: p.Springs, Material: p.Material}
			if p.Springs > 0 {
				v := toVec(p.Centroid, info.Unit)
				d.Centroid = &v
			} else {
				d.Material = ""
			}
			for a := range 3 {
				d.Translational[a], d.Rotational[a] = sig6(p.Translational[a]), sig6(p.Rotational[a])
				// The ratios of the values as computed, rounded once: of
				// the rounded values they would be off in their sixth
				// digit (0.640001 for the (4/5)^2 of two nuggets).
				d.RatioTranslational[a] = ratio(p.Translational[a], first.Translational[a])
				d.RatioRotational[a] = ratio(p.Rotational[a], first.Rotational[a])
				for _, q := range []*float64{d.RatioTranslational[a], d.RatioRotational[a]} {
					if q == nil || *q == 0 {
						change = math.Inf(1)
					} else {
						change = math.Max(change, math.Abs(math.Log(*q)))
					}
				}
			}
			cp.Variants = append(cp.Variants, d)
		}
		if !math.IsInf(change, 1) {
			c := sig6(change)
			cp.Change = &c
		}
		doc.Pairs = append(doc.Pairs, cp)
	}
	// Infinite changes first, then the largest; ties by part ids.
	slices.SortStableFunc(doc.Pairs, func(x, y ComparePair) int {
		return cmp.Compare(changeKey(y.Change), changeKey(x.Change))
	})
	return doc
}

func changeKey(c *float64) float64 {
	if c == nil {
		return math.Inf(1)
	}
	return *c
}

// EncodeCompare writes the comparison as indented JSON.
func EncodeCompare(w io.Writer, doc *CompareDoc) error { return EncodeJSON(w, doc) }

// toVec converts a point from mm to unit u, rounded like the
// stiffnesses.
func toVec(v r3.Vec, u joints.Unit) Vec {
	w := vecIn(vecOf(v), u.MM())
	return Vec{clean(sig6(w[0])), clean(sig6(w[1])), clean(sig6(w[2]))}
}

package pipeline

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"runtime"
	"slices"
	"strings"
	"sync"

	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/spot"
	"github.com/joinery-cae/joinery/joints/stiffness"
	"github.com/joinery-cae/joinery/writers"
	"github.com/joinery-cae/joinery/writers/document"
	"github.com/joinery-cae/joinery/writers/html"
)

// SweepSettings are a sweep's settings: the build settings every
// variant starts from, the varied settings and the bound on the
// variants' number.
type SweepSettings struct {
	Build       BuildSettings
	Vary        []Vary
	MaxVariants int
	Out         string
}

// SweepSettings reads and checks the job's sweep settings. vary, when
// not empty, replaces the job's sweep vary list (flags win), and
// maxVariants, when above 0, its max_variants. The sweep writes into
// SweepOut(job) unless OutGiven. Errors are usage errors.
func (job *Job) SweepSettings(vary []Vary, maxVariants int) (SweepSettings, error) {
	b, err := job.BuildSettings()
	if err != nil {
		return SweepSettings{}, err
	}
	s := SweepSettings{Build: b, Vary: job.Sweep.Vary, MaxVariants: DefaultMaxVariants, Out: b.Out}
	if !job.OutGiven {
		s.Out = SweepOut(job)
	}
	if len(vary) > 0 {
		s.Vary = vary
	}
	bound := "the default bound" // what set the bound, for the message
	if job.Sweep.MaxVariants != nil {
		s.MaxVariants, bound = *job.Sweep.MaxVariants, "the job's max_variants"
	}
	if maxVariants > MaxMaxVariants {
		// Bounded as the job's max_variants is: the most a sweep builds
		// (a larger bound once let a larger product through, of which
		// Variants built the first MaxMaxVariants+1).
		return s, UsageError(fmt.Errorf("--max-variants %d: want 1 to %d (0 for the default)", maxVariants, MaxMaxVariants))
	}
	if maxVariants > 0 {
		s.MaxVariants, bound = maxVariants, "--max-variants"
	}
	if len(s.Vary) == 0 {
		return s, UsageError(errors.New("nothing to vary: give --vary KEY=V1,V2 or a sweep: vary: section in the job file"))
	}
	seen := map[string]bool{}
	for _, v := range s.Vary {
		if seen[v.Key] {
			return s, UsageError(fmt.Errorf("--vary %s given twice", v.Key))
		}
		seen[v.Key] = true
	}
	if n := s.count(); n > s.MaxVariants {
		return s, UsageError(fmt.Errorf("%s make %d variants, more than %s %d: vary fewer settings or values, or raise --max-variants",
			s.product(), n, bound, s.MaxVariants))
	}
	return s, nil
}

// count returns the number of variants, the product of the value
// counts, saturating at countCap (far above MaxMaxVariants: a product
// that large is refused, never built in part).
func (s *SweepSettings) count() int {
	n := 1
	for _, v := range s.Vary {
		n *= len(v.Values)
		if n > countCap {
			return countCap
		}
	}
	return n
}

// countCap bounds count, so that no product of value counts overflows
// (each factor is below it too: a key has at most 63 distinct values).
const countCap = 1 << 30

// product says how the variants' number comes about: "3 x 2 values of
// attach and links".
func (s *SweepSettings) product() string {
	counts, keys := make([]string, len(s.Vary)), make([]string, len(s.Vary))
	for i, v := range s.Vary {
		counts[i], keys[i] = fmt.Sprint(len(v.Values)), v.Key
	}
	return strings.Join(counts, " x ") + " values of " + strings.Join(keys, ", ")
}

// Variant is one build of a sweep.
type Variant struct {
	// Name is its folder's name: its number from 01 and its settings,
	// "03-spot-dofs=tx+ty+tz-attach=patch".
	Name     string
	Settings []document.Setting
	Job      *Job // the job with the variant's settings
	Build    BuildSettings
	// shareKey, per builder, names the variant's values of the varied
	// settings the builder reads: variants with the same key share its
	// connectors.
	shareKey map[builders]string
}

// Variants returns the Cartesian product of the varied values, the
// last varied setting changing fastest, each applied over job's build
// settings as its flag would be.
func (s *SweepSettings) Variants(job *Job) ([]Variant, error) {
	n := s.count()
	if n > MaxMaxVariants {
		return nil, UsageError(fmt.Errorf("%s make %d variants, more than %d, the most a sweep builds", s.product(), n, MaxMaxVariants))
	}
	width := max(2, len(fmt.Sprint(n)))
	out := make([]Variant, 0, n)
	for i := range n {
		vj := *job
		var settings []document.Setting
		names := []string{fmt.Sprintf("%0*d", width, i+1)}
		share := map[builders]string{spotBuilder: "", boltBuilder: ""}
		rest := i
		idx := make([]int, len(s.Vary))
		for k := len(s.Vary) - 1; k >= 0; k-- {
			idx[k] = rest % len(s.Vary[k].Values)
			rest /= len(s.Vary[k].Values)
		}
		for k, v := range s.Vary {
			key, err := lookupVaryKey(v.Key)
			if err != nil {
				return nil, UsageError(err)
			}
			val, err := key.set(&vj.Build, v.Values[idx[k]])
			if err != nil {
				return nil, UsageError(fmt.Errorf("%s: %w", v.Key, err))
			}
			settings = append(settings, document.Setting{Key: v.Key, Value: val})
			names = append(names, v.Key+"="+val)
			for b := range share {
				if key.reads&b != 0 {
					share[b] += fmt.Sprintf("%s=%q ", v.Key, val)
				}
			}
		}
		b, err := vj.BuildSettings()
		if err != nil {
			return nil, err
		}
		b.NoPage, b.NoCheck = s.Build.NoPage, s.Build.NoCheck
		out = append(out, Variant{Name: strings.Join(names, "-"), Settings: settings, Job: &vj, Build: b, shareKey: share})
	}
	return out, nil
}

// SweepFiles are the names of the files a sweep writes beside its
// variants' folders, in order.
func SweepFiles() []string {
	return []string{"manifest.json", "manifest.yaml", "compare.json", "compare.txt", "compare.csv", "report.html"}
}

// SweepOutcome is what a command reports of a sweep.
type SweepOutcome struct {
	Out      string
	RunID    string
	Files    []string
	Manifest *document.ManifestDoc
	Compare  *document.CompareDoc
	// Reached is set when the findings of some variant reached its
	// failure level.
	Reached bool
}

// variantRun is one variant built.
type variantRun struct {
	run     document.VariantRun
	reached bool
}

// Sweep runs a sensitivity sweep: load and index the job's inputs once,
// build every variant (in parallel, as many at once as there are
// processors), check and render each as a plain build would, and write
// the whole as one set into s.Out: a folder per variant holding its
// build's set, and beside them the manifest and the comparison.
func Sweep(ctx context.Context, job *Job, s SweepSettings, env Env) (*SweepOutcome, error) {
	if len(job.Joints) == 0 {
		return nil, UsageError(errors.New("no joint list given: name one with --joints or in the job file's joints"))
	}
	variants, err := s.Variants(job)
	if err != nil {
		return nil, err
	}
	out, err := OpenOutput(s.Out)
	if err != nil {
		return nil, err
	}
	defer out.Close()
	in, err := LoadForSet(ctx, job, env)
	if err != nil {
		return nil, err
	}
	if err := in.missingThickness(); err != nil {
		return nil, err
	}
	var outline *html.Outline
	var outlineDone sync.WaitGroup
	if !s.Build.NoPage {
		outlineDone.Go(func() { outline = html.NewOutline(in.Model.Mesh) })
	}
	prog := env.progress()
	prog.Start("indexing elements", 0)
	opts := make([]joints.BuildOptions, len(variants))
	for i, v := range variants {
		opts[i] = v.Build.Options
	}
	in.index = IndexFor(in.Model.Mesh, in.Joints, opts)
	in.stacks = &spot.Stacks{}
	in.shared = newSharedBuilds(variants)
	prog.Done()

	material := partMaterials(in)
	runs := make([]variantRun, len(variants))
	errs := make([]error, len(variants))
	var mu sync.Mutex
	prog.Start("building variants", int64(len(variants)))
	// As many variants are built at once as there are processors; each
	// renders its files straight into its folder of the set's temporary
	// directory (out.WriteNestedFiles, synced), so that no variant's
	// files stay in memory and memory stays bounded whatever the number
	// of variants; the swap comes once every variant is on disk.
	sem := make(chan struct{}, max(1, min(runtime.GOMAXPROCS(0), len(variants))))
	var wg sync.WaitGroup
	for i := range variants {
		wg.Go(func() {
			sem <- struct{}{}
			defer func() { <-sem }()
			if ctx.Err() != nil {
				errs[i] = ctx.Err()
				return
			}
			v := &variants[i]
			r, files, err := buildVariant(ctx, in, v, material, env, func() *html.Outline { outlineDone.Wait(); return outline })
			if err == nil {
				r.run.Files, err = out.WriteNestedFiles(v.Name, writers.Set{Job: "build", Generator: env.Generator, RunID: r.run.RunID}, files)
			}
			runs[i], errs[i] = r, err
			mu.Lock()
			prog.Add(1)
			mu.Unlock()
		})
	}
	wg.Wait()
	prog.Done()
	if err := errors.Join(errs...); err != nil {
		if ctx.Err() != nil {
			return nil, ctx.Err()
		}
		return nil, err
	}
	outlineDone.Wait()

	var vr []document.VariantRun
	set := writers.Set{Job: "sweep", Generator: env.Generator}
	outcome := &SweepOutcome{Out: s.Out, Files: SweepFiles()}
	for _, r := range runs {
		vr = append(vr, r.run)
		outcome.Reached = outcome.Reached || r.reached
	}
	// The sweep's record of its inputs is its first variant's; its run id
	// is its own.
	info, err := in.RunInfo(env.Generator, runs[0].run.Result, RunSettings{Command: "build", NoCheck: s.Build.NoCheck, NoPage: s.Build.NoPage})
	if err != nil {
		return nil, err
	}
	info.RunID = sweepRunID(env.Generator, s, vr)
	vary := make([]document.VaryDoc, len(s.Vary))
	for i, v := range s.Vary {
		vary[i] = document.VaryDoc{Key: v.Key, Values: v.Values}
	}
	man := document.NewManifest(vr, vary, info)
	cmpDoc := document.NewCompare(vr, info)
	files := []writers.File{
		{Name: "manifest.json", Render: func(w io.Writer) error { return document.EncodeManifest(w, man) }},
		{Name: "manifest.yaml", Render: func(w io.Writer) error { return writers.WriteManifestYAML(w, man) }},
		{Name: "compare.json", Render: func(w io.Writer) error { return document.EncodeCompare(w, cmpDoc) }},
		{Name: "compare.txt", Render: func(w io.Writer) error { return writers.WriteCompareText(w, cmpDoc) }},
		{Name: "compare.csv", Render: func(w io.Writer) error { return writers.WriteCompareCSV(w, cmpDoc) }},
	}
	if !s.Build.NoPage {
		files = append(files, writers.File{Name: "report.html", Render: func(w io.Writer) error {
			return html.Render(w, html.ForSweep(man, cmpDoc))
		}})
	} else {
		outcome.Files = outcome.Files[:len(outcome.Files)-1]
	}
	set.RunID = info.RunID
	if err := writeSet(env.progress(), out, set, files); err != nil {
		return nil, err
	}
	outcome.RunID, outcome.Manifest, outcome.Compare = info.RunID, man, cmpDoc
	return outcome, nil
}

// buildVariant builds and checks one variant as Build would, on the
// sweep's shared inputs and index, and returns it with the files of its
// set, to render.
func buildVariant(ctx context.Context, shared *Inputs, v *Variant, material func(int64) stiffness.Material, env Env,
	outline func() *html.Outline) (variantRun, []writers.File, error) {
	in := *shared
	in.Job = v.Job
	in.shareKey = v.shareKey
	quiet := Env{Generator: env.Generator} // progress and notes come from the sweep
	res, err := BuildConnectors(ctx, &in, v.Build.Options, quiet)
	if err != nil {
		return variantRun{}, nil, fmt.Errorf("variant %s: %w", v.Name, err)
	}
	if !v.Build.NoCheck {
		if err := CheckConnectors(ctx, &in, res, quiet); err != nil {
			return variantRun{}, nil, fmt.Errorf("variant %s: %w", v.Name, err)
		}
	}
	info, err := in.RunInfo(env.Generator, res, RunSettings{Command: "build", NoCheck: v.Build.NoCheck, NoPage: v.Build.NoPage})
	if err != nil {
		return variantRun{}, nil, err
	}
	conn := document.NewConnectors(in.Model.Mesh, res, info)
	rep := document.NewReport(res, info)
	files := buildFiles(conn, rep)
	if !v.Build.NoPage {
		files = append(files, writers.File{Name: "report.html", Render: func(w io.Writer) error {
			return html.Render(w, html.ForBuild(rep, conn, outline()))
		}})
	}
	r := variantRun{reached: v.Build.Fail && res.Reached(v.Build.FailOn)}
	r.run = document.VariantRun{Name: v.Name, Settings: v.Settings, RunID: info.RunID, Result: summaryResult(res),
		Pairs: stiffness.Pairs(res.Connectors, material)}
	return r, files, nil
}

// summaryResult returns what the manifest and the comparison read of a
// variant's result (document.NewManifest, NewCompare: the connectors'
// joints, states, stacks and degrees of freedom, the findings, the
// kinematic counts, the options), without the connectors' ends, links
// and own findings, which every variant would otherwise keep in memory
// until the sweep's end: on a body, tens of megabytes a variant.
func summaryResult(r *joints.Result) *joints.Result {
	s := *r
	s.Connectors = make([]joints.Connector, len(r.Connectors))
	for i := range r.Connectors {
		c := &r.Connectors[i]
		s.Connectors[i] = joints.Connector{Joint: c.Joint, Status: c.Status, Stack: c.Stack, DOFs: c.DOFs, Attach: c.Attach}
	}
	return &s
}

// sharedBuilds keeps the connectors each builder made for a sweep's
// variants, by builder and share key (Variant.shareKey): a builder's
// connectors depend only on the inputs, the index and the settings it
// reads, which the variants of one key have in common.
type sharedBuilds struct {
	mu    sync.Mutex
	built map[shareID]*builtConns
}

// newSharedBuilds returns the shared builds of variants, each knowing
// how many variants take it, so that it is dropped once the last one
// has its copy.
func newSharedBuilds(variants []Variant) *sharedBuilds {
	sh := &sharedBuilds{built: map[shareID]*builtConns{}}
	for _, v := range variants {
		for b, key := range v.shareKey {
			id := shareID{b, key}
			if sh.built[id] == nil {
				sh.built[id] = &builtConns{}
			}
			sh.built[id].users++
		}
	}
	return sh
}

type shareID struct {
	b   builders
	key string
}

// builtConns is one builder's connectors, built once.
type builtConns struct {
	once  sync.Once
	conns []joints.Connector
	err   error
	users int // variants still to take a copy; guarded by sharedBuilds.mu
}

// buildShared returns the connectors builder b makes with build: in a
// sweep (in.shared set), built once per share key and copied for each
// variant, as joints.NewResult then sorts them and hands out ids in
// place; otherwise build's own.
func (in *Inputs) buildShared(b builders, build func() ([]joints.Connector, error)) ([]joints.Connector, error) {
	if in.shared == nil || in.shareKey == nil {
		return build()
	}
	sh := in.shared
	id := shareID{b, in.shareKey[b]}
	sh.mu.Lock()
	bc := sh.built[id]
	sh.mu.Unlock()
	if bc == nil {
		return nil, fmt.Errorf("pipeline: no shared build for %v", id) // a variant not of the sweep: a bug
	}
	bc.once.Do(func() { bc.conns, bc.err = build() })
	if bc.err != nil {
		return nil, bc.err
	}
	conns := cloneConnectors(bc.conns)
	sh.mu.Lock()
	if bc.users--; bc.users == 0 {
		bc.conns = nil // the last variant of the key has its copy
	}
	sh.mu.Unlock()
	return conns, nil
}

// cloneConnectors copies connectors deep enough for joints.NewResult and
// the checks to change the copy alone: the slice, the links (ids are
// written into them) and the findings; the ends, the stack and the
// bolt's data are only read after a builder made them.
func cloneConnectors(cs []joints.Connector) []joints.Connector {
	out := slices.Clone(cs)
	for i := range out {
		c := &out[i]
		c.Links = slices.Clone(c.Links)
		c.Findings = slices.Clone(c.Findings)
		c.EndIDs = slices.Clone(c.EndIDs)
	}
	return out
}

// partMaterials returns the material of each part, from the parts
// table's material (stiffness.MaterialOf; steel when none).
func partMaterials(in *Inputs) func(int64) stiffness.Material {
	m := map[int64]stiffness.Material{}
	for _, p := range in.Model.Mesh.Parts {
		m[p.ID] = stiffness.MaterialOf(p.Material)
	}
	return func(id int64) stiffness.Material {
		if mat, ok := m[id]; ok {
			return mat
		}
		return stiffness.Steel()
	}
}

// sweepRunIDVersion names the recipe of sweepRunID.
const sweepRunIDVersion = "joinery sweep run id 1"

// sweepRunID returns the run id of a sweep: the first 16 bytes, in hex,
// of a SHA-256 over the recipe's version, the generator, the varied
// settings and every variant's name and run id (which covers its inputs
// and its settings as resolved, by runID's rule). The varied keys and
// values enter as given, since they name the variants' folders and the
// manifest records them; the bound on the variants' number
// (max_variants) does not, as it changes no output.
func sweepRunID(generator string, s SweepSettings, runs []document.VariantRun) string {
	h := sha256.New()
	fmt.Fprintf(h, "%s\ngenerator %q\n", sweepRunIDVersion, generator)
	for _, v := range s.Vary {
		fmt.Fprintf(h, "vary %q %q\n", v.Key, v.Values)
	}
	for _, r := range runs {
		fmt.Fprintf(h, "variant %q %s\n", r.Name, r.RunID)
	}
	return hex.EncodeToString(h.Sum(nil)[:document.RunIDLen/2])
}

// Summary is the few lines a sweep prints on stdout.
func (o *SweepOutcome) Summary(w io.Writer) error {
	return writers.WriteSweepSummary(w, o.Manifest, o.Out, o.Files)
}

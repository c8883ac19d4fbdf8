package main

import (
	"bytes"
	"encoding/json"
	"maps"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/writers/document"
)

// stackedModel writes a small hand-made model into dir and returns its
// job file: a lower (1, 1 mm) and a middle sheet (2, 1.5 mm) 100 x 40
// mm in contact, an upper sheet (3, 0.8 mm) over their right half, 0.02
// mm off contact, and an aluminium doubler (4, 2 mm) under their left
// 30 mm, all meshed at 5 mm; five welds through the doubler, lower and
// middle sheets (one of a group the job attaches by node pair), five
// through the lower, middle and upper sheets (one with a listed
// nugget), one 1 mm from the edge, one with listed parts, a bolt
// through three sheets, one through the doubler, lower and middle
// sheets, and one grounded.
func stackedModel(t *testing.T, dir string) string {
	t.Helper()
	writeLines(t, filepath.Join(dir, "model.jmesh"), jmesh([]sheet{
		{part: 1, t: 1, z: 0, nx: 20, ny: 8, h: 5, base: 10000},
		{part: 2, t: 1.5, z: 1.25, nx: 20, ny: 8, h: 5, base: 20000},
		{part: 3, t: 0.8, z: 2.42, x0: 50, nx: 10, ny: 8, h: 5, base: 30000},
		{part: 4, t: 2, z: -1.5, nx: 6, ny: 8, h: 5, base: 40000}}))
	writeLines(t, filepath.Join(dir, "parts.yaml"), []string{"parts:",
		"  - id: 1", "    name: lower", "    thickness: 1",
		"  - id: 2", "    name: middle", "    thickness: 1.5",
		"  - id: 3", "    name: upper", "    thickness: 0.8",
		"  - id: 4", "    name: doubler", "    thickness: 2", "    material: EN AW-5754"})
	writeLines(t, filepath.Join(dir, "joints.csv"), []string{"id,x,y,z,kind,parts,diameter,group,washer,hole,nx,ny,nz,ground",
		"w0,7,20,0.6,spot,,,,,,,,,", "w1,17,20,0.6,spot,,,,,,,,,", "w2,27,20,0.6,spot,,,,,,,,,", "w3,37,20,0.6,spot,,,g,,,,,,",
		"w4,47,20,0.6,spot,,,,,,,,,",
		"t0,57.5,12.5,1.3,spot,,,,,,,,,", "t1,67.5,12.5,1.3,spot,,,,,,,,,", "t2,77.5,12.5,1.3,spot,,6,,,,,,,",
		"t3,87.5,12.5,1.3,spot,,,,,,,,,", "t4,97,12.5,1.3,spot,,,,,,,,,",
		"e1,42,1,0.6,spot,,,,,,,,,", `l1,22,30,0.6,spot,"1;2",,,,,,,,`,
		"b1,72.5,30,1.2,bolt,,8,,16,9,,,,", "b2,12.5,10,0.5,bolt,,6,,12,6.6,,,,", "b3,35,30,0.5,bolt,,8,,16,9,0,0,-1,yes"})
	return writeLines(t, filepath.Join(dir, "job.yaml"), []string{"version: 1", "meshes: [model.jmesh]", "parts: parts.yaml",
		"joints: [joints.csv]", "build:", "  groups:", "    g:", "      attach: node-pair"})
}

// settingsFlags returns a variant's settings as build flags, a set of
// degrees of freedom written as the build flag takes it.
func settingsFlags(ss []document.Setting) []string {
	var flags []string
	for _, s := range ss {
		flags = append(flags, "--"+s.Key, strings.ReplaceAll(s.Value, "+", ","))
	}
	return flags
}

// sameTree reports every file that differs between the trees got and
// want, by name.
func sameTree(t *testing.T, name string, got, want map[string][]byte) {
	t.Helper()
	if len(got) != len(want) || len(got) == 0 {
		t.Errorf("%s: %d files, the build %d", name, len(got), len(want))
	}
	for f := range want {
		if !bytes.Equal(got[f], want[f]) {
			t.Errorf("%s: %s differs from the plain build's", name, f)
		}
	}
}

// On a model of two- and three-sheet stacks, bolts through two and three
// sheets, a grounded bolt, a group attached its own way, listed parts
// and nuggets, every variant of sweeps over every key and its values is
// the plain build with its settings as flags, byte for byte, whatever
// other build flags apply to all (here the hidden --no-check too); the
// same settings give the same files in any order of keys and values
// and alone, so nothing of one variant reaches another.
func TestSweepVariantsAreBuildsOnStacks(t *testing.T) {
	dir := t.TempDir()
	job := stackedModel(t, dir)
	sweeps := []struct {
		common []string
		vary   []string
	}{
		{nil, []string{"attach=interpolated,node-pair,patch", "links=gap,offset", "nugget-rule=4sqrt,5sqrt"}},
		{nil, []string{"bolt-ring=hole,washer", "shank=rigid,beam", "bolt-coupling=rigid,averaging", "links=gap,offset"}},
		{[]string{"--shank-modulus", "70000", "--hole-tolerance", "0.5"}, []string{"bolt-dofs=tx+ty+tz,tx+ty+tz+rx+ry+rz", "spot-dofs=tx+ty+tz,tx+ty+tz+rx+ry+rz", "shank=beam,rigid"}},
		{[]string{"--no-check", "--reach", "8"}, []string{"attach=patch,interpolated", "bolt-coupling=averaging,rigid"}},
	}
	if testing.Short() {
		sweeps = sweeps[2:]
	}
	// files by the variant's settings as the build resolves them: the
	// common flags and the settings in key order.
	seen := map[string]map[string][]byte{}
	key := func(common []string, ss []document.Setting) string {
		s := slices.Clone(ss)
		slices.SortFunc(s, func(a, b document.Setting) int { return strings.Compare(a.Key, b.Key) })
		return strings.Join(append(common, settingsFlags(s)...), " ")
	}
	for n, sw := range sweeps {
		out := filepath.Join(dir, "sweep"+strconv.Itoa(n))
		args := append([]string{"sweep", job, "--out", out, "--quiet", "--fail-on", "never"}, sw.common...)
		for _, v := range sw.vary {
			args = append(args, "--vary", v)
		}
		if code, _, errs := runCLI(t, args...); code != exitOK {
			t.Fatalf("%v: exit %d: %s", sw.vary, code, errs)
		}
		for _, v := range readManifest(t, out).Variants {
			b := filepath.Join(dir, "build")
			args := append(append([]string{"build", job, "--out", b, "--quiet", "--fail-on", "never"}, sw.common...), settingsFlags(v.Settings)...)
			if code, _, errs := runCLI(t, args...); code != exitOK {
				t.Fatalf("build %v: exit %d: %s", args, code, errs)
			}
			got := readTree(t, filepath.Join(out, v.Folder))
			sameTree(t, v.Name, got, readTree(t, b))
			seen[key(sw.common, v.Settings)] = got
		}
	}
	// The last sweeps again, keys and values reversed, and one variant
	// alone: the same files for the same settings.
	for n, sw := range sweeps[len(sweeps)-2:] {
		vary := slices.Clone(sw.vary)
		slices.Reverse(vary)
		for i, v := range vary {
			k, vals, _ := strings.Cut(v, "=")
			vs := strings.Split(vals, ",")
			slices.Reverse(vs)
			vary[i] = k + "=" + strings.Join(vs, ",")
		}
		alone := make([]string, len(vary))
		for i, v := range vary {
			alone[i], _, _ = strings.Cut(v, ",")
		}
		for m, vv := range [][]string{vary, alone} {
			out := filepath.Join(dir, "again"+strconv.Itoa(n)+strconv.Itoa(m))
			args := append([]string{"sweep", job, "--out", out, "--quiet", "--fail-on", "never"}, sw.common...)
			for _, v := range vv {
				args = append(args, "--vary", v)
			}
			if code, _, errs := runCLI(t, args...); code != exitOK {
				t.Fatalf("%v: exit %d: %s", vv, code, errs)
			}
			man := readManifest(t, out)
			if m == 1 && len(man.Variants) != 1 {
				t.Fatalf("%v: %d variants, want 1", vv, len(man.Variants))
			}
			for _, v := range man.Variants {
				want, ok := seen[key(sw.common, v.Settings)]
				if !ok {
					t.Fatalf("%s: settings not seen in the first sweep", v.Name)
				}
				sameTree(t, v.Name+" ("+strings.Join(vv, " ")+")", readTree(t, filepath.Join(out, v.Folder)), want)
			}
		}
	}
}

// compareDoc reads a sweep's compare.json.
func compareDoc(t *testing.T, dir string) *document.CompareDoc {
	t.Helper()
	raw, err := os.ReadFile(filepath.Join(dir, "compare.json"))
	if err != nil {
		t.Fatal(err)
	}
	var doc document.CompareDoc
	if err := json.Unmarshal(raw, &doc); err != nil {
		t.Fatal(err)
	}
	return &doc
}

// One spot weld between two 1 mm steel sheets: the comparison's figures
// against the closed form of the documented spring, a beam of the
// nugget diameter d and the contact length L = (1+1)/2 = 1 mm (E =
// 210,000 N/mm^2, nu = 0.3, G = E/2.6): axial EA/L, across the axis
// 12 EI / (L^3 (1 + phi)), phi = 12 EI / (kappa G A L^2), kappa =
// 6 (1 + nu) / (7 + 6 nu) (Cowper 1966), torsion GJ/L, bending EI/L
// (A = pi d^2/4, I = pi d^4/64, J = 2I; any strength of materials text,
// from memory). A single spring at the pair's centroid has no spread, so
// the rotational stiffness is its own torsion and bending, and nothing
// with translations alone. d = 5 sqrt(1) = 5 mm or 4 sqrt(1) = 4 mm
// (the two nugget rules), so the 4sqrt variant's axial ratio is
// (4/5)^2 = 0.64 and its bending and torsion ratios (4/5)^4 = 0.4096
// exactly; the shear ratio is 0.4096 (1 + phi5)/(1 + phi4), phi4 =
// 0.64 phi5. Coupling counts: a weld on all six degrees of freedom
// holds the two sheets (no free motion); on tx ty tz it is a ball joint
// (three free rotations), on tz alone it leaves two translations and
// the three rotations free (rigid-body kinematics, from memory). The
// same model in metres gives the same stiffnesses, which are in N/mm
// and N mm/rad whatever the unit.
func TestSweepSingleWeldClosedForm(t *testing.T) {
	for _, unit := range []struct {
		name  string
		scale float64
	}{{"mm", 1}, {"m", 0.001}} {
		t.Run(unit.name, func(t *testing.T) {
			dir := t.TempDir()
			sc := func(v float64) string { return strconv.FormatFloat(v*unit.scale, 'g', -1, 64) }
			lines := []string{"joinery-mesh 1", "part 1 thickness=" + sc(1), "part 2 thickness=" + sc(1)}
			for p, z := range []float64{0, 1} {
				for j := range 5 {
					for i := range 5 {
						lines = append(lines, "node "+strconv.Itoa(1000*(p+1)+j*5+i+1)+" "+sc(float64(5*i))+" "+sc(float64(5*j))+" "+sc(z))
					}
				}
			}
			for p := range 2 {
				e := 1000 * (p + 1)
				for j := range 4 {
					for i := range 4 {
						n0 := 1000*(p+1) + j*5 + i + 1
						e++
						lines = append(lines, "shell "+strings.Join([]string{strconv.Itoa(e), strconv.Itoa(p + 1), strconv.Itoa(n0), strconv.Itoa(n0 + 1), strconv.Itoa(n0 + 6), strconv.Itoa(n0 + 5)}, " "))
					}
				}
			}
			mesh := writeLines(t, filepath.Join(dir, "m.jmesh"), lines)
			parts := writeLines(t, filepath.Join(dir, "parts.yaml"), []string{"parts:", "  - id: 1", "    thickness: " + sc(1), "  - id: 2", "    thickness: " + sc(1)})
			list := writeLines(t, filepath.Join(dir, "j.csv"), []string{"id,x,y,z", "w1," + sc(10) + "," + sc(10) + "," + sc(0.5)})
			out := filepath.Join(dir, "sweep")
			code, _, errs := runCLI(t, "sweep", "--mesh", mesh, "--parts", parts, "--joints", list, "--units", unit.name, "--out", out, "--quiet", "--fail-on", "never",
				"--vary", "spot-dofs=tx+ty+tz+rx+ry+rz,tx+ty+tz,tz", "--vary", "nugget-rule=5sqrt,4sqrt")
			if code != exitOK {
				t.Fatalf("exit %d: %s", code, errs)
			}
			doc := compareDoc(t, out)
			if len(doc.Variants) != 6 || len(doc.Pairs) != 1 || len(doc.Pairs[0].Variants) != 6 {
				t.Fatalf("%d variants, pairs %+v: want 6 variants of one pair", len(doc.Variants), doc.Pairs)
			}
			const e, nu, l = 210000.0, 0.3, 1.0
			g := e / (2 * (1 + nu))
			kappa := 6 * (1 + nu) / (7 + 6*nu)
			beam := func(d float64) (axial, shear, torsion, bending float64) {
				a, i := math.Pi*d*d/4, math.Pi*math.Pow(d, 4)/64
				phi := 12 * e * i / (kappa * g * a * l * l)
				return e * a / l, 12 * e * i / (l * l * l * (1 + phi)), g * 2 * i / l, e * i / l
			}
			_, sh5, _, _ := beam(5)
			_, sh4, _, _ := beam(4)
			near := func(got, want float64) bool { return math.Abs(got-want) <= 5e-6*math.Abs(want) }
			for i, v := range doc.Variants {
				dofs := v.Settings[0].Value
				d := 5.0
				if v.Settings[1].Value == "4sqrt" {
					d = 4
				}
				ax, sh, to, be := beam(d)
				wantT := [3]float64{sh, sh, ax}
				wantR := [3]float64{to, be, be}
				wantDOFs, wantMech := map[string]int{"tx,ty,tz,rx,ry,rz": 1}, 0
				switch dofs {
				case "tx+ty+tz":
					wantR, wantDOFs, wantMech = [3]float64{}, map[string]int{"tx,ty,tz": 1}, 3
				case "tz":
					wantT, wantR, wantDOFs, wantMech = [3]float64{0, 0, ax}, [3]float64{}, map[string]int{"tz": 1}, 5
				}
				p := doc.Pairs[0].Variants[i]
				for a := range 3 {
					if !near(p.Translational[a], wantT[a]) || !near(p.Rotational[a], wantR[a]) {
						t.Errorf("%s: translational %v rotational %v, want %v %v", v.Name, p.Translational, p.Rotational, wantT, wantR)
						break
					}
				}
				if p.Springs != 1 || !maps.Equal(v.ByDOFs, wantDOFs) || v.Mechanisms != wantMech || v.Moves != (wantMech > 0) {
					t.Errorf("%s: %d springs, by dofs %v, %d mechanism motions; want 1, %v, %d", v.Name, p.Springs, v.ByDOFs, v.Mechanisms, wantDOFs, wantMech)
				}
			}
			// Variant 2, the 4sqrt nugget on all six: its ratios to variant 1.
			r := doc.Pairs[0].Variants[1]
			wantRT := [3]float64{sh4 / sh5, sh4 / sh5, 0.64}
			wantRR := [3]float64{0.4096, 0.4096, 0.4096}
			for a := range 3 {
				if r.RatioTranslational[a] == nil || r.RatioRotational[a] == nil ||
					!near(*r.RatioTranslational[a], wantRT[a]) || !near(*r.RatioRotational[a], wantRR[a]) {
					t.Fatalf("4sqrt against 5sqrt: ratios %v %v, want %v %v", deref(r.RatioTranslational), deref(r.RatioRotational), wantRT, wantRR)
				}
			}
			// Rounded once to 6 digits, the exact ratios read exactly.
			if *r.RatioTranslational[2] != 0.64 || *r.RatioRotational[0] != 0.4096 {
				t.Errorf("ratios %v %v: want 0.64 and 0.4096 as written", *r.RatioTranslational[2], *r.RatioRotational[0])
			}
		})
	}
}

func deref(ps [3]*float64) []any {
	out := make([]any, 3)
	for i, p := range ps {
		if p != nil {
			out[i] = *p
		}
	}
	return out
}

// A sweep one of whose variants fails (here the offset links' new ids
// do not fit below the largest id, where the gap links' do) exits 2
// naming the variant and leaves the sweep's old set as it was, whole,
// with nothing beside it: the variants already on disk go with the
// failed run's temporary directory.
func TestSweepFailedVariantLeavesOldSet(t *testing.T) {
	skipWithoutExample(t)
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	if code, _, errs := runCLI(t, "sweep", exampleJob, "--out", out, "--quiet", "--vary", "attach=interpolated,patch"); code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	before := readTree(t, out)
	// The example needs 88 new ids with gap links and 216 with offset
	// links: 150 below the largest int64 holds the first only.
	start := strconv.FormatInt(math.MaxInt64-150, 10)
	code, _, errs := runCLI(t, "sweep", exampleJob, "--out", out, "--quiet", "--id-start", start, "--vary", "links=gap,offset")
	if code != exitBadInput || !strings.Contains(errs, "variant 02-links=offset") {
		t.Fatalf("exit %d, %q: want 2 naming variant 02-links=offset", code, errs)
	}
	after := readTree(t, out)
	if len(after) != len(before) {
		t.Errorf("%d files after the failed sweep, %d before", len(after), len(before))
	}
	for name, b := range before {
		if !bytes.Equal(after[name], b) {
			t.Errorf("%s changed by the failed sweep", name)
		}
	}
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range entries {
		if e.Name() != "out" {
			t.Errorf("%s left beside the output directory", e.Name())
		}
	}
}

// --max-variants is bounded like the job's max_variants: above the most
// a sweep builds it is refused, since the count it guards saturates
// there (a bound of 20000 let a product of 11,907 through, of which
// 10,000 variants were built); a bound from the job file is named as
// the job's.
func TestSweepMaxVariantsBounds(t *testing.T) {
	skipWithoutExample(t)
	out := filepath.Join(t.TempDir(), "out")
	var subsets []string
	names := []string{"tx", "ty", "tz", "rx", "ry", "rz"}
	for m := 1; m < 64; m++ {
		var s []string
		for i, n := range names {
			if m&(1<<i) != 0 {
				s = append(s, n)
			}
		}
		subsets = append(subsets, strings.Join(s, "+"))
	}
	all := strings.Join(subsets, ",")
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--vary", "spot-dofs=" + all, "--vary", "bolt-dofs=" + all, "--vary", "attach=interpolated,patch,node-pair", "--max-variants", "20000"}, "--max-variants 20000: want 1 to 9999"},
		{[]string{"--vary", "spot-dofs=" + all, "--vary", "bolt-dofs=" + all, "--vary", "attach=interpolated,patch,node-pair", "--max-variants", "9999"}, "make 11907 variants, more than --max-variants 9999"},
		{[]string{"--vary", "attach=patch", "--max-variants", "-1"}, "--max-variants -1: want 1 to 9999"},
	} {
		code, _, errs := runCLI(t, append([]string{"sweep", exampleJob, "--out", out}, c.args...)...)
		if code != exitBadInput || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, %q; want 2 and %q", c.args[len(c.args)-2:], code, errs, c.want)
		}
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("output directory written on bad usage")
	}
}

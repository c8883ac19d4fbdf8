package main

import (
	"bytes"
	"context"
	"encoding/json"
	"flag"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strings"
	"testing"

	"github.com/santhosh-tekuri/jsonschema/v6"
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"github.com/joinery-cae/joinery/writers"
	"github.com/joinery-cae/joinery/writers/document"
)

var update = flag.Bool("update", false, "rewrite the golden files under testdata/golden")

const exampleJob = "../../examples/van-rear-crossmember/job.yaml"

// runCLI runs one command line in-process and returns the exit status and
// the two streams.
func runCLI(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(context.Background(), args, &out, &errb, false)
	return code, out.String(), errb.String()
}

func TestEveryCommandHasHelp(t *testing.T) {
	g := &globalOptions{stdout: &bytes.Buffer{}, stderr: &bytes.Buffer{}}
	root := newRootCommand(g)
	for _, c := range root.Commands() {
		if c.Name() == "help" || c.Name() == "completion" {
			continue
		}
		t.Run(c.Name(), func(t *testing.T) {
			if c.Short == "" || c.Example == "" || !strings.Contains(c.Long, "EXIT STATUS") {
				t.Errorf("%s: help lacks a short line, examples or an EXIT STATUS section", c.Name())
			}
			c.Flags().VisitAll(func(f *pflag.Flag) {
				if f.Usage == "" {
					t.Errorf("%s --%s has no usage text", c.Name(), f.Name)
				}
			})
			code, out, _ := runCLI(t, c.Name(), "--help")
			if code != exitOK || !strings.Contains(out, "Usage:") {
				t.Errorf("%s --help: exit %d, output %q", c.Name(), code, out)
			}
		})
	}
	var _ *cobra.Command = root
}

func TestVersion(t *testing.T) {
	code, out, _ := runCLI(t, "--version")
	if code != exitOK || !strings.Contains(out, "joinery version") {
		t.Fatalf("exit %d, %q", code, out)
	}
}

func skipWithoutExample(t *testing.T) {
	t.Helper()
	if _, err := os.Stat(exampleJob); err != nil {
		t.Skip("example not generated")
	}
}

// golden compares got with testdata/golden/name, or rewrites it under -update.
func golden(t *testing.T, name string, got []byte) {
	t.Helper()
	path := filepath.Join("testdata", "golden", name)
	if *update {
		if err := os.WriteFile(path, got, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test -update to create it)", err)
	}
	if !bytes.Equal(got, want) {
		gl, wl := strings.Split(string(got), "\n"), strings.Split(string(want), "\n")
		for i := 0; i < max(len(gl), len(wl)); i++ {
			var g, w string
			if i < len(gl) {
				g = gl[i]
			}
			if i < len(wl) {
				w = wl[i]
			}
			if g != w {
				t.Fatalf("%s differs from the golden file at line %d:\n got: %q\nwant: %q\n(run go test -update if the change is intended)", name, i+1, g, w)
			}
		}
	}
}

func TestInspectExampleGolden(t *testing.T) {
	skipWithoutExample(t)
	code, out, errs := runCLI(t, "inspect", exampleJob, "--deep")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	golden(t, "inspect.txt", []byte(out))
	code, out, errs = runCLI(t, "inspect", exampleJob, "--json")
	if code != exitOK || !json.Valid([]byte(out)) {
		t.Fatalf("exit %d: %s", code, errs)
	}
}

var buildOutputs = []string{"connectors.json", "connectors.csv", "connectors.vtk", "report.json", "report.txt"}

func TestBuildExampleGolden(t *testing.T) {
	skipWithoutExample(t)
	dir := t.TempDir()
	code, out, errs := runCLI(t, "build", exampleJob, "--out", dir)
	if code != exitOK {
		t.Fatalf("exit %d: %s\n%s", code, errs, out)
	}
	for _, name := range buildOutputs {
		b, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		golden(t, "build-"+name, b)
	}
	validate(t, "connectors.schema.json", filepath.Join(dir, "connectors.json"))
	validate(t, "report.schema.json", filepath.Join(dir, "report.json"))
	validate(t, "set.schema.json", filepath.Join(dir, document.SetMarker))
	if set, err := writers.ReadSet(dir); err != nil || len(set.Files) != len(buildOutputs)+1 { // and report.html (TestBuildPageGolden)
		t.Errorf("the set does not read back whole: %v", err)
	}
}

// validate checks a JSON file against one of Joinery's published schemas
// with an independent JSON Schema (draft 2020-12) implementation.
func validate(t *testing.T, schemaName, file string) {
	t.Helper()
	raw, err := document.Schemas.ReadFile("schema/" + schemaName)
	if err != nil {
		t.Fatal(err)
	}
	doc, err := jsonschema.UnmarshalJSON(bytes.NewReader(raw))
	if err != nil {
		t.Fatal(err)
	}
	c := jsonschema.NewCompiler()
	if err := c.AddResource(schemaName, doc); err != nil {
		t.Fatal(err)
	}
	sch, err := c.Compile(schemaName)
	if err != nil {
		t.Fatal(err)
	}
	f, err := os.Open(file)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	inst, err := jsonschema.UnmarshalJSON(f)
	if err != nil {
		t.Fatal(err)
	}
	if err := sch.Validate(inst); err != nil {
		t.Fatalf("%s does not validate against %s: %v", file, schemaName, err)
	}
}

func TestBuildDeterministicAcrossGOMAXPROCS(t *testing.T) {
	skipWithoutExample(t)
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(0))
	var first map[string][]byte
	for _, procs := range []int{1, 2, 4} {
		runtime.GOMAXPROCS(procs)
		dir := t.TempDir()
		if code, _, errs := runCLI(t, "build", exampleJob, "--out", dir, "--quiet"); code != exitOK {
			t.Fatalf("exit %d: %s", code, errs)
		}
		got := map[string][]byte{}
		for _, name := range append(slices.Clone(buildOutputs), "report.html") {
			b, err := os.ReadFile(filepath.Join(dir, name))
			if err != nil {
				t.Fatal(err)
			}
			got[name] = b
		}
		if first == nil {
			first = got
			continue
		}
		for name := range got {
			if !bytes.Equal(got[name], first[name]) {
				t.Errorf("GOMAXPROCS=%d: %s differs", procs, name)
			}
		}
	}
}

func TestBadInputExitsTwoAndWritesNothing(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.jmesh")
	if err := os.WriteFile(bad, []byte("joinery-mesh 1\nnode 1 0 0 zero\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "out")
	cases := [][]string{
		{"build", "--mesh", bad, "--out", out},
		{"build", "--mesh", filepath.Join(dir, "missing.vtk"), "--out", out},
		{"build", "--mesh", bad, "--attach", "glue", "--out", out},
		{"inspect", "--mesh", bad},
		{"inspect"},
		{"build", "--no-such-flag"},
	}
	for _, args := range cases {
		code, _, errs := runCLI(t, args...)
		if code != exitBadInput {
			t.Errorf("%v: exit %d, want 2 (%s)", args, code, errs)
		}
		if errs == "" {
			t.Errorf("%v: no message", args)
		}
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("output directory written on bad input")
	}
	// The error names the file and line.
	_, _, errs := runCLI(t, "inspect", "--mesh", bad)
	if !strings.Contains(errs, "bad.jmesh:2") {
		t.Errorf("error %q does not name bad.jmesh:2", errs)
	}
}

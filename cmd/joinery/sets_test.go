package main

import (
	"bufio"
	"bytes"
	"context"
	"errors"
	"fmt"
	"io/fs"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/joinery-cae/joinery/geom/native"
	"github.com/joinery-cae/joinery/joints/synth"
	"github.com/joinery-cae/joinery/writers"
	"github.com/joinery-cae/joinery/writers/document"
)

// asCLI is the environment variable that makes the test binary run as
// joinery itself, so that tests can start, kill and race real processes
// without building the binary.
const asCLI = "JOINERY_TEST_AS_CLI"

func TestMain(m *testing.M) {
	if os.Getenv(asCLI) == "1" {
		os.Exit(run(context.Background(), os.Args[1:], os.Stdout, os.Stderr, false))
	}
	os.Exit(m.Run())
}

// cliCommand returns a command that runs joinery with args in dir.
func cliCommand(t *testing.T, dir string, args ...string) *exec.Cmd {
	t.Helper()
	exe, err := os.Executable()
	if err != nil {
		t.Fatal(err)
	}
	c := exec.Command(exe, args...)
	c.Dir = dir
	c.Env = append(os.Environ(), asCLI+"=1")
	return c
}

// runProcess runs joinery in a process of its own and returns its exit
// status and stderr.
func runProcess(t *testing.T, dir string, args ...string) (int, string) {
	t.Helper()
	c := cliCommand(t, dir, args...)
	var errb bytes.Buffer
	c.Stderr = &errb
	err := c.Run()
	var ee *exec.ExitError
	switch {
	case err == nil:
		return 0, errb.String()
	case errors.As(err, &ee):
		return ee.ExitCode(), errb.String()
	}
	t.Fatal(err)
	return -1, ""
}

// synthJob writes a synthetic model (package joints/synth) into dir:
// body.jmesh, parts.csv, two joint lists (welds-a.csv with every weld,
// welds-b.csv with every other one, so that two runs differ) and
// job-a.yaml and job-b.yaml. It returns the two job files' paths.
func synthJob(t *testing.T, dir string, elements, welds int) (string, string) {
	t.Helper()
	model, err := synth.Generate(synth.Config{Elements: elements, Welds: welds, Seed: 7})
	if err != nil {
		t.Fatal(err)
	}
	write := func(name string, fill func(w *bufio.Writer) error) {
		f, err := os.Create(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		bw := bufio.NewWriter(f)
		if err := fill(bw); err != nil {
			t.Fatal(err)
		}
		if err := bw.Flush(); err != nil {
			t.Fatal(err)
		}
		if err := f.Close(); err != nil {
			t.Fatal(err)
		}
	}
	write("body.jmesh", func(w *bufio.Writer) error { return native.Write(w, model.Mesh) })
	write("parts.csv", func(w *bufio.Writer) error {
		fmt.Fprintln(w, "id,thickness")
		for _, p := range model.Mesh.Parts {
			fmt.Fprintf(w, "%d,%g\n", p.ID, p.Thickness)
		}
		return nil
	})
	for _, list := range []struct {
		name string
		step int
	}{{"a", 1}, {"b", 2}} {
		write("welds-"+list.name+".csv", func(w *bufio.Writer) error {
			fmt.Fprintln(w, "id,x,y,z,kind")
			for i := 0; i < len(model.Joints); i += list.step {
				j := model.Joints[i]
				fmt.Fprintf(w, "%s,%g,%g,%g,%s\n", j.ID, j.Point.X, j.Point.Y, j.Point.Z, j.Kind)
			}
			return nil
		})
		write("job-"+list.name+".yaml", func(w *bufio.Writer) error {
			_, err := fmt.Fprintf(w, "version: 1\nmeshes: [body.jmesh]\nparts: parts.csv\njoints: [welds-%s.csv]\nout: out\nbuild:\n  fail_on: never\n", list.name)
			return err
		})
	}
	return filepath.Join(dir, "job-a.yaml"), filepath.Join(dir, "job-b.yaml")
}

// setState describes what a reader of an output directory sees: "none"
// (no directory) or the run id of the whole set there; a set that is
// not whole fails the test.
func setState(t *testing.T, dir string) string {
	t.Helper()
	if _, err := os.Lstat(dir); errors.Is(err, fs.ErrNotExist) {
		return "none"
	}
	set, err := writers.ReadSet(dir)
	if err != nil {
		t.Fatalf("output directory %s is not a whole set of one run: %v", dir, err)
	}
	for _, name := range buildOutputs {
		if _, ok := set.Files[name]; !ok {
			t.Fatalf("set of run %s lacks %s", set.Marker.RunID, name)
		}
	}
	return set.Marker.RunID
}

// leftover matches what a run may leave beside its output directory out
// when it is killed: its temporary directory, an old set set aside, its
// lock file.
var leftover = regexp.MustCompile(`^\.out\.((new|old)-[0-9]+|lock)$`)

// beside lists the names in dir other than the output directory out
// and the inputs synthJob writes.
func beside(t *testing.T, dir string, out ...string) []string {
	t.Helper()
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range entries {
		n := e.Name()
		if n == "out" || slices.Contains(out, n) || strings.HasPrefix(n, "job-") || strings.HasPrefix(n, "welds-") || n == "body.jmesh" || n == "parts.csv" {
			continue
		}
		names = append(names, n)
	}
	return names
}

// The reproduction: report.json of a set replaced by a
// directory, then a build into the same directory. The run exits 3,
// says what is left, and leaves the directory as it was: the four other
// files of the old set and the directory in the way, nothing mixed.
func TestBuildDirectoryInTheWay(t *testing.T) {
	skipWithoutExample(t)
	out := filepath.Join(t.TempDir(), "o1")
	if code, _, errs := runCLI(t, "build", exampleJob, "--out", out, "--quiet"); code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	old := map[string][]byte{}
	for _, name := range buildOutputs {
		old[name], _ = os.ReadFile(filepath.Join(out, name))
	}
	oldID := document.FindRunID(old["report.txt"])
	os.Remove(filepath.Join(out, "report.json"))
	if err := os.Mkdir(filepath.Join(out, "report.json"), 0o755); err != nil {
		t.Fatal(err)
	}
	code, _, errs := runCLI(t, "build", exampleJob, "--out", out, "--attach", "node-pair", "--quiet")
	if code != exitFailure {
		t.Fatalf("exit %d, want 3: %s", code, errs)
	}
	for _, want := range []string{"report.json (not the file Joinery wrote there)", out + " is left as it is", "the set of run " + oldID} {
		if !strings.Contains(errs, want) {
			t.Errorf("message %q lacks %q", errs, want)
		}
	}
	for _, name := range buildOutputs {
		got, err := os.ReadFile(filepath.Join(out, name))
		if name == "report.json" {
			if fi, err := os.Stat(filepath.Join(out, name)); err != nil || !fi.IsDir() {
				t.Errorf("the directory in the way was touched")
			}
			continue
		}
		if err != nil || !bytes.Equal(got, old[name]) {
			t.Errorf("%s changed", name)
		}
	}
	if names := beside(t, filepath.Dir(out), "o1"); len(names) != 0 {
		t.Errorf("left beside the output directory: %v", names)
	}
}

// A directory that is not Joinery's is refused with exit 2, before the
// run reads its inputs, and left as it was; an empty one is adopted.
func TestBuildRefusesForeignDirectory(t *testing.T) {
	skipWithoutExample(t)
	abs, err := filepath.Abs(exampleJob)
	if err != nil {
		t.Fatal(err)
	}
	inputs := t.TempDir()
	os.WriteFile(filepath.Join(inputs, "notes.txt"), []byte("mine"), 0o644)
	t.Chdir(inputs)
	for _, out := range []string{".", inputs} {
		code, _, errs := runCLI(t, "build", abs, "--out", out, "--quiet")
		if code != exitBadInput || !strings.Contains(errs, "is not one Joinery wrote: it holds notes.txt") {
			t.Errorf("--out %s: exit %d: %s", out, code, errs)
		}
	}
	if entries, _ := os.ReadDir(inputs); len(entries) != 1 {
		t.Errorf("folder changed: %v", entries)
	}
	empty := filepath.Join(inputs, "empty")
	os.Mkdir(empty, 0o755)
	if code, _, errs := runCLI(t, "build", abs, "--out", empty, "--quiet"); code != exitOK {
		t.Errorf("empty directory: exit %d: %s", code, errs)
	}
}

// The same job run from two working directories, and with a flag's
// relative path spelled from each, gives byte-identical outputs: the
// recorded paths are relative to the job file's directory.
func TestBuildOutputsIndependentOfWorkingDirectory(t *testing.T) {
	skipWithoutExample(t)
	job, err := filepath.Abs(exampleJob)
	if err != nil {
		t.Fatal(err)
	}
	jobDir := filepath.Dir(job)
	base := t.TempDir()
	var first map[string][]byte
	for i, cwd := range []string{jobDir, filepath.Dir(jobDir), base} {
		welds, _ := filepath.Rel(cwd, filepath.Join(jobDir, "welds.csv"))
		jobArg, _ := filepath.Rel(cwd, job)
		out := filepath.Join(base, fmt.Sprintf("out%d", i))
		if code, errs := runProcess(t, cwd, "build", jobArg, "--joints", welds, "--out", out, "--quiet"); code != exitOK {
			t.Fatalf("from %s: exit %d: %s", cwd, code, errs)
		}
		got := map[string][]byte{}
		for _, name := range buildOutputs {
			got[name], _ = os.ReadFile(filepath.Join(out, name))
		}
		if first == nil {
			first = got
			if !bytes.Contains(got["connectors.json"], []byte(`"joints":["welds.csv"]`)) {
				t.Errorf("joint list not recorded relative to the job file")
			}
			continue
		}
		for name := range got {
			if !bytes.Equal(got[name], first[name]) {
				t.Errorf("from %s: %s differs", cwd, name)
			}
		}
	}
}

// A second build into a directory a running build holds fails at once
// with exit 3, naming the first one's process id; the first one writes
// its whole set. Builds started together never mix their files.
func TestBuildConcurrentRuns(t *testing.T) {
	dir := t.TempDir()
	jobA, jobB := synthJob(t, dir, 50_000, 320)
	out := filepath.Join(dir, "out")
	lock := filepath.Join(dir, ".out.lock")

	first := cliCommand(t, dir, "build", jobA, "--quiet")
	if err := first.Start(); err != nil {
		t.Fatal(err)
	}
	pid := strconv.Itoa(first.Process.Pid)
	deadline := time.Now().Add(10 * time.Second)
	for {
		if b, _ := os.ReadFile(lock); strings.TrimSpace(string(b)) == pid {
			break
		}
		if time.Now().After(deadline) {
			first.Process.Kill()
			t.Fatal("the first run never took the lock")
		}
		time.Sleep(time.Millisecond)
	}
	start := time.Now()
	code, errs := runProcess(t, dir, "build", jobB, "--quiet")
	took := time.Since(start)
	if err := first.Wait(); err != nil {
		t.Fatalf("first run: %v", err)
	}
	if code != exitFailure || !strings.Contains(errs, "being written by another joinery run (process "+pid+")") {
		t.Fatalf("second run: exit %d: %s", code, errs)
	}
	t.Logf("the second run failed after %v", took)
	idA := setState(t, out)

	// Pairs started together: one may wait for nothing and fail, or run
	// after the other; the set is always whole and of one run.
	for range 3 {
		a, b := cliCommand(t, dir, "build", jobA, "--quiet"), cliCommand(t, dir, "build", jobB, "--quiet")
		var ea, eb bytes.Buffer
		a.Stderr, b.Stderr = &ea, &eb
		a.Start()
		b.Start()
		errA, errB := a.Wait(), b.Wait()
		state := setState(t, out)
		switch {
		case errA == nil && errB == nil:
		case errA == nil && strings.Contains(eb.String(), "(process "+strconv.Itoa(a.Process.Pid)+")"):
			if state != idA {
				t.Errorf("set of run %s, want the winner's %s", state, idA)
			}
		case errB == nil && strings.Contains(ea.String(), "(process "+strconv.Itoa(b.Process.Pid)+")"):
			if state == idA {
				t.Errorf("set of the loser's run")
			}
		default:
			t.Fatalf("runs: %v %s / %v %s", errA, ea.String(), errB, eb.String())
		}
	}
	if names := beside(t, dir); len(names) != 0 {
		t.Errorf("left beside the output directory: %v", names)
	}
}

// kill -9 at random points of builds that alternate between two jobs:
// a third of the kills at any time of the run, the others soon after
// the run's temporary directory appears, while it writes the set and
// swaps it in. After every kill the output directory holds nothing or
// the whole set of one of the two runs; the next run that completes
// removes what the killed ones left.
func TestBuildKilledAtRandomPoints(t *testing.T) {
	if testing.Short() {
		t.Skip("kills builds of a 50,000-element model; skipped under -short")
	}
	dir := t.TempDir()
	jobA, jobB := synthJob(t, dir, 50_000, 320)
	out := filepath.Join(dir, "out")
	// A full run of each, to learn their run ids and how long a run takes.
	ids := map[string]string{}
	var full time.Duration
	for _, job := range []string{jobB, jobA} {
		start := time.Now()
		if code, errs := runProcess(t, dir, "build", job, "--quiet"); code != exitOK {
			t.Fatalf("exit %d: %s", code, errs)
		}
		full = max(full, time.Since(start))
		ids[setState(t, out)] = job
	}
	if len(ids) != 2 {
		t.Fatalf("the two jobs have one run id")
	}
	writing := regexp.MustCompile(`^\.out\.new-[0-9]+$`)
	rng := rand.New(rand.NewPCG(1, 2))
	seen := map[string]int{}
	const kills = 12
	for i := range kills {
		job := []string{jobA, jobB}[i%2]
		before := beside(t, dir) // a killed run's temporary directory
		started := func(n string) bool { return writing.MatchString(n) && !slices.Contains(before, n) }
		c := cliCommand(t, dir, "build", job, "--quiet")
		if err := c.Start(); err != nil {
			t.Fatal(err)
		}
		when := "anywhere"
		if i%3 == 0 {
			time.Sleep(time.Duration(rng.Float64() * float64(full)))
		} else {
			when = "writing"
			deadline := time.Now().Add(2 * full)
			for !slices.ContainsFunc(beside(t, dir), started) && time.Now().Before(deadline) {
				time.Sleep(50 * time.Microsecond)
			}
			time.Sleep(time.Duration(rng.Float64() * float64(10*time.Millisecond)))
		}
		c.Process.Signal(syscall.SIGKILL)
		err := c.Wait()
		state := setState(t, out)
		if _, ok := ids[state]; !ok {
			t.Fatalf("kill %d (%s): set of run %s, not one of the two runs", i, when, state)
		}
		outcome := when + ", killed"
		if err == nil {
			outcome = when + ", finished first"
		}
		seen[outcome]++
		for _, n := range beside(t, dir) {
			if !leftover.MatchString(n) {
				t.Fatalf("kill %d: unexpected %s beside the output directory", i, n)
			}
		}
	}
	t.Logf("%d kills of runs of about %v: %v", kills, full, seen)
	if code, errs := runProcess(t, dir, "build", jobA, "--quiet"); code != exitOK {
		t.Fatalf("run after the kills: exit %d: %s", code, errs)
	}
	if names := beside(t, dir); len(names) != 0 {
		t.Errorf("left after a complete run: %v", names)
	}
	if ids[setState(t, out)] != jobA {
		t.Errorf("final set is not job A's")
	}
}

// A full disk: builds into a small tmpfs, mounted in a user namespace of
// its own (no root needed; skipped where the system does not allow it).
// The first set fits; the second does not: exit 3, the old set whole,
// no temporary left.
func TestBuildFullDisk(t *testing.T) {
	if _, err := exec.LookPath("unshare"); err != nil {
		t.Skip("no unshare")
	}
	if err := exec.Command("unshare", "-rm", "true").Run(); err != nil {
		t.Skipf("no user namespaces: %v", err)
	}
	skipWithoutExample(t)
	dir := t.TempDir()
	_, jobB := synthJob(t, dir, 40_000, 250)
	small, err := filepath.Abs(exampleJob)
	if err != nil {
		t.Fatal(err)
	}
	exe, _ := os.Executable()
	disk := filepath.Join(dir, "disk")
	copyTo := filepath.Join(dir, "copy")
	os.Mkdir(disk, 0o755)
	// The example's set is about 60 KB; the synthetic job's about 1 MB.
	script := `set -u
mount -t tmpfs -o size=256k tmpfs "$DISK" || exit 99
"$EXE" build "$SMALL" --out "$DISK/out" --quiet; echo "first $?"
"$EXE" build "$BIG" --out "$DISK/out" --quiet 2>"$DISK/err"; echo "second $?"
cat "$DISK/err" >&2
cp -a "$DISK/." "$COPY"
`
	c := exec.Command("unshare", "-rm", "sh", "-c", script)
	c.Dir = dir
	c.Env = append(os.Environ(), asCLI+"=1", "EXE="+exe, "SMALL="+small, "BIG="+jobB, "DISK="+disk, "COPY="+copyTo)
	var stdout, stderr bytes.Buffer
	c.Stdout, c.Stderr = &stdout, &stderr
	if err := c.Run(); err != nil {
		if ee, ok := err.(*exec.ExitError); ok && ee.ExitCode() == 99 {
			t.Skipf("cannot mount a tmpfs: %s", stderr.String())
		}
		t.Fatalf("%v: %s", err, stderr.String())
	}
	if got := stdout.String(); got != "first 0\nsecond 3\n" {
		t.Fatalf("exit statuses %q (stderr %s)", got, stderr.String())
	}
	if !strings.Contains(stderr.String(), "no space left on device") || !strings.Contains(stderr.String(), "is as it was before this run: the whole set of run") {
		t.Errorf("message: %s", stderr.String())
	}
	out := filepath.Join(copyTo, "out")
	set, err := writers.ReadSet(out)
	if err != nil {
		t.Fatalf("old set not whole: %v", err)
	}
	if !strings.Contains(stderr.String(), set.Marker.RunID) {
		t.Errorf("message does not name the old set's run %s", set.Marker.RunID)
	}
	entries, _ := os.ReadDir(copyTo)
	for _, e := range entries {
		if e.Name() != "out" && e.Name() != "err" {
			t.Errorf("left on the disk: %s", e.Name())
		}
	}
}

package main

import (
	"bytes"
	"context"
	"errors"
	"image"
	"image/color"
	"image/color/palette"
	"image/draw"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/joinery-cae/joinery/geom/meshio"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/pipeline"
	"github.com/joinery-cae/joinery/joints/synth"
	"github.com/joinery-cae/joinery/writers/document"
	"github.com/joinery-cae/joinery/writers/html"
)

// chromiumFlags run Chromium headless as this machine and CI need it:
// without a sandbox (CI runs as root), without a GPU, and without the
// background connections (updates, sync, field trials) that a closed
// network refuses.
func chromiumFlags() []string {
	return []string{
		"--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
		"--disable-background-networking", "--disable-component-update", "--disable-sync",
		"--hide-scrollbars", "--enable-logging=stderr", "--v=0",
	}
}

// chromium returns the path of a Chromium browser, or skips the test
// where none is installed (.ci/run installs the Debian package).
func chromium(t *testing.T) string {
	t.Helper()
	for _, name := range []string{"chromium", "chromium-browser"} {
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	t.Skip("no Chromium installed (Debian package chromium; .ci/run installs it)")
	return ""
}

// runChromium runs the browser on a page with a fresh profile and
// returns its standard output and its log.
func runChromium(t *testing.T, bin string, args ...string) (stdout, log string) {
	t.Helper()
	// Headless Chromium itself now and then dies of a signal on a loaded
	// machine before it has loaded anything (seen as a segmentation
	// fault in its start-up); such a run says nothing about the page, so
	// it is tried again, after a pause that grows with each try (the
	// crashes come in bursts while other test binaries load both cores),
	// up to chromiumTries times in all. Any other failure, and a crash on
	// every try, fails the test.
	const chromiumTries = 6
	for try := 1; ; try++ {
		ctx, cancel := context.WithTimeout(context.Background(), 90*time.Second)
		all := append(chromiumFlags(), "--user-data-dir="+t.TempDir())
		cmd := exec.CommandContext(ctx, bin, append(all, args...)...)
		var out, errb bytes.Buffer
		cmd.Stdout, cmd.Stderr = &out, &errb
		err := cmd.Run()
		timedOut := ctx.Err() != nil // before cancel, which sets it
		cancel()
		if err == nil {
			return out.String(), errb.String()
		}
		var exit *exec.ExitError
		if errors.As(err, &exit) && !timedOut && try < chromiumTries {
			if ws, ok := exit.Sys().(syscall.WaitStatus); ok && ws.Signaled() {
				t.Logf("chromium %v died of %v (try %d of %d); trying again", args, ws.Signal(), try, chromiumTries)
				time.Sleep(time.Duration(try) * time.Second)
				continue
			}
		}
		t.Fatalf("chromium %v: %v\n%s", args, err, errb.String())
	}
}

var (
	bodyTag  = regexp.MustCompile(`<body[^>]*>`)
	bodyAttr = regexp.MustCompile(`data-([a-z-]+)="([^"]*)"`)
	console  = regexp.MustCompile(`(?m)^.*CONSOLE.*$`)
)

// TestPageInBrowser opens the example's report.html from disk in
// headless Chromium. The page's script must run with no console message
// at all (it writes none, so any is an error), and the counts it reads
// back from the rendered DOM and writes on the body (marks per state in
// the axonometric view, rows of the findings table) must match
// report.json. A copy of the page with a probe script then filters the
// findings by a code and follows a joint link, and the rows shown, the
// rings drawn and the rows lit must follow. A screenshot is kept in the
// test's temp dir; with -update it also becomes the README's
// docs/report-html.png.
func TestPageInBrowser(t *testing.T) {
	skipWithoutExample(t)
	if testing.Short() {
		t.Skip("starts a browser")
	}
	bin := chromium(t)
	dir := t.TempDir()
	if code, _, errs := runCLI(t, "build", exampleJob, "--out", dir, "--quiet"); code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	rep := readReport(t, filepath.Join(dir, "report.json"))
	page := "file://" + filepath.Join(dir, "report.html")
	attrs, _ := checkRendered(t, bin, filepath.Join(dir, "report.html"), rep)
	// The script's answers to a reader: filter the findings by the first
	// code, then follow the first joint link; a test script added to a
	// copy of the page records what the page shows then.
	probe := `<script>
(function () {
  var d = document, b = d.body, code = d.getElementById("f-code");
  code.value = code.options[1].value;
  code.dispatchEvent(new Event("change"));
  b.setAttribute("data-t-code", code.value);
  b.setAttribute("data-t-shown", d.querySelectorAll("#findings-table tbody tr:not([hidden])").length);
  code.value = "";
  code.dispatchEvent(new Event("change"));
  d.querySelector("#findings-table a[href^='#axo-']").click();
  b.setAttribute("data-t-rings", d.querySelectorAll("circle.ring").length);
  b.setAttribute("data-t-lit", d.querySelectorAll("tr.hl").length);
})();
</script>
</body>`
	raw, err := os.ReadFile(filepath.Join(dir, "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	probed := filepath.Join(dir, "probe.html")
	if err := os.WriteFile(probed, bytes.Replace(raw, []byte("</body>"), []byte(probe), 1), 0o644); err != nil {
		t.Fatal(err)
	}
	dom, log := runChromium(t, bin, "--dump-dom", "file://"+probed)
	if msgs := console.FindAllString(log, -1); len(msgs) > 0 {
		t.Errorf("console messages with the probe:\n%s", strings.Join(msgs, "\n"))
	}
	after := map[string]string{}
	for _, m := range bodyAttr.FindAllStringSubmatch(bodyTag.FindString(dom), -1) {
		after[m[1]] = m[2]
	}
	if want := strconv.Itoa(rep.Summary.ByCode[after["t-code"]]); after["t-shown"] != want {
		t.Errorf("filtered by %q: %s rows shown, report.json has %s", after["t-code"], after["t-shown"], want)
	}
	// The joint's marks in the four overview views and its pair's plan
	// view are ringed, its row in the pair's table lit.
	if n, _ := strconv.Atoi(after["t-rings"]); n < 5 || after["t-lit"] == "0" {
		t.Errorf("following a joint link: %s rings, %s rows lit", after["t-rings"], after["t-lit"])
	}

	shot := filepath.Join(dir, "report.png")
	runChromium(t, bin, "--window-size=1200,2600", "--force-device-scale-factor=0.75", "--screenshot="+shot, page)
	b, err := os.ReadFile(shot)
	if err != nil || !bytes.HasPrefix(b, []byte("\x89PNG")) {
		t.Fatalf("no screenshot: %v", err)
	}
	t.Logf("screenshot: %s (%d bytes); load took %s ms; probe %v", shot, len(b), attrs["load-ms"], after)
	if *update {
		small, err := paletted(b)
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join("..", "..", "docs", "report-html.png"), small, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// checkRendered opens a page in the browser and wants its script to run
// to its end with no console message, the marks per state of the
// axonometric view to be report.json's connectors by state, and the
// rows of the findings table (in the dumped DOM too) to be its
// findings. It returns the attributes the script wrote on the body.
func checkRendered(t *testing.T, bin, path string, rep *document.ReportDoc) (map[string]string, string) {
	t.Helper()
	dom, log := runChromium(t, bin, "--dump-dom", "file://"+path)
	if msgs := console.FindAllString(log, -1); len(msgs) > 0 {
		t.Errorf("console messages:\n%s", strings.Join(msgs, "\n"))
	}
	body := bodyTag.FindString(dom)
	attrs := map[string]string{}
	for _, m := range bodyAttr.FindAllStringSubmatch(body, -1) {
		attrs[m[1]] = m[2]
	}
	if attrs["ready"] != "1" || attrs["errors"] != "" {
		t.Fatalf("the script did not run to its end without errors: %s", body)
	}
	states := map[string]bool{}
	for state, want := range rep.Summary.ByState {
		states[state] = true
		got := 0
		if v, ok := attrs["marks-"+state]; ok {
			got, _ = strconv.Atoi(v)
		}
		if got != want {
			t.Errorf("%d %s marks in the rendered page, report.json says %d", got, state, want)
		}
	}
	for k := range attrs {
		if s, ok := strings.CutPrefix(k, "marks-"); ok && !states[s] {
			t.Errorf("%s %s marks in the rendered page, report.json has none", attrs[k], s)
		}
	}
	if got := attrs["rows"]; got != strconv.Itoa(len(rep.Findings)) {
		t.Errorf("%s finding rows in the rendered page, report.json has %d findings", got, len(rep.Findings))
	}
	if n := strings.Count(dom, `<tr id="f-`); n != len(rep.Findings) {
		t.Errorf("%d finding rows in the dumped DOM, want %d", n, len(rep.Findings))
	}
	// Every finding's row in report.json's order, with its code.
	rows := findingRow.FindAllStringSubmatch(dom, -1)
	for i, f := range rep.Findings {
		if i >= len(rows) {
			break
		}
		if rows[i][1] != strconv.Itoa(i+1) || rows[i][2] != f.Code {
			t.Errorf("row %d: f-%s %s, report.json's finding %d is %s", i, rows[i][1], rows[i][2], i+1, f.Code)
			break
		}
	}
	return attrs, dom
}

var findingRow = regexp.MustCompile(`<tr id="f-(\d+)"[^>]*><td>[^<]*</td><td>([^<]*)</td>`)

// TestPagesInBrowser opens the report.html of check, flanges and
// offsets on the example in headless Chromium, with the checks of
// checkRendered, and keeps a screenshot of each in the test's temp dir.
func TestPagesInBrowser(t *testing.T) {
	skipWithoutExample(t)
	if testing.Short() {
		t.Skip("starts a browser")
	}
	bin := chromium(t)
	for _, r := range pageRuns {
		t.Run(r.cmd, func(t *testing.T) {
			dir := t.TempDir()
			runPage(t, dir, r.cmd, r.args...)
			path := filepath.Join(dir, "report.html")
			attrs, _ := checkRendered(t, bin, path, reportOf(t, dir))
			shot := filepath.Join(dir, "report.png")
			runChromium(t, bin, "--window-size=1200,2600", "--force-device-scale-factor=0.75", "--screenshot="+shot, "file://"+path)
			t.Logf("screenshot: %s; load took %s ms", shot, attrs["load-ms"])
		})
	}
}

// paletted re-encodes a screenshot with a palette of 256 colours (the
// web-safe colours, greys and the page's own), which a page of flat
// colours keeps without visible loss at a fraction of the size.
func paletted(b []byte) ([]byte, error) {
	img, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		return nil, err
	}
	pal := color.Palette{}
	pal = append(pal, palette.WebSafe...)
	for _, hex := range []uint32{0x009E73, 0xE69F00, 0xD55E00, 0x0072B2, 0x56B4E9, 0xCC79A7, 0xfbf1ea, 0xfff3c4} {
		pal = append(pal, color.RGBA{uint8(hex >> 16), uint8(hex >> 8), uint8(hex), 255})
	}
	for g := 0; len(pal) < 256; g += 8 {
		pal = append(pal, color.Gray{Y: uint8(g)})
	}
	p := image.NewPaletted(img.Bounds(), pal)
	draw.Draw(p, p.Bounds(), img, img.Bounds().Min, draw.Src)
	var out bytes.Buffer
	enc := png.Encoder{CompressionLevel: png.BestCompression}
	if err := enc.Encode(&out, p); err != nil {
		return nil, err
	}
	return out.Bytes(), nil
}

// TestCompactPageInBrowser renders the page of a small synthetic body
// (node-pair attachment: many welds flagged, many findings) with the
// compact forms forced on (html.Page's CompactMarks and
// CompactFindings: one path per state for the plain marks, the findings
// table as data the script turns into rows) and checks it in Chromium
// as checkRendered does: the same marks and rows as report.json.
func TestCompactPageInBrowser(t *testing.T) {
	if testing.Short() {
		t.Skip("starts a browser")
	}
	bin := chromium(t)
	md, err := synth.Generate(synth.Config{Elements: 40_000, Welds: 240, Bolts: 2, Seed: 3})
	if err != nil {
		t.Fatal(err)
	}
	in := &pipeline.Inputs{Job: &pipeline.Job{}, Model: &meshio.Model{Mesh: md.Mesh}, Joints: md.Joints}
	res, err := pipeline.BuildConnectors(context.Background(), in, joints.BuildOptions{Attach: joints.NodePair}, pipeline.Env{})
	if err != nil {
		t.Fatal(err)
	}
	info := document.RunInfo{Generator: "joinery test"}
	conn := document.NewConnectors(md.Mesh, res, info)
	rep := document.NewReport(res, info)
	if len(rep.Findings) < 40 {
		t.Fatalf("%d findings, want more to draw compactly", len(rep.Findings))
	}
	p := html.ForBuild(rep, conn, html.NewOutline(md.Mesh))
	p.CompactMarks, p.CompactFindings = 50, 20
	var b bytes.Buffer
	if err := html.Render(&b, p); err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(b.Bytes(), []byte(`id="findings-data"`)) || !bytes.Contains(b.Bytes(), []byte(`data-n="`)) {
		t.Fatal("the page is not in its compact forms")
	}
	path := filepath.Join(t.TempDir(), "report.html")
	if err := os.WriteFile(path, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	attrs, dom := checkRendered(t, bin, path, rep)
	// The rows drawn from the data say what report.json says.
	esc := strings.NewReplacer("&", "&amp;", "<", "&lt;", ">", "&gt;")
	for i, f := range rep.Findings {
		if !strings.Contains(dom, "<td>"+esc.Replace(f.Message)+"</td>") {
			t.Errorf("finding %d: no row with its message %q", i+1, f.Message)
			break
		}
	}
	t.Logf("%d findings, %d connectors; load took %s ms", len(rep.Findings), len(conn.Connectors), attrs["load-ms"])
}

package pipeline

import (
	"bytes"
	"context"
	"testing"
	"time"

	"github.com/joinery-cae/joinery/geom/meshio"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/synth"
	"github.com/joinery-cae/joinery/writers"
	"github.com/joinery-cae/joinery/writers/document"
	"github.com/joinery-cae/joinery/writers/html"
)

// BenchmarkPage measures what report.html adds to a build of the
// 2,000,000-element synthetic body with 6,000 spot welds and 20 bolts,
// side by side with the build's other steps (the read excepted): the
// connector build (index and welds), the other five outputs, the outline
// of the model and the page itself. It reports each as ms per run and
// the page's share (outline and page) of the rest as page/build.
func BenchmarkPage(b *testing.B) {
	if testing.Short() {
		b.Skip("2,000,000 elements")
	}
	md, err := synth.Generate(synth.Config{Elements: 2_000_000, Welds: 6000, Bolts: 20, Seed: 1})
	if err != nil {
		b.Fatal(err)
	}
	in := &Inputs{Job: &Job{}, Model: &meshio.Model{Mesh: md.Mesh}, Joints: md.Joints}
	var tBuild, tFiles, tOutline, tPage time.Duration
	var size int
	for b.Loop() {
		t0 := time.Now()
		res, err := BuildConnectors(context.Background(), in, joints.BuildOptions{}, Env{})
		if err != nil {
			b.Fatal(err)
		}
		info := document.RunInfo{Generator: "bench"}
		conn := document.NewConnectors(md.Mesh, res, info)
		rep := document.NewReport(res, info)
		t1 := time.Now()
		if _, err := writers.Render(buildFiles(conn, rep)); err != nil {
			b.Fatal(err)
		}
		t2 := time.Now()
		o := html.NewOutline(md.Mesh)
		t3 := time.Now()
		var buf bytes.Buffer
		if err := html.Render(&buf, html.ForBuild(rep, conn, o)); err != nil {
			b.Fatal(err)
		}
		t4 := time.Now()
		size = buf.Len()
		tBuild += t1.Sub(t0)
		tFiles += t2.Sub(t1)
		tOutline += t3.Sub(t2)
		tPage += t4.Sub(t3)
	}
	n := float64(b.N)
	ms := func(d time.Duration) float64 { return float64(d.Milliseconds()) / n }
	b.ReportMetric(ms(tBuild), "build-ms")
	b.ReportMetric(ms(tFiles), "files-ms")
	b.ReportMetric(ms(tOutline), "outline-ms")
	b.ReportMetric(ms(tPage), "page-ms")
	b.ReportMetric(float64(tOutline+tPage)/float64(tBuild+tFiles), "page/build")
	b.ReportMetric(float64(size)/1e6, "MB")
}

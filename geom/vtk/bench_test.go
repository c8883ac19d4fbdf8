package vtk

import (
	"bytes"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"syscall"
	"testing"
	"time"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/geomtest"
)

// gridMesh is an nx by ny grid of quads, 2.5 mm apart, in 20 parts of
// strips, with node ids from 1000001 and the part thicknesses written per
// element.
func gridMesh(nx, ny int) *geom.Mesh {
	thick := []float64{0.7, 0.8, 1, 1.2, 1.5, 2}
	parts := make([]geom.Part, 20)
	for k := range parts {
		parts[k] = geom.Part{ID: int64(100 + k), Thickness: thick[k%len(thick)]}
	}
	return geomtest.Grid(geomtest.GridSpec{
		NX: nx, NY: ny,
		Node: func(i, j int) r3.Vec {
			return r3.Vec{X: float64(i) * 2.5, Y: float64(j) * 2.5, Z: float64((i*j)%7) * 0.125}
		},
		Parts:       parts,
		Part:        func(i, _ int) int32 { return int32(i * 20 / nx) },
		FirstNodeID: 1_000_001,
	})
}

// benchFile writes the grid mesh to a temporary VTK file.
func benchFile(b *testing.B, nx, ny int, binary bool) string {
	b.Helper()
	path := filepath.Join(b.TempDir(), "grid.vtk")
	var buf bytes.Buffer
	if err := Write(&buf, gridMesh(nx, ny), binary); err != nil {
		b.Fatal(err)
	}
	if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
		b.Fatal(err)
	}
	return path
}

// benchRead times ReadFile on a grid of nx by ny quads and reports
// elements per second, the bytes per element of the resulting mesh
// (Mesh.Bytes) and the bytes allocated per element while reading.
func benchRead(b *testing.B, nx, ny int, binary bool) {
	path := benchFile(b, nx, ny, binary)
	fi, err := os.Stat(path)
	if err != nil {
		b.Fatal(err)
	}
	ne := float64(nx * ny)
	b.SetBytes(fi.Size())
	runtime.GC()
	var before, after runtime.MemStats
	runtime.ReadMemStats(&before)
	var m *geom.Mesh
	b.ResetTimer()
	cpu0 := cpuTime()
	start := time.Now()
	for b.Loop() {
		if m, err = ReadFile(path, geom.ReadOptions{}); err != nil {
			b.Fatal(err)
		}
	}
	elapsed := time.Since(start)
	cpu := cpuTime() - cpu0
	b.StopTimer()
	runtime.ReadMemStats(&after)
	if m.NumElems() != nx*ny {
		b.Fatalf("read %d elements, want %d", m.NumElems(), nx*ny)
	}
	b.ReportMetric(ne*float64(b.N)/elapsed.Seconds(), "elem/s")
	b.ReportMetric(cpu.Seconds()/float64(b.N), "cpu-s/op")
	b.ReportMetric(float64(m.Bytes())/ne, "meshB/elem")
	b.ReportMetric(float64(after.TotalAlloc-before.TotalAlloc)/float64(b.N)/ne, "allocB/elem")
}

// cpuTime returns the user and system CPU time of the process, which,
// unlike wall time, does not grow when other processes share the machine.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

func BenchmarkReadBinary200k(b *testing.B) { benchRead(b, 500, 400, true) }
func BenchmarkReadASCII200k(b *testing.B)  { benchRead(b, 500, 400, false) }

func BenchmarkReadBinary2M(b *testing.B) {
	if testing.Short() {
		b.Skip("2M elements: skipped with -short")
	}
	benchRead(b, 2000, 1000, true)
}

func BenchmarkReadASCII2M(b *testing.B) {
	if testing.Short() {
		b.Skip("2M elements: skipped with -short")
	}
	benchRead(b, 2000, 1000, false)
}

// benchFloats is the text of typical coordinates.
func benchFloats() []byte {
	var b []byte
	for i := range 1000 {
		b = strconv.AppendFloat(b, float64(i)*2.5+0.125, 'g', -1, 64)
		b = append(b, ' ')
		b = strconv.AppendFloat(b, float64(i)*-0.0371, 'g', 6, 64)
		b = append(b, '\n')
	}
	return b
}

// BenchmarkScanFloats is the real scanner of the reader; compare with
// BenchmarkScanFloatsStrconv, the plain strconv baseline.
func BenchmarkScanFloats(b *testing.B) {
	data := benchFloats()
	dst := make([]float64, 2000)
	b.SetBytes(int64(len(data)))
	for b.Loop() {
		if _, _, ok := scanFloats(data, 0, dst, false); !ok {
			b.Fatal("scan failed")
		}
	}
}

func BenchmarkScanFloatsStrconv(b *testing.B) {
	data := benchFloats()
	dst := make([]float64, 2000)
	b.SetBytes(int64(len(data)))
	for b.Loop() {
		for k, f := range bytes.Fields(data) {
			v, err := strconv.ParseFloat(string(f), 64)
			if err != nil {
				b.Fatal(err)
			}
			dst[k] = v
		}
	}
}
